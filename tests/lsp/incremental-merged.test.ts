// The language server's item-level scope on a larger, realistic file: several generated kernel
// modules (exports, #[repr(C)] types, helpers, planted seam slips) merged into one open Rust file
// of a generated workspace, so that names, headers and blocks of several kernels meet in one
// document. Random edits (signature types, inserted and deleted lines, duplicated lines); after
// every edit the findings must equal a fresh analysis of the same texts.

import { afterAll, describe, expect, test } from "vitest";
import fc from "fast-check";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { fileURLToPath } from "node:url";
import { Workspace } from "../../server/src/analysis/workspace.js";
import { Engine } from "../../server/src/lsp/engine.js";
import type { Finding } from "../../server/src/rules/api.js";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-merged-"));
afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

const key = (ws: string) => (f: Finding) => `${f.rule}|${path.relative(ws, f.range.file)}|${f.range.line}:${f.range.col}-${f.range.endLine}:${f.range.endCol}|${f.message}|${f.related.map((r) => `${path.relative(ws, r.range.file)}:${r.range.line}:${r.range.col}`).join(",")}`;

const TOKENS = ["usize", "u32", "i64", "i32", "f32", "f64", "*mut", "*const", "c_int", "u8", "u64"];

function posAt(text: string, off: number): { line: number; character: number } {
  const before = text.slice(0, off).split("\n");
  return { line: before.length - 1, character: before[before.length - 1]!.length };
}

describe("item-level scope on a merged multi-kernel file", () => {
  test("random edits: findings equal a fresh analysis after every edit", async () => {
    const { generate } = (await import(path.join(ROOT, "scripts", "gen-bench.mjs"))) as { generate: (o: { lines: number; out: string; seed: number }) => unknown };
    const ws = path.join(tmp, "ws");
    generate({ lines: 4000, out: ws, seed: 23 });
    // merge the modules of the crate with the most modules into one file
    const crates = fs.readdirSync(path.join(ws, "crates")).map((c) => path.join(ws, "crates", c, "src"));
    const mods = crates.map((src) => fs.readdirSync(src).filter((f) => f.endsWith(".rs") && f !== "lib.rs").map((f) => path.join(src, f))).sort((a, b) => b.length - a.length)[0]!;
    expect(mods.length).toBeGreaterThanOrEqual(3);
    const big = path.join(path.dirname(mods[0]!), "merged_kernels.rs");
    fs.writeFileSync(big, mods.slice(0, 4).map((m) => fs.readFileSync(m, "utf8")).join("\n"));
    for (const m of mods.slice(0, 4)) fs.rmSync(m);

    const engine = new Engine(await Workspace.create());
    engine.scan([ws]);
    engine.analyze(true);
    let text = fs.readFileSync(big, "utf8");
    engine.open(big, text, 1);
    engine.analyze();
    engine.seed();
    const edit = fc.record({ op: fc.constantFrom("retype", "retype", "retype", "newline", "delete-line", "duplicate-line"), at: fc.integer({ min: 0, max: 9999 }).map((n) => n / 10000), token: fc.constantFrom(...TOKENS) });
    const script = fc.sample(fc.array(edit, { minLength: 14, maxLength: 14 }), { seed: Number(process.env.FERRULE_FUZZ_SEED ?? 77), numRuns: 1 })[0]!;
    let version = 1;
    const scopes: string[] = [];
    for (const e of script) {
      let start: number, end: number, insert: string;
      const lines = text.split("\n");
      const li = Math.min(lines.length - 1, Math.floor(e.at * lines.length));
      const lineStart = lines.slice(0, li).reduce((n, l) => n + l.length + 1, 0);
      if (e.op === "retype") {
        const found: [number, string][] = [];
        const typePos = (i: number) => [": ", "> ", "t "].includes(text.slice(i - 2, i));
        for (const t of TOKENS) for (let i = text.indexOf(t); i >= 0; i = text.indexOf(t, i + 1)) if (typePos(i)) found.push([i, t]);
        found.sort((a, b) => a[0] - b[0]);
        const [s, t] = found[Math.floor(e.at * found.length)]!;
        [start, end, insert] = [s, s + t.length, e.token];
      } else if (e.op === "newline") [start, end, insert] = [lineStart, lineStart, "\n"];
      else if (e.op === "delete-line") [start, end, insert] = [lineStart, lineStart + lines[li]!.length + 1, ""];
      else [start, end, insert] = [lineStart, lineStart, lines[li]! + "\n"];
      engine.change(big, [{ range: { start: posAt(text, start), end: posAt(text, end) }, text: insert }], ++version);
      text = text.slice(0, start) + insert + text.slice(end);
      const res = engine.analyze();
      scopes.push(res.scope);
      const fresh = await Workspace.create();
      fresh.loadAll([ws]);
      fresh.update(big, text);
      expect(res.findings.map(key(ws)).sort(), `${e.op} at line ${li}`).toEqual(fresh.check().map(key(ws)).sort());
    }
    // most of these edits take the item-level scope (a helper's edit or broken syntax does not)
    expect(scopes.filter((s) => s === "items").length).toBeGreaterThanOrEqual(3);
    engine.dispose();
  }, 180_000);
});
