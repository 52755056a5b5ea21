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
