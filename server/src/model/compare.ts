// Cross-language type agreement: does a Rust type and a C type mean the same bits on a target?
// Returns the first difference per target; callers group targets with the same difference.

import type { AbiType } from "./types.js";
import { scalarInfo, type Triple, C_SPELLING, RUST_SPELLING } from "./targets.js";
import { mirrorNames, type Model } from "./boundary.js";
import { layoutOf } from "./layout.js";

export type DiffKind =
  | "kind" // integer vs float vs pointer vs aggregate
  | "width" // integer/float size differs
  | "sign" // signedness differs
  | "depth" // pointer vs non-pointer, or a different number of pointer levels
  | "item" // pointee item differs (size or kind)
  | "const" // the pointee is writable on one side only
  | "name" // different named aggregates of the same size
  | "callback" // function-pointer types differ
  | "nullable"; // C may pass NULL where Rust assumes non-null

export interface TypeDiff {
  kind: DiffKind;
  /** Human description of this difference, without the target list. */
  detail: string;
  /** For "const": true when Rust may write where C promises not to. */
  rustWrites?: boolean;
}

export interface GroupedDiff extends TypeDiff {
  targets: Triple[];
}

export function describeRust(t: AbiType): string {
  switch (t.k) {
    case "void": return "()";
    case "scalar": return RUST_SPELLING[t.s];
    case "complex": return `complex ${t.of}`;
    case "ptr": {
      const inner = describeRust(t.to === undefined ? { k: "void" } : t.to.k === "void" ? { k: "unknown", text: "c_void" } : t.to);
      if (t.via === "ref") return `&${t.mut ? "mut " : ""}${inner}`;
      if (t.via === "box") return `Box<${inner}>`;
      if (t.via === "nonnull") return `NonNull<${inner}>`;
      return `*${t.mut ? "mut" : "const"} ${inner}`;
    }
    case "array": return `[${describeRust(t.of)}; ${t.len ?? t.lenText}]`;
    case "named": return t.name;
    case "fn": return `extern "${t.abi}" fn(${t.params.map(describeRust).join(", ")})${t.ret.k === "void" ? "" : " -> " + describeRust(t.ret)}`;
    case "unsafe": return t.text;
    case "unknown": return t.text;
  }
}

export function describeC(t: AbiType): string {
  switch (t.k) {
    case "void": return "void";
    case "scalar": return C_SPELLING[t.s];
    case "complex": return `${t.of} _Complex`;
    case "ptr": {
      if (t.to.k === "fn") return describeC(t.to);
      return `${t.mut ? "" : "const "}${describeC(t.to)} *`.replace(/\* \*/g, "**");
    }
    case "array": return `${describeC(t.of)}[${t.len ?? t.lenText ?? ""}]`;
    case "named": return t.tag && t.tag !== "enum" ? `${t.tag} ${t.name}` : t.name;
    case "fn": return `${describeC(t.ret)} (*)(${t.params.map(describeC).join(", ")})`;
    case "unsafe": return t.text;
    case "unknown": return t.text;
  }
}

function sizeWord(n: number): string {
  return `${n}-byte`;
}

/** Strips a C pointer-to-function down to the function type (C typedefs spell callbacks that way). */
function fnOf(t: AbiType): (AbiType & { k: "fn" }) | undefined {
  if (t.k === "fn") return t;
  if (t.k === "ptr" && t.to.k === "fn") return t.to;
  return undefined;
}

/**
 * Compares one Rust type with one C type on one target. `top` is true for a parameter/return
 * itself (so `const` on the outermost pointee is reported as a const difference).
 */
export function compareOn(model: Model, r0: AbiType, c0: AbiType, triple: Triple, level = 0): TypeDiff | null {
  if (level > 16) return null;
  const c = model.resolve(c0, "c");
  const r = transparentAsField(model, model.resolve(r0, "rust"), c, triple);
  if (r.k === "unknown" || c.k === "unknown" || r.k === "unsafe" || c.k === "unsafe") return null;

  // a pointer to a typedef of a function type (`typedef int cb_fn(float); … cb_fn *cb`) is a
  // function pointer too
  const rf = fnOf(r) ?? (r.k === "ptr" ? fnOf(model.resolve(r.to, "rust")) : undefined);
  const cf = fnOf(c) ?? (c.k === "ptr" ? fnOf(model.resolve(c.to, "c")) : undefined);
  if (rf || cf) {
    if (!rf || !cf) return { kind: "depth", detail: `${describeRust(r)} in Rust but ${describeC(c)} in C` };
    if (rf.params.length !== cf.params.length) return { kind: "callback", detail: `the callback takes ${rf.params.length} parameter(s) in Rust but ${cf.params.length} in C` };
    for (let i = 0; i < rf.params.length; i++) {
      const d = compareOn(model, rf.params[i]!, cf.params[i]!, triple, level + 1);
      if (d && d.kind !== "const" && d.kind !== "sign") return { kind: "callback", detail: `callback parameter ${i + 1}: ${d.detail}` };
    }
    const dr = compareOn(model, rf.ret, cf.ret, triple, level + 1);
    if (dr && dr.kind !== "sign") return { kind: "callback", detail: `callback return: ${dr.detail}` };
    if (level === 0 && !rf.nullable && cf.nullable) {
      return { kind: "nullable", detail: `C may pass NULL for this function pointer, but a Rust \`extern "C" fn\` must never be null; use Option<extern "C" fn(..)>` };
    }
    return null;
  }

  if (r.k === "void" || c.k === "void") {
    if (r.k === c.k) return null;
    return { kind: "kind", detail: `${describeRust(r)} in Rust but ${describeC(c)} in C` };
  }

  if (r.k === "ptr" || c.k === "ptr") {
    if (r.k !== "ptr" || c.k !== "ptr") {
      return { kind: "depth", detail: `${r.k === "ptr" ? "a pointer" : "not a pointer"} in Rust (\`${describeRust(r)}\`) but ${c.k === "ptr" ? "a pointer" : "not a pointer"} in C (\`${describeC(c)}\`)` };
    }
    const rt = model.resolve(r.to, "rust");
    const ct = model.resolve(c.to, "c");
    // void pointers accept any pointee (common practice for opaque handles and raw buffers)
    if (rt.k !== "void" && ct.k !== "void") {
      const inner = comparePointee(model, rt, ct, triple, level);
      if (inner) return inner;
    }
    // Rust read-only, C writable, and the C pointee an opaque handle (declared, never defined in
    // C): C cannot read or write through a pointer to an incomplete type (C11 6.2.5p1, 6.5.3.2p4),
    // so the writable pointer gives C nothing Rust did not grant. `Arc::into_raw` returns
    // `*const T`; a `gm_calib *` for it is common practice.
    const opaqueC = ct.k === "named" && model.aggregate(ct, "c")?.kind === "opaque";
    // NonNull<T> has no read-only form (std::ptr::NonNull: "*mut T but non-zero and covariant"):
    // it says nothing about writing, so it agrees with a const and a writable C pointee alike.
    if (r.mut !== c.mut && !(!r.mut && opaqueC) && r.via !== "nonnull") {
      return r.mut
        ? { kind: "const", rustWrites: true, detail: `Rust takes \`${describeRust(r)}\` (may write) but C declares the pointee const (\`${describeC(c)}\`)` }
        : { kind: "const", rustWrites: false, detail: `Rust takes \`${describeRust(r)}\` (read-only) but C passes a writable \`${describeC(c)}\`` };
    }
    return null;
  }

  if (r.k === "scalar" && c.k === "scalar") {
    const a = scalarInfo(r.s, triple);
    const b = scalarInfo(c.s, triple);
    if (a.cls !== b.cls) {
      if (a.cls === "bool" || b.cls === "bool") {
        if (a.size !== b.size) return { kind: "width", detail: `\`${describeRust(r)}\` (${sizeWord(a.size)}) in Rust but \`${describeC(c)}\` (${sizeWord(b.size)}) in C` };
        return { kind: "kind", detail: `\`${describeRust(r)}\` in Rust but \`${describeC(c)}\` in C (only 0 and 1 are valid Rust bool values)` };
      }
      return { kind: "kind", detail: `\`${describeRust(r)}\` (${a.cls === "float" ? "floating point" : "integer"}) in Rust but \`${describeC(c)}\` (${b.cls === "float" ? "floating point" : "integer"}) in C` };
    }
    if (a.size !== b.size) return { kind: "width", detail: `\`${describeRust(r)}\` is ${sizeWord(a.size)} but \`${describeC(c)}\` is ${sizeWord(b.size)}` };
    if (a.cls === "int" && a.signed !== b.signed) {
      return { kind: "sign", detail: `\`${describeRust(r)}\` is ${a.signed ? "signed" : "unsigned"} but \`${describeC(c)}\` is ${b.signed ? "signed" : "unsigned"}` };
    }
    return null;
  }

  if (r.k === "complex" || c.k === "complex") {
    const lr = layoutOf(r, { model, side: "rust", triple });
    const lc = layoutOf(c, { model, side: "c", triple });
    if (lr.unknown || lc.unknown) return null;
    if (lr.size !== lc.size || lr.align !== lc.align) {
      return { kind: "width", detail: `\`${describeRust(r)}\` is ${lr.size} bytes (align ${lr.align}) but \`${describeC(c)}\` is ${lc.size} bytes (align ${lc.align})` };
    }
    return null;
  }

  if (r.k === "array" && c.k === "array") {
    if (r.len !== null && c.len !== null && r.len !== c.len) return { kind: "width", detail: `array of ${r.len} in Rust but ${c.len} in C` };
    return compareOn(model, r.of, c.of, triple, level + 1);
  }

  if (r.k === "named" || c.k === "named") {
    return compareAggregates(model, r, c, triple);
  }
  if (r.k !== c.k) return { kind: "kind", detail: `\`${describeRust(r)}\` in Rust but \`${describeC(c)}\` in C` };
  return null;
}

/**
 * A Rust `#[repr(transparent)]` struct "has the same layout and ABI as" its one non-zero-sized
 * field (Rust Reference, "Type layout", the transparent representation), so against a C type that
 * is not itself a struct or union (`typedef uint32_t chan_id` for `struct ChanId(u32)`) it is
 * compared as that field. Against a C struct or union it stays a mirror pair: a one-field C struct
 * is not passed like its field on every ABI (i386 returns it through memory).
 */
function transparentAsField(model: Model, r: AbiType, c: AbiType, triple: Triple): AbiType {
  if (c.k === "named") {
    const kind = model.aggregate(c, "c")?.kind;
    if (kind === "struct" || kind === "union") return r;
  }
  for (let i = 0; i < 8 && r.k === "named"; i++) {
    const d = model.aggregate(r, "rust");
    if (!d || d.lang !== "rust" || d.kind !== "struct" || !d.repr.transparent || d.generic) return r;
    const sized = d.fields.filter((f) => {
      const l = layoutOf(f.type, { model, side: "rust", triple });
      return l.unknown || l.size > 0;
    });
    if (sized.length !== 1) return r;
    r = model.resolve(sized[0]!.type, "rust");
  }
  return r;
}

function isByte(t: AbiType): boolean {
  return t.k === "scalar" && ["char", "schar", "uchar", "i8", "u8"].includes(t.s);
}

function comparePointee(model: Model, rt: AbiType, ct: AbiType, triple: Triple, level: number): TypeDiff | null {
  const d = compareOn(model, rt, ct, triple, level + 1);
  if (!d) return null;
  // A pointer to a whole array and a pointer to its first element hold the same address and
  // reach the same items (C11 §6.3.2.1p3: an array converts to a pointer to its first element;
  // the Rust Reference: an array's elements are laid out contiguously): `*const [u32; 256]` for a
  // `const uint32_t *` table is the same pointer.
  const ra = model.resolve(rt, "rust");
  const ca = model.resolve(ct, "c");
  if (ra.k === "array" && ca.k !== "array" && !compareOn(model, ra.of, ct, triple, level + 1)) return null;
  if (ca.k === "array" && ra.k !== "array" && !compareOn(model, rt, ca.of, triple, level + 1)) return null;
  // Byte buffers: `*const u8`/`*const i8` for `const char *` is common practice (strings, raw
  // bytes); the signedness of the byte does not change what the pointer addresses.
  if (d.kind === "sign" && isByte(rt) && isByte(ct)) return null;
  if (d.kind === "const" || d.kind === "sign" || d.kind === "name" || d.kind === "nullable") return d.kind === "const" ? { ...d, detail: `at the inner pointer level: ${d.detail}` } : d;
  if (d.kind === "depth") {
    return { kind: "depth", detail: `a different number of pointer levels: \`${describeRust(rt)}\` behind the pointer in Rust but \`${describeC(ct)}\` in C` };
  }
  const lr = layoutOf(rt, { model, side: "rust", triple });
  const lc = layoutOf(ct, { model, side: "c", triple });
  const sizes = !lr.unknown && !lc.unknown ? ` (${lr.size}-byte items vs ${lc.size}-byte items)` : "";
  return { kind: "item", detail: `points to \`${describeRust(rt)}\` in Rust but \`${describeC(ct)}\` in C${sizes}` };
}

function compareAggregates(model: Model, r: AbiType, c: AbiType, triple: Triple): TypeDiff | null {
  const rd = model.aggregate(r, "rust");
  const cd = model.aggregate(c, "c");
  // An opaque C handle matches any Rust type (C never looks inside); an enum matches an integer
  // of its size (checked by the enum rules).
  if (cd?.kind === "opaque" || rd?.opaqueMarker) return null;
  const lr = layoutOf(r, { model, side: "rust", triple });
  const lc = layoutOf(c, { model, side: "c", triple });
  if (lr.unknown || lc.unknown) {
    if (r.k === "named" && c.k === "named" && !namesAgree(r.name, c.name, cd) && rd && cd) {
      return { kind: "name", detail: `\`${r.name}\` in Rust but \`${describeC(c)}\` in C` };
    }
    return null;
  }
  // A Rust #[repr(C)]/transparent/#[repr(int)] aggregate against a C aggregate with a body is a
  // mirror pair: the layout family (rules/layout.ts, mirror-layout-mismatch / mirror-enum-mismatch)
  // reports its first differing field with both offsets, so a size difference is not repeated here.
  const mirrored = !!rd && !!cd && r.k === "named" && c.k === "named" && ((rd.kind === "enum") === (cd.kind === "enum")) && !!(rd.repr.c || rd.repr.transparent || rd.repr.int);
  if (!mirrored && lr.size !== lc.size) {
    return { kind: "width", detail: `\`${describeRust(r)}\` is ${lr.size} bytes but \`${describeC(c)}\` is ${lc.size} bytes` };
  }
  if (!mirrored && lr.align !== lc.align) {
    return { kind: "width", detail: `\`${describeRust(r)}\` is aligned to ${lr.align} but \`${describeC(c)}\` to ${lc.align}` };
  }
  if ((r.k === "named") !== (c.k === "named") && !(rd?.kind === "enum" || cd?.kind === "enum")) {
    return { kind: "kind", detail: `\`${describeRust(r)}\` in Rust but \`${describeC(c)}\` in C` };
  }
  // A #[repr(C)] Rust aggregate and a C aggregate with a body that meet at the same parameter, one
  // name's words all in the other's (`MsacAsmContext` / `MsacContext`), are a mirror pair
  // (rules/layout.ts compares them field by field); names with no word in common stay a warning.
  if (r.k === "named" && c.k === "named" && !(mirrored && relatedNames(r.name, c.name)) && !namesAgree(r.name, c.name, cd) && rd && cd && rd.kind !== "enum" && cd.kind !== "enum") {
    return { kind: "name", detail: `\`${r.name}\` in Rust but \`${describeC(c)}\` in C (same size, different types)` };
  }
  return null;
}

/**
 * A Rust name and a C type agree when the Rust name is a mirror name of any of the C type's
 * names: the name used, the declaration's typedef name and its tag (`typedef struct TagScan {…}
 * Scan;` is one type under two names; `struct scan_s` with `typedef … scan;` the same).
 */
function namesAgree(rust: string, cName: string, cd: { name: string; tag?: string } | undefined): boolean {
  const names = [cName, cd?.name, cd?.tag].filter((x): x is string => !!x);
  return names.some((n) => mirrorNames(rust, n) || mirrorNames(rust, n.replace(/^(struct|union|enum)\s+/, "").replace(/_s$/, "")));
}

/** The words of a type name: CamelCase and snake_case split, lower case, no `struct`/`_t`. */
function nameWords(n: string): string[] {
  return n.replace(/^(struct|union|enum)\s+/, "").replace(/_t$/, "").replace(/([a-z0-9])([A-Z])/g, "$1_$2").toLowerCase().split(/_+/).filter(Boolean);
}

/** One name's words are all among the other's. */
function relatedNames(a: string, b: string): boolean {
  const wa = nameWords(a), wb = nameWords(b);
  const [short, long] = wa.length <= wb.length ? [wa, new Set(wb)] : [wb, new Set(wa)];
  return short.length > 0 && short.every((w) => long.has(w));
}

/** Compares on every target and groups targets that share the same difference. */
export function compareTypes(model: Model, r: AbiType, c: AbiType, triples: Triple[]): GroupedDiff[] {
  const out: GroupedDiff[] = [];
  for (const t of triples) {
    const d = compareOn(model, r, c, t);
    if (!d) continue;
    const same = out.find((g) => g.kind === d.kind && g.detail === d.detail);
    if (same) same.targets.push(t);
    else out.push({ ...d, targets: [t] });
  }
  return out;
}
