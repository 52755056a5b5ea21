// The CLI's chunked check (analysis/chunks.ts, packed.ts, Workspace.checkChunked) against the
// whole-workspace check it stands in for: one model of every file (Workspace.loadAll + check()).
// The oracle is that model; the chunked check must report exactly the same findings, with
// chunks as small as the relation allows (chunkFiles 1), on every fixture workspace, on all the
// fixtures read as one workspace, on a generated bench workspace, and on random sets of fixture
// files.
import { afterAll, describe, expect, test } from "vitest";
import fc from "fast-check";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { fileURLToPath } from "node:url";
import { spawnSync } from "node:child_process";
import { Workspace, listSources } from "../server/src/analysis/workspace.js";
import { planChunks } from "../server/src/analysis/chunks.js";
import { packFacts, unpackFacts } from "../server/src/analysis/packed.js";
import { IncludeIndex } from "../server/src/model/includes.js";
import { collectGarbage, HeapBudget } from "../server/src/analysis/memory.js";
import { extractFile, initParsers } from "../server/src/extract/index.js";
import type { Finding } from "../server/src/rules/api.js";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const FIX = path.join(ROOT, "test-fixtures");
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-chunks-"));
afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

function norm(fs_: Finding[]): string[] {
  return fs_.map((f) => [f.rule, f.severity, f.range.file, f.range.line, f.range.col, f.range.endLine, f.range.endCol, f.message,
    f.related.map((r) => `${r.range.file}:${r.range.line}:${r.range.col} ${r.message}`).join(" | ")].join("\t"));
}

async function whole(paths: string[]): Promise<string[]> {
  const ws = await Workspace.create();
  ws.loadAll(paths);
  return norm(ws.check());
}

async function chunked(paths: string[], chunkFiles: number): Promise<{ findings: string[]; chunks: number }> {
  const r = await new Workspace().checkChunked(paths, { chunkFiles });
  return { findings: norm(r.findings), chunks: r.chunks };
}

/** Every fixture workspace: the leaf folders holding sources (bad/, good/, the demo). */
function fixtureWorkspaces(): string[] {
  const out = [path.join(FIX, "sonar-demo")];
  for (const fam of ["buffers", "layout", "ownership", "rules"]) {
    for (const rule of fs.readdirSync(path.join(FIX, fam))) {
      const d = path.join(FIX, fam, rule);
      if (!fs.statSync(d).isDirectory()) continue;
      const subs = fs.readdirSync(d).filter((s) => fs.statSync(path.join(d, s)).isDirectory());
      if (subs.length) out.push(...subs.map((s) => path.join(d, s)));
      else out.push(d);
    }
  }
  return out;
}

/** Writes a small workspace under the test's temp folder: relative path → lines. */
function writeWorkspace(name: string, files: Record<string, string[]>): string {
  const ws = path.join(tmp, name);
  for (const [rel, lines] of Object.entries(files)) {
    fs.mkdirSync(path.dirname(path.join(ws, rel)), { recursive: true });
    fs.writeFileSync(path.join(ws, rel), lines.join("\n") + "\n");
  }
  return ws;
}

describe("chunked check = whole check", () => {
  test("every fixture workspace, chunks of 1 and of the default size", async () => {
    const dirs = fixtureWorkspaces();
    expect(dirs.length).toBeGreaterThan(40);
    let findings = 0;
    for (const d of dirs) {
      const w = await whole([d]);
      findings += w.length;
      expect((await chunked([d], 1)).findings, path.relative(ROOT, d)).toEqual(w);
      expect((await chunked([d], 100)).findings, path.relative(ROOT, d)).toEqual(w);
    }
    expect(findings).toBeGreaterThan(100); // the fixtures are mostly bad ones: a real comparison
  }, 240_000);

  test("all fixtures read as one workspace (names and headers of many scenarios meet)", async () => {
    const w = await whole([FIX]);
    const c = await chunked([FIX], 1);
    // many chunks, for a real comparison; fixtures share common names (Status, get(), main, the
    // default port calls), which joins some of them (19 chunks with the two clean probes)
    expect(c.chunks).toBeGreaterThan(15);
    expect(c.findings).toEqual(w);
  }, 240_000);

  test("a generated bench workspace with planted findings, several chunk sizes", async () => {
    const { generate } = (await import(path.join(ROOT, "scripts", "gen-bench.mjs"))) as { generate: (o: { lines: number; out: string; seed: number }) => unknown };
    const ws = path.join(tmp, "gen");
    generate({ lines: 6000, out: ws, seed: 11 });
    const w = await whole([ws]);
    expect(w.length).toBeGreaterThan(5);
    for (const size of [1, 5, 1000]) {
      const c = await chunked([ws], size);
      if (size === 1) expect(c.chunks).toBeGreaterThan(10);
      expect(c.findings, `chunkFiles ${size}`).toEqual(w);
    }
  }, 240_000);

  test("a Rust helper in another file of the crate: found through it, and not when its name is ambiguous", async () => {
    // Rules follow a call into a helper of another file when the name is unique (rules/ownership.ts
    // CrateIndex); the files share no linked name, only the `r:` helper key (analysis/keys.ts).
    const ws = writeWorkspace("helper", {
      "src/lib.rs": [
        "#[unsafe(no_mangle)]",
        "pub extern \"C\" fn flash_window(idx: usize) -> u32 {",
        "    window_len(idx)",
        "}",
      ],
      "src/tables.rs": [
        "const WINDOWS: [u32; 4] = [32, 64, 128, 256];",
        "pub fn window_len(idx: usize) -> u32 {",
        "    WINDOWS[idx]",
        "}",
      ],
      "flash.h": ["#include <stdint.h>", "#include <stddef.h>", "uint32_t flash_window(size_t idx);"],
    });
    const w = await whole([ws]);
    expect(w.some((l) => l.startsWith("panic-across-c-abi\t") && l.includes("/src/lib.rs\t2\t"))).toBe(true);
    expect((await chunked([ws], 1)).findings).toEqual(w);
    // a second `window_len` elsewhere: the call no longer resolves, in either check
    fs.writeFileSync(path.join(ws, "src", "other.rs"), "pub fn window_len(i: usize) -> u32 {\n    i as u32\n}\n");
    const w2 = await whole([ws]);
    expect(w2.some((l) => l.startsWith("panic-across-c-abi\t"))).toBe(false);
    expect((await chunked([ws], 1)).findings).toEqual(w2);
  }, 60_000);

  test("a constructor and a release that pair only by a scalar pointee (a boxed byte frame, its release in another file)", async () => {
    // rules/ownership.ts pairs a constructor with a release function by the handle's pointee type,
    // scalars too (`*mut u8` made by Box::into_raw of a boxed slice, taken back by Box::from_raw),
    // when their names share no stem; the files share no linked name.
    const ws = writeWorkspace("scalar-handle", {
      "src/frame.rs": [
        "#[no_mangle]",
        "pub unsafe extern \"C\" fn tide_frame_encode(len: *mut usize) -> *mut u8 {",
        "    let frame: Box<[u8]> = vec![0u8; 16].into_boxed_slice();",
        "    *len = frame.len();",
        "    Box::into_raw(frame) as *mut u8",
        "}",
      ],
      "src/bytes.rs": [
        "#[no_mangle]",
        "pub unsafe extern \"C\" fn tide_bytes_dispose(p: *mut u8, len: usize) {",
        "    if !p.is_null() {",
        "        drop(Box::from_raw(std::ptr::slice_from_raw_parts_mut(p, len)));",
        "    }",
        "}",
      ],
      // (declared in two headers: one header declaring both would relate the files by itself)
      "frame.h": ["#include <stddef.h>", "#include <stdint.h>", "uint8_t *tide_frame_encode(size_t *len);"],
      "bytes.h": ["#include <stddef.h>", "#include <stdint.h>", "void tide_bytes_dispose(uint8_t *p, size_t len);"],
    });
    const w = await whole([ws]);
    expect(w.some((l) => l.startsWith("handle-no-release\t"))).toBe(false);
    expect((await chunked([ws], 1)).findings).toEqual(w);
  }, 60_000);

  test("the shipped CLI with two worker threads, facts compressed or sent as they are", async () => {
    // all fixtures as one workspace, in chunks of one group: exactly the whole check's findings
    const ws = await Workspace.create();
    ws.loadAll([FIX]);
    const want = ws.check().map((f) => `${f.rule}|${path.relative(process.cwd(), f.range.file)}|${f.range.line + 1}:${f.range.col + 1}|${f.message}`).sort();
    expect(want.length).toBeGreaterThan(100);
    for (const pack of ["1", "0"]) {
      const r = spawnSync(process.execPath, [path.join(ROOT, "bin/ferrule.js"), "check", "--format", "json", FIX], {
        encoding: "utf8", timeout: 120_000, env: { ...process.env, FERRULE_WORKERS: "2", FERRULE_CHUNK_FILES: "1", FERRULE_TIMINGS: "1", FERRULE_PACK: pack },
      });
      expect(r.status).toBe(1);
      expect(Number(/in (\d+) chunk\(s\)/.exec(r.stderr)?.[1])).toBeGreaterThan(15);
      const got = (JSON.parse(r.stdout).findings as { rule: string; file: string; line: number; column: number; message: string }[]).map((f) => `${f.rule}|${f.file}|${f.line}:${f.column}|${f.message}`);
      expect(got.sort(), `FERRULE_PACK=${pack}`).toEqual(want);
    }
  }, 240_000);

  test("random sets of fixture files (fast-check)", async () => {
    const all = listSources([FIX]).files;
    const runs = Number(process.env.FERRULE_FUZZ_RUNS) || 12;
    await fc.assert(
      fc.asyncProperty(fc.subarray(all, { minLength: 1, maxLength: 40 }), fc.integer({ min: 1, max: 8 }), async (files, size) => {
        const w = await whole(files);
        expect((await chunked(files, size)).findings).toEqual(w);
      }),
      { numRuns: runs, seed: Number(process.env.FERRULE_FUZZ_SEED) || 4242 },
    );
  }, 240_000);
});

describe("planning", () => {
  const input = (file: string, decl: string[], use: string[], includes: string[] = []) => ({ file, decl, use, includes });

  test("related files share a chunk however small the chunks; unrelated ones do not", () => {
    const files = [
      input("/w/a.rs", ["s:tap_new", "h:tap"], ["t:tapstate"]),
      input("/w/b.h", ["s:tap_new"], []),
      input("/w/c.cc", [], ["s:tap_new"], ["b.h"]),
      input("/w/d.rs", ["s:other"], []),
      input("/w/e.rs", ["t:tapstate"], []), // declares a type a.rs uses
      input("/w/f.cc", [], ["s:nowhere"]), // calls what nobody declares: on its own
      input("/w/g.rs", [], ["t:shared"]),
      input("/w/h.rs", [], ["t:shared"]), // two users of one type relate
      input("/w/i.rs", ["h:tap"], []), // the same constructor/releaser stem
    ];
    const idx = IncludeIndex.of(files.map((f) => f.file), []);
    const chunks = planChunks(files, idx, 1);
    const names = chunks.map((c) => c.map((i) => path.basename(files[i]!.file)));
    expect(names).toEqual([["a.rs", "b.h", "c.cc", "e.rs", "i.rs"], ["d.rs"], ["f.cc"], ["g.rs", "h.rs"]]);
    // larger chunks pack whole groups in workspace order
    expect(planChunks(files, idx, 7).map((c) => c.length)).toEqual([7, 2]);
  });

  test("an include joins the header that resolves, through the include paths too", () => {
    const files = [input("/w/src/x.c", [], [], ["radio.h"]), input("/w/inc/radio.h", [], []), input("/w/src/y.c", [], [], ["missing.h"])];
    expect(planChunks(files, IncludeIndex.of(files.map((f) => f.file), ["/w/inc"]), 1).length).toBe(2);
    expect(planChunks(files, IncludeIndex.of(files.map((f) => f.file), []), 1).length).toBe(2); // unique base name
    const twice = [...files, input("/w/other/radio.h", [], [])];
    expect(planChunks(twice, IncludeIndex.of(twice.map((f) => f.file), []), 1).length).toBe(4); // ambiguous: no edge
  });
});

describe("packed facts and the heap budget", () => {
  test("a file's facts survive packing unchanged, and its keys are readable", async () => {
    await initParsers();
    const file = path.join(FIX, "sonar-demo", "kernels", "src", "lib.rs");
    const facts = extractFile(file, fs.readFileSync(file, "utf8"));
    const p = packFacts(facts, "h");
    expect(unpackFacts(p)).toEqual(facts);
    expect(p.facts).toBeUndefined();
    expect(p.decl.length).toBeGreaterThan(3);
    expect(p.packed!.byteLength).toBe(p.packed!.buffer.byteLength); // owns its buffer: transferable
    expect(unpackFacts(packFacts(facts, "h", false))).toBe(facts); // read in this thread: kept as is
  });

  test("the collector is reachable and a budget collects garbage", () => {
    expect(collectGarbage()).toBe(true);
    const b = new HeapBudget(1);
    let junk: unknown[] = [];
    for (let i = 0; i < 200_000; i++) junk.push({ i, s: String(i) });
    junk = [];
    const before = process.memoryUsage().heapUsed;
    b.step();
    expect(junk.length).toBe(0);
    expect(process.memoryUsage().heapUsed).toBeLessThan(before);
  });
});
