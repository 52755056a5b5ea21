// handle-used-after-release across the member functions of a C++ class (issue 15, point 2): a
// member function that passes the handle field to the release function and leaves the field
// holding it, in a class whose destructor releases the field too, releases it twice when that
// function ran first. Fixtures: test-fixtures/ownership/handle-used-after-release/member-close
// (a lightning-detector strike channel). Good: close() clears the field after the release;
// restart() releases and stores a new handle. Bad: close() keeps the released pointer.
import { describe, expect, it } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { spawnSync } from "node:child_process";
import { analyze } from "../helpers/analyze.js";
import { have } from "../oracles/compilers.js";

const ROOT = path.resolve(__dirname, "../../test-fixtures/ownership");
const DIR = "handle-used-after-release/member-close";

function files(kind: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const d of [path.join(ROOT, DIR, kind), path.join(ROOT, "common")]) {
    for (const f of fs.readdirSync(d)) out[path.relative(ROOT, path.join(d, f))] = fs.readFileSync(path.join(d, f), "utf8");
  }
  return out;
}

const rows = (fs_: { rule: string; range: { file: string; line: number } }[]) =>
  fs_.filter((f) => f.rule === "handle-used-after-release").map((f) => `${path.basename(f.range.file)}:${f.range.line + 1}`);

describe("handle-used-after-release: a member function's release and the destructor's", () => {
  it("good: close() clears the field, restart() stores a new handle: nothing", async () => {
    const { findings } = await analyze(files("good"));
    expect(rows(findings)).toEqual([]);
    expect(findings.filter((f) => f.severity === "error" || f.severity === "warning").map((f) => `${f.rule} ${f.range.file}:${f.range.line + 1}`)).toEqual([]);
  });
  it("bad: close() keeps the released pointer, the destructor releases it again", async () => {
    const { findings } = await analyze(files("bad"));
    expect(rows(findings)).toEqual(["strike_channel.cc:14"]);
    const f = findings.find((x) => x.rule === "handle-used-after-release")!;
    expect(f.message).toContain("`strike_channel::close` releases `tracker_`");
    expect(f.related[0]!.range.line + 1).toBe(9);
  });
});

// g++ accepts both fixtures as C++17 (syntax and types; the Rust side is not linked here).
describe.skipIf(!have("g++"))("g++ compiles the fixtures", () => {
  for (const kind of ["good", "bad"]) {
    it(kind, () => {
      const r = spawnSync("g++", ["-std=c++17", "-fsyntax-only", path.join(ROOT, DIR, kind, "strike_channel.cc")], { encoding: "utf8" });
      expect(r.status, r.stderr).toBe(0);
    });
  }
});
