// Target data models: size and alignment of every scalar the boundary model knows, per target.
//
// Sources (named beside each table; every value is checked by tests/targets.oracle.test.ts
// against clang --target=TRIPLE, the Debian gcc cross compilers and rustc on the host):
//  - x86_64-unknown-linux-gnu: System V AMD64 psABI (LP64), §3.1.2 "Data Representation".
//  - aarch64-unknown-linux-gnu: Arm "Procedure Call Standard for the Arm 64-bit Architecture"
//    (AAPCS64, LP64), §"Fundamental data types" / "Arm C and C++ language mappings"; plain char
//    is unsigned.
//  - armv7-unknown-linux-gnueabihf: Arm "Procedure Call Standard for the Arm Architecture"
//    (AAPCS, ILP32), §4.1 and §7.1 (C/C++ mappings); plain char unsigned; long long and double
//    are 8-byte aligned; enums are int-sized on Linux (no -fshort-enums).
//  - i686-unknown-linux-gnu: System V i386 psABI (ILP32), Table 2.1; long long/double are
//    4-byte aligned inside structs, long double is 12 bytes with alignment 4.
//  - x86_64-pc-windows-msvc: Microsoft x64 ABI, "Type sizes" (LLP64): long is 4 bytes, long
//    double is the same as double, wchar_t is 2 bytes.
// Rust primitive sizes/alignments follow the Rust Reference, "Type layout" (primitive data
// layout: the alignment of i64/u64/f64 is target-specific and is 4 on i686 Linux, the i128/u128
// alignment is 16 on x86_64 since Rust 1.77 — from memory, confirmed by the rustc oracle on
// the host).

export type Triple =
  | "x86_64-unknown-linux-gnu"
  | "aarch64-unknown-linux-gnu"
  | "armv7-unknown-linux-gnueabihf"
  | "i686-unknown-linux-gnu"
  | "x86_64-pc-windows-msvc";

export const ALL_TRIPLES: readonly Triple[] = [
  "x86_64-unknown-linux-gnu",
  "aarch64-unknown-linux-gnu",
  "armv7-unknown-linux-gnueabihf",
  "i686-unknown-linux-gnu",
  "x86_64-pc-windows-msvc",
];

/** Short names people use on the command line and in messages. */
export const TRIPLE_ALIASES: Record<string, Triple> = {
  x86_64: "x86_64-unknown-linux-gnu",
  aarch64: "aarch64-unknown-linux-gnu",
  armv7: "armv7-unknown-linux-gnueabihf",
  i686: "i686-unknown-linux-gnu",
  "x86_64-windows": "x86_64-pc-windows-msvc",
};

export function parseTriple(s: string): Triple | undefined {
  if ((ALL_TRIPLES as readonly string[]).includes(s)) return s as Triple;
  return TRIPLE_ALIASES[s];
}

export function shortTriple(t: Triple): string {
  for (const [k, v] of Object.entries(TRIPLE_ALIASES)) if (v === t) return k;
  return t;
}

/**
 * Every scalar kind of the ABI type algebra. C named types keep their own kind (so `long` stays
 * `long` and is resolved per target); Rust fixed-width primitives map to the fixed kinds.
 */
export type ScalarKind =
  | "bool" // C _Bool / C++ bool / Rust bool
  | "char" | "schar" | "uchar"
  | "short" | "ushort" | "int" | "uint" | "long" | "ulong" | "llong" | "ullong"
  | "i8" | "u8" | "i16" | "u16" | "i32" | "u32" | "i64" | "u64" | "i128" | "u128"
  | "isize" | "usize" // Rust; same size as a pointer on every target here
  | "size_t" | "ssize_t" | "ptrdiff_t" | "intptr_t" | "uintptr_t"
  | "wchar_t"
  | "float" | "double" | "ldouble"
  | "f32" | "f64"
  | "rust_char"; // Rust `char`: a 32-bit Unicode scalar value, not an FFI type

export interface ScalarInfo {
  size: number;
  align: number;
  /** "int" for integers (incl. bool and char), "float" for floating point. */
  cls: "int" | "float" | "bool";
  signed: boolean;
}

interface DataModel {
  ptr: number; // pointer size == alignment on all five targets
  long: number;
  charSigned: boolean;
  /** Alignment of 8-byte integers and double inside aggregates. */
  align8: number;
  ldouble: [number, number];
  wchar: [number, boolean];
  i128align: number;
}

const MODELS: Record<Triple, DataModel> = {
  // System V AMD64 psABI, LP64
  "x86_64-unknown-linux-gnu": { ptr: 8, long: 8, charSigned: true, align8: 8, ldouble: [16, 16], wchar: [4, true], i128align: 16 },
  // AAPCS64, LP64, unsigned plain char, wchar_t unsigned int
  "aarch64-unknown-linux-gnu": { ptr: 8, long: 8, charSigned: false, align8: 8, ldouble: [16, 16], wchar: [4, false], i128align: 16 },
  // AAPCS (32-bit), ILP32, unsigned plain char, wchar_t unsigned int on Linux
  "armv7-unknown-linux-gnueabihf": { ptr: 4, long: 4, charSigned: false, align8: 8, ldouble: [8, 8], wchar: [4, false], i128align: 8 },
  // System V i386 psABI, ILP32. i128align is Rust's view only (C has no __int128 on i386): 16,
  // measured with rustc --target i686-unknown-linux-gnu (tests/targets.oracle.test.ts, no_core
  // probe); rustc's data layout for this target contains `i128:128`.
  "i686-unknown-linux-gnu": { ptr: 4, long: 4, charSigned: true, align8: 4, ldouble: [12, 4], wchar: [4, true], i128align: 16 },
  // Microsoft x64, LLP64
  "x86_64-pc-windows-msvc": { ptr: 8, long: 4, charSigned: true, align8: 8, ldouble: [8, 8], wchar: [2, false], i128align: 16 },
};

export function pointerSize(t: Triple): number {
  return MODELS[t].ptr;
}

export function charIsSigned(t: Triple): boolean {
  return MODELS[t].charSigned;
}

export function scalarInfo(k: ScalarKind, t: Triple): ScalarInfo {
  const m = MODELS[t];
  const I = (size: number, signed: boolean, align = size): ScalarInfo => ({ size, align, cls: "int", signed });
  switch (k) {
    case "bool": return { size: 1, align: 1, cls: "bool", signed: false };
    case "char": return I(1, m.charSigned);
    case "schar": case "i8": return I(1, true);
    case "uchar": case "u8": return I(1, false);
    case "short": case "i16": return I(2, true);
    case "ushort": case "u16": return I(2, false);
    case "int": case "i32": return I(4, true);
    case "uint": case "u32": return I(4, false);
    case "rust_char": return I(4, false);
    case "long": return I(m.long, true, m.long === 8 ? m.align8 : m.long);
    case "ulong": return I(m.long, false, m.long === 8 ? m.align8 : m.long);
    case "llong": case "i64": return I(8, true, m.align8);
    case "ullong": case "u64": return I(8, false, m.align8);
    case "i128": return I(16, true, m.i128align);
    case "u128": return I(16, false, m.i128align);
    case "isize": case "ssize_t": case "ptrdiff_t": case "intptr_t": return I(m.ptr, true);
    case "usize": case "size_t": case "uintptr_t": return I(m.ptr, false);
    case "wchar_t": return I(m.wchar[0], m.wchar[1]);
    case "float": case "f32": return { size: 4, align: 4, cls: "float", signed: true };
    case "double": case "f64": return { size: 8, align: m.align8, cls: "float", signed: true };
    case "ldouble": return { size: m.ldouble[0], align: m.ldouble[1], cls: "float", signed: true };
  }
}

/** Human spelling of a scalar kind, in the language of the side it came from. */
export const C_SPELLING: Record<ScalarKind, string> = {
  bool: "bool", char: "char", schar: "signed char", uchar: "unsigned char", short: "short",
  ushort: "unsigned short", int: "int", uint: "unsigned int", long: "long", ulong: "unsigned long",
  llong: "long long", ullong: "unsigned long long", i8: "int8_t", u8: "uint8_t", i16: "int16_t",
  u16: "uint16_t", i32: "int32_t", u32: "uint32_t", i64: "int64_t", u64: "uint64_t",
  i128: "__int128", u128: "unsigned __int128", isize: "intptr_t", usize: "uintptr_t",
  size_t: "size_t", ssize_t: "ssize_t", ptrdiff_t: "ptrdiff_t", intptr_t: "intptr_t",
  uintptr_t: "uintptr_t", wchar_t: "wchar_t", float: "float", double: "double",
  ldouble: "long double", f32: "float", f64: "double", rust_char: "uint32_t",
};

export const RUST_SPELLING: Record<ScalarKind, string> = {
  bool: "bool", char: "c_char", schar: "c_schar", uchar: "c_uchar", short: "c_short",
  ushort: "c_ushort", int: "c_int", uint: "c_uint", long: "c_long", ulong: "c_ulong",
  llong: "c_longlong", ullong: "c_ulonglong", i8: "i8", u8: "u8", i16: "i16", u16: "u16",
  i32: "i32", u32: "u32", i64: "i64", u64: "u64", i128: "i128", u128: "u128", isize: "isize",
  usize: "usize", size_t: "usize", ssize_t: "isize", ptrdiff_t: "isize", intptr_t: "isize",
  uintptr_t: "usize", wchar_t: "u32", float: "f32", double: "f64", ldouble: "f64",
  f32: "f32", f64: "f64", rust_char: "char",
};
