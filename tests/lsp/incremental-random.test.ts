// Random edit sequences on the demo's Rust files through the language server's engine (item
// reuse, item-level and file-level scopes) against a fresh analysis of the same texts: after
// every edit the findings must be the same (fast-check, fixed seed; FERRULE_FUZZ_RUNS for more).

import { describe, expect, test } from "vitest";
import fc from "fast-check";
import * as fs from "node:fs";
import * as path from "node:path";
import { fileURLToPath } from "node:url";
import { Workspace } from "../../server/src/analysis/workspace.js";
import { Engine } from "../../server/src/lsp/engine.js";
import type { Finding } from "../../server/src/rules/api.js";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const DEMO = path.join(ROOT, "test-fixtures/sonar-demo");
// two Rust files (item-level scope) and the header they are declared in (file-level scope,
// narrowed for the open Rust documents that link to it)
const FILES = ["kernels/src/lib.rs", "kernels/src/detector.rs", "include/sonar_kernels.h"].map((f) => path.join(DEMO, f));
const C_TOKENS = ["float", "double", "size_t", "long", "int", "uint32_t", "int64_t"];
const key = (f: Finding) => `${f.rule}|${path.relative(DEMO, f.range.file)}|${f.range.line}:${f.range.col}-${f.range.endLine}:${f.range.endCol}|${f.message}|${f.related.map((r) => `${path.relative(DEMO, r.range.file)}:${r.range.line}`).join(",")}`;

const TOKENS = ["usize", "u32", "i64", "i32", "f32", "f64", "*mut", "*const", "c_int", "u8", "u16"];

/** One edit: what to do, where (a fraction of the text), and a token for replacements. */
const editArb = fc.record({
  op: fc.constantFrom("newline", "delete-line", "retype", "retype", "retype", "duplicate-line", "blank-fn"),
  at: fc.integer({ min: 0, max: 9999 }).map((n) => n / 10000),
  token: fc.constantFrom(...TOKENS),
  file: fc.constantFrom(0, 1, 2),
});

/** Applies an edit to a text; returns the replaced range [start, end) and the new text there. */
function plan(text: string, e: { op: string; at: number; token: string }, c = false): { start: number; end: number; insert: string } {
  if (c && (e.op === "retype" || e.op === "blank-fn")) {
    // a C type in a declaration (after `(`, `, ` or `const `) becomes another
    const found: [number, string][] = [];
    const typePos = (i: number) => text[i - 1] === "(" || [", ", "t "].includes(text.slice(i - 2, i));
    for (const t of C_TOKENS) for (let i = text.indexOf(t); i >= 0; i = text.indexOf(t, i + 1)) if (typePos(i)) found.push([i, t]);
    found.sort((a, b) => a[0] - b[0]);
    if (!found.length) return { start: 0, end: 0, insert: "" };
    const [s, t] = found[Math.min(found.length - 1, Math.floor(e.at * found.length))]!;
    return { start: s, end: s + t.length, insert: C_TOKENS[(e.token.length + Math.floor(e.at * 97)) % C_TOKENS.length]! };
  }
  const lines = text.split("\n");
  const li = Math.min(lines.length - 1, Math.floor(e.at * lines.length));
  const lineStart = lines.slice(0, li).reduce((n, l) => n + l.length + 1, 0);
  const line = lines[li]!;
  switch (e.op) {
    case "newline":
      return { start: lineStart, end: lineStart, insert: "\n" };
    case "delete-line":
      return { start: lineStart, end: Math.min(text.length, lineStart + line.length + 1), insert: "" };
    case "duplicate-line":
      return { start: lineStart, end: lineStart, insert: line + "\n" };
    case "blank-fn":
      return { start: lineStart, end: lineStart, insert: `pub extern "C" fn sonar_probe_${li}(n: ${e.token.startsWith("*") ? "usize" : e.token}) {}\n` };
    default: {
      // one of the type-like tokens of the file (picked by `at`) becomes another
      const found: [number, string][] = [];
      // (in a type position: after `: `, `-> ` or a pointer's `*mut `/`*const `, not in a `use`)
      const typePos = (i: number) => [": ", "> ", "t "].includes(text.slice(i - 2, i));
      for (const t of TOKENS) for (let i = text.indexOf(t); i >= 0; i = text.indexOf(t, i + 1)) if (typePos(i)) found.push([i, t]);
      found.sort((a, b) => a[0] - b[0]);
      if (!found.length) return { start: 0, end: 0, insert: "" };
      const [s, t] = found[Math.min(found.length - 1, Math.floor(e.at * found.length))]!;
      return { start: s, end: s + t.length, insert: e.token };
    }
  }
}

function posAt(text: string, off: number): { line: number; character: number } {
  const before = text.slice(0, off).split("\n");
  return { line: before.length - 1, character: before[before.length - 1]!.length };
}

describe("random edits: incremental analysis equals a fresh one", () => {
  test("findings after every edit of random sequences", async () => {
    const runs = Number(process.env.FERRULE_FUZZ_RUNS ?? 12);
    await fc.assert(
      fc.asyncProperty(fc.array(editArb, { minLength: 1, maxLength: 5 }), async (edits) => {
        const ws = await Workspace.create();
        const engine = new Engine(ws);
        engine.scan([DEMO]);
        engine.analyze(true);
        const texts = FILES.map((f) => fs.readFileSync(f, "utf8"));
        FILES.forEach((f, i) => engine.open(f, texts[i]!, 1));
        engine.analyze();
        engine.seed();
        let version = 1;
        for (const e of edits) {
          const t = texts[e.file]!;
          const { start, end, insert } = plan(t, e, FILES[e.file]!.endsWith(".h"));
          engine.change(FILES[e.file]!, [{ range: { start: posAt(t, start), end: posAt(t, end) }, text: insert }], ++version);
          texts[e.file] = t.slice(0, start) + insert + t.slice(end);
          const res = engine.analyze();
          const fresh = await Workspace.create();
          fresh.loadAll([DEMO]);
          FILES.forEach((f, i) => fresh.update(f, texts[i]!));
          expect(res.findings.map(key).sort(), JSON.stringify(edits)).toEqual(fresh.check().map(key).sort());
        }
        engine.dispose();
      }),
      { seed: Number(process.env.FERRULE_FUZZ_SEED ?? 20261202), numRuns: runs },
    );
  }, 120_000);
});

/** Start offset of every line, as the LSP counts lines (`\r\n`, `\r` and `\n` end a line). */
function lineStartsOf(text: string): number[] {
  const out = [0];
  for (let i = 0; i < text.length; i++) {
    if (text[i] === "\r" && text[i + 1] === "\n") i++;
    if (text[i] === "\n" || text[i] === "\r") out.push(i + 1);
  }
  return out;
}

describe("line starts kept in step with edits", () => {
  test("random replacements (LF and CRLF texts) leave the same line starts as a fresh count", () => {
    const piece = fc.constantFrom("a", "fn x() {}", "\n", "\r\n", "\r", "\n\n", "é", "🛰", "");
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 40 }), fc.array(fc.tuple(fc.nat(), fc.nat(), fc.array(piece, { maxLength: 4 })), { minLength: 1, maxLength: 8 }), (start, edits) => {
        const engine = new Engine(new Workspace());
        const file = path.join(DEMO, "scratch.rs");
        let text = start.join("");
        engine.open(file, text, 1);
        let v = 1;
        for (const [a, b, ins] of edits) {
          const s = Math.min(a, b) % (text.length + 1);
          const e = Math.max(s, Math.max(a, b) % (text.length + 1));
          const insert = ins.join("");
          engine.change(file, [{ range: { start: posAt2(text, s), end: posAt2(text, e) }, text: insert }], ++v);
          text = text.slice(0, s) + insert + text.slice(e);
          const d = engine.docs.get(file)!;
          expect(d.text).toBe(text);
          expect(d.lineStarts).toEqual(lineStartsOf(text));
        }
      }),
      { seed: 4242, numRuns: 300 },
    );
  });
});

/** LSP position of an offset under the same line rules. */
function posAt2(text: string, off: number): { line: number; character: number } {
  const starts = lineStartsOf(text);
  let line = 0;
  while (line + 1 < starts.length && starts[line + 1]! <= off) line++;
  return { line, character: off - starts[line]! };
}
