// Fuzzing the model and every rule family: fixture workspaces with one file mutated (fast-check,
// fixed seed) are linked and checked; nothing throws, every finding is well formed, and no rule
// family fails on the input (a family that throws would show up as an internal-error finding).
// Then the runner contract: a family that throws — an Error, a non-Error, a stack overflow —
// becomes exactly one internal finding naming it, and the other families' results stand.
import { beforeAll, describe, expect, test } from "vitest";
import fc from "fast-check";
import { Workspace } from "../../server/src/analysis/workspace.js";
import { DEFAULTS } from "../../server/src/analysis/config.js";
import { FAMILIES, runRules } from "../../server/src/rules/index.js";
import type { Finding, RuleFamily } from "../../server/src/rules/api.js";
import { groups, mutations, RUNS, SEED, utf8, deepNesting } from "./corpus.js";

const G = groups();

async function checkGroup(files: Record<string, string>): Promise<{ ws: Workspace; findings: Finding[] }> {
  const ws = await Workspace.create({ ...DEFAULTS });
  for (const [name, text] of Object.entries(files)) ws.update(`/ws/${name}`, text, { timeBudgetMs: 1500 });
  return { ws, findings: ws.check() };
}

function wellFormed(findings: Finding[], files: Set<string>) {
  for (const f of findings) {
    expect(typeof f.rule).toBe("string");
    expect(["error", "warning", "info", "hint"]).toContain(f.severity);
    expect(f.message.length).toBeGreaterThan(0);
    expect(files.has(f.range.file), `${f.rule} at ${f.range.file}`).toBe(true);
    expect(f.range.line).toBeGreaterThanOrEqual(0);
    for (const r of f.related) expect(files.has(r.range.file)).toBe(true);
  }
}

beforeAll(async () => {
  await Workspace.create();
});

describe("every rule family over mutated workspaces", () => {
  test("fast-check: one file of a fixture workspace mutated (truncate, flip, NUL, invalid UTF-8, CRLF, BOM)", async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.integer({ min: 0, max: G.length - 1 }),
        fc.nat(),
        fc.constantFrom("truncate", "flip", "nul", "invalidUtf8", "crlf", "bom"),
        fc.nat(),
        fc.integer({ min: 1, max: 255 }),
        async (gi, fi, kind, pos, mask) => {
          const g = G[gi]!;
          const victim = g.files[fi % g.files.length]!;
          const at = victim.bytes.length ? pos % victim.bytes.length : 0;
          const m =
            kind === "truncate" ? mutations.truncate(victim.bytes, at)
            : kind === "flip" ? mutations.flip(victim.bytes, at, mask)
            : kind === "nul" ? mutations.nul(victim.bytes, at)
            : kind === "invalidUtf8" ? mutations.invalidUtf8(victim.bytes, at)
            : kind === "crlf" ? mutations.crlf(victim.bytes)
            : mutations.bom(victim.bytes);
          const files: Record<string, string> = {};
          for (const f of g.files) files[f.rel] = utf8(f === victim ? m : f.bytes);
          const { findings } = await checkGroup(files);
          wellFormed(findings, new Set(Object.keys(files).map((k) => `/ws/${k}`)));
          const internal = findings.filter((f) => f.rule === "internal-error");
          expect(internal.map((f) => f.message), `${g.dir}: ${victim.rel} ${kind}@${at}`).toEqual([]);
        },
      ),
      { seed: SEED, numRuns: RUNS * 2 },
    );
  });

  test("10,000-deep nesting on both sides of a seam: the model links and every family runs", async () => {
    const files: Record<string, string> = {};
    deepNesting("rs").forEach((s, i) => (files[`deep${i}.rs`] = s));
    deepNesting("c").forEach((s, i) => (files[`deep${i}.h`] = s));
    files["use.cc"] = `#include "deep0.h"\nint main() { return deep(0); }\n`;
    const t0 = performance.now();
    const { findings } = await checkGroup(files);
    expect(performance.now() - t0).toBeLessThan(2000 * Object.keys(files).length);
    wellFormed(findings, new Set(Object.keys(files).map((k) => `/ws/${k}`)));
    // a rule never fails on it; a file too deep to read says so in one notice
    expect(findings.filter((f) => f.rule === "internal-error").map((f) => f.message)).toEqual([]);
    for (const f of findings.filter((x) => x.rule === "file-skipped")) expect(f.message).toMatch(/skipped: .*: (nested too deeply to read|reading it took longer)/);
    const perFile = new Map<string, number>();
    for (const f of findings.filter((x) => x.rule === "file-skipped")) perFile.set(f.range.file, (perFile.get(f.range.file) ?? 0) + 1);
    for (const n of perFile.values()) expect(n).toBe(1);
  });
});

describe("the runner turns a throwing family into one internal finding", () => {
  const demo = G.find((g) => g.dir === "sonar-demo")!;
  const demoFiles = Object.fromEntries(demo.files.map((f) => [f.rel, utf8(f.bytes)]));
  const boom = (name: string, thrower: () => never): RuleFamily => ({ name, rules: [], check: thrower });
  const recurse = (n: number): number => recurse(n + 1) + 1;

  const throwers: [string, RuleFamily][] = [
    ["an Error", boom("throws-error", () => { throw new Error("kaboom"); })],
    ["a string", boom("throws-string", () => { throw "plain string"; })],
    ["undefined", boom("throws-undefined", () => { throw undefined; })],
    ["null", boom("throws-null", () => { throw null; })],
    ["a stack overflow", boom("overflows", () => { recurse(0); throw new Error("unreachable"); })],
  ];

  for (const [what, fam] of throwers) {
    test(`a family that throws ${what}`, async () => {
      const { ws } = await checkGroup(demoFiles);
      const model = ws.model();
      const normal = runRules(model, FAMILIES);
      const out = runRules(model, [fam, ...FAMILIES]);
      const internal = out.filter((f) => f.rule === "internal-error");
      expect(internal).toHaveLength(1);
      expect(internal[0]!.message).toContain(fam.name);
      expect(internal[0]!.severity).toBe("error"); // fail closed (issue "hostile repositories"): was a warning
      // the rest stands, unchanged
      const key = (f: Finding) => `${f.rule}@${f.range.file}:${f.range.line}:${f.range.col}`;
      expect(out.filter((f) => f.rule !== "internal-error").map(key)).toEqual(normal.map(key));
      expect(normal.some((f) => f.rule === "param-type-mismatch")).toBe(true);
    });
  }

  test("two throwing families give two internal findings, one each", async () => {
    const { ws } = await checkGroup(demoFiles);
    const out = runRules(ws.model(), [throwers[0]![1], ...FAMILIES, throwers[1]![1]]);
    expect(out.filter((f) => f.rule === "internal-error").map((f) => f.message.match(/`([^`]+)`/)?.[1])).toEqual(["throws-error", "throws-string"]);
  });
});
