// Pairing inference: for each boundary function, which length parameter bounds which pointer,
// in items or in bytes, and where that knowledge came from. Sources, in order of trust:
//   1. explicit declarations on the C side: GCC `access(mode, ptr, size)` attributes, C99 array
//      parameters (`float out[static n]`), clang `__counted_by(n)` / `__sized_by(n)`, and the
//      ferrule doc-comment annotation (on either side; see the README, "Buffer contracts"):
//          ferrule-buffers: out[n], iq[2*n], raw[nbytes bytes], ctx nullable, alias(in, out)
//   2. Rust body evidence: `slice::from_raw_parts(p, len)` in the exported function's body;
//   3. naming conventions: `n`, `len`, `count`, `num_*`, `n_*`, `*_len`, `*_count`, `n<word>`,
//      and capacities `max_*`, `*_max`, `cap`, `*_cap`, `*_capacity` for item counts, `nbytes`, `*_bytes`, `size` for byte counts.
// Each pairing carries its evidence (text and location) for messages and hovers.

import type { Model } from "./boundary.js";
import type { AbiType, Expr, FnDecl, Range } from "./types.js";
import type { BufferHint, RustBufferFacts } from "./buffer-facts.js";
import { layoutOf } from "./layout.js";

export type PairSource = "gcc-access" | "c99-array" | "counted-by" | "ferrule-doc" | "rust-body" | "naming";
export const TRUST: Record<PairSource, number> = { "gcc-access": 6, "c99-array": 5, "counted-by": 5, "ferrule-doc": 5, "rust-body": 3, naming: 1 };

/** A length as a product: coef × Π names × Π sizeof(types) ÷ (Π divNames × Π divSizeofs). */
export interface LenTerm {
  coef: number;
  names: string[];
  sizeofs: AbiType[];
  divNames: string[];
  divSizeofs: AbiType[];
}

export interface Pairing {
  ptr: number;
  ptrName: string;
  /** The length in terms of parameter indexes (`#0`, `#2` …) so both sides' names map to it. */
  len: LenTerm;
  lenText: string;
  /** Parameter index of the (single) length parameter named in `len`, when there is one. */
  lenParam?: number;
  unit: "items" | "bytes";
  source: PairSource;
  access?: "read_only" | "write_only" | "read_write" | "none";
  evidence: string;
  at: Range;
}

export interface FnContract {
  symbol: string;
  c?: FnDecl;
  rust?: FnDecl;
  /** Best pairing per pointer parameter index. */
  pairs: Map<number, Pairing>;
  all: Pairing[];
  /** Parameter indexes the header documents as nullable, with the evidence. */
  nullable: Map<number, string>;
  /** Pointer parameter index pairs the header allows to alias, with the evidence. */
  alias: { a: number; b: number; evidence: string }[];
}

// ------------------------------------------------------------------------------------------

/** `opaque`: treat calls, fields and other sub-expressions as opaque factors (for argument scaling). */
export function lenTerm(e: Expr, lets?: Map<string, Expr>, depth = 0, opaque = false): LenTerm | undefined {
  if (depth > 30) return undefined;
  const one = (): LenTerm => ({ coef: 1, names: [], sizeofs: [], divNames: [], divSizeofs: [] });
  switch (e.k) {
    case "ident": {
      const l = lets?.get(e.name);
      if (l) return lenTerm(l, lets, depth + 1, opaque);
      return { ...one(), names: [e.name] };
    }
    case "num":
      return { ...one(), coef: e.value };
    case "cast":
      return lenTerm(e.e, lets, depth + 1, opaque);
    case "sizeof":
      return e.type ? { ...one(), sizeofs: [e.type] } : undefined;
    case "bin": {
      const l = lenTerm(e.l, lets, depth + 1, opaque);
      const r = lenTerm(e.r, lets, depth + 1, opaque);
      if (!l || !r) return undefined;
      if (e.op === "*") return { coef: l.coef * r.coef, names: [...l.names, ...r.names], sizeofs: [...l.sizeofs, ...r.sizeofs], divNames: [...l.divNames, ...r.divNames], divSizeofs: [...l.divSizeofs, ...r.divSizeofs] };
      if (e.op === "/") {
        if (r.coef === 0) return undefined;
        return { coef: l.coef / r.coef, names: l.names, sizeofs: l.sizeofs, divNames: [...l.divNames, ...r.names], divSizeofs: [...l.divSizeofs, ...r.sizeofs] };
      }
      if (e.op === "<<" && e.r.k === "num" && e.r.value < 31) return { ...l, coef: l.coef * 2 ** e.r.value };
      if (e.op === ">>" && e.r.k === "num" && e.r.value < 31) return { ...l, coef: l.coef / 2 ** e.r.value };
      return undefined;
    }
  }
  if (opaque && (e.k === "call" || e.k === "field" || e.k === "index")) return { ...one(), names: [`?${JSON.stringify(e).length}`] };
  return undefined;
}

export function termText(t: LenTerm, names: (n: string) => string = (n) => n): string {
  const parts: string[] = [];
  if (t.coef !== 1 || (!t.names.length && !t.sizeofs.length)) parts.push(String(t.coef));
  parts.push(...t.names.map(names));
  parts.push(...t.sizeofs.map((s) => `sizeof(${typeText(s)})`));
  let s = parts.join(" * ");
  const div = [...t.divNames.map(names), ...t.divSizeofs.map((x) => `sizeof(${typeText(x)})`)];
  if (div.length) s += " / " + div.join(" / ");
  return s;
}

export function typeText(t: AbiType): string {
  switch (t.k) {
    case "scalar": return t.s;
    case "complex": return `complex ${t.of}`;
    case "named": return t.name;
    case "void": return "void";
    case "ptr": return `${typeText(t.to)} *`;
    default: return "text" in t ? t.text : t.k;
  }
}

/** Size in bytes of a type on the model's first target (undefined when unknown). */
export function sizeOfType(model: Model, t: AbiType, side: "rust" | "c"): number | undefined {
  if (t.k === "void") return undefined;
  const triple = model.targets[0];
  if (!triple) return undefined;
  try {
    const l = layoutOf(side === "c" ? model.resolve(t, "c") : t, { model, side, triple });
    if (l.unknown || !l.size) return undefined;
    return l.size;
  } catch {
    return undefined;
  }
}

/** Bytes contributed by the sizeof factors (multiplied) over divided ones; null when unknown. */
export function sizeofFactor(model: Model, t: LenTerm, side: "rust" | "c"): number | null {
  let f = 1;
  for (const s of t.sizeofs) { const z = sizeOfType(model, s, side); if (!z) return null; f *= z; }
  for (const s of t.divSizeofs) { const z = sizeOfType(model, s, side); if (!z) return null; f /= z; }
  return f;
}

/** Same parameters and coefficient (sizeof factors compared by size). */
export function sameTerm(model: Model, a: LenTerm, b: LenTerm, side: "rust" | "c"): boolean {
  const key = (x: LenTerm) => [...x.names].sort().join("*") + "/" + [...x.divNames].sort().join("/");
  if (key(a) !== key(b)) return false;
  const fa = sizeofFactor(model, a, side);
  const fb = sizeofFactor(model, b, side);
  if (fa === null || fb === null) return false;
  return Math.abs(a.coef * fa - b.coef * fb) < 1e-9;
}

// ------------------------------------------------------------------------------------------

const ITEM_NAME = /^(n|len|length|count|num|cnt|nitems|n_items|nsamp|nsamples|nbins|ntaps|npoints|nframes|nelem|nelems|nvals|nvalues|cap|capacity)$|^(num|n|max)_[a-z0-9_]+$|^[a-z0-9_]+_(len|length|count|cnt|items|samples|num|max|cap|capacity)$|^n[a-z]{2,12}$/;
const BYTE_NAME = /^(nbytes|size|byte_len|len_bytes|size_bytes|num_bytes)$|^[a-z0-9_]+_(bytes|nbytes)$|^n_bytes$/;
const NOT_COUNT = /^(norm|noise|null|name|node|next|nan|notify|nonce)/;

function isIntType(t: AbiType): boolean {
  return t.k === "scalar" && !["float", "double", "f32", "f64", "ldouble", "bool"].includes(t.s);
}

/** A pointer parameter that carries a data buffer (not an opaque handle, not a callback). */
export function isBufferPtr(model: Model, t: AbiType, side: "rust" | "c"): boolean {
  if (t.k !== "ptr" || t.via === "box") return false;
  const to = side === "c" ? model.resolve(t.to, "c") : t.to;
  if (to.k === "scalar" || to.k === "complex" || to.k === "void") return true;
  if (to.k === "named") {
    const agg = model.aggregate(to, side);
    return !!agg && agg.kind !== "opaque" && !agg.opaqueMarker && agg.kind !== "alias" && (agg.fields.length > 0 || agg.kind === "enum");
  }
  return false;
}

/** What a count's name reads as by the naming conventions above (one identifier's text). */
export function countUnit(name: string): "items" | "bytes" | undefined {
  const n = name.toLowerCase();
  if (BYTE_NAME.test(n)) return "bytes";
  if (NOT_COUNT.test(n)) return undefined;
  if (ITEM_NAME.test(n)) return "items";
  return undefined;
}

const DOC_RE = /ferrule-buffers:\s*(.+)$/m;

/** The ferrule doc annotation: `ferrule-buffers: out[n], iq[2*n], raw[nbytes bytes], ctx nullable, alias(in, out)`. */
export function parseDocAnnotation(doc: string): { bufs: { ptr: string; factors: string[]; coef: number; unit: "items" | "bytes"; text: string }[]; nullable: string[]; alias: [string, string][]; line: string } | undefined {
  const m = DOC_RE.exec(doc);
  if (!m) return undefined;
  const line = m[1]!.trim();
  const out = { bufs: [] as { ptr: string; factors: string[]; coef: number; unit: "items" | "bytes"; text: string }[], nullable: [] as string[], alias: [] as [string, string][], line: m[0].trim() };
  // entries separated by commas outside brackets/parentheses
  const entries: string[] = [];
  let depth = 0, cur = "";
  for (const ch of line) {
    if (ch === "[" || ch === "(") depth++;
    if (ch === "]" || ch === ")") depth--;
    if (ch === "," && depth === 0) { entries.push(cur.trim()); cur = ""; } else cur += ch;
  }
  if (cur.trim()) entries.push(cur.trim());
  for (const e of entries) {
    let mm = /^([A-Za-z_]\w*)\s*\[\s*([^\]]+?)\s*\]$/.exec(e);
    if (mm) {
      let body = mm[2]!;
      let unit: "items" | "bytes" = "items";
      const um = /\s+(bytes|items)$/.exec(body);
      if (um) { unit = um[1] as "items" | "bytes"; body = body.slice(0, um.index); }
      const factors = body.split("*").map((x) => x.trim()).filter(Boolean);
      let coef = 1;
      const names: string[] = [];
      let ok = true;
      for (const f of factors) {
        if (/^\d+$/.test(f)) coef *= Number(f);
        else if (/^[A-Za-z_]\w*$/.test(f)) names.push(f);
        else ok = false;
      }
      if (ok) out.bufs.push({ ptr: mm[1]!, factors: names, coef, unit, text: e });
      continue;
    }
    mm = /^([A-Za-z_]\w*)\s+nullable$/.exec(e);
    if (mm) { out.nullable.push(mm[1]!); continue; }
    mm = /^alias\s*\(\s*([A-Za-z_]\w*)\s*,\s*([A-Za-z_]\w*)\s*\)$/.exec(e);
    if (mm) out.alias.push([mm[1]!, mm[2]!]);
  }
  return out;
}

/** Words of a doc comment that say a pointer may be NULL (a C header's prose). */
export const NULL_DOC = /\b(may|can|might) be (NULL|null|nullptr)\b|\bNULL (is allowed|allowed|disables|means)\b|\boptional\b|\bor NULL\b/;

function paramIndexByName(fn: FnDecl | undefined, name: string): number {
  return fn ? fn.params.findIndex((p) => p.name === name) : -1;
}

function termToIdx(t: LenTerm, fn: FnDecl): LenTerm | undefined {
  const map = (n: string) => { const i = paramIndexByName(fn, n); return i >= 0 ? `#${i}` : undefined; };
  const names: string[] = [];
  for (const n of t.names) { const x = map(n); if (!x) return undefined; names.push(x); }
  const divNames: string[] = [];
  for (const n of t.divNames) { const x = map(n); if (!x) return undefined; divNames.push(x); }
  return { ...t, names, divNames };
}

/** Renders a term whose names are `#i` with the parameter names of `fn`. */
export function idxTermText(t: LenTerm, fn: FnDecl): string {
  return termText(t, (n) => fn.params[Number(n.slice(1))]?.name ?? n);
}

function singleParam(t: LenTerm): number | undefined {
  if (t.names.length !== 1) return undefined;
  return Number(t.names[0]!.slice(1));
}

function loc(r: Range): string {
  return `${r.file.split("/").pop()}:${r.line + 1}`;
}

const cache = new WeakMap<Model, Map<string, FnContract>>();

/** The contract of one boundary symbol, merged from the C declaration(s) and the Rust function. */
export function contractOf(model: Model, symbol: string): FnContract | undefined {
  let m = cache.get(model);
  if (!m) cache.set(model, (m = new Map()));
  if (m.has(symbol)) return m.get(symbol);
  const g = model.symbols.get(symbol);
  if (!g) return undefined;
  const cHeader = g.c.find((f) => f.role === "proto" && f.inHeader) ?? g.c.find((f) => f.role === "proto") ?? g.c[0];
  const rust = g.rust.find((f) => f.role === "export") ?? g.rust[0];
  const k: FnContract = { symbol, c: cHeader, rust, pairs: new Map(), all: [], nullable: new Map(), alias: [] };
  const ref = cHeader ?? rust!;
  const add = (p: Pairing) => {
    k.all.push(p);
    const cur = k.pairs.get(p.ptr);
    if (!cur || TRUST[p.source] > TRUST[cur.source]) k.pairs.set(p.ptr, p);
  };
  // 1. explicit declarations (every C declaration of the symbol)
  for (const c of g.c) {
    const hints = (model.files.get(c.file)?.extra.bufferHints as Record<string, BufferHint[]> | undefined)?.[c.id] ?? [];
    for (const h of hints) {
      const pi = paramIndexByName(c, h.ptr);
      const t = lenTerm(h.len);
      const ti = t && termToIdx(t, c);
      if (pi < 0 || !ti) continue;
      add({ ptr: pi, ptrName: h.ptr, len: ti, lenText: h.lenText, lenParam: singleParam(ti), unit: h.unit, source: h.source, access: h.access, evidence: `${h.evidence} at ${loc(h.range)}`, at: h.range });
    }
  }
  for (const f of [...g.c, ...g.rust]) {
    const ann = parseDocAnnotation(f.doc);
    if (!ann) continue;
    for (const b of ann.bufs) {
      const pi = paramIndexByName(f, b.ptr);
      const names = b.factors.map((n) => paramIndexByName(f, n));
      if (pi < 0 || names.some((x) => x < 0)) continue;
      const len: LenTerm = { coef: b.coef, names: names.map((x) => `#${x}`), sizeofs: [], divNames: [], divSizeofs: [] };
      add({ ptr: pi, ptrName: b.ptr, len, lenText: b.text.replace(/^\w+\s*\[|\]$/g, ""), lenParam: singleParam(len), unit: b.unit, source: "ferrule-doc", evidence: `\`${ann.line}\` in the doc comment of \`${f.name}\` at ${loc(f.nameRange)}`, at: f.nameRange });
    }
    for (const n of ann.nullable) { const i = paramIndexByName(f, n); if (i >= 0) k.nullable.set(i, `\`${n} nullable\` in the doc comment of \`${f.name}\` at ${loc(f.nameRange)}`); }
    for (const [a, b] of ann.alias) {
      const ia = paramIndexByName(f, a), ib = paramIndexByName(f, b);
      if (ia >= 0 && ib >= 0) k.alias.push({ a: ia, b: ib, evidence: `\`alias(${a}, ${b})\` in the doc comment of \`${f.name}\` at ${loc(f.nameRange)}` });
    }
  }
  // nullability and aliasing from the header's words and qualifiers
  for (const c of g.c) {
    c.params.forEach((p, i) => {
      if (/\b_Nullable\b/.test(p.text)) k.nullable.set(i, `\`_Nullable\` on \`${p.name}\` at ${loc(p.range)}`);
    });
    if (c.doc) {
      for (const sentence of c.doc.split(/(?<=[.;])\s+|\n/)) {
        if (!NULL_DOC.test(sentence)) continue;
        c.params.forEach((p, i) => {
          if (p.type.k === "ptr" && p.name && new RegExp(`\\b${p.name}\\b`).test(sentence) && !k.nullable.has(i)) k.nullable.set(i, `the doc comment of \`${c.name}\` at ${loc(c.nameRange)}: "${sentence.trim()}"`);
        });
      }
      if (/\bin[- ]place\b|\bmay (alias|overlap|be the same)\b|\bsame buffer\b/i.test(c.doc)) {
        const ptrs = c.params.map((p, i) => ({ p, i })).filter((x) => x.p.type.k === "ptr" && isBufferPtr(model, x.p.type, "c"));
        const ins = ptrs.filter((x) => x.p.type.k === "ptr" && !x.p.type.mut);
        const outs = ptrs.filter((x) => x.p.type.k === "ptr" && x.p.type.mut);
        for (const a of ins) for (const b of outs) if (!k.alias.some((z) => z.a === a.i && z.b === b.i)) k.alias.push({ a: a.i, b: b.i, evidence: `the doc comment of \`${c.name}\` at ${loc(c.nameRange)} allows \`${a.p.name}\` and \`${b.p.name}\` to be the same buffer` });
      }
    }
  }
  // 2. Rust body evidence
  if (rust) {
    const bf = rust.body?.buffers as RustBufferFacts | undefined;
    const lets = new Map<string, Expr>();
    for (const l of bf?.lets ?? []) if (!rust.params.some((p) => p.name === l.name)) lets.set(l.name, l.expr);
    for (const s of bf?.slices ?? []) {
      if (!s.root) continue;
      const pi = paramIndexByName(rust, s.root);
      const t = lenTerm(s.len, lets);
      const ti = t && termToIdx(t, rust);
      if (pi < 0 || !ti || !ti.names.length) continue;
      if (k.all.some((p) => p.source === "rust-body" && p.ptr === pi)) continue;
      // The unit of the length *parameter*: `nbytes / size_of::<T>()` means the parameter counts
      // bytes; `n * size_of::<T>()` (a byte view) means it counts items. A body that uses a
      // byte-named parameter as an item count is reported by the body rules; the parameter's
      // name stays the better guess for callers.
      const lpName = singleParam(ti) !== undefined ? rust.params[singleParam(ti)!]?.name ?? "" : "";
      const cName = singleParam(ti) !== undefined ? cHeader?.params[singleParam(ti)!]?.name ?? lpName : lpName;
      const unit = ti.divSizeofs.length > ti.sizeofs.length || (!ti.sizeofs.length && !ti.divSizeofs.length && (countUnit(lpName) === "bytes" || countUnit(cName) === "bytes")) ? "bytes" : "items";
      add({ ptr: pi, ptrName: ref.params[pi]?.name ?? s.root, len: ti, lenText: s.lenText, lenParam: singleParam(ti), unit, source: "rust-body", evidence: `\`${s.mut ? "from_raw_parts_mut" : "from_raw_parts"}(${s.root}, ${s.lenText})\` at ${loc(s.range)}${unit === "bytes" && !ti.divSizeofs.length ? `, with \`${cName}\` a byte count by its name` : ""}`, at: s.range });
    }
  }
  // 3. naming conventions (on the declaration C callers see, else the Rust one)
  const named = ref;
  const side = named.lang === "rust" ? "rust" : "c";
  const ptrs = named.params.map((p, i) => ({ p, i })).filter((x) => isBufferPtr(model, x.p.type, side));
  const lens = named.params.map((p, i) => ({ p, i, unit: isIntType(side === "c" ? model.resolve(p.type, "c") : p.type) ? countUnit(p.name) : undefined })).filter((x) => x.unit);
  const specific = new Map<number, { i: number; unit: "items" | "bytes" }>();
  for (const l of lens) {
    const nm = l.p.name.toLowerCase();
    for (const x of ptrs) {
      const pn = x.p.name.toLowerCase();
      if (!pn) continue;
      if (nm === `${pn}_len` || nm === `${pn}_count` || nm === `n_${pn}` || nm === `num_${pn}` || nm === `${pn}_bytes` || nm === `${pn}_nbytes` || nm === `${pn}_size` || nm === `${pn}len` || nm === `n${pn}` || nm === `max_${pn}` || nm === `${pn}_max` || nm === `${pn}_cap` || nm === `${pn}_capacity`) specific.set(x.i, { i: l.i, unit: nm === `${pn}_size` ? "bytes" : l.unit! });
    }
  }
  const generic = lens.filter((l) => ![...specific.values()].some((s) => s.i === l.i));
  ptrs.forEach((x, j) => {
    let pick = specific.get(x.i);
    if (!pick && generic.length) {
      // the nearest generic length after the pointer, else the nearest before it
      const after = generic.filter((l) => l.i > x.i);
      const before = generic.filter((l) => l.i < x.i);
      const g0 = after[0] ?? before[before.length - 1];
      if (g0) pick = { i: g0.i, unit: g0.unit! };
    }
    void j;
    if (!pick) return;
    const lp = named.params[pick.i]!;
    add({ ptr: x.i, ptrName: x.p.name, len: { coef: 1, names: [`#${pick.i}`], sizeofs: [], divNames: [], divSizeofs: [] }, lenText: lp.name, lenParam: pick.i, unit: pick.unit, source: "naming", evidence: `naming: \`${lp.name}\` reads as ${pick.unit === "bytes" ? "a byte count" : "an item count"} for \`${x.p.name}\` (\`${named.name}\` at ${loc(named.nameRange)})`, at: lp.range });
  });
  m.set(symbol, k);
  return k;
}

/** How a pairing is said in a message: "length `n` pairs with `out` (from …)". */
export function pairingPhrase(p: Pairing, fn: FnDecl): string {
  const len = idxTermText(p.len, fn);
  return `\`${p.ptrName}\` holds \`${len}\` ${p.unit} (from ${p.evidence})`;
}
