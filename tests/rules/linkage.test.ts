import { describe, expect, test } from "vitest";
import { execFileSync } from "node:child_process";
import * as os from "node:os";
import * as path from "node:path";
import { checkDir } from "../helpers/analyze.js";

const FIX = path.resolve(__dirname, "../../test-fixtures");

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

// A header with two extern "C" guarded sections (a stable one, and one under a build option that
// ferrule cannot decide): the guard idiom is read as a C++ compiler reads it, so the first
// section keeps its C linkage. Oracle: g++ itself — the object of the C++ includer references the
// unmangled names for the good header, and a mangled name (`_Z…flash_count_windowed…`) for the
// bad one, whose experimental section has no guard (C++ [dcl.link]).
describe("header-lacks-c-linkage: two guarded sections, one under an undecided build option", () => {
  const undefinedSymbols = (dir: string): string[] => {
    const obj = path.join(os.tmpdir(), `ferrule-linkage-${process.pid}-${path.basename(dir)}.o`);
    execFileSync("g++", ["-c", "-o", obj, path.join(dir, "counter_block.cpp")]);
    return execFileSync("nm", ["-u", obj], { encoding: "utf8" }).split("\n").map((l) => l.trim().split(/\s+/).pop()!).filter((s) => /flash/.test(s));
  };
  test("good: nothing reported, and g++ references both kernels by their C names", async () => {
    const dir = path.join(FIX, "linkage/two-guarded-sections/good");
    expect(undefinedSymbols(dir).sort()).toEqual(["flash_count", "flash_count_windowed"]);
    const { lines } = await checkDir("linkage/two-guarded-sections/good");
    expect(lines).toEqual([]);
  });
  test("bad: the unguarded experimental prototype is reported, and g++ mangles exactly that one", async () => {
    const dir = path.join(FIX, "linkage/two-guarded-sections/bad");
    const syms = undefinedSymbols(dir);
    expect(syms).toContain("flash_count");
    expect(syms.filter((s) => s.startsWith("_Z"))).toEqual([expect.stringMatching(/flash_count_windowed/)]);
    const { lines } = await checkDir("linkage/two-guarded-sections/bad");
    expect(lines).toEqual(["flash_count.h:25 header-lacks-c-linkage"]);
  });
});
