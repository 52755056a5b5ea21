// Rule family "layout": a Rust mirror of a C aggregate must have the same layout on every target,
// and layout assertions written in the source must hold on every target.
//
// Pairing a Rust type with a C type (all three routes; a pair's aggregate fields pair up too):
//  1. an explicit mapping: a `ferrule-mirror: c_name` comment above the Rust item, or
//     `[layout.mirrors] RustName = "c_name"` in .ferrule.toml;
//  2. a function signature: parameter i (or the return) of a Rust extern fn and of the C
//     declaration of the same symbol name aggregates, by value or through the same number of
//     pointer levels;
//  3. the same name after normalisation (`SonarFrameHdr` ~ `sonar_frame_hdr_t`), for a Rust type
//     no signature pairs with another C type. Such a pair is weak (its findings are `info`) unless
//     a seam function's signature names the Rust type: sharing a name is no evidence the two ever
//     meet (a Rust port beside the C it replaced, a Rust API type beside a C test helper).
// A name declared in several files is read from the declaration nearest the file that names it.
// Layout facts come from model/layout.ts (checked against clang/gcc/rustc by
// tests/layout.oracle.test.ts); the Rust Reference ("Type layout") says a repr(C) type is laid out
// like the C type, and ("Behavior considered undefined") that an invalid enum discriminant is
// undefined behaviour.

import type { Model } from "../model/boundary.js";
import { HEADER_FILE, normName, twoImplementations } from "../model/boundary.js";
import type { AbiType, FnDecl, Range, SourceAssert, TypeDecl } from "../model/types.js";
import { declLayout, fieldsOn, layoutOf, spellType, type FieldLayout, type Layout } from "../model/layout.js";
import { compareOn } from "../model/compare.js";
import { C_SPELLING, RUST_SPELLING, scalarInfo, shortTriple, type ScalarKind, type Triple } from "../model/targets.js";
import { finding, targetPhrase, type Finding, type RuleFamily, type RuleMeta } from "./api.js";

export const MIRROR_MISMATCH: RuleMeta = {
  id: "mirror-layout-mismatch",
  severity: "error",
  summary: "A Rust #[repr(C)] type and the C type it mirrors differ in field count, order, a field's type, offset or size, or total size/alignment, on some target.",
  why: "Every field after the first difference is read from the wrong bytes: a header shared with C++ or an FPGA descriptor ring is silently corrupted, often only on the 32-bit targets.",
};
export const MIRROR_NOT_REPR_C: RuleMeta = {
  id: "mirror-not-repr-c",
  severity: "error",
  summary: "A Rust struct/union/enum that crosses the boundary (through a pointer, or as the mirror of a C type) has no #[repr(C)], #[repr(transparent)] or #[repr(int)].",
  why: "Without repr(C) Rust may reorder and pad fields as it likes (Rust Reference, \"The Rust representation\"), so C reads different bytes than Rust wrote.",
};
export const ENUM_MISMATCH: RuleMeta = {
  id: "mirror-enum-mismatch",
  severity: "error",
  summary: "A Rust enum and the C enum it mirrors have different discriminant values, a different number of values, or a different size on some target.",
  why: "A value written by one side means a different variant (or is out of range) on the other; a size difference shifts every later field or argument.",
};
export const ENUM_FROM_C_INT: RuleMeta = {
  id: "enum-from-c-int",
  severity: "warning",
  summary: "A Rust field-less enum receives a value from C (parameter, return or mirrored field) where C can hold any integer.",
  why: "C enums and ints may hold values no variant declares; such a value in a Rust enum is undefined behaviour (Rust Reference, \"Behavior considered undefined\"). Receive the integer and convert with a match or TryFrom.",
};
export const ASSERT_FAILS: RuleMeta = {
  id: "layout-assert-fails",
  severity: "error",
  summary: "A _Static_assert/static_assert/const assert! about sizeof/alignof/offsetof fails on some target.",
  why: "The assertion documents a layout the code relies on; the build for that target either fails or (if the assertion is not compiled there) runs with a different layout.",
};
export const NOT_PORTABLE: RuleMeta = {
  id: "layout-not-portable",
  severity: "warning",
  summary: "A type that crosses the boundary has a layout ferrule does not compute on some target (zero-width bit-fields, bit-fields under #pragma pack, flexible array members inside aggregates, …).",
  why: "The layout depends on compiler rules no ABI document fixes; check it with the compiler for that target or avoid the construct at the boundary.",
};

export interface Pair {
  rust: TypeDecl;
  c: TypeDecl;
  /** How they were matched, for messages. */
  via: string;
  /** Only ever passed by value (the c-representation family reports a missing repr then). */
  byValueOnly: boolean;
  /**
   * Paired by name alone: no seam function passes either type (as a parameter or return, through
   * pointers, or as a field of a type one passes) and no annotation maps them. Two types that share
   * a name but never meet at the boundary (a Rust port beside the C it replaced, a Rust API type
   * beside a C test helper) are not mirrors, so their differences are advice: `info`.
   */
  weak?: boolean;
}

const MIRROR_RE = /ferrule-mirror:\s*(?:struct\s+|union\s+|enum\s+)?([A-Za-z_]\w*)/;

function isAggregate(d: TypeDecl | undefined): d is TypeDecl {
  return !!d && (d.kind === "struct" || d.kind === "union" || d.kind === "enum") && !d.opaqueMarker && !d.generic;
}

function cAggregateByName(model: Model, name: string): TypeDecl | undefined {
  const d = model.aggregate({ k: "named", name }, "c");
  return d && d.kind !== "opaque" ? d : undefined;
}

/** Peels the same number of pointer/array levels off both sides; returns the inner named types. */
function innerPair(model: Model, r: AbiType, c: AbiType, rFrom?: string, cFrom?: string): { r: TypeDecl; c: TypeDecl; byValue: boolean } | undefined {
  let a = model.resolve(r, "rust");
  let b = model.resolve(c, "c");
  let byValue = true;
  for (let i = 0; i < 8; i++) {
    if (a.k === "ptr" && b.k === "ptr") {
      a = model.resolve(a.to, "rust");
      b = model.resolve(b.to, "c");
      byValue = false;
      continue;
    }
    if (a.k === "array" && b.k === "array") {
      a = model.resolve(a.of, "rust");
      b = model.resolve(b.of, "c");
      continue;
    }
    break;
  }
  if (a.k !== "named" || b.k !== "named") return undefined;
  const rd = model.aggregate(a, "rust", rFrom);
  const cd = model.aggregate(b, "c", cFrom);
  if (!rd || !cd || cd.kind === "opaque" || rd.opaqueMarker || rd.generic) return undefined;
  return { r: rd, c: cd, byValue };
}

/** Whether a header sees a file's declarations: the same file, or one it includes (transitively). */
function visibleFrom(model: Model, header: string, file: string): boolean {
  const seen = new Set([header]);
  const queue = [header];
  for (let k = 0; k < queue.length && k < 500; k++) {
    const f = queue[k]!;
    if (f === file) return true;
    for (const inc of model.files.get(f)?.includes ?? []) {
      const t = model.includeTarget(inc);
      if (t && !seen.has(t)) { seen.add(t); queue.push(t); }
    }
  }
  return false;
}

/** A field name as Rust and C spell it alike (`r#type` / `type`, `sampleRate` / `sample_rate`). */
function fieldKey(n: string): string {
  return n.replace(/^r#/, "").replace(/_/g, "").toLowerCase();
}

const pairsCache = new WeakMap<Model, Pair[]>();

/** The mirror pairs of a model (computed once per model: the signatures family asks too). */
export function findPairs(model: Model): Pair[] {
  let hit = pairsCache.get(model);
  if (!hit) {
    hit = computePairs(model);
    pairsCache.set(model, hit);
  }
  return hit;
}

function computePairs(model: Model): Pair[] {
  const pairs = new Map<string, Pair>();
  const add = (rust: TypeDecl, c: TypeDecl, via: string, byValue: boolean) => {
    const key = `${rust.id}|${c.id}`;
    const old = pairs.get(key);
    if (old) {
      old.byValueOnly &&= byValue;
      return;
    }
    pairs.set(key, { rust, c, via, byValueOnly: byValue });
  };
  const rustAggs: TypeDecl[] = [];
  const cByNorm = new Map<string, TypeDecl[]>();
  for (const f of model.files.values()) {
    for (const d of f.types) {
      if (!isAggregate(d)) continue;
      if (f.lang === "rust") rustAggs.push(d);
      else {
        const arr = cByNorm.get(normName(d.name)) ?? [];
        const same = arr.findIndex((x) => x.name === d.name);
        if (same < 0) arr.push(d);
        // one name declared in a header and in a .c file: the header's is the one other files see
        else if (!HEADER_FILE.test(arr[same]!.file) && HEADER_FILE.test(d.file)) arr[same] = d;
        cByNorm.set(normName(d.name), arr);
      }
    }
  }
  // 1. explicit mappings
  const cfg = (model.config.families?.layout ?? {}) as { mirrors?: Record<string, unknown> };
  const mirrors = cfg.mirrors && typeof cfg.mirrors === "object" ? cfg.mirrors : {};
  for (const d of rustAggs) {
    const m = MIRROR_RE.exec(d.doc);
    const target = m?.[1] ?? (typeof mirrors[d.name] === "string" ? (mirrors[d.name] as string) : undefined);
    if (!target) continue;
    const c = cAggregateByName(model, target);
    if (c) add(d, c, m ? `the ferrule-mirror comment names \`${target}\`` : `the [layout.mirrors] setting names \`${target}\``, false);
  }
  // 2. function signatures
  for (const g of model.symbols.values()) {
    if (!g.rust.length || !g.c.length) continue;
    // a function both a C file defines and Rust exports: two implementations of one API (a C
    // original beside its Rust port, one chosen by the build). What callers see is the header:
    // a struct it leaves opaque (its body only in the C implementation's own files) is that
    // implementation's private state, not the Rust port's mirror
    const dual = twoImplementations(g);
    const protos = g.c.filter((f) => f.role === "proto" && f.inHeader);
    const cands = protos.length ? protos : g.c;
    for (const r of g.rust) {
      for (const c of cands) {
        const seen = (d: TypeDecl) => !dual || (c.inHeader && visibleFrom(model, c.file, d.file));
        const n = Math.min(r.params.length, c.params.length);
        for (let i = 0; i < n; i++) {
          const p = innerPair(model, r.params[i]!.type, c.params[i]!.type, r.file, c.file);
          if (p && seen(p.c)) add(p.r, p.c, `both are parameter ${i + 1} of \`${g.symbol}\``, p.byValue);
        }
        const p = innerPair(model, r.ret, c.ret, r.file, c.file);
        if (p && seen(p.c)) add(p.r, p.c, `both are the return type of \`${g.symbol}\``, p.byValue);
      }
    }
  }
  // nested aggregates of a pair pair up too (same field index, same pointer depth)
  const nest = (queue: Pair[]) => {
    for (let k = 0; k < queue.length && k < 10_000; k++) {
      const p = queue[k]!;
      if (p.rust.kind === "enum" || p.c.kind === "enum") continue;
      const n = Math.min(p.rust.fields.length, p.c.fields.length);
      for (let i = 0; i < n; i++) {
        // only fields of the same name: where the names part, the two structs part too (the
        // parent pair's own finding says so), and what follows are not each other's mirrors
        if (fieldKey(p.rust.fields[i]!.name) !== fieldKey(p.c.fields[i]!.name)) break;
        const q = innerPair(model, p.rust.fields[i]!.type, p.c.fields[i]!.type, p.rust.file, p.c.file);
        if (!q) continue;
        const key = `${q.r.id}|${q.c.id}`;
        if (pairs.has(key)) continue;
        add(q.r, q.c, `they are field ${i + 1} of \`${p.rust.name}\` / \`${p.c.name}\``, q.byValue && p.byValueOnly);
        const np = pairs.get(key)!;
        if (p.weak && !seamTypes(model).has(q.r.id)) np.weak = true;
        // a C struct whose body lives in a .c file is that translation unit's private state:
        // met through another struct's field, not through a seam function, it is no sure mirror
        if (!HEADER_FILE.test(q.c.file)) np.weak = true;
        queue.push(np);
      }
    }
  };
  nest([...pairs.values()]);
  // 3. same (normalised) name, when exactly one C aggregate has it; weak unless a seam function
  // passes the Rust type (then C code may well hand it the C type of that name)
  const named: Pair[] = [];
  const pairedRust = new Set([...pairs.values()].map((p) => p.rust.id));
  for (const d of rustAggs) {
    const cs = cByNorm.get(normName(d.name)) ?? [];
    if (cs.length !== 1 || (cs[0]!.kind === "enum") !== (d.kind === "enum")) continue;
    const key = `${d.id}|${cs[0]!.id}`;
    if (pairs.has(key)) {
      add(d, cs[0]!, "they have the same name", false); // the same pair: also named alike (it crosses as the C type's twin)
      continue;
    }
    if (pairedRust.has(d.id)) continue; // a signature pairs it with another C type: that one is its mirror
    add(d, cs[0]!, "they have the same name", false);
    const np = pairs.get(key)!;
    if (!seamTypes(model).has(d.id) || !HEADER_FILE.test(cs[0]!.file)) np.weak = true;
    named.push(np);
  }
  nest(named);
  return [...pairs.values()];
}

const seamCache = new WeakMap<Model, Set<string>>();

/**
 * The Rust aggregates a seam function's signature names: a parameter or the return of an exported
 * or imported function, through pointers, arrays, Option and callback signatures. One step only:
 * the items this reads share the type's name (analysis/keys.ts), so a scoped re-check sees them.
 */
function seamTypes(model: Model): Set<string> {
  let hit = seamCache.get(model);
  if (hit) return hit;
  hit = new Set();
  const out = hit;
  const visit = (t: AbiType, from: string, depth: number): void => {
    if (depth > 16) return;
    const r = model.resolve(t, "rust");
    if (r.k === "unsafe") {
      if (r.optionOf) visit(r.optionOf, from, depth + 1);
      if (r.generic) for (const a of r.generic.args) visit(a, from, depth + 1);
    } else if (r.k === "ptr") visit(r.to, from, depth + 1);
    else if (r.k === "array") visit(r.of, from, depth + 1);
    else if (r.k === "fn") {
      for (const p of r.params) visit(p, from, depth + 1);
      visit(r.ret, from, depth + 1);
    } else if (r.k === "named") {
      const d = model.aggregate(r, "rust", from);
      if (d) out.add(d.id);
    }
  };
  for (const g of model.symbols.values()) {
    // (two implementations of one function — see computePairs — are not a seam crossing)
    if (twoImplementations(g)) continue;
    for (const f of g.rust) {
      if (f.role !== "export" && f.role !== "import") continue;
      for (const p of f.params) visit(p.type, f.file, 0);
      visit(f.ret, f.file, 0);
    }
  }
  seamCache.set(model, hit);
  return hit;
}

/** Findings made for a weak (name-only) pair become `info`, saying why. */
function weaken(p: Pair, out: Finding[], from: number): void {
  if (!p.weak) return;
  for (let i = from; i < out.length; i++) {
    const f = out[i]!;
    if (f.severity === "info") continue;
    f.severity = "info";
    f.message += HEADER_FILE.test(p.c.file)
      ? ` — paired by name only: no seam function passes \`${p.rust.name}\` or \`${p.c.name}\`, so they may never meet (map them with a \`ferrule-mirror\` comment to check them as mirrors)`
      : ` — \`${p.c.name}\` is private to ${p.c.file.split(/[\\/]/).pop()} and no seam function passes it, so they may never meet (map them with a \`ferrule-mirror\` comment to check them as mirrors)`;
  }
}

function bytes(n: number): string {
  return n === 1 ? "1 byte" : `${n} bytes`;
}

function cName(d: TypeDecl): string {
  return d.tag && d.tag === d.name && d.kind !== "enum" ? `${d.kind} ${d.name}` : d.name;
}

function group<T>(items: { key: string; triple: Triple; v: T }[]): { key: string; triples: Triple[]; vs: T[] }[] {
  const out: { key: string; triples: Triple[]; vs: T[] }[] = [];
  for (const it of items) {
    const g = out.find((x) => x.key === it.key);
    if (g) {
      g.triples.push(it.triple);
      g.vs.push(it.v);
    } else out.push({ key: it.key, triples: [it.triple], vs: [it.v] });
  }
  return out;
}

/** "8 (4 bytes)" when all targets agree, else "8 (4 bytes) on armv7, 16 (8 bytes) on x86_64-windows". */
function perTarget(triples: Triple[], vals: string[]): string {
  if (vals.every((v) => v === vals[0])) return vals[0]!;
  const g = group(vals.map((v, i) => ({ key: v, triple: triples[i]!, v })));
  return g.map((x) => `${x.key} on ${x.triples.map(shortTriple).join(", ")}`).join(", ");
}

interface FieldDiff {
  key: string;
  index: number;
  severity?: Finding["severity"];
  rustRange: Range;
  cRange: Range;
  /** Message without the per-target numbers. */
  text: string;
  numbers: string;
}

function fieldLabel(i: number, name: string): string {
  return `field ${i + 1}${name ? ` \`${name}\`` : ""}`;
}

/**
 * A C struct of bit-fields only (a register word) mirrored, as a field, by a Rust unsigned integer
 * with the same size and alignment on this target: the same bytes (common practice: Rust has no
 * bit-fields, so the mirror holds the whole word and shifts and masks; which bits each field takes
 * is the ABI's bit-field rule). Only as a field: passed or returned by value, a struct and an
 * integer may travel differently (the i386 psABI returns every struct in memory).
 */
function registerWord(model: Model, r: AbiType, c: AbiType, t: Triple, a: FieldLayout, b: FieldLayout): boolean {
  const rr = model.resolve(r, "rust");
  if (rr.k !== "scalar") return false;
  const s = scalarInfo(rr.s, t);
  if (s.cls !== "int" || s.signed) return false;
  const cr = model.resolve(c, "c");
  if (cr.k !== "named") return false;
  const d = model.aggregate(cr, "c");
  if (!d || d.kind !== "struct" || d.fields.length === 0 || !d.fields.every((f) => f.bits !== undefined)) return false;
  return a.size === b.size && a.align === b.align;
}

interface Leaf { o: number; size: number; cls: string }

/**
 * The scalar pieces of a type at their byte offsets (a struct's fields in order, an array's
 * elements), a union as one opaque piece; false when some part is unknown. Two types with the same
 * pieces hold the same bytes the same way, however the fields are grouped: a Rust struct holding
 * `{ pos, end }` for a C struct's `buf_pos, buf_end` (C11 6.7.2.1p15: members at increasing
 * addresses; Rust Reference, "The C representation": the same algorithm).
 */
function leaves(model: Model, t: AbiType, side: "rust" | "c", triple: Triple, base: number, out: Leaf[], from: string, depth = 0): boolean {
  if (depth > 16 || out.length > 4096) return false;
  const r = model.resolve(t, side);
  if (r.k === "scalar") {
    const i = scalarInfo(r.s, triple);
    out.push({ o: base, size: i.size, cls: `${i.cls}${i.cls === "int" && i.signed ? "s" : ""}` });
    return true;
  }
  if (r.k === "ptr" || r.k === "fn") {
    const l = layoutOf(r.k === "fn" ? { k: "ptr", to: r, mut: true } : r, { model, side, triple });
    if (l.unknown) return false;
    out.push({ o: base, size: l.size, cls: "ptr" });
    return true;
  }
  if (r.k === "array") {
    if (r.len === null) return false;
    const el = layoutOf(r.of, { model, side, triple });
    if (el.unknown) return false;
    for (let i = 0; i < r.len; i++) if (!leaves(model, r.of, side, triple, base + i * el.size, out, from, depth + 1)) return false;
    return true;
  }
  if (r.k !== "named") return false;
  const d = model.aggregate(r, side, from);
  if (!d) return false;
  const l = declLayout(d, { model, side, triple });
  if (l.unknown || l.notPortable) return false;
  if (d.kind === "enum") {
    out.push({ o: base, size: l.size, cls: "enum" });
    return true;
  }
  if (d.kind === "union") {
    out.push({ o: base, size: l.size, cls: "union" });
    return true;
  }
  const fs = fieldsOn(d, { model, triple });
  if (d.kind !== "struct" || !l.fields || fs.some((f) => f.bits !== undefined)) return false;
  for (let i = 0; i < fs.length; i++) {
    const fl = l.fields[i];
    if (!fl || !leaves(model, fs[i]!.type, side, triple, base + fl.offset, out, d.file, depth + 1)) return false;
  }
  return true;
}

/** Same pieces on both sides; an opaque union piece on one side covers whatever the other side
 * puts in its bytes (a mirror of a union by one of its members). Enums compare as integers. */
function sameLeaves(a: Leaf[], b: Leaf[]): boolean {
  // an enum holds an integer of its size (checked value by value by the enum rules)
  const same = (x: Leaf, y: Leaf) => x.cls === y.cls || (x.cls === "enum" && y.cls.startsWith("int")) || (y.cls === "enum" && x.cls.startsWith("int"));
  let i = 0, j = 0;
  while (i < a.length && j < b.length) {
    const x = a[i]!, y = b[j]!;
    if (x.cls === "union" || y.cls === "union") {
      const [u, other, k0, isA] = x.cls === "union" ? [x, b, j, true] : [y, a, i, false];
      if (x.o !== y.o) return false;
      let k = k0;
      while (k < other.length && other[k]!.o + other[k]!.size <= u.o + u.size && other[k]!.o >= u.o) k++;
      if (k < other.length && other[k]!.o < u.o + u.size) return false;
      if (isA) { i++; j = k; } else { j++; i = k; }
      continue;
    }
    if (x.o !== y.o || x.size !== y.size || !same(x, y)) return false;
    i++; j++;
  }
  return i === a.length && j === b.length;
}

function flatEqual(model: Model, p: Pair, t: Triple): boolean {
  const a: Leaf[] = [], b: Leaf[] = [];
  return leaves(model, { k: "named", name: p.rust.name }, "rust", t, 0, a, p.rust.file)
    && leaves(model, { k: "named", name: p.c.name }, "c", t, 0, b, p.c.file)
    && sameLeaves(a, b);
}

function diffOn(model: Model, p: Pair, t: Triple, lr: Layout, lc: Layout): FieldDiff | undefined {
  const d = diffFields(model, p, t, lr, lc);
  // grouped differently but the same bytes: not a difference
  if (d && d.severity !== "warning" && lr.size === lc.size && lr.align === lc.align && flatEqual(model, p, t)) return undefined;
  return d;
}

function diffFields(model: Model, p: Pair, t: Triple, lr: Layout, lc: Layout): FieldDiff | undefined {
  const rf = fieldsOn(p.rust, { model, triple: t });
  const cf = fieldsOn(p.c, { model, triple: t });
  const bits = cf.some((f) => f.bits !== undefined);
  const n = Math.min(rf.length, cf.length);
  if (!bits) {
    for (let i = 0; i < n; i++) {
      const a = lr.fields?.[i];
      const b = lc.fields?.[i];
      if (!a || !b) break;
      const td = compareOn(model, rf[i]!.type, cf[i]!.type, t);
      const typeBad = td && td.kind !== "const" && td.kind !== "name" && td.kind !== "nullable" && !registerWord(model, rf[i]!.type, cf[i]!.type, t, a, b);
      if (a.offset === b.offset && a.size === b.size && !typeBad) continue;
      const rt = spellType(rf[i]!.type, "rust");
      const ct = spellType(cf[i]!.type, "c");
      const moved = cf.findIndex((x) => x.name && rf[i]!.name && normName(x.name) === normName(rf[i]!.name));
      const hint = moved >= 0 && moved !== i ? ` (C declares \`${cf[moved]!.name}\` as field ${moved + 1}: fields in a different order?)` : "";
      const why = typeBad ? ` — ${td!.detail}` : a.offset !== b.offset ? " — an earlier difference in alignment or packing moves it" : "";
      return {
        key: `f${i}|${rt}|${ct}|${why}`,
        index: i,
        severity: td && td.kind === "sign" && a.offset === b.offset && a.size === b.size ? "warning" : undefined,
        rustRange: rf[i]!.range,
        cRange: cf[i]!.range,
        text: `first differ at ${fieldLabel(i, rf[i]!.name)}: \`${rt}\` in Rust, \`${ct}\`${cf[i]!.name && cf[i]!.name !== rf[i]!.name ? ` \`${cf[i]!.name}\`` : ""} in C${why}${hint}`,
        numbers: `Rust offset ${a.offset} (${bytes(a.size)}), C offset ${b.offset} (${bytes(b.size)})`,
      };
    }
    if (rf.length !== cf.length) {
      const extraR = rf.length > cf.length;
      const f = extraR ? rf[n]! : cf[n]!;
      return {
        key: `count`,
        index: n,
        rustRange: extraR ? f.range : p.rust.nameRange,
        cRange: extraR ? p.c.nameRange : f.range,
        text: `have ${rf.length} field(s) in Rust but ${cf.length} in C; ${fieldLabel(n, f.name)} exists only in ${extraR ? "Rust" : "C"}`,
        numbers: `sizes ${lr.size} / ${lc.size} bytes`,
      };
    }
  }
  if (lr.size !== lc.size || lr.align !== lc.align) {
    return {
      key: "total",
      index: -1,
      rustRange: p.rust.nameRange,
      cRange: p.c.nameRange,
      text: bits
        ? "differ in size or alignment (the C type has bit-fields, so fields are compared by total size only)"
        : `differ in total size or alignment with the same fields — a missing or extra packed/align attribute?`,
      numbers: `Rust ${lr.size} bytes aligned to ${lr.align}, C ${lc.size} bytes aligned to ${lc.align}`,
    };
  }
  return undefined;
}

function checkPair(model: Model, p: Pair, out: Finding[], reprReported: Set<string>): void {
  const rd = p.rust;
  const cd = p.c;
  const related = [{ range: cd.nameRange, message: `C declaration of \`${cd.name}\`` }];
  const hasRepr = rd.kind === "enum" ? !!(rd.repr.c || rd.repr.int) : !!(rd.repr.c || rd.repr.transparent);
  if (!hasRepr) {
    if (!p.byValueOnly && !reprReported.has(rd.id)) {
      reprReported.add(rd.id);
      out.push(finding(MIRROR_NOT_REPR_C, rd.nameRange, `\`${rd.name}\` crosses the boundary as the Rust side of C \`${cName(cd)}\` (${p.via}) but has no ${rd.kind === "enum" ? "#[repr(C)] or #[repr(<int>)]" : "#[repr(C)]"}, so Rust may lay it out differently`, related, { data: { rust: rd.id, c: cd.id } }));
    }
    return;
  }
  const targets = model.targets;
  if (rd.kind === "enum" || cd.kind === "enum") {
    checkEnumPair(model, p, out);
    return;
  }
  // A Rust struct standing for a C union (common practice: Rust code emulating the union by its
  // largest member, or bytes with accessors) holds the same bytes when it has the union's size and
  // alignment on every target and its pieces fit inside the union.
  if (rd.kind === "struct" && cd.kind === "union" && model.targets.every((t) => {
    const a = declLayout(rd, { model, side: "rust", triple: t });
    const b = declLayout(cd, { model, side: "c", triple: t });
    return !a.unknown && !b.unknown && a.size === b.size && a.align === b.align && flatEqual(model, p, t);
  })) return;
  if (rd.kind !== cd.kind) {
    out.push(finding(MIRROR_MISMATCH, rd.nameRange, `\`${rd.name}\` is a Rust ${rd.kind} but C \`${cName(cd)}\` is a ${cd.kind} (${p.via})`, related, { data: { rust: rd.id, c: cd.id } }));
    return;
  }
  const items: { key: string; triple: Triple; v: FieldDiff }[] = [];
  const notPortable: { key: string; triple: Triple; v: string }[] = [];
  for (const t of targets) {
    const lr = declLayout(rd, { model, side: "rust", triple: t });
    const lc = declLayout(cd, { model, side: "c", triple: t });
    if (lr.unknown || lc.unknown) return; // an unresolved field type: nothing certain to say
    if (lc.notPortable || lr.notPortable) {
      const why = lc.notPortable ?? lr.notPortable!;
      notPortable.push({ key: why, triple: t, v: why });
      continue;
    }
    const d = diffOn(model, p, t, lr, lc);
    if (d) items.push({ key: d.key, triple: t, v: d });
  }
  for (const g of group(notPortable)) {
    out.push(finding(NOT_PORTABLE, cd.nameRange, `layout not portable: C \`${cName(cd)}\`, mirrored by Rust \`${rd.name}\`: ${g.key}; ferrule cannot compare them there${targetPhrase(g.triples, targets)}`, [{ range: rd.nameRange, message: `Rust mirror \`${rd.name}\`` }], {
      targets: g.triples.length === targets.length ? undefined : g.triples,
      data: { rust: rd.id, c: cd.id },
    }));
  }
  for (const g of group(items)) {
    const d = g.vs[0]!;
    const nums = perTarget(g.triples, g.vs.map((x) => x.numbers));
    const f = finding(MIRROR_MISMATCH, d.rustRange, `\`${rd.name}\` (Rust) and \`${cName(cd)}\` (C) ${d.text}: ${nums}${targetPhrase(g.triples, targets)}`, [{ range: d.cRange, message: `C side: \`${cName(cd)}\` (matched because ${p.via})` }], {
      targets: g.triples.length === targets.length ? undefined : g.triples,
      data: { rust: rd.id, c: cd.id, field: d.index },
    });
    if (d.severity) f.severity = d.severity;
    out.push(f);
  }
}

/** A struct of one integer field laid out as that field (`#[repr(transparent)]` or `#[repr(C)]`). */
function isIntNewtype(model: Model, d: TypeDecl): boolean {
  if (!(d.repr.transparent || d.repr.c) || d.fields.length !== 1) return false;
  const t = model.resolve(d.fields[0]!.type, "rust");
  return t.k === "scalar" && !["bool", "f32", "f64", "float", "double", "ldouble", "rust_char"].includes(t.s);
}

function checkEnumPair(model: Model, p: Pair, out: Finding[]): void {
  const rd = p.rust;
  const cd = p.c;
  const related = [{ range: cd.nameRange, message: `C declaration of \`${cd.name}\`` }];
  // an integer newtype (`#[repr(transparent)] struct Mode(u32);` with associated constants) is a
  // common Rust spelling of a C enum that C may extend (common practice): only its size matters
  const newtype = rd.kind === "struct" && cd.kind === "enum" && isIntNewtype(model, rd);
  if (!newtype && (rd.kind !== "enum" || cd.kind !== "enum")) {
    out.push(finding(ENUM_MISMATCH, rd.nameRange, `\`${rd.name}\` is a Rust ${rd.kind} but C \`${cd.name}\` is a ${cd.kind} (${p.via})`, related));
    return;
  }
  const re = newtype ? [] : withoutCount(rd.enumerators);
  const ce0 = newtype ? [] : cd.enumerators;
  const ce = withoutCount(ce0);
  let reported = newtype;
  const byName = membersByName(re, ce);
  if (byName) {
    // every Rust variant has a C enumerator of the same name (once each side's common prefix is
    // stripped): compare values name by name, so swapped or shifted values show where they are
    for (let i = 0; i < re.length; i++) {
      const c = byName[i]!;
      if (re[i]!.value === null || c.value === null || re[i]!.value === c.value) continue;
      out.push(finding(ENUM_MISMATCH, re[i]!.range, `\`${rd.name}::${re[i]!.name}\` = ${re[i]!.value} in Rust but the C value of the same member, \`${c.name}\`, is ${c.value}`, [{ range: c.range, message: `C enumerator \`${c.name}\` (same member name; matched because ${p.via})` }], { data: { rust: rd.id, c: cd.id, index: i } }));
      reported = true;
      break;
    }
  } else {
    const n = Math.min(re.length, ce.length);
    for (let i = 0; i < n; i++) {
      if (re[i]!.value === null || ce[i]!.value === null) break;
      if (re[i]!.value !== ce[i]!.value) {
        out.push(finding(ENUM_MISMATCH, re[i]!.range, `\`${rd.name}::${re[i]!.name}\` = ${re[i]!.value} in Rust but the C value at the same position, \`${ce[i]!.name}\`, is ${ce[i]!.value}`, [{ range: ce[i]!.range, message: `C enumerator \`${ce[i]!.name}\` (matched because ${p.via})` }], { data: { rust: rd.id, c: cd.id, index: i } }));
        reported = true;
        break;
      }
    }
  }
  if (!reported && re.length !== ce.length) {
    const rv = new Set(re.map((e) => e.value));
    const missing = ce.filter((e) => !rv.has(e.value));
    const extra = re.filter((e) => !new Set(ce.map((x) => x.value)).has(e.value));
    const parts: string[] = [];
    if (missing.length) parts.push(`C declares ${missing.map((e) => `\`${e.name}\` = ${e.value}`).join(", ")} that Rust lacks${missing.length ? " — C sending it is undefined behaviour in Rust" : ""}`);
    if (extra.length) parts.push(`Rust declares ${extra.map((e) => `\`${e.name}\` = ${e.value}`).join(", ")} that C lacks`);
    out.push(finding(ENUM_MISMATCH, rd.nameRange, `\`${rd.name}\` has ${re.length} variant(s) but C \`${cd.name}\` has ${ce.length}: ${parts.join("; ")}`, related, { data: { rust: rd.id, c: cd.id } }));
  }
  const sizes: { key: string; triple: Triple; v: string }[] = [];
  for (const t of model.targets) {
    const a = declLayout(rd, { model, side: "rust", triple: t });
    const b = declLayout(cd, { model, side: "c", triple: t });
    if (a.unknown || b.unknown) return;
    if (a.size !== b.size || a.align !== b.align) sizes.push({ key: `${a.size}/${b.size}`, triple: t, v: `${bytes(a.size)} in Rust but ${bytes(b.size)} in C` });
  }
  for (const g of group(sizes)) {
    out.push(finding(ENUM_MISMATCH, rd.nameRange, `\`${rd.name}\` is ${g.vs[0]}${rd.repr.int ? ` (#[repr(${RUST_SPELLING[rd.repr.int]})])` : ""}; C \`${cd.name}\` is ${cd.repr.int ? `\`${C_SPELLING[cd.repr.int]}\`-sized` : "int-sized (C enums are int-sized on these ABIs)"}${targetPhrase(g.triples, model.targets)}`, related, {
      targets: g.triples.length === model.targets.length ? undefined : g.triples,
      data: { rust: rd.id, c: cd.id },
    }));
  }
}

type Enumerator = TypeDecl["enumerators"][number];

/**
 * A last enumerator that counts the others (`N_BL_LEVELS`, `TAP_COUNT`, `MODE_MAX`): common
 * practice in C for array sizes and loop bounds, not a value either side passes, so a Rust mirror
 * leaves it out. Recognised by its name and by a value one past (or equal to) the largest other.
 */
const COUNT_NAME = /^(N|NUM|NB|COUNT|MAX)_|_(COUNT|NUM|NB|MAX|LAST|END|LIMIT)$|^(Count|Num|Max|Last|End)$/;
function withoutCount(es: Enumerator[]): Enumerator[] {
  if (es.length < 2) return es;
  const last = es[es.length - 1]!;
  const rest = es.slice(0, -1);
  if (last.value === null || !COUNT_NAME.test(last.name) || rest.some((e) => e.value === null)) return es;
  const max = Math.max(...rest.map((e) => e.value!));
  return last.value === max + 1 || last.value === max || last.value === rest.length ? rest : es;
}

/** Member names without the prefix all members of the enum share (`HYD_GAIN_LOW` → `low`). */
function memberKeys(es: Enumerator[]): string[] {
  const names = es.map((e) => e.name);
  let prefix = names[0] ?? "";
  for (const n of names) while (!n.startsWith(prefix)) prefix = prefix.slice(0, -1);
  // cut at a word boundary (`_` or a lower→upper step) so `LOW`/`LOCK` keep their common `LO`
  let cut = 0;
  for (let i = 1; i <= prefix.length; i++) {
    if (prefix[i - 1] === "_" || (i < prefix.length && /[a-z0-9]/.test(prefix[i - 1]!) && /[A-Z]/.test(prefix[i]!))) cut = i;
  }
  if (names.length < 2) cut = 0;
  return names.map((n) => n.slice(cut).replace(/_/g, "").toLowerCase());
}

/** For each Rust variant the C enumerator of the same member name, when every variant has one. */
function membersByName(re: Enumerator[], ce: Enumerator[]): Enumerator[] | undefined {
  if (!re.length || !ce.length) return undefined;
  const rk = memberKeys(re);
  const ck = memberKeys(ce);
  const byKey = new Map<string, Enumerator>();
  ck.forEach((k, i) => { if (!byKey.has(k)) byKey.set(k, ce[i]!); });
  const out: Enumerator[] = [];
  for (const k of rk) {
    const c = byKey.get(k);
    if (!c) return undefined;
    out.push(c);
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// Rust enums receiving C integers

function rustEnum(model: Model, t: AbiType): TypeDecl | undefined {
  const r = model.resolve(t, "rust");
  if (r.k !== "named") return undefined;
  const d = model.aggregate(r, "rust");
  if (!d || d.kind !== "enum" || d.opaqueMarker || (d as TypeDecl & { dataCarrying?: boolean }).dataCarrying) return undefined;
  return d;
}

function cIntegerish(model: Model, t: AbiType): boolean {
  const r = model.resolve(t, "c");
  if (r.k === "scalar") return r.s !== "float" && r.s !== "double" && r.s !== "ldouble" && r.s !== "bool";
  if (r.k === "named") return model.aggregate(r, "c")?.kind === "enum";
  return false;
}

function enumWarning(model: Model, e: TypeDecl, where: string, range: Range, cType: AbiType, cRange: Range, out: Finding[], advice = false): void {
  const vals = e.enumerators.map((x) => x.value).filter((v): v is number => v !== null);
  const shown = vals.length <= 6 ? vals.join(", ") : `${vals.slice(0, 5).join(", ")}, …`;
  const ct = spellType(model.resolve(cType, "c"), "c");
  out.push(finding(ENUM_FROM_C_INT, range, `${where} receives C \`${ct}\` as Rust enum \`${e.name}\`: any value other than ${shown} is undefined behaviour in Rust; receive the integer and convert it with a match or TryFrom`, [{ range: cRange, message: `C side (\`${ct}\`)` }], advice ? { data: { enum: e.id }, severity: "info" } : { data: { enum: e.id } }));
}

/**
 * The Rust aggregates the seam's signatures name (`reached`), and those whose bytes C can hand to
 * Rust (`inbound`): a parameter of an exported function, the return of an imported one, anything
 * behind a writable pointer (C may fill it) or in a callback's signature (either side may
 * implement it), and any field of a #[repr(C)]/transparent Rust type (whoever passes the outer
 * type; the fields of a type without a C layout are Rust's own: C sees it only as an opaque
 * handle). A type named only the other way (returned by a Rust export, passed to C by value or
 * behind a const pointer) is only ever written by Rust, so a field-less enum in it holds one of
 * its variants (Rust Reference, "Behavior considered undefined": producing an invalid value). A
 * type no signature names (a `void *` cast, a name match) counts as inbound.
 * Only one step from a signature or a field: the items this depends on share the type's name
 * (analysis/keys.ts), so a scoped re-check sees them all.
 */
function seamFlows(model: Model): { reached: Set<string>; inbound: Set<string> } {
  const reached = new Set<string>();
  const inbound = new Set<string>();
  const visit = (t: AbiType, inb: boolean, depth: number): void => {
    if (depth > 16) return;
    const r = model.resolve(t, "rust");
    if (r.k === "unsafe") {
      if (r.optionOf) visit(r.optionOf, inb, depth + 1);
    } else if (r.k === "ptr") {
      visit(r.to, inb || r.mut || r.via === "box", depth + 1);
    } else if (r.k === "array") {
      visit(r.of, inb, depth + 1);
    } else if (r.k === "fn") {
      for (const p of r.params) visit(p, true, depth + 1);
      visit(r.ret, true, depth + 1);
    } else if (r.k === "named") {
      const d = model.aggregate(r, "rust");
      if (!d) return;
      reached.add(d.id);
      if (inb) inbound.add(d.id);
    }
  };
  for (const g of model.symbols.values()) {
    for (const f of g.rust) {
      if (f.role !== "export" && f.role !== "import") continue;
      for (const p of f.params) visit(p.type, f.role === "export", 0);
      visit(f.ret, f.role === "import", 0);
    }
  }
  for (const file of model.files.values()) {
    if (file.lang !== "rust") continue;
    for (const d of file.types) if (d.repr.c || d.repr.transparent) for (const f of d.fields) visit(f.type, true, 0);
  }
  return { reached, inbound };
}

function checkEnumInputs(model: Model, pairs: Pair[], out: Finding[]): void {
  for (const g of model.symbols.values()) {
    if (!g.rust.length || !g.c.length) continue;
    const protos = g.c.filter((f) => f.role === "proto" && f.inHeader);
    const c: FnDecl | undefined = (protos.length ? protos : g.c)[0];
    if (!c) continue;
    for (const r of g.rust) {
      if (r.role === "export") {
        r.params.forEach((p, i) => {
          const e = rustEnum(model, p.type);
          const cp = c.params[i];
          if (e && cp && cIntegerish(model, cp.type)) enumWarning(model, e, `parameter ${i + 1} \`${p.name}\` of \`${r.name}\``, p.typeRange, cp.type, cp.range, out);
        });
      } else if (r.role === "import") {
        const e = rustEnum(model, r.ret);
        if (e && cIntegerish(model, c.ret)) enumWarning(model, e, `the return value of \`${r.name}\``, r.retRange ?? r.nameRange, c.ret, c.retRange ?? c.nameRange, out);
      }
    }
  }
  const flows = seamFlows(model);
  for (const p of pairs) {
    if (p.rust.kind === "enum" || p.c.kind === "enum") continue;
    if (flows.reached.has(p.rust.id) && !flows.inbound.has(p.rust.id)) continue;
    const n = Math.min(p.rust.fields.length, p.c.fields.length);
    const at = out.length;
    for (let i = 0; i < n; i++) {
      const rf = p.rust.fields[i]!;
      const cf = p.c.fields[i]!;
      const e = rustEnum(model, rf.type);
      // A field of a struct C fills: C writes whatever its enum holds, and the values usually agree
      // (the mirror rules compare them); reading it as a Rust enum is advice, not a defect seen.
      if (e && cIntegerish(model, cf.type)) enumWarning(model, e, `field \`${rf.name}\` of \`${p.rust.name}\``, rf.range, cf.type, cf.range, out, true);
    }
    weaken(p, out, at);
  }
}

// ---------------------------------------------------------------------------------------------
// Source assertions

const SCALAR_BY_C_NAME = new Map<string, ScalarKind>();
const SCALAR_BY_RUST_NAME = new Map<string, ScalarKind>();
for (const [k, v] of Object.entries(C_SPELLING)) if (!SCALAR_BY_C_NAME.has(v)) SCALAR_BY_C_NAME.set(v, k as ScalarKind);
for (const [k, v] of Object.entries(RUST_SPELLING)) if (!SCALAR_BY_RUST_NAME.has(v)) SCALAR_BY_RUST_NAME.set(v, k as ScalarKind);
for (const k of ["i8", "u8", "i16", "u16", "i32", "u32", "i64", "u64", "i128", "u128", "isize", "usize", "f32", "f64", "bool"] as ScalarKind[]) SCALAR_BY_RUST_NAME.set(k, k);

function assertSubject(model: Model, a: SourceAssert): { t: AbiType; decl?: TypeDecl } | undefined {
  const side = a.lang === "rust" ? "rust" : "c";
  const name = a.typeName.replace(/^(struct|union|enum)\s+/, "");
  const decls = model.typeDecls(name, side);
  if (decls.length) {
    const t: AbiType = { k: "named", name };
    return { t, decl: model.aggregate(t, side) };
  }
  const s = (side === "rust" ? SCALAR_BY_RUST_NAME : SCALAR_BY_C_NAME).get(name.replace(/\s+/g, " "));
  return s ? { t: { k: "scalar", s } } : undefined;
}

const OPS: Record<SourceAssert["op"], (a: number, b: number) => boolean> = {
  "==": (a, b) => a === b, "!=": (a, b) => a !== b, "<=": (a, b) => a <= b,
  ">=": (a, b) => a >= b, "<": (a, b) => a < b, ">": (a, b) => a > b,
};

function checkAsserts(model: Model, out: Finding[]): void {
  for (const f of model.files.values()) {
    for (const a of f.asserts) {
      const subj = assertSubject(model, a);
      if (!subj) continue;
      const side = a.lang === "rust" ? "rust" : "c";
      const tn = a.typeName;
      const what = a.lang === "rust"
        ? a.kind === "sizeof" ? `size_of::<${tn}>()` : a.kind === "alignof" ? `align_of::<${tn}>()` : `offset_of!(${tn}, ${a.field})`
        : a.kind === "sizeof" ? `sizeof(${tn})` : a.kind === "alignof" ? `_Alignof(${tn})` : `offsetof(${tn}, ${a.field})`;
      const fails: { key: string; triple: Triple; v: number }[] = [];
      const holds: Triple[] = [];
      for (const t of model.targets) {
        const l = layoutOf(subj.t, { model, side, triple: t });
        if (l.unknown || l.notPortable) continue;
        let actual: number | undefined;
        if (a.kind === "sizeof") actual = l.size;
        else if (a.kind === "alignof") actual = l.align;
        else {
          const fl = l.fields?.find((x) => x.name === a.field);
          if (fl && fl.bits === undefined) actual = fl.offset;
        }
        if (actual === undefined) continue;
        if (OPS[a.op](actual, a.value)) holds.push(t);
        else fails.push({ key: String(actual), triple: t, v: actual });
      }
      if (!fails.length) continue;
      const failing = fails.map((x) => x.triple);
      const groups = group(fails);
      // "does not hold on i686: … is 4 there (it holds on x86_64, …)"; no target list when it fails everywhere
      const some = failing.length !== model.targets.length;
      const where = some ? ` on ${failing.map(shortTriple).join(", ")}` : "";
      const byVal = groups.length === 1 ? `${groups[0]!.vs[0]}${some ? " there" : ""}` : groups.map((g) => `${g.vs[0]} on ${g.triples.map(shortTriple).join(", ")}`).join(", ");
      const holdText = holds.length ? ` (it holds on ${holds.map(shortTriple).join(", ")})` : "";
      const related = subj.decl ? [{ range: subj.decl.nameRange, message: `declaration of \`${subj.decl.name}\`` }] : [];
      out.push(finding(ASSERT_FAILS, a.range, `\`${what} ${a.op} ${a.value}\` does not hold${where}: ${what} is ${byVal}${holdText}`, related, {
        targets: failing.length === model.targets.length ? undefined : failing,
        data: { kind: a.kind, type: a.typeName },
      }));
    }
  }
}

export const layoutFamily: RuleFamily = {
  name: "layout",
  rules: [MIRROR_MISMATCH, MIRROR_NOT_REPR_C, ENUM_MISMATCH, ENUM_FROM_C_INT, ASSERT_FAILS, NOT_PORTABLE],
  check(model: Model): Finding[] {
    const out: Finding[] = [];
    const pairs = findPairs(model);
    const reprReported = new Set<string>();
    for (const p of pairs) {
      const at = out.length;
      checkPair(model, p, out, reprReported);
      weaken(p, out, at);
    }
    checkEnumInputs(model, pairs, out);
    checkAsserts(model, out);
    return out;
  },
};
