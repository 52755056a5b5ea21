import { describe, expect, test } from "vitest";
import { checkDir } from "../helpers/analyze.js";

describe("linkage family", () => {
  test("bad fixture: unguarded header included by C++, and a C++ declaration without extern \"C\"", async () => {
    const { lines, findings } = await checkDir("rules/linkage/bad");
    expect(lines.sort()).toEqual(["agc.h:5 header-lacks-c-linkage", "agc_block.cpp:3 header-lacks-c-linkage"]);
    const h = findings.find((f) => f.range.file.endsWith("agc.h"))!;
    expect(h.related[0]!.range.file).toMatch(/agc_block\.cpp$/);
    expect(h.related[0]!.range.line + 1).toBe(1); // the #include line
  });
  test("good fixture: guarded header, extern \"C\" declaration in C++, plain C includer", async () => {
    const { lines } = await checkDir("rules/linkage/good");
    expect(lines).toEqual([]);
  });
});

// A `.h` the C++ grammar reads with fewer errors than the C one (`_Alignas` in a field) is still a
// C header: only a C++ translation unit including it (directly or through another header) makes
// its declarations need extern "C". gcc and g++ show the same header compiling as either
// language; only g++ mangles the name (C++ [dcl.link]: a function without C language linkage).
describe("header-lacks-c-linkage: C headers that only C files include", () => {
  test("good: a C header chain included only by a .c file gives nothing", async () => {
    const { lines } = await checkDir("linkage/header-lacks-c-linkage/good");
    expect(lines).toEqual([]);
  });
  test("bad: the same headers, once a .cpp includes them, are reported at the prototypes", async () => {
    const { lines, findings } = await checkDir("linkage/header-lacks-c-linkage/bad");
    expect(lines.sort()).toEqual(["strike_front.h:4 header-lacks-c-linkage", "strike_ring.h:14 header-lacks-c-linkage"]);
    const f = findings.find((x) => x.range.file.endsWith("strike_ring.h"))!;
    expect(f.related[0]!.range.file).toMatch(/strike_view\.cpp$/);
  });
});
