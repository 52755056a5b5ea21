// Layout of ABI types per target: size, alignment, field offsets, padding.
//
// C struct layout follows the System V psABIs (x86_64 §3.1.2, i386 §2.1), AAPCS/AAPCS64 and the
// Microsoft x64 rules, which agree for non-bit-field members: each member at the next offset that
// is a multiple of its alignment, the struct aligned to its most-aligned member, size rounded up to
// that alignment (C11 §6.7.2.1 leaves padding to the implementation; these ABIs fix it).
// `packed` caps member alignment at 1 (or N for pack(N)/packed(N)); `aligned(N)`/`align(N)` raise
// it. Rust `#[repr(C)]` uses the same algorithm (Rust Reference, "Type layout", repr(C) structs).

import type { AbiType, TypeDecl, Field } from "./types.js";
import { pointerSize, scalarInfo, type Triple } from "./targets.js";
import type { Model, Side } from "./boundary.js";

export interface FieldLayout {
  name: string;
  offset: number;
  size: number;
  align: number;
  /** For bit-fields: bit offset within the struct and width. */
  bitOffset?: number;
  bits?: number;
}

export interface Layout {
  size: number;
  align: number;
  fields?: FieldLayout[];
  /** Padding holes: [offset, length] pairs (including tail padding). */
  holes?: [number, number][];
  /** Set when ferrule will not guess (bit-fields on targets whose ABI it does not model, flexible arrays in arrays…). */
  notPortable?: string;
  /** Set when the layout is unknown (unresolved name, non-repr(C) Rust type, …). */
  unknown?: string;
}

const UNKNOWN = (why: string): Layout => ({ size: 0, align: 1, unknown: why });

function roundUp(x: number, a: number): number {
  return a <= 1 ? x : Math.ceil(x / a) * a;
}

export interface LayoutCtx {
  model: Model;
  side: Side;
  triple: Triple;
  depth?: number;
}

/** Enum storage per target ABI: C enums are int-sized unless a value does not fit (then the
 * compilers widen to unsigned int / long long — GCC and clang extension; MSVC keeps int). */
export function enumLayout(d: TypeDecl, triple: Triple): Layout {
  if (d.repr.int) {
    const s = scalarInfo(d.repr.int, triple);
    return { size: s.size, align: s.align };
  }
  if (d.repr.packed) {
    // __attribute__((packed)) on an enum: smallest integer that holds all values (GCC docs, "Common Type Attributes").
    const vals = d.enumerators.map((e) => e.value ?? 0);
    const min = Math.min(0, ...vals);
    const max = Math.max(0, ...vals);
    for (const size of [1, 2, 4, 8]) {
      const lo = min < 0 ? -(2 ** (size * 8 - 1)) : 0;
      const hi = min < 0 ? 2 ** (size * 8 - 1) - 1 : 2 ** (size * 8) - 1;
      if (min >= lo && max <= hi) return { size, align: size === 8 ? scalarInfo("i64", triple).align : size };
    }
  }
  const vals = d.enumerators.map((e) => e.value ?? 0);
  const min = Math.min(0, ...vals);
  const max = Math.max(0, ...vals);
  if (triple !== "x86_64-pc-windows-msvc" && (max > 0xffffffff || min < -0x80000000 || (min < 0 && max > 0x7fffffff))) {
    const s = scalarInfo("llong", triple);
    return { size: 8, align: s.align };
  }
  return { size: 4, align: 4 };
}

export function layoutOf(t: AbiType, ctx: LayoutCtx): Layout {
  const depth = ctx.depth ?? 0;
  if (depth > 64) return UNKNOWN("type nests too deeply");
  const { triple } = ctx;
  switch (t.k) {
    case "void":
      return { size: 0, align: 1 };
    case "scalar": {
      const s = scalarInfo(t.s, triple);
      return { size: s.size, align: s.align };
    }
    case "complex": {
      // C11 §6.2.5p13: a complex type has the representation and alignment of an array of two
      // elements of the corresponding real type. std::complex<T> matches (C++ [complex.numbers]).
      const s = scalarInfo(t.of === "float" ? "float" : "double", triple);
      return { size: 2 * s.size, align: s.align };
    }
    case "ptr":
    case "fn":
      return { size: pointerSize(triple), align: pointerSize(triple) };
    case "array": {
      const el = layoutOf(t.of, { ...ctx, depth: depth + 1 });
      if (el.unknown) return el;
      if (t.len === null) return { size: 0, align: el.align, notPortable: t.lenText ? `array length \`${t.lenText}\` is not a constant ferrule can evaluate` : undefined, unknown: t.lenText ? "array length unknown" : undefined };
      return { size: el.size * t.len, align: el.align, notPortable: el.notPortable };
    }
    case "named": {
      const r = ctx.model.resolve(t, ctx.side);
      if (r.k !== "named") return layoutOf(r, { ...ctx, depth: depth + 1 });
      const d = ctx.model.aggregate(r, ctx.side);
      if (!d) return UNKNOWN(`\`${t.name}\` is not declared in the workspace`);
      return declLayout(d, { ...ctx, depth: depth + 1 });
    }
    case "unsafe":
      return UNKNOWN(`\`${t.text}\` has no C layout`);
    case "unknown":
      return UNKNOWN(`type \`${t.text}\` is not understood`);
  }
}

export function declLayout(d: TypeDecl, ctx: LayoutCtx): Layout {
  const side: Side = d.lang === "rust" ? "rust" : "c";
  const c2 = { ...ctx, side };
  if (d.kind === "opaque") return UNKNOWN(`\`${d.name}\` is opaque (no body)`);
  if (d.kind === "alias") return d.aliasOf ? layoutOf(d.aliasOf, c2) : UNKNOWN("alias without target");
  if (d.kind === "enum") {
    if (d.lang === "rust" && !d.repr.c && !d.repr.int) return UNKNOWN(`\`${d.name}\` has no #[repr(C)] or #[repr(int)], so its layout is unspecified`);
    if ((d as TypeDecl & { dataCarrying?: boolean }).dataCarrying) return UNKNOWN(`\`${d.name}\` carries data; ferrule does not model tagged-union enums`);
    return enumLayout(d, ctx.triple);
  }
  if (d.lang === "rust" && !d.repr.c && !d.repr.transparent) {
    return UNKNOWN(`\`${d.name}\` is not #[repr(C)], so Rust may reorder its fields`);
  }
  if (d.repr.transparent) {
    const nonZst = d.fields.map((f) => layoutOf(f.type, c2)).filter((l) => l.size > 0 || l.unknown);
    if (nonZst.length === 1) return { ...nonZst[0]!, fields: undefined };
    return UNKNOWN(`#[repr(transparent)] \`${d.name}\` must have exactly one non-zero-sized field`);
  }
  return d.kind === "union" ? unionLayout(d, c2) : structLayout(d, c2);
}

function fieldAlignAttr(f: Field): number | undefined {
  const attrs = (f as Field & { attrs?: string[] }).attrs ?? [];
  let a: number | undefined;
  for (const t of attrs) {
    const m = /\b(?:__aligned__|aligned|_Alignas|alignas)\s*\(\s*(\d+)\s*\)/.exec(t);
    if (m) a = Math.max(a ?? 0, Number(m[1]));
  }
  return a;
}

function memberPack(d: TypeDecl): number | undefined {
  const p = [d.repr.packed, d.pragmaPack].filter((x): x is number => typeof x === "number" && x > 0);
  return p.length ? Math.min(...p) : undefined;
}

function structLayout(d: TypeDecl, ctx: LayoutCtx): Layout {
  const pack = memberPack(d);
  let offset = 0;
  let align = 1;
  const fields: FieldLayout[] = [];
  const holes: [number, number][] = [];
  if (d.fields.some((f) => f.bits !== undefined)) {
    return bitfieldStructLayout(d, ctx);
  }
  for (let i = 0; i < d.fields.length; i++) {
    const f = d.fields[i]!;
    const l = layoutOf(f.type, ctx);
    if (l.unknown && !(f.type.k === "array" && f.type.len === null)) return UNKNOWN(`field \`${f.name}\`: ${l.unknown}`);
    let a = l.align;
    const fa = fieldAlignAttr(f);
    if (pack !== undefined) a = Math.min(a, pack);
    if (fa) a = Math.max(a, fa);
    const at = roundUp(offset, a);
    if (at > offset) holes.push([offset, at - offset]);
    const isFlex = f.type.k === "array" && f.type.len === null;
    if (isFlex && i !== d.fields.length - 1) return UNKNOWN(`field \`${f.name}\` has an unknown array length`);
    fields.push({ name: f.name, offset: at, size: isFlex ? 0 : l.size, align: a });
    offset = at + (isFlex ? 0 : l.size);
    align = Math.max(align, a);
  }
  if (d.repr.align) align = Math.max(align, d.repr.align);
  const size = roundUp(offset, align);
  if (size > offset) holes.push([offset, size - offset]);
  return { size, align, fields, holes };
}

function unionLayout(d: TypeDecl, ctx: LayoutCtx): Layout {
  const pack = memberPack(d);
  let size = 0;
  let align = 1;
  const fields: FieldLayout[] = [];
  for (const f of d.fields) {
    const l = layoutOf(f.type, ctx);
    if (l.unknown) return UNKNOWN(`field \`${f.name}\`: ${l.unknown}`);
    let a = l.align;
    const fa = fieldAlignAttr(f);
    if (pack !== undefined) a = Math.min(a, pack);
    if (fa) a = Math.max(a, fa);
    fields.push({ name: f.name, offset: 0, size: l.size, align: a });
    size = Math.max(size, l.size);
    align = Math.max(align, a);
  }
  if (d.repr.align) align = Math.max(align, d.repr.align);
  const total = roundUp(size, align);
  return { size: total, align, fields, holes: total > size ? [[size, total - size]] : [] };
}

/**
 * Bit-field layout. System V (x86_64, i386) and AAPCS/AAPCS64 allocate a bit-field in the next
 * bits that do not make it cross a boundary of its declared type's alignment unit; a zero-width
 * bit-field moves to the next such boundary; the declared type's alignment counts toward the
 * struct's alignment (AAPCS §8.1.8; SysV psABI "Bit-Fields"). Microsoft x64 packs bit-fields of the
 * same declared type into one unit and starts a new unit when the type size changes; ferrule does
 * not model that and reports it as not portable.
 */
function bitfieldStructLayout(d: TypeDecl, ctx: LayoutCtx): Layout {
  if (ctx.triple === "x86_64-pc-windows-msvc") {
    return { size: 0, align: 1, notPortable: `\`${d.name}\` has bit-fields; their layout on ${ctx.triple} follows Microsoft rules ferrule does not model` };
  }
  const pack = memberPack(d);
  let bit = 0;
  let align = 1;
  const fields: FieldLayout[] = [];
  for (const f of d.fields) {
    const l = layoutOf(f.type, ctx);
    if (l.unknown) return UNKNOWN(`field \`${f.name}\`: ${l.unknown}`);
    let a = l.align;
    if (pack !== undefined) a = Math.min(a, pack);
    const fa = fieldAlignAttr(f);
    if (fa) a = Math.max(a, fa);
    if (f.bits === undefined) {
      const at = roundUp(Math.ceil(bit / 8), a);
      fields.push({ name: f.name, offset: at, size: l.size, align: a });
      bit = (at + l.size) * 8;
      align = Math.max(align, a);
      continue;
    }
    const unitBits = l.size * 8;
    if (f.bits === 0) {
      bit = roundUp(bit, (pack !== undefined ? Math.min(l.align, pack) : l.align) * 8);
      continue;
    }
    if (pack === undefined) {
      const unitStart = Math.floor(bit / unitBits) * unitBits;
      if (bit + f.bits > unitStart + unitBits) bit = unitStart + unitBits;
    }
    fields.push({ name: f.name, offset: Math.floor(bit / 8), size: l.size, align: a, bitOffset: bit, bits: f.bits });
    bit += f.bits;
    // Unnamed bit-fields do not affect the alignment of the struct (SysV psABI).
    if (f.name) align = Math.max(align, a);
  }
  if (d.repr.align) align = Math.max(align, d.repr.align);
  const bytes = Math.ceil(bit / 8);
  return { size: roundUp(bytes, align), align, fields };
}
