// borrower-takes-ownership and release-kind-mismatch on real-code false patterns (issue 15):
// fixtures under test-fixtures/ownership/borrower-takes-ownership/transfer (a hydrophone
// processing chain of our own). Good: a release the comment on either side documents as a
// transfer ("owned by the chain", "takes ownership"), and a callback that looks at its context
// through `ManuallyDrop::new(Box::from_raw(ctx))`, which never drops it (std docs,
// `ManuallyDrop`). Bad: the same functions without the comments, and the callback that drops its
// context at the end of every call.
import { describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { spawnSync } from "node:child_process";
import { analyze, at, checkDir, FIXTURES } from "../helpers/analyze.js";
import { have } from "../oracles/compilers.js";

const OWN = new Set(["borrower-takes-ownership", "release-kind-mismatch", "release-without-null-check", "handle-no-release", "handle-kind-mismatch"]);
const DIR = "ownership/borrower-takes-ownership/transfer";

describe("ownership: documented transfers and ManuallyDrop looks", () => {
  test("good: no ownership finding", async () => {
    const { findings, lines } = await checkDir(`${DIR}/good`);
    expect(lines.filter((l) => OWN.has(l.split(" ")[1]!)), lines.join("\n")).toEqual([]);
    expect(findings.filter((f) => f.severity === "error")).toEqual([]);
  });
  test("bad: undocumented transfers and the callback dropping its context are borrower-takes-ownership", async () => {
    const { lines } = await checkDir(`${DIR}/bad`);
    expect(lines.filter((l) => OWN.has(l.split(" ")[1]!)).sort()).toEqual([
      "lib.rs:48 borrower-takes-ownership",
      "lib.rs:58 borrower-takes-ownership",
      "lib.rs:79 borrower-takes-ownership",
    ]);
  });
});

// A Box parameter kept from its drop (ManuallyDrop::new, then moved on) is not freed on return;
// the same parameter simply dropped is.
describe("ownership: a Box parameter put in ManuallyDrop", () => {
  const header = `typedef struct hyd_chain hyd_chain;\ntypedef struct hyd_stage hyd_stage;\nint hyd_chain_adopt(hyd_chain *chain, hyd_stage *stage);\n`;
  const rust = (body: string) => `use std::mem::ManuallyDrop;
pub struct HydStage { gain: f32 }
pub struct HydChain { stages: Vec<Box<HydStage>> }
#[no_mangle]
pub extern "C" fn hyd_chain_adopt(chain: &mut HydChain, stage: Option<Box<HydStage>>) -> i32 {
    let Some(stage) = stage else { return -1 };
${body}
    0
}
`;
  test("kept: moved into the chain through ManuallyDrop", async () => {
    const { findings } = await analyze({ "hydro.h": header, "lib.rs": rust("    let stage = ManuallyDrop::new(stage);\n    chain.stages.push(ManuallyDrop::into_inner(stage));") });
    expect(at(findings, "borrower-takes-ownership")).toEqual([]);
  });
  test("dropped: read and freed at the end of the call", async () => {
    const { findings } = await analyze({ "hydro.h": header, "lib.rs": rust("    let _ = (chain.stages.len(), stage.gain);") });
    expect(at(findings, "borrower-takes-ownership")).toEqual(["lib.rs:5"]);
  });
});

// rustc accepts both fixtures (the good one is what a C caller may call in any order).
describe.skipIf(!have("rustc"))("rustc compiles the fixtures", () => {
  for (const d of ["good", "bad"]) {
    test(d, () => {
      const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-transfer-"));
      const r = spawnSync("rustc", ["--edition=2021", "--crate-type=lib", "-A", "warnings", "-o", path.join(tmp, "libhyd.rlib"), path.join(FIXTURES, DIR, d, "lib.rs")], { encoding: "utf8" });
      fs.rmSync(tmp, { recursive: true, force: true });
      expect(r.status, r.stderr).toBe(0);
    });
  }
});
