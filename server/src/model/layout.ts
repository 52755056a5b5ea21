// Layout of ABI types per target: size, alignment, field offsets, padding.
//
// Sources, per rule (each is checked against clang --target=TRIPLE for all five targets, the Debian
// gcc cross compilers and host gcc for the Linux targets and rustc on the host by
// tests/layout.oracle.test.ts, with at least 1,000 random structs):
//  - Ordinary members (C11 §6.7.2.1p15-17 leaves padding to the implementation; the ABIs fix it):
//    System V AMD64 psABI §3.1.2 "Aggregates and Unions", System V i386 psABI §2.1 (same rule,
//    with 4-byte alignment for 8-byte scalars), AAPCS §4.3 / AAPCS64 §5.7 "Composite Types", and
//    the Microsoft x64 "struct alignment" rules: each member at the next offset that is a multiple
//    of its alignment, the aggregate aligned to its most-aligned member, its size rounded up to
//    that alignment. A union has every member at 0.
//  - Rust `#[repr(C)]` structs and unions use the same algorithm (Rust Reference, "Type layout",
//    "#[repr(C)] Structs" / "Unions"); `packed(N)` caps each field's alignment at N and `align(N)`
//    raises the type's (Rust Reference, "The alignment modifiers"); `#[repr(transparent)]` has the
//    layout of its one non-zero-sized field.
//  - GCC/clang extensions (GCC manual, "Common Type Attributes" / "Common Variable Attributes" /
//    "Structure-Layout Pragmas"): `__attribute__((packed))` makes every member 1-aligned, a
//    member's `aligned(N)` (and C11 `_Alignas`, C++ `alignas`) raises that member's alignment even in
//    a packed struct, `#pragma pack(N)` caps every member's alignment at N — including one raised by
//    `aligned` — on the System V / AAPCS targets. On x86_64-pc-windows-msvc clang follows the
//    Microsoft layout, where an explicit member alignment (and a member type's own required
//    alignment) wins over `#pragma pack` (from memory of clang's MicrosoftRecordLayoutBuilder;
//    confirmed by the oracle test). A type's own `aligned(N)` raises its alignment.
//  - Flexible array members: C11 §6.7.2.1p18 (the struct is laid out as if the member were
//    omitted, except that the member's alignment counts). A struct with one nested in another
//    aggregate or an array is a GCC extension: reported as not portable.
//  - Bit-fields: the System V psABIs ("Bit-Fields") and AAPCS §8.1.8 define them for non-zero-width
//    bit-fields: each goes in the next bits that do not make it straddle a boundary of its declared
//    type's size; its declared type's alignment counts toward the aggregate's — for an unnamed one
//    only on Arm (AAPCS §8.1.8.1 / AAPCS64 "Bit-fields": "without exception for zero-sized or
//    anonymous bit-fields"; the System V psABIs: "unnamed bit-fields' types do not affect the
//    alignment of a structure or union"). GCC's `packed` places them at the next bit. Microsoft
//    layout (clang's MicrosoftRecordLayoutBuilder, checked by the oracle test): a bit-field shares
//    the storage unit the previous bit-field opened when its declared type has the same size and
//    the unit still has room for it; otherwise it opens a new unit, placed and aligned like an
//    ordinary member of its declared type (named or not). Everything else — zero-width bit-fields,
//    bit-fields under `#pragma pack(N>1)`, Microsoft bit-fields under `packed` or next to an
//    explicit alignment — is reported as not portable rather than guessed.
//  - Enums: see enumLayout.

import type { AbiType, TypeDecl, Field } from "./types.js";
import { pointerSize, scalarInfo, C_SPELLING, RUST_SPELLING, type ScalarKind, type Triple } from "./targets.js";
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
  /** Padding holes: [offset, length] pairs (including tail padding); undefined when there are none. */
  holes?: [number, number][];
  /** Set when ferrule will not guess (bit-fields on targets whose ABI it does not model, flexible arrays in arrays…). */
  notPortable?: string;
  /** Set when the layout is unknown (unresolved name, non-repr(C) Rust type, …). */
  unknown?: string;
  /** The aggregate ends in a flexible array member (C11 §6.7.2.1p18). */
  flexible?: boolean;
  /** Microsoft layout: alignment required by an explicit `aligned`/`alignas` inside (not capped by #pragma pack). */
  required?: number;
  /** Microsoft layout: the type itself carries an alignment attribute, so a member of this type
   * requires the type's whole alignment, whatever packing is in force. */
  alignAttr?: boolean;
}

/**
 * Every Layout is built here, with all properties in one fixed order: layout code reads
 * `l.size`/`l.unknown`/… on every field of every type, and one object shape keeps those reads
 * monomorphic (measured: several times faster on the 10,000-type benchmark).
 */
function mk(size: number, align: number, o?: Omit<Layout, "size" | "align">): Layout {
  return {
    size, align,
    fields: o?.fields, holes: o?.holes, notPortable: o?.notPortable, unknown: o?.unknown,
    flexible: o?.flexible, required: o?.required, alignAttr: o?.alignAttr,
  };
}

const UNKNOWN = (why: string): Layout => mk(0, 1, { unknown: why });

function roundUp(x: number, a: number): number {
  // (integer arithmetic only: keeps offsets small integers for the engine, no float boxes)
  if (a <= 1) return x;
  const r = x % a;
  return r === 0 ? x : x + (a - r);
}

export interface LayoutCtx {
  model: Model;
  side: Side;
  triple: Triple;
  depth?: number;
}

const isMs = (t: Triple) => t === "x86_64-pc-windows-msvc";

/**
 * Enum storage per target ABI.
 *  - A fixed underlying type (C23 `enum E : T`, C++11 `enum class E : T`, Rust `#[repr(u8)]`…)
 *    is that type.
 *  - GCC's `__attribute__((packed))` on an enum: the smallest integer type that holds every value
 *    (GCC manual, "Common Type Attributes").
 *  - Otherwise C enums are int-sized on all five targets (System V psABIs; AAPCS §7.1.3 leaves it
 *    to the platform and the Linux gnueabihf platform uses int-sized enums — no -fshort-enums).
 *    A value that does not fit int makes GCC and clang use unsigned int or a 64-bit type (GCC
 *    manual, "Integers implementation"); Microsoft keeps int.
 *  - Rust `#[repr(C)]` field-less enums have the size of the target C ABI's enum (Rust Reference,
 *    "Type layout", "#[repr(C)] Field-less Enums").
 */
export function enumLayout(d: TypeDecl, triple: Triple): Layout {
  if (d.repr.int) {
    const s = scalarInfo(d.repr.int, triple);
    return mk(s.size, s.align, { fields: [] });
  }
  const vals = d.enumerators.map((e) => e.value ?? 0);
  const min = Math.min(0, ...vals);
  const max = Math.max(0, ...vals);
  // (Microsoft ignores `packed` on enums: clang for x86_64-pc-windows-msvc keeps them int-sized.)
  if (d.repr.packed && d.lang !== "rust" && !isMs(triple)) {
    for (const size of [1, 2, 4, 8]) {
      const lo = min < 0 ? -(2 ** (size * 8 - 1)) : 0;
      const hi = min < 0 ? 2 ** (size * 8 - 1) - 1 : 2 ** (size * 8) - 1;
      if (min >= lo && max <= hi) return mk(size, size === 8 ? scalarInfo("i64", triple).align : size, { fields: [] });
    }
  }
  if (!isMs(triple) && (max > 0xffffffff || min < -0x80000000 || (min < 0 && max > 0x7fffffff))) {
    const s = scalarInfo("llong", triple);
    return mk(8, s.align, { fields: [] });
  }
  return mk(4, 4, { fields: [] });
}

/** Scalar layouts, shared (never mutated): layout is hot, so no allocation per scalar field. */
const SCALAR_CACHE = new Map<Triple, Partial<Record<ScalarKind, Layout>>>();
function scalarLayout(k: ScalarKind, triple: Triple): Layout {
  let t = SCALAR_CACHE.get(triple);
  if (!t) SCALAR_CACHE.set(triple, (t = {}));
  let l = t[k];
  if (!l) {
    const s = scalarInfo(k, triple);
    l = t[k] = Object.freeze(mk(s.size, s.align));
  }
  return l;
}

/** Layouts of declarations, per model (a model never changes after it is built) and per target. */
const cache = new WeakMap<Model, Map<TypeDecl, (Layout | undefined)[]>>();
const TRIPLE_INDEX: Record<Triple, number> = {
  "x86_64-unknown-linux-gnu": 0, "aarch64-unknown-linux-gnu": 1, "armv7-unknown-linux-gnueabihf": 2,
  "i686-unknown-linux-gnu": 3, "x86_64-pc-windows-msvc": 4,
};
/** Marks a declaration whose layout is being computed (a struct that contains itself). */
const IN_PROGRESS: Layout = mk(0, 1, { unknown: "in progress" });

export function layoutOf(t: AbiType, ctx: LayoutCtx, depth = ctx.depth ?? 0): Layout {
  if (depth > 64) return UNKNOWN("type nests too deeply");
  const { triple } = ctx;
  switch (t.k) {
    case "void":
      return mk(0, 1);
    case "scalar":
      return scalarLayout(t.s, triple);
    case "complex": {
      // C11 §6.2.5p13: a complex type has the representation and alignment of an array of two
      // elements of the corresponding real type. std::complex<T> matches (C++ [complex.numbers]).
      const s = scalarInfo(t.of === "float" ? "float" : "double", triple);
      return mk(2 * s.size, s.align);
    }
    case "ptr":
    case "fn":
      return mk(pointerSize(triple), pointerSize(triple));
    case "array": {
      const el = layoutOf(t.of, ctx, depth + 1);
      if (el.unknown) return el;
      if (t.len === null) {
        if (t.lenText) return mk(0, el.align, { unknown: `array length \`${t.lenText}\` is not a constant ferrule can evaluate` });
        return mk(0, el.align, { flexible: true, required: el.required });
      }
      if (el.flexible) return mk(el.size * t.len, el.align, { notPortable: "an array of a struct that ends in a flexible array member (GCC extension)" });
      return mk(el.size * t.len, el.align, { notPortable: el.notPortable, required: el.required, alignAttr: el.alignAttr });
    }
    case "named": {
      // A C typedef carrying `aligned(N)` changes the alignment: lay it out through its declaration
      // instead of resolving straight through it.
      if (ctx.side === "c") {
        const decls = ctx.model.typeDecls(t.name, "c");
        const aligned = decls.find((d) => d.kind === "alias" && d.aliasOf && d.repr.align);
        if (aligned && !decls.some((d) => d.kind !== "alias")) return declLayout(aligned, ctx, depth + 1);
      }
      const r = ctx.model.resolve(t, ctx.side);
      if (r.k !== "named") return layoutOf(r, ctx, depth + 1);
      const d = ctx.model.aggregate(r, ctx.side);
      if (!d) return UNKNOWN(`\`${t.name}\` is not declared in the workspace`);
      return declLayout(d, ctx, depth + 1);
    }
    case "unsafe":
      return UNKNOWN(`\`${t.text}\` has no C layout`);
    case "unknown":
      return UNKNOWN(`type \`${t.text}\` is not understood`);
  }
}

/** Layout of one declaration on one target (cached per model). */
export function declLayout(d: TypeDecl, ctx: LayoutCtx, depth = ctx.depth ?? 0): Layout {
  let m = cache.get(ctx.model);
  if (!m) cache.set(ctx.model, (m = new Map()));
  let per = m.get(d);
  if (!per) m.set(d, (per = [undefined, undefined, undefined, undefined, undefined]));
  const ti = TRIPLE_INDEX[ctx.triple];
  const hit = per[ti];
  if (hit === IN_PROGRESS) return UNKNOWN(`\`${d.name}\` contains itself`);
  if (hit) return hit;
  per[ti] = IN_PROGRESS;
  let l: Layout = IN_PROGRESS;
  try {
    l = computeDecl(d, ctx, depth);
  } finally {
    per[ti] = l === IN_PROGRESS ? undefined : l;
  }
  return l;
}

/** The members an aggregate has on the context's target (see Model.memberOn). */
export function fieldsOn(d: TypeDecl, ctx: { model: LayoutCtx["model"]; triple: Triple }): TypeDecl["fields"] {
  if (!d.fields.some((f) => f.cfg || f.ppCond)) return d.fields;
  return d.fields.filter((f) => ctx.model.memberOn(d, f, ctx.triple));
}

function computeDecl(d0: TypeDecl, ctx: LayoutCtx, depth: number): Layout {
  const fields = fieldsOn(d0, ctx);
  const d = fields === d0.fields ? d0 : { ...d0, fields };
  const side: Side = d.lang === "rust" ? "rust" : "c";
  const c2 = ctx.side === side ? ctx : { ...ctx, side };
  if (d.kind === "opaque") return UNKNOWN(`\`${d.name}\` is opaque (no body)`);
  if (d.kind === "alias") {
    if (!d.aliasOf) return UNKNOWN("alias without target");
    const l = layoutOf(d.aliasOf, c2, depth);
    // `typedef T name __attribute__((aligned(N)))` sets the alignment of the typedef (GCC manual,
    // "Common Type Attributes": on a typedef it may also decrease it).
    if (d.lang !== "rust" && d.repr.align && !l.unknown) return mk(l.size, d.repr.align, { ...l, alignAttr: isMs(ctx.triple) || undefined });
    return l;
  }
  if (d.generic) return UNKNOWN(`\`${d.name}\` is generic; its layout depends on the type arguments`);
  if (d.kind === "enum") {
    if (d.lang === "rust" && !d.repr.c && !d.repr.int) return UNKNOWN(`\`${d.name}\` has no #[repr(C)] or #[repr(int)], so its layout is unspecified`);
    if ((d as TypeDecl & { dataCarrying?: boolean }).dataCarrying) return UNKNOWN(`\`${d.name}\` carries data; ferrule does not model tagged-union enums`);
    return enumLayout(d, ctx.triple);
  }
  if (d.lang === "rust" && !d.repr.c && !d.repr.transparent) {
    return UNKNOWN(`\`${d.name}\` is not #[repr(C)], so Rust may reorder its fields`);
  }
  if (d.repr.transparent) {
    const ls = d.fields.map((f) => layoutOf(f.type, c2, depth));
    const bad = ls.find((l) => l.unknown);
    if (bad) return UNKNOWN(bad.unknown!);
    const idx = ls.map((l, i) => (l.size > 0 ? i : -1)).filter((i) => i >= 0);
    if (idx.length > 1) return UNKNOWN(`#[repr(transparent)] \`${d.name}\` has more than one non-zero-sized field`);
    const i = idx[0] ?? 0;
    const inner = ls[i] ?? mk(0, 1);
    const f = d.fields[i];
    return mk(inner.size, inner.align, { fields: f ? [{ name: f.name, offset: 0, size: inner.size, align: inner.align }] : [], notPortable: inner.notPortable });
  }
  return d.kind === "union" ? unionLayout(d, c2, depth) : structLayout(d, c2, depth);
}

/** Explicit alignment written on a member: `aligned(N)`, `_Alignas(N)`, `alignas(N)` (largest wins). */
export function fieldAlignAttr(f: Field): number | undefined {
  const attrs = (f as Field & { attrs?: string[] }).attrs;
  if (!attrs || attrs.length === 0) return undefined;
  let a: number | undefined;
  for (const t of attrs) {
    // attribute argument text is opaque to the grammar; reading the number from it is allowed
    for (const m of t.matchAll(/\b(?:__aligned__|aligned|_Alignas|alignas)\s*\(\s*(\d+)\s*\)/g)) a = Math.max(a ?? 0, Number(m[1]));
  }
  return a;
}

interface Packing {
  /** GCC `packed` on the type (C), or Rust `packed` = `packed(1)`. */
  attrPacked: boolean;
  /** `#pragma pack(N)` in force (C) or Rust `packed(N)`: caps member alignment. */
  cap?: number;
}

function packingOf(d: TypeDecl): Packing {
  if (d.lang === "rust") {
    // Rust Reference, "The alignment modifiers": packed(N) sets each field's alignment to min(its own, N).
    return { attrPacked: false, cap: d.repr.packed };
  }
  return { attrPacked: d.repr.packed === 1, cap: d.pragmaPack && d.pragmaPack > 0 ? d.pragmaPack : undefined };
}

/** Microsoft layout: the alignment a member requires whatever packing is in force — an explicit
 * alignment on the member, one required inside its type, or (when its type carries an alignment
 * attribute) the type's whole alignment (clang: ASTContext::isAlignmentRequired). */
function msRequired(natural: Layout, f: Field): number {
  return Math.max(fieldAlignAttr(f) ?? 0, natural.required ?? 0, natural.alignAttr ? natural.align : 0);
}

/** The alignment a member gets inside its aggregate on this target, from its natural alignment. */
function memberAlign(natural: Layout, f: Field, p: Packing, triple: Triple): number {
  if (isMs(triple)) {
    // Microsoft layout: pack caps the natural alignment, `packed` makes it 1, a required
    // alignment (see msRequired) wins over both.
    let a = natural.align;
    if (p.cap !== undefined) a = Math.min(a, p.cap);
    if (p.attrPacked) a = 1;
    return Math.max(a, msRequired(natural, f));
  }
  // System V / AAPCS (GCC and clang): `packed` makes it 1, an explicit member alignment raises
  // it, `#pragma pack(N)` caps the result.
  let a = p.attrPacked ? 1 : natural.align;
  const explicit = fieldAlignAttr(f);
  if (explicit !== undefined) a = Math.max(a, explicit);
  if (p.cap !== undefined) a = Math.min(a, p.cap);
  return a;
}

function describeField(f: Field): string {
  return f.name || "(anonymous member)";
}

function structLayout(d: TypeDecl, ctx: LayoutCtx, depth: number): Layout {
  if (d.fields.some((f) => f.bits !== undefined)) return bitfieldStructLayout(d, ctx, depth);
  const p = packingOf(d);
  const ms = isMs(ctx.triple);
  let offset = 0;
  let align = 1;
  let required = 0;
  let notPortable: string | undefined;
  let flexible = false;
  const fields: FieldLayout[] = [];
  let holes: [number, number][] | undefined;
  for (let i = 0; i < d.fields.length; i++) {
    const f = d.fields[i]!;
    const l = layoutOf(f.type, ctx, depth);
    if (l.unknown) return UNKNOWN(`field \`${describeField(f)}\`: ${l.unknown}`);
    if (l.notPortable) notPortable ??= `field \`${describeField(f)}\`: ${l.notPortable}`;
    const isFlexArray = f.type.k === "array" && f.type.len === null;
    if (isFlexArray && i !== d.fields.length - 1) return UNKNOWN(`field \`${describeField(f)}\` has no array length but is not the last member`);
    if (l.flexible && !isFlexArray) notPortable ??= `field \`${describeField(f)}\` is a struct ending in a flexible array member (GCC extension)`;
    const ma = memberAlign(l, f, p, ctx.triple);
    const at = roundUp(offset, ma);
    if (at > offset) (holes ??= []).push([offset, at - offset]);
    fields.push({ name: f.name, offset: at, size: l.size, align: ma });
    offset = at + l.size;
    if (ma > align) align = ma;
    if (ms) required = Math.max(required, msRequired(l, f));
    if (isFlexArray) flexible = true;
  }
  if (d.repr.align) {
    align = Math.max(align, d.repr.align);
    required = Math.max(required, d.repr.align);
  }
  const size = roundUp(offset, align);
  if (size > offset) (holes ??= []).push([offset, size - offset]);
  const out: Layout = mk(size, align, { fields, holes });
  if (notPortable) out.notPortable = notPortable;
  if (flexible) out.flexible = true;
  if (required && isMs(ctx.triple)) out.required = required;
  if (d.repr.align && d.lang !== "rust" && isMs(ctx.triple)) out.alignAttr = true;
  return out;
}

function unionLayout(d: TypeDecl, ctx: LayoutCtx, depth: number): Layout {
  if (d.fields.some((f) => f.bits !== undefined)) {
    if (isMs(ctx.triple)) return mk(0, 1, { fields: [], notPortable: `\`${d.name}\` has bit-fields; their layout on ${ctx.triple} follows Microsoft rules ferrule does not model` });
  }
  const p = packingOf(d);
  let size = 0;
  let align = 1;
  let required = 0;
  let notPortable: string | undefined;
  const fields: FieldLayout[] = [];
  for (const f of d.fields) {
    const l = layoutOf(f.type, ctx, depth);
    if (l.unknown) return UNKNOWN(`field \`${describeField(f)}\`: ${l.unknown}`);
    if (l.notPortable) notPortable ??= `field \`${describeField(f)}\`: ${l.notPortable}`;
    if (l.flexible) notPortable ??= `field \`${describeField(f)}\` has a flexible array member inside a union (GCC extension)`;
    const ma = memberAlign(l, f, p, ctx.triple);
    const bytes = f.bits !== undefined ? Math.ceil(f.bits / 8) : l.size;
    const fl: FieldLayout = { name: f.name, offset: 0, size: l.size, align: ma };
    if (f.bits !== undefined) {
      fl.bits = f.bits;
      fl.bitOffset = 0;
    }
    fields.push(fl);
    size = Math.max(size, bytes);
    align = Math.max(align, ma);
    if (isMs(ctx.triple)) required = Math.max(required, msRequired(l, f));
  }
  if (d.repr.align) {
    align = Math.max(align, d.repr.align);
    required = Math.max(required, d.repr.align);
  }
  const total = roundUp(size, align);
  const out: Layout = mk(total, align, { fields, holes: total > size ? [[size, total - size]] : undefined });
  if (notPortable) out.notPortable = notPortable;
  if (required && isMs(ctx.triple)) out.required = required;
  if (d.repr.align && d.lang !== "rust" && isMs(ctx.triple)) out.alignAttr = true;
  return out;
}

/**
 * Bit-field layout (System V psABIs "Bit-Fields"; AAPCS §8.1.8): a bit-field goes in the next bits
 * unless it would straddle a boundary of its declared type's size, in which case it starts at the
 * next such boundary; its declared type's alignment counts toward the aggregate's. With GCC's
 * `packed` (and Rust has no bit-fields) it goes at the very next bit. See the header comment for
 * what is reported as not portable.
 */
function bitfieldStructLayout(d: TypeDecl, ctx: LayoutCtx, depth: number): Layout {
  const np = (why: string): Layout => mk(0, 1, { fields: [], notPortable: `\`${d.name}\` ${why}` });
  const p = packingOf(d);
  if (p.cap !== undefined) return np("has bit-fields under #pragma pack; GCC and clang place them by rules no ABI document fixes");
  if (d.fields.some((f) => f.bits === 0)) return np("has a zero-width bit-field; ferrule does not model how each ABI aligns around it");
  if (isMs(ctx.triple)) return msBitfieldStructLayout(d, ctx, depth, p, np);
  // AAPCS / AAPCS64: an unnamed bit-field's type counts toward the aggregate's alignment too.
  const anonAligns = ctx.triple === "armv7-unknown-linux-gnueabihf" || ctx.triple === "aarch64-unknown-linux-gnu";
  let bit = 0;
  let align = 1;
  const fields: FieldLayout[] = [];
  const holes: [number, number][] = [];
  let notPortable: string | undefined;
  for (const f of d.fields) {
    const l = layoutOf(f.type, ctx, depth);
    if (l.unknown) return UNKNOWN(`field \`${describeField(f)}\`: ${l.unknown}`);
    if (l.notPortable) notPortable ??= `field \`${describeField(f)}\`: ${l.notPortable}`;
    const ma = memberAlign(l, f, p, ctx.triple);
    if (f.bits === undefined) {
      const start = Math.ceil(bit / 8);
      const at = roundUp(start, ma);
      if (at > start) holes.push([start, at - start]);
      fields.push({ name: f.name, offset: at, size: l.size, align: ma });
      bit = (at + l.size) * 8;
      align = Math.max(align, ma);
      continue;
    }
    if (f.bits > l.size * 8) return np(`has a bit-field \`${f.name}\` wider than its type`);
    if (fieldAlignAttr(f)) return np(`has an aligned bit-field \`${f.name}\``);
    if (!p.attrPacked) {
      // A bit-field may not span more units of its type's alignment than the type itself does
      // (GCC's rule, which implements the psABIs' "must not straddle its type's boundary"; it
      // differs only where alignment < size: long long on i686, 4-byte aligned, may start at any
      // bit of a 4-byte unit as long as it covers at most two of them).
      const unit = l.align * 8;
      const maxUnits = l.size / l.align;
      const within = bit % unit;
      if (Math.ceil((within + f.bits) / unit) > maxUnits) bit = bit - within + unit;
    }
    fields.push({ name: f.name, offset: Math.floor(bit / 8), size: l.size, align: ma, bitOffset: bit, bits: f.bits });
    bit += f.bits;
    if (f.name || anonAligns) align = Math.max(align, ma);
  }
  if (d.repr.align) align = Math.max(align, d.repr.align);
  const bytes = Math.ceil(bit / 8);
  const size = roundUp(bytes, align);
  if (size > bytes) holes.push([bytes, size - bytes]);
  const out: Layout = mk(size, align, { fields, holes });
  if (notPortable) out.notPortable = notPortable;
  return out;
}

/**
 * Microsoft bit-field layout (see the header comment): a run of bit-fields whose declared types
 * have one size shares storage units of that size; a bit-field of another size, one that does not
 * fit the unit's remaining bits, or the first after an ordinary member opens a new unit, laid out
 * like an ordinary member of its declared type. Unnamed bit-fields are no exception.
 */
function msBitfieldStructLayout(d: TypeDecl, ctx: LayoutCtx, depth: number, p: Packing, np: (why: string) => Layout): Layout {
  if (p.attrPacked) return np(`has bit-fields in a packed struct; ferrule does not model how the Microsoft layout on ${ctx.triple} places them`);
  let offset = 0;
  let align = 1;
  /** The open storage unit: its size in bytes and the bits still free in it (0: none open). */
  let unitSize = 0;
  let unitBitsLeft = 0;
  const fields: FieldLayout[] = [];
  const holes: [number, number][] = [];
  let notPortable: string | undefined;
  for (const f of d.fields) {
    const l = layoutOf(f.type, ctx, depth);
    if (l.unknown) return UNKNOWN(`field \`${describeField(f)}\`: ${l.unknown}`);
    if (l.notPortable) notPortable ??= `field \`${describeField(f)}\`: ${l.notPortable}`;
    if (fieldAlignAttr(f) !== undefined || l.required || l.alignAttr) return np(`has bit-fields next to an explicitly aligned member; ferrule does not model how the Microsoft layout on ${ctx.triple} places them`);
    if (f.bits !== undefined && f.bits > l.size * 8) return np(`has a bit-field \`${f.name}\` wider than its type`);
    if (f.bits !== undefined && unitSize === l.size && unitBitsLeft >= f.bits) {
      const bitOffset = offset * 8 - unitBitsLeft;
      fields.push({ name: f.name, offset: Math.floor(bitOffset / 8), size: l.size, align: l.align, bitOffset, bits: f.bits });
      unitBitsLeft -= f.bits;
      continue;
    }
    const at = roundUp(offset, l.align);
    if (at > offset) holes.push([offset, at - offset]);
    const fl: FieldLayout = { name: f.name, offset: at, size: l.size, align: l.align };
    if (f.bits !== undefined) {
      fl.bitOffset = at * 8;
      fl.bits = f.bits;
    }
    fields.push(fl);
    offset = at + l.size;
    align = Math.max(align, l.align);
    unitSize = f.bits !== undefined ? l.size : 0;
    unitBitsLeft = f.bits !== undefined ? l.size * 8 - f.bits : 0;
  }
  if (d.repr.align) align = Math.max(align, d.repr.align);
  const size = roundUp(offset, align);
  if (size > offset) holes.push([offset, size - offset]);
  const out: Layout = mk(size, align, { fields, holes: holes.length ? holes : undefined });
  if (notPortable) out.notPortable = notPortable;
  if (d.repr.align) {
    out.required = d.repr.align;
    out.alignAttr = true;
  }
  return out;
}

/** The type of a field as its own language spells it (for messages and tables). */
export function spellType(t: AbiType, lang: "rust" | "c"): string {
  switch (t.k) {
    case "void": return lang === "rust" ? "()" : "void";
    case "scalar": return lang === "rust" ? RUST_SPELLING[t.s] : C_SPELLING[t.s];
    case "complex": return lang === "rust" ? `[${t.of === "float" ? "f32" : "f64"}; 2]` : `${t.of} _Complex`;
    case "ptr": return lang === "rust" ? `*${t.mut ? "mut" : "const"} ${spellType(t.to, lang)}` : `${spellType(t.to, lang)} *`;
    case "array": return lang === "rust" ? `[${spellType(t.of, lang)}; ${t.len ?? t.lenText ?? "?"}]` : `${spellType(t.of, lang)}[${t.len ?? t.lenText ?? ""}]`;
    case "named": return lang === "c" && t.tag && t.tag !== "enum" ? `${t.tag} ${t.name}` : t.name;
    case "fn": return lang === "rust" ? "extern fn" : "function pointer";
    case "unsafe": return t.text;
    case "unknown": return t.text;
  }
}
