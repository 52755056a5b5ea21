// Checks the per-target scalar table (scalarInfo in server/src/model/targets.ts) against compilers:
// clang --target=TRIPLE for all five targets (C11 and C++17), the Debian gcc cross compilers for
// the four Linux targets, rustc on the host for the Rust kinds (incl. core::ffi::c_*), and rustc's
// own layout for every target (no_core probe, see tests/oracles/compilers.ts).
//
// The ABI documents that define the expected values, per target (the compilers implement them; the
// test compares the table with the compilers, the documents say which one is authoritative when
// the two disagree):
const ABI_DOC: Record<string, string> = {
  "x86_64-unknown-linux-gnu": "System V AMD64 psABI, §3.1.2 Data Representation (LP64)",
  "aarch64-unknown-linux-gnu": "AAPCS64, Fundamental Data Types + C/C++ mappings (LP64, unsigned char, unsigned wchar_t)",
  "armv7-unknown-linux-gnueabihf": "AAPCS (32-bit), §4.1 + §7.1 C/C++ mappings (ILP32, 8-byte aligned long long/double)",
  "i686-unknown-linux-gnu": "System V i386 psABI, Table 2.1 (ILP32, 4-byte aligned long long/double, 12-byte long double)",
  "x86_64-pc-windows-msvc": "Microsoft x64 ABI, Type sizes (LLP64, long = 4, long double = double, wchar_t = 2)",
};
// Rust side: the Rust Reference, "Type layout" chapter (primitive sizes; alignment of primitives
// is target-specific, so it is measured, not assumed).

import { describe, expect, it } from "vitest";
import {
  TRIPLES,
  type Triple,
  cValuesClang,
  cValuesGcc,
  cxxValuesClang,
  GCC_FOR,
  HOST_RUST_TOOLS,
  HOST_TRIPLE,
  requireTool,
  rustLayoutCross,
  rustValuesHost,
} from "./oracles/compilers";
import { ALL_TRIPLES, scalarInfo, type ScalarKind, type ScalarInfo } from "../server/src/model/targets";

const T = 120_000; // per-test timeout: a compiler run takes well under a second, but CI boxes are slow

/** 64-bit targets: the only ones where C has __int128 (clang and gcc reject it on i386 and arm32). */
const is64 = (t: Triple) => t.startsWith("x86_64") || t.startsWith("aarch64");

// ---------------------------------------------------------------------------------------------
// C spellings of the C-visible kinds. rust_char has no C spelling (Rust `char` is not an FFI type)
// and is checked through rustc only. Rust isize/usize are checked against intptr_t/uintptr_t:
// the Rust Reference, "Type layout": usize/isize have the size of a pointer (the platform's
// address width), which is what intptr_t/uintptr_t are on these targets (common practice).

const C_TYPE: Partial<Record<ScalarKind, string>> = {
  bool: "_Bool",
  char: "char", schar: "signed char", uchar: "unsigned char",
  short: "short", ushort: "unsigned short", int: "int", uint: "unsigned int",
  long: "long", ulong: "unsigned long", llong: "long long", ullong: "unsigned long long",
  i8: "int8_t", u8: "uint8_t", i16: "int16_t", u16: "uint16_t", i32: "int32_t", u32: "uint32_t",
  i64: "int64_t", u64: "uint64_t", i128: "__int128", u128: "unsigned __int128",
  isize: "intptr_t", usize: "uintptr_t",
  size_t: "size_t",
  // ssize_t is POSIX (sys/types.h), absent from the freestanding headers. glibc defines it as the
  // signed counterpart of size_t (from memory); MSVC has no ssize_t, its SSIZE_T is LONG_PTR
  // (8 bytes on x64). ferrule_ssize_t below is exactly "the signed type of size_t's rank".
  ssize_t: "ferrule_ssize_t",
  ptrdiff_t: "ptrdiff_t", intptr_t: "intptr_t", uintptr_t: "uintptr_t",
  wchar_t: "wchar_t", // <stddef.h> in C (C11 §7.19); a keyword in C++
  float: "float", double: "double", ldouble: "long double", f32: "float", f64: "double",
};

const ALL_KINDS = Object.keys(C_TYPE) as ScalarKind[];
const cKinds = (t: Triple) => ALL_KINDS.filter((k) => is64(t) || (k !== "i128" && k !== "u128"));

const C_PRELUDE_BASE = `#include <stddef.h>
#include <stdint.h>
`;
const C_SSIZE = `typedef __typeof__(_Generic((size_t)0, unsigned int: (int)0, unsigned long: (long)0, unsigned long long: (long long)0)) ferrule_ssize_t;
`;
const CXX_SSIZE = `int ferrule_s(unsigned int); long ferrule_s(unsigned long); long long ferrule_s(unsigned long long);
typedef decltype(ferrule_s(size_t())) ferrule_ssize_t;
`;

type Measured = Pick<ScalarInfo, "size" | "align" | "signed" | "cls">;

/**
 * Questions per kind, 5 each: sizeof, in-struct alignment, _Alignof, signedness, class.
 *
 * ALIGNMENT is measured as offsetof(struct { char c; T x; }, x): the alignment the ABI applies
 * inside aggregates, which is what struct layout (ferrule's job) depends on. __alignof__ is NOT
 * used: on i386 GCC (and clang) report the *preferred* alignment 8 for long long and double
 * through __alignof__, while the System V i386 psABI, Table 2.1, gives 4 and structs are laid out
 * with 4. C11 _Alignof is also asked and must agree with the in-struct value (GCC >= 8 and clang
 * return the ABI alignment for it); the i686 test below pins the __alignof__ difference.
 *
 * SIGNEDNESS: (T)-1 < (T)0. CLASS: float if (T)0.5 * 2 == 1 survives; bool if (T)2 == (T)1.
 */
function cPrelude(kinds: ScalarKind[], cxx: boolean): string {
  const spell = (k: ScalarKind) => (cxx && k === "bool" ? "bool" : C_TYPE[k]!);
  return (
    C_PRELUDE_BASE +
    (cxx ? CXX_SSIZE : C_SSIZE) +
    kinds.map((k) => `struct ferrule_in_${k} { char c; ${spell(k)} x; };\n`).join("")
  );
}
function cQuestions(kinds: ScalarKind[], cxx: boolean): string[] {
  const q: string[] = [];
  for (const k of kinds) {
    const ty = cxx && k === "bool" ? "bool" : C_TYPE[k]!;
    q.push(`sizeof(${ty})`);
    q.push(`offsetof(struct ferrule_in_${k}, x)`);
    q.push(cxx ? `alignof(${ty})` : `_Alignof(${ty})`);
    q.push(`(${ty})-1 < (${ty})0`);
    q.push(`(${ty})0.5 * 2 == 1 ? 2 : (${ty})2 == (${ty})1 ? 1 : 0`);
  }
  return q;
}
const CLS = ["int", "bool", "float"] as const;

function decode(kinds: ScalarKind[], vals: number[]): { measured: Record<string, Measured>; alignofDisagrees: string[] } {
  expect(vals.length).toBe(kinds.length * 5);
  const measured: Record<string, Measured> = {};
  const alignofDisagrees: string[] = [];
  kinds.forEach((k, i) => {
    const [size, inStruct, alignof, signed, cls] = vals.slice(i * 5, i * 5 + 5) as [number, number, number, number, number];
    measured[k] = { size, align: inStruct, signed: signed === 1, cls: CLS[cls]! };
    if (alignof !== inStruct) alignofDisagrees.push(`${k}: _Alignof ${alignof} vs in-struct ${inStruct}`);
  });
  return { measured, alignofDisagrees };
}

function expected(kinds: ScalarKind[], t: Triple): Record<string, Measured> {
  const out: Record<string, Measured> = {};
  for (const k of kinds) {
    const s = scalarInfo(k, t);
    out[k] = { size: s.size, align: s.align, signed: s.signed, cls: s.cls };
  }
  return out;
}

it("the oracle's target list is the model's target list", () => {
  expect([...TRIPLES].sort()).toEqual([...ALL_TRIPLES].sort());
});

// ---------------------------------------------------------------------------------------------
// Self-tests of the oracle plumbing: a reader that silently loses data would make every check
// below vacuous, so it is pinned on known answers first.

describe("oracle self-test", () => {
  const counting = Array.from({ length: 2000 }, (_, k) => String(k));
  const expectCounting = Array.from({ length: 2000 }, (_, k) => k);
  // Values that exercise the reader: zero runs (gcc/clang may fold them into .zero), values
  // above 2^31 (gcc prints them negative), and a value that only a real evaluation gives.
  const edge = ["0", "0", "0", "0", "0xFFFFFFFFu", "0x80000000u", "sizeof(char)", "3 * 7 - 1", "0", "0"];
  const edgeAnswers = [0, 0, 0, 0, 0xffffffff, 0x80000000, 1, 20, 0, 0];

  for (const t of TRIPLES) {
    it(`clang ${t}: known answers and 2000 questions in one run`, ({ skip }) => {
      if (!requireTool("clang", skip)) return;
      expect(cValuesClang(t, "", ["sizeof(char)"])).toEqual([1]);
      expect(cValuesClang(t, "", counting)).toEqual(expectCounting);
      expect(cValuesClang(t, "", edge)).toEqual(edgeAnswers);
      expect(cxxValuesClang(t, "", ["sizeof(char)", "sizeof(bool)", ...counting.slice(0, 50)])).toEqual([1, 1, ...expectCounting.slice(0, 50)]);
    }, T);

    const gcc = GCC_FOR[t];
    if (gcc) {
      it(`${gcc} (${t}): known answers and 2000 questions in one run`, ({ skip }) => {
        if (!requireTool(gcc, skip)) return;
        expect(cValuesGcc(t, "", ["sizeof(char)"])).toEqual([1]);
        expect(cValuesGcc(t, "", counting)).toEqual(expectCounting);
        expect(cValuesGcc(t, "", edge)).toEqual(edgeAnswers);
        expect(cValuesGcc(t, "", Array(3000).fill("0"))).toEqual(Array(3000).fill(0));
      }, T);
    } else {
      it(`no gcc oracle for ${t}: cValuesGcc refuses clearly`, () => {
        expect(() => cValuesGcc(t, "", ["1"])).toThrow(/no gcc oracle/);
      });
    }
  }

  it("rustc (host): known answers and 2000 questions in one run", ({ skip }) => {
    if (!HOST_RUST_TOOLS.every((tool) => requireTool(tool, skip))) return;
    const vals = rustValuesHost("#[repr(C)] struct Probe { a: u8, b: u32 }", [
      "size_of::<u8>()", "offset_of!(Probe, b)", "u64::MAX as u32", ...counting,
    ]);
    expect(vals).toEqual([1, 4, 0xffffffff, ...expectCounting]);
  }, T);

  it("a compile error names the offending question", ({ skip }) => {
    if (!requireTool("clang", skip)) return;
    expect(() => cValuesClang(HOST_TRIPLE, "", ["1", "ferrule_no_such_name", "2"])).toThrow(/#1: ferrule_no_such_name/);
  }, T);

  it("the clang target really is the one asked for (arch macros, hard-float on armv7)", ({ skip }) => {
    if (!requireTool("clang", skip)) return;
    const prelude = `
#if defined(__x86_64__) && defined(_WIN64)
#define FERRULE_ARCH 5
#elif defined(__x86_64__) && defined(__linux__)
#define FERRULE_ARCH 1
#elif defined(__aarch64__) && defined(__linux__)
#define FERRULE_ARCH 2
#elif defined(__arm__) && defined(__linux__) && defined(__ARM_PCS_VFP)
#define FERRULE_ARCH 3
#elif defined(__i386__) && defined(__linux__)
#define FERRULE_ARCH 4
#else
#define FERRULE_ARCH 0
#endif
`;
    const got = TRIPLES.map((t) => cValuesClang(t, prelude, ["FERRULE_ARCH"])[0]);
    expect(got).toEqual([1, 2, 3, 4, 5]);
    for (const t of TRIPLES) {
      const gcc = GCC_FOR[t];
      if (gcc && requireTool(gcc, skip)) expect(cValuesGcc(t, prelude, ["FERRULE_ARCH"])[0]).toBe(TRIPLES.indexOf(t) + 1);
    }
  }, T);
});

// ---------------------------------------------------------------------------------------------
// The table against C compilers.

describe.each(TRIPLES.map((t) => [t, ABI_DOC[t]!] as const))("scalarInfo for %s — %s", (t) => {
  const kinds = cKinds(t);

  it("matches clang (C11): size, in-struct alignment, signedness, class", ({ skip }) => {
    if (!requireTool("clang", skip)) return;
    const { measured, alignofDisagrees } = decode(kinds, cValuesClang(t, cPrelude(kinds, false), cQuestions(kinds, false)));
    expect(measured).toEqual(expected(kinds, t));
    expect(alignofDisagrees).toEqual([]);
  }, T);

  it("matches clang (C++17): same facts with bool/wchar_t as C++ types", ({ skip }) => {
    if (!requireTool("clang", skip)) return;
    const { measured, alignofDisagrees } = decode(kinds, cxxValuesClang(t, cPrelude(kinds, true), cQuestions(kinds, true)));
    expect(measured).toEqual(expected(kinds, t));
    expect(alignofDisagrees).toEqual([]);
  }, T);

  const gcc = GCC_FOR[t];
  if (gcc) {
    it(`matches ${gcc}: size, in-struct alignment, signedness, class`, ({ skip }) => {
      if (!requireTool(gcc, skip)) return;
      const { measured, alignofDisagrees } = decode(kinds, cValuesGcc(t, cPrelude(kinds, false), cQuestions(kinds, false)));
      expect(measured).toEqual(expected(kinds, t));
      expect(alignofDisagrees).toEqual([]);
    }, T);
  }

  it("plain char and wchar_t signedness as the ABI document says", ({ skip }) => {
    if (!requireTool("clang", skip)) return;
    // Signed plain char on x86 (System V AMD64 / i386 psABI; Microsoft x64), unsigned on Arm
    // (AAPCS §7.1.1, AAPCS64 "Arm C and C++ language mappings"). wchar_t: signed int on x86
    // Linux, unsigned int on Arm Linux (AAPCS/AAPCS64), unsigned short on Windows.
    const arm = t.startsWith("arm") || t.startsWith("aarch64");
    const win = t.endsWith("windows-msvc");
    const q = ["(char)-1 < 0", "(wchar_t)-1 < 0", "sizeof(wchar_t)"];
    const facts = [arm ? 0 : 1, arm || win ? 0 : 1, win ? 2 : 4];
    expect(cValuesClang(t, C_PRELUDE_BASE, q)).toEqual(facts);
    expect([scalarInfo("char", t).signed ? 1 : 0, scalarInfo("wchar_t", t).signed ? 1 : 0, scalarInfo("wchar_t", t).size]).toEqual(facts);
  }, T);
});

it("i686: __alignof__ reports the preferred 8 for long long/double, structs use the psABI's 4", ({ skip }) => {
  // Why the in-struct measurement above: System V i386 psABI, Table 2.1 (long long, double: align 4).
  if (!requireTool("clang", skip)) return;
  const t: Triple = "i686-unknown-linux-gnu";
  const prelude = "struct a { char c; long long x; }; struct b { char c; double x; };";
  const q = ["__alignof__(long long)", "__alignof__(double)", "__builtin_offsetof(struct a, x)", "__builtin_offsetof(struct b, x)"];
  expect(cValuesClang(t, prelude, q)).toEqual([8, 8, 4, 4]);
  if (requireTool("i686-linux-gnu-gcc", skip)) expect(cValuesGcc(t, prelude, q)).toEqual([8, 8, 4, 4]);
  expect([scalarInfo("llong", t).align, scalarInfo("double", t).align]).toEqual([4, 4]);
}, T);

// ---------------------------------------------------------------------------------------------
// The table against rustc.

/** Rust types per kind. c_* are core::ffi aliases (host only: they are defined in core). */
const RUST_PRIM: Partial<Record<ScalarKind, { ty: string; zero: string; int: boolean }>> = {
  i8: { ty: "i8", zero: "0", int: true }, u8: { ty: "u8", zero: "0", int: true },
  i16: { ty: "i16", zero: "0", int: true }, u16: { ty: "u16", zero: "0", int: true },
  i32: { ty: "i32", zero: "0", int: true }, u32: { ty: "u32", zero: "0", int: true },
  i64: { ty: "i64", zero: "0", int: true }, u64: { ty: "u64", zero: "0", int: true },
  i128: { ty: "i128", zero: "0", int: true }, u128: { ty: "u128", zero: "0", int: true },
  isize: { ty: "isize", zero: "0", int: true }, usize: { ty: "usize", zero: "0", int: true },
  f32: { ty: "f32", zero: "0.0", int: false }, f64: { ty: "f64", zero: "0.0", int: false },
  bool: { ty: "bool", zero: "false", int: false }, rust_char: { ty: "char", zero: "'\\0'", int: false },
};
const RUST_FFI: Partial<Record<ScalarKind, string>> = {
  char: "c_char", schar: "c_schar", uchar: "c_uchar", short: "c_short", ushort: "c_ushort",
  int: "c_int", uint: "c_uint", long: "c_long", ulong: "c_ulong", llong: "c_longlong",
  ullong: "c_ulonglong", float: "c_float", double: "c_double",
};

it(`rustc on the host (${HOST_TRIPLE}): Rust primitives and core::ffi::c_* match the table`, ({ skip }) => {
  if (!HOST_RUST_TOOLS.every((tool) => requireTool(tool, skip))) return;
  const rows: { k: ScalarKind; ty: string; int: boolean | "float" | "none" }[] = [];
  for (const [k, p] of Object.entries(RUST_PRIM)) rows.push({ k: k as ScalarKind, ty: p!.ty, int: p!.int ? true : p!.zero === "0.0" ? "float" : "none" });
  for (const [k, ty] of Object.entries(RUST_FFI)) rows.push({ k: k as ScalarKind, ty: `core::ffi::${ty}`, int: k === "float" || k === "double" ? "float" : true });
  const prelude = rows.map((r, i) => `#[repr(C)] struct In${i} { c: u8, x: ${r.ty} }`).join("\n");
  const q: string[] = [];
  rows.forEach((r, i) => {
    q.push(`size_of::<${r.ty}>()`, `offset_of!(In${i}, x)`, `align_of::<${r.ty}>()`);
    // Signedness: integers by their MIN; floats are signed; bool/char carry no sign (asked as 0).
    q.push(r.int === true ? `<${r.ty}>::MIN < 0` : r.int === "float" ? `(-1.0 as ${r.ty}) < 0.0` : "0");
  });
  const vals = rustValuesHost(prelude, q);
  const measured: Record<string, object> = {};
  const want: Record<string, object> = {};
  rows.forEach((r, i) => {
    const [size, inStruct, alignOf, signed] = vals.slice(i * 4, i * 4 + 4) as [number, number, number, number];
    const s = scalarInfo(r.k, HOST_TRIPLE);
    measured[`${r.k} (${r.ty})`] = { size, align: inStruct, alignOf, ...(r.int === "none" ? {} : { signed: signed === 1 }) };
    want[`${r.k} (${r.ty})`] = { size: s.size, align: s.align, alignOf: s.align, ...(r.int === "none" ? {} : { signed: s.signed }) };
  });
  expect(measured).toEqual(want);
}, T);

describe("rustc's layout of Rust primitives on every target (no_core probe)", () => {
  // Includes i128/u128 on the 32-bit targets, where C has no __int128 and the table's value is
  // Rust's view only. rustc reads these from the target's LLVM data layout (e.g. `i128:128`).
  for (const t of TRIPLES) {
    it(t, ({ skip }) => {
      if (!requireTool("rustc", skip)) return;
      const kinds = Object.keys(RUST_PRIM) as ScalarKind[];
      const got = rustLayoutCross(t, kinds.map((k) => RUST_PRIM[k]!));
      const measured: Record<string, object> = {};
      const want: Record<string, object> = {};
      kinds.forEach((k, i) => {
        measured[k] = { size: got[i]!.size, align: got[i]!.inStructAlign };
        want[k] = { size: scalarInfo(k, t).size, align: scalarInfo(k, t).align };
      });
      expect(measured).toEqual(want);
    }, T);
  }
});
