// panic-across-c-abi on values C cannot steer (issue 15, real-code false patterns): a bad and a
// good fixture under test-fixtures/ownership/panic-across-c-abi/derived (a seismic array stacker
// of our own). Good: an assert on a value a crate constructor built from the crate's own count; an
// assert on rows behind a handle C holds as an incomplete type (C11 6.2.5p1: C cannot reach the
// members of an incomplete struct); `try_into().unwrap()` of a length at most a slice's length
// into isize (a slice holds at most isize::MAX bytes: std::slice::from_raw_parts, "Safety");
// `assert_ne!(len, 0)` in a helper called with `strlen(s) + 1`; a length read from the crate's
// own state behind a C handle cast to a struct no C file declares. Bad: the same shapes where the
// value is C's with no guard (a channel count C passes, a struct C defines and fills, a length
// read from C's bytes, a length C passes, a field of the public struct C writes) still warn.
import { describe, expect, it } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { spawnSync } from "node:child_process";
import * as os from "node:os";
import { analyze } from "../helpers/analyze.js";
import { have } from "../oracles/compilers.js";
import type { Finding } from "../../server/src/rules/api.js";

const ROOT = path.resolve(__dirname, "../../test-fixtures/ownership/panic-across-c-abi/derived");
const RULE = "panic-across-c-abi";

async function run(dir: string): Promise<Finding[]> {
  const files: Record<string, string> = {};
  for (const f of fs.readdirSync(path.join(ROOT, dir))) files[f] = fs.readFileSync(path.join(ROOT, dir, f), "utf8");
  const { findings } = await analyze(files);
  return findings.filter((f) => f.rule === RULE);
}

const lines = (fs_: Finding[]) => fs_.map((f) => `${f.range.line + 1} ${f.severity}`).sort((a, b) => parseInt(a) - parseInt(b));
const show = (fs_: Finding[]) => fs_.map((f) => `${f.range.line + 1} ${f.severity} ${f.message}`).join("\n");

describe("panic-across-c-abi: values the crate derived itself", () => {
  it("good: a constructor's count, a handle's rows, a slice-bounded length and strlen + 1 give no warning", async () => {
    const f = await run("good");
    // the two asserts that only a slip of the crate itself could fail stay as info (an aid, not
    // a proof); the slice-bounded unwrap and the strlen + 1 assert are gone
    expect(lines(f), show(f)).toEqual(["61 info", "89 info", "161 info"]);
  });

  it("bad: the same asserts and unwraps on C's own values still warn", async () => {
    const f = await run("bad");
    expect(lines(f), show(f)).toEqual(["32 warning", "61 warning", "75 warning", "90 warning", "106 warning"]);
    expect(f.find((x) => x.range.line + 1 === 90)!.message).toContain("`seis_bytes_free` → `release_bytes`");
  });
});

// rustc accepts both fixtures as written (the shapes are real Rust, not pseudo-code).
describe.skipIf(!have("rustc"))("rustc compiles the fixtures", () => {
  for (const dir of ["good", "bad"]) {
    it(dir, () => {
      const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-derived-"));
      const r = spawnSync("rustc", ["--edition=2021", "--crate-type=lib", "-A", "warnings", "-o", path.join(tmp, "libseis.rlib"), path.join(ROOT, dir, "lib.rs")], { encoding: "utf8" });
      fs.rmSync(tmp, { recursive: true, force: true });
      expect(r.status, r.stderr).toBe(0);
    });
  }
});
