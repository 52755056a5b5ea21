// Broken or half-typed files: no crash, and no storm of false mismatches. Truncating a file
// must never invent a signature finding on a declaration that was complete before the cut.
import { describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { analyze, FIXTURES } from "./helpers/analyze.js";

const DEMO = path.join(FIXTURES, "sonar-demo");
const files = {
  "include/sonar_kernels.h": fs.readFileSync(path.join(DEMO, "include/sonar_kernels.h"), "utf8"),
  "kernels/src/lib.rs": fs.readFileSync(path.join(DEMO, "kernels/src/lib.rs"), "utf8"),
  "blocks/beamformer_block.cc": fs.readFileSync(path.join(DEMO, "blocks/beamformer_block.cc"), "utf8"),
};
const SIGNATURE_RULES = new Set(["arity-mismatch", "param-type-mismatch", "param-signedness", "pointer-constness", "return-type-mismatch", "callback-mismatch"]);

describe("truncated files", () => {
  for (const victim of Object.keys(files) as (keyof typeof files)[]) {
    test(`truncating ${victim} at every 23 bytes: no throw, no invented signature mismatch`, async () => {
      const full = await analyze(files);
      const baseline = new Set(full.findings.filter((f) => SIGNATURE_RULES.has(f.rule)).map((f) => `${f.rule}@${f.range.file}:${f.range.line}`));
      const text = files[victim];
      for (let cut = 0; cut < text.length; cut += 23) {
        const partial = text.slice(0, cut);
        const cutLine = partial.split("\n").length - 1;
        const { findings } = await analyze({ ...files, [victim]: partial });
        for (const f of findings) {
          if (!SIGNATURE_RULES.has(f.rule)) continue;
          const key = `${f.rule}@${f.range.file}:${f.range.line}`;
          const onCutDecl = f.range.file.endsWith(victim) && f.range.line >= cutLine - 1;
          if (!baseline.has(key) && !onCutDecl) {
            throw new Error(`cut at ${cut} of ${victim} invented ${key}: ${f.message}`);
          }
        }
        // bounded: never more findings than declarations on both sides
        expect(findings.length).toBeLessThan(40);
      }
    });
  }
});

describe("garbage", () => {
  test("random bytes, NUL bytes, invalid UTF-8 and a half-typed signature produce results, not exceptions", async () => {
    let seed = 12345;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) & 0x7fffffff) / 0x7fffffff);
    const junk = Array.from({ length: 4000 }, () => String.fromCharCode(Math.floor(rnd() * 256))).join("");
    const { findings, ws } = await analyze({
      "a.rs": junk,
      "b.h": junk.replace(/a/g, "\0"),
      "c.cc": Buffer.from([0xff, 0xfe, 0xc3, 0x28, 0x00, 0x7b]).toString("latin1"),
      "d.rs": "#[no_mangle]\npub unsafe extern \"C\" fn whole(x: *const f32) -> i32 { 0 }\n#[no_mangle]\npub unsafe extern \"C\" fn half(x: *const f32, n: us",
      "e.h": "int half(const float *x, size_t",
      "f.h": "\uFEFFint bom_fn(int x);\r\nint crlf_fn(float y);\r\n",
    });
    expect(Array.isArray(findings)).toBe(true);
    const whole = ws.facts("/ws/d.rs")!.fns.find((f) => f.name === "whole");
    expect(whole?.params.map((p) => p.name)).toEqual(["x"]); // broken code still yields partial facts
    const bom = ws.facts("/ws/f.h")!.fns.map((f) => f.name);
    expect(bom).toEqual(["bom_fn", "crlf_fn"]);
    expect(findings.filter((f) => f.rule === "internal-error")).toEqual([]);
  });

  test("a rule family that throws becomes one internal finding; the others' results stand", async () => {
    const { runRules, FAMILIES } = await import("../server/src/rules/index.js");
    const { ws } = await analyze(files);
    const boom = { name: "boom", rules: [], check: () => { throw new Error("kaboom"); } };
    const out = runRules(ws.model(), [boom, ...FAMILIES]);
    const internal = out.filter((f) => f.rule === "internal-error");
    expect(internal).toHaveLength(1);
    expect(internal[0]!.message).toContain("boom");
    expect(internal[0]!.message).toContain("kaboom");
    expect(out.some((f) => f.rule === "param-type-mismatch")).toBe(true);
  });
});
