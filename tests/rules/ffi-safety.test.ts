import { describe, expect, test } from "vitest";
import { checkDir } from "../helpers/analyze.js";

describe("ffi-safety family", () => {
  test("bad fixture: slices, &str, non-repr(C) by value, Vec, tuples, char, bare enum, Rust-ABI fn", async () => {
    const { lines } = await checkDir("rules/ffi-safety/bad");
    expect(lines).toEqual([12, 15, 18, 21, 24, 27, 30, 33].map((l) => `detector.rs:${l} not-c-representable`));
  });
  test("good fixture: repr(C), repr(transparent), repr(u8), pointers to Rust-only types, references, Option<Box>, Option<fn>", async () => {
    const { lines } = await checkDir("rules/ffi-safety/good");
    expect(lines).toEqual([]);
  });
});

test("Option<Alias> where the alias is an extern \"C\" fn type (declared anywhere) is a nullable fn pointer", async () => {
  const { analyze } = await import("../helpers/analyze.js");
  const { findings, ws } = await analyze({
    "cb.rs": "use crate::types::StrikeCb;\n#[no_mangle]\npub extern \"C\" fn ld_on(cb: Option<StrikeCb>) {}\n#[no_mangle]\npub extern \"C\" fn ld_bad(cb: Option<Counter>) {}\n",
    "types.rs": "pub type StrikeCb = unsafe extern \"C\" fn(f32);\npub struct Counter { n: u32 }\n",
    "cb.h": "typedef void (*strike_cb)(float);\nvoid ld_on(strike_cb cb);\n",
  });
  expect(findings.filter((f) => f.rule === "not-c-representable").map((f) => f.range.line + 1)).toEqual([5]);
  expect(findings.filter((f) => f.rule === "callback-mismatch")).toEqual([]);
  expect(ws.model().resolve(ws.facts("/ws/cb.rs")!.fns[0]!.params[0]!.type, "rust")).toMatchObject({ k: "fn", nullable: true });
});
