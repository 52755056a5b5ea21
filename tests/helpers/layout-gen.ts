// Random C aggregates (and their Rust #[repr(C)] equivalents) for the layout property test.
//
// A batch is a list of struct/union specs; a field may refer to any EARLIER spec of the batch (by
// value, as an array, or through a pointer), so nesting is arbitrary but acyclic. Each spec is
// rendered as C (GCC attributes, C11 _Alignas, #pragma pack, typedef'd names) and, where Rust can
// express it, as Rust (#[repr(C)], packed, packed(N), align(N), unions).

import fc from "fast-check";

export interface ScalarSpec {
  c: string;
  /** Rust spelling, or null when Rust has no equivalent (long double). */
  rust: string | null;
}

export const SCALARS: ScalarSpec[] = [
  { c: "char", rust: "c_char" },
  { c: "signed char", rust: "i8" },
  { c: "unsigned char", rust: "u8" },
  { c: "short", rust: "c_short" },
  { c: "unsigned short", rust: "u16" },
  { c: "int", rust: "c_int" },
  { c: "unsigned int", rust: "c_uint" },
  { c: "long", rust: "c_long" },
  { c: "unsigned long", rust: "c_ulong" },
  { c: "long long", rust: "i64" },
  { c: "unsigned long long", rust: "c_ulonglong" },
  { c: "float", rust: "f32" },
  { c: "double", rust: "f64" },
  { c: "long double", rust: null },
  { c: "_Bool", rust: "bool" },
  { c: "void *", rust: "*mut c_void" },
  { c: "int8_t", rust: "i8" },
  { c: "uint16_t", rust: "u16" },
  { c: "int32_t", rust: "i32" },
  { c: "uint64_t", rust: "u64" },
  { c: "int64_t", rust: "i64" },
  { c: "size_t", rust: "usize" },
  { c: "intptr_t", rust: "isize" },
  { c: "float _Complex", rust: "[f32; 2]" },
  { c: "double _Complex", rust: "[f64; 2]" },
];

export interface FieldSpec {
  kind: "scalar" | "array" | "ref" | "refarray" | "ptr" | "bits";
  scalar: number;
  len: number;
  ref: number;
  /** Explicit member alignment (0 = none). */
  align: 0 | 1 | 2 | 4 | 8 | 16 | 32;
  alignas: boolean;
  bits: number;
  /** A bit-field without a name (`unsigned int : 4`, reserved bits). */
  anon: boolean;
}

export interface AggSpec {
  union: boolean;
  fields: FieldSpec[];
  pack: "none" | "packed" | "pragma";
  pragmaN: 1 | 2 | 4 | 8 | 16;
  structAlign: 0 | 2 | 4 | 8 | 16 | 32 | 64;
  /** Refer to this type through its typedef name. */
  typedef: boolean;
}

/** Integer types allowed as bit-field types (C11 §6.7.2.1p5: _Bool, int, unsigned; others are implementation-defined but accepted by GCC and clang). */
export const BIT_TYPES = ["unsigned int", "int", "unsigned char", "unsigned short", "unsigned long long"];

const fieldArb = (withBits: boolean): fc.Arbitrary<FieldSpec> =>
  fc.record({
    kind: withBits
      ? fc.constantFrom<FieldSpec["kind"]>("scalar", "bits", "bits", "bits", "array")
      : fc.constantFrom<FieldSpec["kind"]>("scalar", "scalar", "scalar", "array", "ref", "refarray", "ptr"),
    scalar: fc.nat({ max: SCALARS.length - 1 }),
    len: fc.integer({ min: 1, max: 5 }),
    ref: fc.nat({ max: 1000 }),
    align: fc.oneof({ weight: 12, arbitrary: fc.constant<FieldSpec["align"]>(0) }, { weight: 1, arbitrary: fc.constantFrom<FieldSpec["align"]>(1, 2, 4, 8, 16, 32) }),
    alignas: fc.boolean(),
    bits: fc.integer({ min: 1, max: 31 }),
    anon: fc.constantFrom(false, false, false, true),
  });

export const aggArb = (withBits = false): fc.Arbitrary<AggSpec> =>
  fc.record({
    union: withBits ? fc.constant(false) : fc.constantFrom(false, false, false, false, true),
    fields: fc.array(fieldArb(withBits), { minLength: 1, maxLength: 9 }),
    pack: withBits ? fc.constantFrom<AggSpec["pack"]>("none", "none", "packed") : fc.constantFrom<AggSpec["pack"]>("none", "none", "none", "packed", "pragma"),
    pragmaN: fc.constantFrom<AggSpec["pragmaN"]>(1, 2, 4, 8, 16),
    structAlign: fc.constantFrom<AggSpec["structAlign"]>(0, 0, 0, 0, 2, 4, 8, 16, 32, 64),
    typedef: fc.boolean(),
  });

export interface Rendered {
  c: string;
  /** Rust items for the translatable subset (empty string when none). */
  rust: string;
  /** Per spec: its name, C type spelling, field names, Rust-translatable or not. */
  types: { name: string; cType: string; fields: string[]; bitFields: Set<string>; rust: boolean; union: boolean; c: string; rustText: string }[];
}

/** Renders a batch. Names are `<prefix><index>`; field names are f0, f1, ... */
export function render(specs: AggSpec[], prefix = "S"): Rendered {
  const types: Rendered["types"] = [];
  const alignedTransitively: boolean[] = [];
  const cParts: string[] = [];
  const rustParts: string[] = [];
  specs.forEach((s, i) => {
    const name = `${prefix}${i}`;
    const kw = s.union ? "union" : "struct";
    const cType = s.typedef ? `${name}_t` : `${kw} ${name}`;
    const fieldNames: string[] = [];
    const bitFields = new Set<string>();
    let rustOk = !(s.structAlign && s.pack !== "none"); // Rust: packed and align on one type is an error (E0587)
    let containsAligned = s.structAlign > 0;
    const cFields: string[] = [];
    const rFields: string[] = [];
    s.fields.forEach((f, k) => {
      const fname = `f${k}`;
      const anon = f.kind === "bits" && f.anon;
      if (!anon) fieldNames.push(fname);
      const sc = SCALARS[f.scalar]!;
      let cDecl: string;
      let rType: string | null;
      let alignable = true;
      const prev = i > 0 ? f.ref % i : -1;
      const kind = (f.kind === "ref" || f.kind === "refarray") && prev < 0 ? "scalar" : f.kind;
      switch (kind) {
        case "scalar":
          cDecl = `${sc.c} ${fname}`;
          rType = sc.rust;
          break;
        case "array":
          cDecl = `${sc.c} ${fname}[${f.len}]`;
          rType = sc.rust ? `[${sc.rust}; ${f.len}]` : null;
          break;
        case "ptr":
          cDecl = prev >= 0 ? `${types[prev]!.cType} *${fname}` : `void *${fname}`;
          rType = prev >= 0 && types[prev]!.rust ? `*mut ${types[prev]!.name}` : "*mut c_void";
          break;
        case "ref":
        case "refarray": {
          const t = types[prev]!;
          cDecl = kind === "ref" ? `${t.cType} ${fname}` : `${t.cType} ${fname}[${Math.min(f.len, 3)}]`;
          rType = t.rust ? (kind === "ref" ? t.name : `[${t.name}; ${Math.min(f.len, 3)}]`) : null;
          if (alignedTransitively[prev]) containsAligned = true;
          alignable = false; // _Alignas below an aggregate's own alignment is a constraint violation
          break;
        }
        case "bits": {
          const bt = BIT_TYPES[f.scalar % BIT_TYPES.length]!;
          const width = Math.min(f.bits, bt.includes("char") ? 8 : bt.includes("short") ? 16 : bt.includes("long long") ? 40 : 32);
          cDecl = anon ? `${bt} : ${width}` : `${bt} ${fname} : ${width}`;
          rType = null;
          if (!anon) bitFields.add(fname);
          alignable = false;
          break;
        }
        default:
          throw new Error("unreachable");
      }
      if (f.align && alignable && kind !== "bits") {
        // C11 _Alignas is exercised by tests/layout.test.ts only: the bundled C grammar does not
        // know it and ferrule recovers it in simple declarations only (a documented limitation).
        // C++ alignas is a real grammar node: tests/layout.test.ts checks it against clang++.
        cDecl = `${cDecl} __attribute__((aligned(${f.align})))`;
        rustOk = false; // Rust has no per-field alignment
        if (f.align > 1) containsAligned = true;
      }
      cFields.push(`  ${cDecl};`);
      if (rType === null) rustOk = false;
      else rFields.push(`    pub ${fname}: ${rType},`);
    });
    // Rust: a packed type may not (transitively) contain a #[repr(align)] type (E0588).
    if (s.pack !== "none") {
      for (const f of s.fields) {
        const prev = i > 0 ? f.ref % i : -1;
        if ((f.kind === "ref" || f.kind === "refarray") && prev >= 0 && alignedTransitively[prev]) rustOk = false;
      }
    }
    alignedTransitively.push(containsAligned);
    const attrs: string[] = [];
    if (s.pack === "packed") attrs.push("packed");
    if (s.structAlign) attrs.push(`aligned(${s.structAlign})`);
    const attrText = attrs.length ? ` __attribute__((${attrs.join(", ")}))` : "";
    let c = `${kw}${attrText} ${name} {\n${cFields.join("\n")}\n};\n`;
    if (s.pack === "pragma") c = `#pragma pack(push, ${s.pragmaN})\n${c}#pragma pack(pop)\n`;
    if (s.typedef) c += `typedef ${kw} ${name} ${name}_t;\n`;
    cParts.push(c);
    const repr = ["C"];
    if (s.pack === "packed") repr.push("packed");
    if (s.pack === "pragma") repr.push(`packed(${s.pragmaN})`);
    if (s.structAlign) repr.push(`align(${s.structAlign})`);
    const rustText = rustOk ? `#[repr(${repr.join(", ")})]\n#[derive(Clone, Copy)]\npub ${kw} ${name} {\n${rFields.join("\n")}\n}\n` : "";
    if (rustOk) rustParts.push(rustText);
    types.push({ name, cType, fields: fieldNames, bitFields, rust: rustOk, union: s.union, c, rustText });
  });
  return { c: cParts.join(""), rust: rustParts.join(""), types };
}

export const C_PRELUDE = "#include <stddef.h>\n#include <stdint.h>\n";
export const RUST_PRELUDE = "use core::ffi::{c_char, c_short, c_int, c_uint, c_long, c_ulong, c_ulonglong, c_void};\n";
