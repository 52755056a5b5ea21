// Quick-fix edits of the foundation rules: applying the preferred fix removes the finding and
// adds no new error.
import { describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { analyze, FIXTURES } from "./helpers/analyze.js";
import { applyEdits } from "./helpers/edits.js";
import { fixesFor } from "../server/src/fixes/index.js";
import { cHeaderFor } from "../server/src/fixes/cgen.js";
import { execFileSync } from "node:child_process";
import * as os from "node:os";

function load(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (/\.(rs|h|c|cc|cpp)$/.test(p)) out["/ws/" + path.relative(dir, p)] = fs.readFileSync(p, "utf8");
    }
  };
  walk(dir);
  return out;
}

const FIXABLE = ["param-type-mismatch", "pointer-constness", "return-type-mismatch", "arity-mismatch", "export-name-mangled", "header-lacks-c-linkage", "export-without-declaration", "callback-mismatch", "param-signedness"];

describe("preferred fixes remove their finding", () => {
  for (const dir of ["sonar-demo", "rules/signatures/bad", "rules/symbols/bad", "rules/linkage/bad"]) {
    test(dir, async () => {
      const texts = load(path.join(FIXTURES, dir));
      const { ws, findings } = await analyze(texts);
      const fixable = findings.filter((f) => FIXABLE.includes(f.rule));
      let applied = 0;
      for (const f of fixable) {
        const fixes = fixesFor(f, ws.model());
        if (!fixes.length) continue;
        const fix = fixes.find((x) => x.preferred) ?? fixes[0]!;
        const after = await analyze(applyEdits(texts, fix.edits));
        const same = after.findings.filter((g) => g.rule === f.rule && g.range.file === f.range.file && g.range.line === f.range.line && g.message === f.message);
        expect(same, `${fix.title} for ${f.message}`).toEqual([]);
        const newErrors = after.findings.filter((g) => g.severity === "error" && !findings.some((o) => o.rule === g.rule && o.message === g.message));
        expect(newErrors.map((g) => g.message), `${fix.title} introduced errors`).toEqual([]);
        applied++;
      }
      expect(applied).toBeGreaterThanOrEqual(Math.min(3, fixable.length));
    });
  }
});

test("generated C declarations for a Rust file compile as C and as C++ and match the Rust exports", async () => {
  const texts = load(path.join(FIXTURES, "rules/signatures/good"));
  const { ws } = await analyze(texts);
  const fns = ws.facts("/ws/kern.rs")!.fns.filter((f) => f.role === "export");
  const header = cHeaderFor(fns, "KERN_GEN_H", ws.model());
  expect(header).toContain("int ld_filter(const float *x, float *y, size_t n);");
  // Feed the generated header back in place of the hand-written one: no signature findings.
  const { findings } = await analyze({ "/ws/kern.rs": texts["/ws/kern.rs"]!, "/ws/gen.h": header.replace("#include <stdbool.h>", "#include <stdbool.h>\ntypedef struct Cf32 Cf32;") });
  expect(findings.filter((f) => f.severity === "error").map((f) => f.message)).toEqual([]);
  // Oracle: the generated header is valid C11 (gcc) and valid C++17 (g++).
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-gen-"));
  const file = path.join(dir, "gen.h");
  fs.writeFileSync(file, header.replace("#include <stdbool.h>", "#include <stdbool.h>\ntypedef struct Cf32 Cf32;"));
  execFileSync("gcc", ["-std=c11", "-fsyntax-only", "-Wall", "-Werror", "-x", "c", file]);
  execFileSync("g++", ["-std=c++17", "-fsyntax-only", "-Wall", "-Werror", "-x", "c++", file]);
});
