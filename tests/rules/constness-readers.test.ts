// pointer-constness when only one side writes (issue 15, real-code false pattern): a C header
// that leaves an input array writable while Rust only reads it changes nothing on either side
// (C11 6.7.3: const only forbids writes through that lvalue; reading through a non-const
// pointer is what both sides do), so it is advice (`info`). Where the names or the comment say
// the function writes through the pointer (an output named in its comment, `in place`), a
// read-only Rust pointer stays a warning, and Rust writing where C declares const stays an error.
// Fixtures: test-fixtures/signatures/pointer-constness/readers (a lidar binning scenario).
import { describe, expect, test } from "vitest";
import { checkDir } from "../helpers/analyze.js";

const rows = (fs_: { rule: string; severity: string; range: { file: string; line: number } }[]) =>
  fs_.filter((f) => f.rule === "pointer-constness").map((f) => `${f.range.file.split("/").pop()}:${f.range.line + 1} ${f.severity}`).sort();

describe("pointer-constness: a writable C pointer Rust only reads", () => {
  test("good: an export reading `float *ranges` and an import lending `float *in` read-only are info", async () => {
    const { findings } = await checkDir("signatures/pointer-constness/readers/good");
    expect(rows(findings)).toEqual(["lidar.h:10 info", "lidar.h:8 info"]);
    expect(findings.filter((f) => f.severity !== "info")).toEqual([]);
    expect(findings.find((f) => f.range.line + 1 === 10)!.message).toContain("stays unchanged");
  });
  test("bad: an output the comment names, an array C rewrites in place, Rust writing a const array", async () => {
    const { findings } = await checkDir("signatures/pointer-constness/readers/bad");
    expect(rows(findings)).toEqual(["lidar.h:10 error", "lidar.h:7 warning", "lidar.h:9 warning"]);
  });
});
