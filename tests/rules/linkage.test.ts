import { describe, expect, test } from "vitest";
import { checkDir } from "../helpers/analyze.js";

describe("linkage family", () => {
  test("bad fixture: unguarded header included by C++, and a C++ declaration without extern \"C\"", async () => {
    const { lines, findings } = await checkDir("rules/linkage/bad");
    expect(lines.sort()).toEqual(["agc.h:5 cxx-needs-c-linkage", "agc_block.cpp:3 cxx-needs-c-linkage"]);
    const h = findings.find((f) => f.range.file.endsWith("agc.h"))!;
    expect(h.related[0]!.range.file).toMatch(/agc_block\.cpp$/);
    expect(h.related[0]!.range.line + 1).toBe(1); // the #include line
  });
  test("good fixture: guarded header, extern \"C\" declaration in C++, plain C includer", async () => {
    const { lines } = await checkDir("rules/linkage/good");
    expect(lines).toEqual([]);
  });
});
