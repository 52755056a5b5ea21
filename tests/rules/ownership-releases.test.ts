// Rust-side releases (issue 15, point 2): a by-value `Option<Box<T>>` parameter is dropped when
// the function returns (the Rust Reference: Box<T> and Option<Box<T>> have a pointer's ABI), a
// close through an out-parameter `*mut *mut T` releases `*out`, and `ManuallyDrop::new` as a
// struct field is the struct's own drop management, not a handle given to C. Seismic-array
// scenario of our own: the good fixture pairs every constructor, the bad one leaves both
// handles without a release. A handle type that is a generic instance (`Trace<'static>`) pairs by
// its name without the arguments.
import { describe, expect, it } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { analyze, at } from "../helpers/analyze.js";

const ROOT = path.resolve(__dirname, "../../test-fixtures/ownership/handle-no-release/releases");
const OWN = ["handle-no-release", "release-without-null-check", "borrower-takes-ownership", "release-kind-mismatch", "handle-kind-mismatch"];

async function run(kind: string) {
  const { findings } = await analyze({ "lib.rs": fs.readFileSync(path.join(ROOT, kind, "lib.rs"), "utf8") });
  return findings.filter((f) => OWN.includes(f.rule));
}

describe("Rust-side releases", () => {
  it("bad: a picker with no release function and a close that only clears the pointer leak their handles", async () => {
    const f = await run("bad");
    expect(at(f, "handle-no-release").sort(), f.map((x) => x.message).join("\n")).toEqual(["lib.rs:12", "lib.rs:21", "lib.rs:39"]);
    expect(f.length).toBe(3);
  });
  it("good: `fn free(_: Option<Box<T>>) {}` and `close(out: *mut *mut T)` take the handles back; a ManuallyDrop field is no handle", async () => {
    const f = await run("good");
    expect(f.map((x) => `${x.rule} ${x.range.line + 1} ${x.message}`)).toEqual([]);
  });
});
