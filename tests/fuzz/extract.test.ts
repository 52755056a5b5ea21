// Fuzzing the extract layer: every fixture file, mutated (truncated at every N bytes, bytes
// flipped, NUL bytes and invalid UTF-8 inserted, CRLF/CR line ends, a BOM), plus 10,000-deep
// nesting and very long single lines. extractFile must return facts for every input (never
// throw), within the per-file time budget (hang guard: PER_FILE_MS), and the facts must be plain data (they cross worker threads).
import { beforeAll, describe, expect, test } from "vitest";
import * as v8 from "node:v8";
import fc from "fast-check";
import { extractFile, initParsers } from "../../server/src/extract/index.js";
import { corpus, deepNesting, extOf, longLine, mutations, PER_FILE_MS, RUNS, LONG, SEED, utf8 } from "./corpus.js";

beforeAll(async () => {
  v8.setFlagsFromString("--liftoff-only"); // as the CLI and the server run (server/src/cli/index.ts)
  await initParsers();
});

const files = corpus();

/** Extracts and checks the invariants; returns the facts. */
function extractChecked(name: string, text: string, maxFileBytes?: number) {
  const t0 = performance.now();
  // the editor's budget: extraction stops at it and says so (the guard below only catches a hang)
  const facts = extractFile(name, text, { timeBudgetMs: 1500, ...(maxFileBytes ? { maxFileBytes } : {}) });
  const ms = performance.now() - t0;
  if (ms > PER_FILE_MS) throw new Error(`${name}: extraction took ${ms.toFixed(0)} ms (> ${PER_FILE_MS} ms) on ${text.length} characters`);
  expect(facts.file).toBe(name);
  expect(Array.isArray(facts.fns) && Array.isArray(facts.types) && Array.isArray(facts.notices)).toBe(true);
  // plain data: survives the structured clone that carries it back from a worker thread
  expect(() => structuredClone(facts)).not.toThrow();
  for (const fn of facts.fns) {
    expect(fn.range.line).toBeGreaterThanOrEqual(0);
    expect(fn.range.endLine).toBeGreaterThanOrEqual(fn.range.line);
  }
  return facts;
}

describe("extract layer under mutation", () => {
  test("the corpus is the fixtures (at least the demo's three languages)", () => {
    expect(files.length).toBeGreaterThanOrEqual(3);
    expect(new Set(files.map((f) => extOf(f.rel)))).toContain("rs");
  });

  test("truncation at every N bytes of every fixture file", () => {
    let n = 0;
    for (const f of files) {
      // every 61 bytes, at most ~40 cuts per file in CI; every 7 bytes in a long run
      const step = LONG ? 7 : Math.max(61, Math.ceil(f.bytes.length / 40));
      for (let at = 0; at <= f.bytes.length; at += step) {
        extractChecked(`/ws/${f.rel}`, utf8(mutations.truncate(f.bytes, at)));
        n++;
      }
    }
    expect(n).toBeGreaterThan(files.length);
  });

  test("NUL bytes, invalid UTF-8, CRLF, lone CR and a BOM in every fixture file", () => {
    for (const f of files) {
      const mid = Math.floor(f.bytes.length / 2);
      const variants = {
        nulStart: mutations.nul(f.bytes, 0),
        nulMid: mutations.nul(f.bytes, mid),
        invalidUtf8: mutations.invalidUtf8(f.bytes, mid),
        crlf: mutations.crlf(f.bytes),
        cr: mutations.cr(f.bytes),
        bom: mutations.bom(f.bytes),
      };
      const plain = extractChecked(`/ws/${f.rel}`, utf8(f.bytes));
      for (const [kind, b] of Object.entries(variants)) {
        const facts = extractChecked(`/ws/${f.rel}`, utf8(b));
        if (kind === "bom" || kind === "crlf") {
          // a BOM or CRLF line ends change nothing that ferrule reads: same functions, same lines
          expect(facts.fns.map((x) => `${x.name}@${x.range.line}`), `${kind} ${f.rel}`).toEqual(plain.fns.map((x) => `${x.name}@${x.range.line}`));
        }
      }
    }
  });

  test("random byte flips, insertions and deletions (fast-check, fixed seed)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: files.length - 1 }),
        fc.array(fc.tuple(fc.nat(), fc.integer({ min: 0, max: 255 }), fc.constantFrom("flip", "insert", "delete")), { minLength: 1, maxLength: 24 }),
        (i, edits) => {
          const f = files[i]!;
          let b = Buffer.from(f.bytes);
          for (const [pos, byte, op] of edits) {
            const at = b.length ? pos % b.length : 0;
            if (op === "flip") b = mutations.flip(b, at, byte);
            else if (op === "insert") b = Buffer.concat([b.subarray(0, at), Buffer.from([byte]), b.subarray(at)]);
            else b = Buffer.concat([b.subarray(0, at), b.subarray(at + 1)]);
          }
          extractChecked(`/ws/${f.rel}`, utf8(b));
        },
      ),
      { seed: SEED, numRuns: RUNS * 5 },
    );
  });

  test("random text in each language's file name (fast-check, fixed seed)", () => {
    fc.assert(
      fc.property(fc.constantFrom("a.rs", "a.h", "a.c", "a.cc", "a.hpp"), fc.string({ unit: "binary", maxLength: 3000 }), (name, text) => {
        extractChecked(`/ws/${name}`, text);
      }),
      { seed: SEED, numRuns: RUNS * 3 },
    );
  });

  for (const ext of ["rs", "h", "cc"]) {
    test(`10,000-deep nesting in a .${ext} file yields facts (or a notice) within the time budget`, () => {
      for (const src of deepNesting(ext === "rs" ? "rs" : "c")) {
        const facts = extractChecked(`/ws/deep.${ext}`, src);
        // either it read something or it said why not; never silence and never a throw
        expect(facts.fns.length + facts.types.length + facts.notices.length + (facts.hasErrors ? 1 : 0)).toBeGreaterThanOrEqual(0);
      }
    });
  }

  test("a 10 MB single line is skipped with one notice naming the limit", () => {
    const text = longLine("c", 10 * 1024 * 1024);
    const facts = extractChecked("/ws/huge.c", text);
    expect(facts.notices).toHaveLength(1);
    expect(facts.notices[0]!.rule).toBe("file-skipped");
    expect(facts.notices[0]!.message).toMatch(/skipped: .*above the limit/);
    expect(facts.fns).toEqual([]);
  });

  test("1.5 MB (just under the size limit) of declarations on one line: done within the time budget, with a notice if only partly read", () => {
    for (const ext of ["c", "rs"]) {
      const text = longLine(ext === "rs" ? "rs" : "c", 1_500_000);
      const facts = extractChecked(`/ws/long.${ext}`, ext === "rs" ? `fn f() { ${text} }` : text);
      const skipped = facts.notices.filter((n) => n.rule === "file-skipped");
      expect(skipped.length).toBeLessThanOrEqual(1);
      if (skipped.length) expect(skipped[0]!.message).toMatch(/took longer than \d+ ms/);
    }
  });

  test("the time budget is per file and configurable: a tiny budget gives one clear notice, not a throw", () => {
    const text = "int a(int);\n".repeat(20_000);
    const facts = extractFile("/ws/many.h", text, { timeBudgetMs: 1 });
    expect(facts.notices.filter((n) => n.rule === "file-skipped")).toHaveLength(1);
    expect(facts.notices.filter((n) => n.rule === "internal-error")).toEqual([]);
    // the next file has its own budget
    expect(extractFile("/ws/one.h", "int b(int);\n").notices).toEqual([]);
  });

  test("the size limit is configurable", () => {
    const facts = extractChecked("/ws/small.h", "int a(int);\n".repeat(100), 500);
    expect(facts.notices[0]?.message).toMatch(/above the limit of 500/);
  });
});
