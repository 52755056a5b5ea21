// Layout engine: hand-picked constructs the random property test (tests/layout.oracle.test.ts)
// does not generate, each compared with a compiler:
//  - C: clang --target=TRIPLE (all five targets) and the Debian gcc cross compilers / host gcc
//    (Linux targets) — enums (C11 §6.7.2.2, GCC "Integers implementation" for values beyond int,
//    GCC "Common Type Attributes" for packed enums), flexible array members (C11 §6.7.2.1p18),
//    C11 _Alignas in simple declarations (§6.7.5), typedef'd alignment, float/double _Complex
//    (C11 §6.2.5p13), anonymous inner structs.
//  - C++: clang++ --target=TRIPLE — alignas on members and types, enum class with a fixed
//    underlying type ([dcl.enum]).
//  - Rust: rustc on the host — field-less enums with #[repr(u8/i16/u32/C)] and implicit/explicit
//    discriminants, #[repr(transparent)], unions (Rust Reference, "Type layout").
// Plus the cases ferrule must report instead of guessing, and robustness (a struct that contains
// itself must not hang or crash).

import { describe, expect, it } from "vitest";
import { Workspace } from "../server/src/analysis/workspace.js";
import { declLayout, type Layout } from "../server/src/model/layout.js";
import type { Model } from "../server/src/model/boundary.js";
import { TRIPLES, GCC_FOR, HOST_RUST_TOOLS, HOST_TRIPLE, cValuesClang, cValuesGcc, cxxValuesClang, requireTool, rustValuesHost, type Triple } from "./oracles/compilers";

async function modelOf(files: Record<string, string>): Promise<Model> {
  const ws = await Workspace.create();
  for (const [n, t] of Object.entries(files)) ws.update(n, t);
  return ws.model();
}

function layout(model: Model, name: string, side: "c" | "rust", t: Triple): Layout {
  const d = model.typeDecls(name, side).find((x) => x.kind !== "alias") ?? model.aggregate({ k: "named", name }, side);
  if (!d) throw new Error(`ferrule did not extract ${name}`);
  return declLayout(d, { model, side, triple: t });
}

interface Probe {
  /** C/C++ spelling of the type. */
  type: string;
  /** ferrule's name for it. */
  name: string;
  fields?: string[];
}

function questions(p: Probe[], alignof: string): string[] {
  return p.flatMap((x) => [`sizeof(${x.type})`, `${alignof}(${x.type})`, ...(x.fields ?? []).map((f) => `offsetof(${x.type}, ${f})`)]);
}

function ours(model: Model, p: Probe[], t: Triple): (number | string)[] {
  return p.flatMap((x) => {
    const l = layout(model, x.name, "c", t);
    if (l.unknown || l.notPortable) return [`${x.name}: ${l.unknown ?? l.notPortable}`];
    return [l.size, l.align, ...(x.fields ?? []).map((f) => l.fields?.find((y) => y.name === f)?.offset ?? `no ${f}`)];
  });
}

const C_SRC = `#include <stddef.h>
#include <stdint.h>
enum seis_state { SS_IDLE, SS_RUN = 5, SS_FAULT };
enum seis_small { SM_A, SM_B = 200 } __attribute__((packed));
enum seis_neg { SN_A = -1, SN_B = 100 } __attribute__((packed));
struct seis_flex { uint16_t n; double samples[]; };
struct seis_flex8 { char tag; int64_t data[]; };
struct seis_al { char c; _Alignas(16) int x; char d; };
typedef uint32_t seis_word8 __attribute__((aligned(8)));
struct seis_tw { char c; seis_word8 w; };
struct seis_cx { char c; float _Complex f; double _Complex d; };
struct seis_anon { int a; struct { char b; double c; } in; union { short s; float f; } u; };
union seis_u { char c[5]; int i; };
struct seis_en { char c; enum seis_state st; };
struct seis_ld { char c; long double x; };
`;
const C_PROBES: Probe[] = [
  { type: "enum seis_state", name: "seis_state" },
  { type: "enum seis_small", name: "seis_small" },
  { type: "enum seis_neg", name: "seis_neg" },
  { type: "struct seis_flex", name: "seis_flex", fields: ["n", "samples"] },
  { type: "struct seis_flex8", name: "seis_flex8", fields: ["tag", "data"] },
  { type: "struct seis_al", name: "seis_al", fields: ["x", "d"] },
  { type: "struct seis_tw", name: "seis_tw", fields: ["w"] },
  { type: "struct seis_cx", name: "seis_cx", fields: ["f", "d"] },
  { type: "struct seis_anon", name: "seis_anon", fields: ["in", "u"] },
  { type: "union seis_u", name: "seis_u" },
  { type: "struct seis_en", name: "seis_en", fields: ["st"] },
  { type: "struct seis_ld", name: "seis_ld", fields: ["x"] },
];

describe("C constructs vs clang (5 targets) and gcc (Linux targets)", () => {
  for (const t of TRIPLES) {
    it(`${t}: enums, flexible arrays, _Alignas, typedef alignment, _Complex, anonymous members, long double`, async ({ skip }) => {
      if (!requireTool("clang", skip)) return;
      const model = await modelOf({ "/ws/seis.c": C_SRC });
      const mine = ours(model, C_PROBES, t);
      expect(mine).toEqual(cValuesClang(t, C_SRC, questions(C_PROBES, "_Alignof")));
      const gcc = GCC_FOR[t];
      if (gcc && requireTool(gcc, skip)) expect(mine).toEqual(cValuesGcc(t, C_SRC, questions(C_PROBES, "_Alignof")));
    });
  }
});

// Bit-fields, named and unnamed, where the layout is fixed: the System V psABIs and AAPCS place
// an unnamed bit-field like a named one; its type counts toward the struct's alignment on Arm only
// (AAPCS: "without exception for zero-sized or anonymous bit-fields"; System V: "unnamed
// bit-fields' types do not affect the alignment"). Microsoft layout: a run of one type size shares
// storage units, anything else opens a new one. Spelled with `unsigned short :` and `unsigned
// long long :` too (the C grammar leaves their width in an ERROR node; see unnamedBitfieldWidth).
// Field offsets asked are those of ordinary members (offsetof of a bit-field is not allowed).
const BF_SRC = `#include <stddef.h>
#include <stdint.h>
struct bf_reg { uint32_t enable : 1; uint32_t mode : 3; uint32_t : 4; uint32_t threshold : 12; uint32_t : 12; };
struct bf_anon { char a; unsigned int : 4; char b; };
struct bf_wide { char a; unsigned long long : 40; char b; };
struct bf_short { char a; unsigned short : 3; unsigned short x : 9; char b; };
struct bf_mix { unsigned char a : 3; unsigned int b : 5; unsigned char c; unsigned short d : 10; unsigned long long e : 7; };
struct bf_split { short a; unsigned int : 20; unsigned int b : 20; int32_t c; };
struct bf_word { uint16_t id; struct bf_reg ctrl; };
`;
const BF_PROBES: Probe[] = [
  { type: "struct bf_reg", name: "bf_reg" },
  { type: "struct bf_anon", name: "bf_anon", fields: ["a", "b"] },
  { type: "struct bf_wide", name: "bf_wide", fields: ["b"] },
  { type: "struct bf_short", name: "bf_short", fields: ["b"] },
  { type: "struct bf_mix", name: "bf_mix", fields: ["c"] },
  { type: "struct bf_split", name: "bf_split", fields: ["c"] },
  { type: "struct bf_word", name: "bf_word", fields: ["ctrl"] },
];

describe("bit-fields, named and unnamed, vs clang (5 targets), gcc (Linux targets) and clang++", () => {
  for (const t of TRIPLES) {
    it(`${t}: reserved bits in a register word, unnamed bit-fields of every width, mixed type sizes`, async ({ skip }) => {
      if (!requireTool("clang", skip)) return;
      const model = await modelOf({ "/ws/bf.c": BF_SRC, "/ws/bfx.hpp": BF_SRC.replace(/struct bf_/g, "struct bfx_") });
      const mine = ours(model, BF_PROBES, t);
      expect(mine.every((v) => typeof v === "number")).toBe(true);
      expect(mine).toEqual(cValuesClang(t, BF_SRC, questions(BF_PROBES, "_Alignof")));
      const gcc = GCC_FOR[t];
      if (gcc && requireTool(gcc, skip)) expect(mine).toEqual(cValuesGcc(t, BF_SRC, questions(BF_PROBES, "_Alignof")));
      // the same text read as C++ (the C++ grammar and extractor)
      const cxx = BF_PROBES.map((p) => ({ type: p.type.replace("bf_", "bfx_"), name: p.name.replace("bf_", "bfx_"), fields: p.fields }));
      expect(ours(model, cxx, t)).toEqual(mine);
      expect(ours(model, cxx, t)).toEqual(cxxValuesClang(t, BF_SRC.replace(/struct bf_/g, "struct bfx_"), questions(cxx, "alignof")));
    });
  }
});

const CXX_SRC = `#include <stddef.h>
#include <stdint.h>
struct alignas(16) hydro_q { int a; };
struct hydro_m { char c; alignas(8) char d; int e; };
enum class hydro_e8 : uint8_t { A, B };
enum class hydro_e16 : int16_t { A = -3, B };
enum hydro_plain { HP_A };
struct hydro_use { hydro_e8 e; hydro_q q; };
`;
const CXX_PROBES: Probe[] = [
  { type: "hydro_q", name: "hydro_q" },
  { type: "hydro_m", name: "hydro_m", fields: ["d", "e"] },
  { type: "hydro_e8", name: "hydro_e8" },
  { type: "hydro_e16", name: "hydro_e16" },
  { type: "hydro_plain", name: "hydro_plain" },
  { type: "hydro_use", name: "hydro_use", fields: ["q"] },
];

describe("C++ constructs vs clang++ (5 targets)", () => {
  for (const t of TRIPLES) {
    it(`${t}: alignas on types and members, enum class with a fixed underlying type`, async ({ skip }) => {
      if (!requireTool("clang", skip)) return;
      const model = await modelOf({ "/ws/hydro.hpp": CXX_SRC });
      expect(ours(model, CXX_PROBES, t)).toEqual(cxxValuesClang(t, CXX_SRC, questions(CXX_PROBES, "alignof")));
    });
  }
});

const RUST_SRC = `use core::ffi::c_int;
#[repr(u8)] pub enum TlmA { X = 1, Y, Z = 200 }
#[repr(i16)] pub enum TlmB { X = -5, Y }
#[repr(u32)] pub enum TlmC { X }
#[repr(C)] pub enum TlmD { X, Y = 7 }
#[repr(transparent)] pub struct TlmT(u64);
#[repr(transparent)] pub struct TlmT2 { v: f32, _m: core::marker::PhantomData<u8> }
#[repr(C)] #[derive(Clone, Copy)] pub union TlmU { a: u8, b: [u16; 3], c: c_int }
#[repr(C)] pub struct TlmS { pub e: TlmA, pub t: TlmT, pub u: TlmU, pub d: TlmD }
#[repr(C, packed(2))] pub struct TlmP { pub a: u8, pub b: u64 }
`;
const RUST_TYPES = ["TlmA", "TlmB", "TlmC", "TlmD", "TlmT", "TlmT2", "TlmU", "TlmS", "TlmP"];

describe("Rust constructs vs rustc (host)", () => {
  it("repr(u8/i16/u32/C) enums, transparent, unions, packed(2), nested", async ({ skip }) => {
    if (!HOST_RUST_TOOLS.every((tool) => requireTool(tool, skip))) return;
    const model = await modelOf({ "/ws/tlm.rs": RUST_SRC });
    const exprs = RUST_TYPES.flatMap((n) => [`size_of::<${n}>()`, `align_of::<${n}>()`]);
    exprs.push("offset_of!(TlmS, t)", "offset_of!(TlmS, u)", "offset_of!(TlmS, d)", "offset_of!(TlmP, b)");
    const mine: (number | string)[] = RUST_TYPES.flatMap((n): (number | string)[] => {
      const l = layout(model, n, "rust", HOST_TRIPLE);
      return l.unknown ? [l.unknown] : [l.size, l.align];
    });
    const s = layout(model, "TlmS", "rust", HOST_TRIPLE);
    const p = layout(model, "TlmP", "rust", HOST_TRIPLE);
    mine.push(...["t", "u", "d"].map((f) => s.fields!.find((x) => x.name === f)!.offset), p.fields!.find((x) => x.name === "b")!.offset);
    expect(mine).toEqual(rustValuesHost(RUST_SRC, exprs));
  });

  it("repr(C) enums are int-sized on every target, like the C enum (Rust Reference, repr(C) field-less enums)", async () => {
    const model = await modelOf({ "/ws/tlm.rs": RUST_SRC, "/ws/c.h": "enum tlm_d { TD_X, TD_Y = 7 };\n" });
    for (const t of TRIPLES) {
      const r = layout(model, "TlmD", "rust", t);
      const c = layout(model, "tlm_d", "c", t);
      expect([r.size, r.align]).toEqual([c.size, c.align]);
    }
  });
});

describe("reported, not guessed", () => {
  it("bit-fields in a packed struct on windows, zero-width bit-fields, bit-fields under #pragma pack, a flexible array inside an array", async () => {
    const model = await modelOf({
      "/ws/bf.c": `#include <stdint.h>
struct bf_a { uint32_t x : 3; uint32_t y : 5; };
struct __attribute__((packed)) bf_p { uint32_t x : 3; uint32_t y : 5; };
struct bf_b { uint32_t x : 3; uint32_t : 0; uint32_t y : 5; };
#pragma pack(push, 2)
struct bf_c { uint8_t a; uint32_t x : 12; };
#pragma pack(pop)
struct fl { int n; float v[]; };
struct fl_arr { struct fl two[2]; };
`,
    });
    // (computed on every target: see "bit-fields, named and unnamed" above)
    expect(layout(model, "bf_a", "c", "x86_64-pc-windows-msvc")).toMatchObject({ size: 4, align: 4, notPortable: undefined });
    expect(layout(model, "bf_p", "c", "x86_64-pc-windows-msvc").notPortable).toMatch(/packed struct.*Microsoft/);
    expect(layout(model, "bf_p", "c", "armv7-unknown-linux-gnueabihf")).toMatchObject({ size: 1, align: 1, notPortable: undefined });
    for (const t of TRIPLES) {
      expect(layout(model, "bf_b", "c", t).notPortable).toMatch(/zero-width/);
      expect(layout(model, "fl_arr", "c", t).notPortable).toMatch(/flexible array/);
    }
    expect(layout(model, "bf_c", "c", "x86_64-unknown-linux-gnu").notPortable).toMatch(/pragma pack/);
  });

  it("a struct that contains itself, an unknown field type and a non-repr(C) Rust struct give `unknown`, not a crash", async () => {
    const model = await modelOf({
      "/ws/x.c": "struct loop_a { int n; struct loop_a inner; };\nstruct uses_unknown { mystery_t m; int k; };\n",
      "/ws/x.rs": "pub struct Plain { a: u8, b: u32 }\n",
    });
    for (const t of TRIPLES) {
      expect(layout(model, "loop_a", "c", t).unknown).toBeTruthy();
      expect(layout(model, "uses_unknown", "c", t).unknown).toMatch(/mystery_t/);
      expect(layout(model, "Plain", "rust", t).unknown).toMatch(/not #\[repr\(C\)\]/);
    }
  });
});
