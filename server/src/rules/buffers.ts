// Rule family "buffers": pointer, length and item size across the boundary.
//
// Contracts come from model/pairing.ts (explicit declarations > Rust body > naming). Rust bodies
// are checked against them (slice lengths, byte/item units, writes through const pointers, slice
// element types, copy counts, NULL checks, aliasing), and so are C/C++ call sites of boundary
// functions (item sizes, byte counts, swapped arguments, const output buffers) and the port item
// sizes a block declares in its constructor (settings: `[ports]` in .ferrule.toml).

import type { Model } from "../model/boundary.js";
import type { AbiType, CallSite, Expr, FnDecl, Range } from "../model/types.js";
import type { CBufferFacts, CFnScope, CVar, RustBufferFacts, RustSliceFact } from "../model/buffer-facts.js";
import { contractOf, countUnit, idxTermText, isBufferPtr, lenTerm, sizeOfType, sizeofFactor, typeText, type FnContract, type LenTerm, type Pairing } from "../model/pairing.js";
import { finding, type Finding, type RuleFamily, type RuleMeta } from "./api.js";

export const SLICE_LEN: RuleMeta = {
  id: "slice-length-mismatch",
  severity: "error",
  summary: "A Rust slice is built from a boundary pointer with a length other than the one the contract pairs with that pointer.",
  why: "The slice reaches past the caller's buffer (out-of-bounds read or write) or silently covers only part of it.",
};
export const UNIT: RuleMeta = {
  id: "length-unit-mismatch",
  severity: "error",
  summary: "A byte count is used where an item count is expected, or the reverse (in a Rust body or at a C/C++ call site).",
  why: "`n * sizeof(float)` passed as an item count makes the callee walk four times past the end of the buffer.",
};
export const CONST_WRITE: RuleMeta = {
  id: "write-through-const",
  severity: "error",
  summary: "The Rust side writes through (or builds a mutable slice from) a pointer parameter declared `*const`.",
  why: "The caller hands read-only data (possibly in read-only memory, possibly shared); writing to it is undefined behaviour and corrupts the caller's input.",
};
export const ITEM_SIZE: RuleMeta = {
  id: "item-size-mismatch",
  severity: "error",
  summary: "A buffer is viewed or passed as items of another size than the contract's (complex vs float, int16 I/Q vs float, bytes vs floats) without scaling the count.",
  why: "The count is read in the wrong unit: half the buffer is skipped or twice its length is touched.",
};
export const COPY_COUNT: RuleMeta = {
  id: "copy-count-mismatch",
  severity: "error",
  summary: "`ptr::copy`/`copy_nonoverlapping` copies a count that matches neither the source's nor the destination's paired length (or counts bytes as items).",
  why: "A copy longer than either buffer writes past the destination or reads past the source.",
};
export const NULL_UNCHECKED: RuleMeta = {
  id: "nullable-unchecked",
  severity: "warning",
  summary: "The header documents a pointer as possibly NULL, but the Rust body dereferences or slices it with no null check first.",
  why: "`slice::from_raw_parts(NULL, n)` and `*p` on NULL are undefined behaviour even for n == 0.",
};
export const ALIAS: RuleMeta = {
  id: "aliasing-mut-slice",
  severity: "error",
  summary: "Input and output slices are built from pointers the header allows to be the same buffer, and one of them is `&mut`.",
  why: "A `&mut [T]` that overlaps any other live slice is undefined behaviour in Rust (aliasing rules), even if the loop looks harmless; use raw pointers or one slice.",
};
export const SWAPPED: RuleMeta = {
  id: "swapped-arguments",
  severity: "warning",
  summary: "Two arguments of a boundary call look swapped: the output buffer where the input belongs (by const-ness and names), or two lengths crossed.",
  why: "Swapped buffers make the kernel overwrite its input; swapped lengths bound each buffer by the other's size.",
};
export const CONST_OUT: RuleMeta = {
  id: "const-buffer-as-output",
  severity: "error",
  summary: "A C/C++ caller passes a const buffer where the kernel writes its output.",
  why: "The kernel writes into data the caller declared read-only (a cast or C's implicit conversion hid it).",
};
export const PORT_SIZE: RuleMeta = {
  id: "port-item-size-mismatch",
  severity: "error",
  summary: "A block's work method casts a port buffer to items of another size than the port declares in the constructor.",
  why: "The scheduler sizes the port's buffer by the declared item size; reading it as other items walks past its end or reads half of it.",
};
export const VECTOR_COUNT: RuleMeta = {
  id: "vector-port-count",
  severity: "warning",
  summary: "A vector port (item size `sizeof(T) * vlen`) is passed to a kernel with an item count not multiplied by the vector length.",
  why: "Each port item holds vlen values; passing n instead of n * vlen processes only a fraction of the data (or, for outputs, leaves it unwritten).",
};

const RULES = [SLICE_LEN, UNIT, CONST_WRITE, ITEM_SIZE, COPY_COUNT, NULL_UNCHECKED, ALIAS, SWAPPED, CONST_OUT, PORT_SIZE, VECTOR_COUNT];

const EXPLICIT = new Set(["gcc-access", "c99-array", "counted-by", "ferrule-doc"]);

function loc(r: Range): string {
  return `${r.file.split("/").pop()}:${r.line + 1}`;
}

function pointee(model: Model, t: AbiType | undefined, side: "rust" | "c"): AbiType | undefined {
  if (!t) return undefined;
  const r = side === "c" ? model.resolve(t, "c") : t;
  if (r.k !== "ptr") return undefined;
  return side === "c" ? model.resolve(r.to, "c") : r.to;
}

function itemSize(model: Model, t: AbiType | undefined, side: "rust" | "c"): number | undefined {
  if (!t || t.k === "void") return undefined;
  return sizeOfType(model, t, side);
}

/** Numeric value of a term with its names ignored: coef × sizeof factors. */
function numPart(model: Model, t: LenTerm, side: "rust" | "c"): number | null {
  const f = sizeofFactor(model, t, side);
  return f === null ? null : t.coef * f;
}

function namesKey(t: LenTerm): string {
  return [...t.names].sort().join("*") + "/" + [...t.divNames].sort().join("/");
}

function toIdx(t: LenTerm, fn: FnDecl): LenTerm | undefined {
  const m = (n: string) => { const i = fn.params.findIndex((p) => p.name === n); return i >= 0 ? `#${i}` : undefined; };
  const names: string[] = [];
  for (const n of t.names) { const x = m(n); if (!x) return undefined; names.push(x); }
  const divNames: string[] = [];
  for (const n of t.divNames) { const x = m(n); if (!x) return undefined; divNames.push(x); }
  return { ...t, names, divNames };
}

// ---------------------------------------------------------------------------------------------
// Rust bodies

function checkRust(model: Model, k: FnContract, out: Finding[]): void {
  const rust = k.rust;
  if (!rust || rust.role !== "export") return;
  const bf = rust.body?.buffers as RustBufferFacts | undefined;
  if (!bf) return;
  const ref = k.c ?? rust;
  const related = (extra: { range: Range; message: string }[] = []) => [...(k.c ? [{ range: k.c.nameRange, message: `C declaration of \`${k.c.name}\`` }] : []), ...extra];
  const lets = new Map<string, Expr>();
  for (const l of bf.lets) if (!rust.params.some((p) => p.name === l.name)) lets.set(l.name, l.expr);
  const pIndex = (name: string | undefined) => (name ? rust.params.findIndex((p) => p.name === name) : -1);
  const lenParams = new Set<number>();
  for (const p of k.all) if (p.lenParam !== undefined) lenParams.add(p.lenParam);

  for (const s of bf.slices) {
    const pi = pIndex(s.root);
    if (pi < 0) continue;
    const param = rust.params[pi]!;
    const declared = pointee(model, param.type, "rust");
    const T = itemSize(model, declared, "rust");
    const E = s.elem ? itemSize(model, s.elem, "rust") : T;
    const t0 = lenTerm(s.len, lets);
    const t = t0 && toIdx(t0, rust);
    // write-through-const: from_raw_parts_mut on a *const parameter
    if (s.mut && param.type.k === "ptr" && !param.type.mut) {
      out.push(finding(CONST_WRITE, s.range, `\`from_raw_parts_mut\` makes a mutable slice from \`${param.name}\`, which \`${rust.name}\` takes as \`${param.text}\` (read-only): the caller's data is written`, related([{ range: param.range, message: `\`${param.name}\` is declared \`${param.text}\`` }])));
    }
    // Pick the contract pairing that is not this very slice.
    const all = k.all.filter((p) => p.ptr === pi && p.source !== "rust-body");
    const best = all.sort((a, b) => rank(b) - rank(a))[0];
    if (!t || !best) {
      // No contract to compare with; still catch a byte view of a typed pointer with an item count.
      if (t && E && T && E !== T && t.names.some((n) => lenParams.has(Number(n.slice(1))))) reportElem(s, param, declared!, T, E, t, undefined);
      continue;
    }
    const P = best;
    const explicit = EXPLICIT.has(P.source);
    const pNum = numPart(model, P.len, "c");
    const sNum = numPart(model, t, "rust");
    if (pNum === null || sNum === null || !T || !E) continue;
    // expected slice length in slice items
    const expected = (P.unit === "bytes" ? pNum / E : (pNum * T) / E);
    const sameNames = namesKey(t) === namesKey(P.len);
    if (sameNames && Math.abs(sNum - expected) < 1e-9) continue;
    const contract = `${pairText(P, ref)}`;
    if (E !== T && sameNames && Math.abs(sNum - pNum) < 1e-9 && P.unit === "items") {
      reportElem(s, param, declared!, T, E, t, P);
      continue;
    }
    if (sameNames) {
      const ratio = sNum / expected;
      if (P.unit === "bytes" && Math.abs(ratio - E) < 1e-9) {
        out.push(finding(UNIT, s.range, `slice length \`${s.lenText}\` counts bytes, but \`${s.mut ? "from_raw_parts_mut" : "from_raw_parts"}\` takes ${typeText(s.elem ?? declared!)} items: ${contract}; use \`${idxTermText(P.len, rust)} / size_of::<${s.elemText ?? param.text.replace(/^\*(const|mut)\s*/, "")}>()\``, related([{ range: P.at, message: `contract: ${P.evidence}` }]), { data: { pairing: P.source } }));
        continue;
      }
      // (only when the slice length divides: `n` for a contract of `2*n` i16 items is a wrong
      // length, not a unit slip, although 2 is also the item size)
      if (P.unit === "items" && Math.abs(ratio * E - 1) < 1e-9 && E > 1 && (t.divSizeofs.length > 0 || t.coef < 1)) {
        out.push(finding(UNIT, s.range, `slice length \`${s.lenText}\` divides an item count by the item size as if it were bytes: ${contract}`, related([{ range: P.at, message: `contract: ${P.evidence}` }])));
        continue;
      }
      if (!explicit) continue; // body arithmetic of a naming-only pairing is the body's own contract
      out.push(finding(SLICE_LEN, s.range, `slice over \`${param.name}\` has length \`${s.lenText}\`, but the contract says ${contract}`, related([{ range: P.at, message: `contract: ${P.evidence}` }])));
      continue;
    }
    // different length parameters
    // (a length parameter this body pairs with `param` alone is not another buffer's length)
    const usesOtherLen = t.names.some((n) => { const i = Number(n.slice(1)); return k.all.some((p) => p.ptr !== pi && p.lenParam === i) && !P.len.names.includes(n); });
    if (explicit || usesOtherLen) {
      const other = k.all.filter((p) => p.ptr !== pi && t.names.some((n) => p.len.names.includes(n)))[0];
      const extra = other ? ` (\`${idxTermText(other.len, ref)}\` is the length of \`${other.ptrName}\`)` : "";
      const f = finding(SLICE_LEN, s.range, `slice over \`${param.name}\` has length \`${s.lenText}\`, but ${contract}${extra}`, related([{ range: P.at, message: `contract: ${P.evidence}` }]));
      if (!explicit) f.severity = "warning";
      out.push(f);
    }
  }

  function reportElem(s: RustSliceFact, param: FnDecl["params"][number], declared: AbiType, T: number, E: number, t: LenTerm, P: Pairing | undefined) {
    const why = P ? pairText(P, ref) : `\`${param.name}\` points to ${typeText(declared)} items`;
    out.push(finding(ITEM_SIZE, s.range, `slice of ${s.elemText ?? typeText(s.elem!)} (${E}-byte items) over \`${param.name}\`, declared \`${param.text}\` (${T}-byte items), with length \`${s.lenText}\` unscaled: ${why}; the slice covers ${E < T ? "only part of" : "more than"} the buffer`, related(P ? [{ range: P.at, message: `contract: ${P.evidence}` }] : [{ range: param.range, message: `\`${param.name}\` is declared \`${param.text}\`` }])));
    void t;
  }

  // writes through *const parameters
  for (const w of bf.writes) {
    const pi = pIndex(w.root);
    if (pi < 0) continue;
    const param = rust.params[pi]!;
    if (param.type.k === "ptr" && !param.type.mut && param.type.via === "raw") {
      out.push(finding(CONST_WRITE, w.range, `\`${rust.name}\` writes through \`${param.name}\` (\`${w.how}\`), which it takes as \`${param.text}\`: the caller's read-only buffer is modified`, related([{ range: param.range, message: `\`${param.name}\` is declared \`${param.text}\`` }])));
    }
  }

  // copies
  for (const c of bf.copies) {
    const t0 = lenTerm(c.count, lets);
    const t = t0 && toIdx(t0, rust);
    if (!t) continue;
    const si = pIndex(c.srcRoot), di = pIndex(c.dstRoot);
    const cands = [si, di].filter((i) => i >= 0).map((i) => k.pairs.get(i)).filter((p): p is Pairing => !!p);
    if (!cands.length) continue;
    const elemParam = rust.params[di >= 0 ? di : si]!;
    const T = itemSize(model, pointee(model, elemParam.type, "rust"), "rust");
    const tNum = numPart(model, t, "rust");
    if (!T || tNum === null) continue;
    let ok = false;
    let bytes = false;
    for (const P of cands) {
      const pNum = numPart(model, P.len, "c");
      if (pNum === null) { ok = true; break; }
      const expected = P.unit === "bytes" ? pNum / T : pNum;
      if (namesKey(t) === namesKey(P.len)) {
        if (Math.abs(tNum - expected) < 1e-9 || tNum < expected) { ok = true; break; }
        if (Math.abs(tNum - expected * T) < 1e-9) bytes = true;
      }
    }
    if (ok) continue;
    const desc = cands.map((P) => pairText(P, k.c ?? rust)).join("; ");
    const msg = bytes
      ? `\`${c.callee}\` counts ${T}-byte items, but \`${c.countText}\` is a byte count: ${desc}`
      : `\`${c.callee}\` copies \`${c.countText}\` items, which matches neither buffer's length: ${desc}`;
    out.push(finding(COPY_COUNT, c.range, msg, related(cands.map((P) => ({ range: P.at, message: `contract: ${P.evidence}` })))));
  }

  // documented-nullable pointers used without a check
  for (const [pi, ev] of k.nullable) {
    const param = rust.params[pi];
    if (!param || param.type.k !== "ptr" || param.type.via === "ref") continue;
    if (param.type.nullable === false) continue;
    const uses = [...bf.slices.filter((s) => s.root === param.name), ...bf.derefs.filter((d) => d.root === param.name), ...bf.writes.filter((w) => w.root === param.name), ...bf.copies.filter((c) => c.srcRoot === param.name || c.dstRoot === param.name)].sort((a, b) => a.pos - b.pos);
    const first = uses[0];
    if (!first) continue;
    const checked = bf.nullChecks.some((n) => n.root === param.name && n.pos <= first.pos);
    if (checked) continue;
    out.push(finding(NULL_UNCHECKED, first.range, `\`${param.name}\` may be NULL (${ev}), but \`${rust.name}\` uses it here with no null check before`, related([{ range: param.range, message: `parameter \`${param.name}\`` }])));
  }

  // aliasing: the header allows in/out to be one buffer; Rust makes two slices, one &mut
  for (const a of k.alias) {
    const na = rust.params[a.a]?.name, nb = rust.params[a.b]?.name;
    if (!na || !nb) continue;
    const sa = bf.slices.filter((s) => s.root === na), sb = bf.slices.filter((s) => s.root === nb);
    if (!sa.length || !sb.length) continue;
    const mutOne = [...sa, ...sb].find((s) => s.mut);
    if (!mutOne) continue;
    const other = (mutOne.root === na ? sb : sa)[0]!;
    out.push(finding(ALIAS, mutOne.range, `\`${rust.name}\` makes a \`&mut\` slice over \`${mutOne.root}\` while a slice over \`${other.root}\` is live, yet ${a.evidence}: when the caller passes the same buffer, that is undefined behaviour (two slices may not overlap when one is \`&mut\`); work through raw pointers or one slice`, related([{ range: other.range, message: `slice over \`${other.root}\`` }, ...(k.c ? [{ range: k.c.nameRange, message: `C declaration of \`${k.c.name}\`` }] : [])])));
  }
}

function rank(p: Pairing): number {
  return { "gcc-access": 6, "c99-array": 5, "counted-by": 5, "ferrule-doc": 5, "rust-body": 3, naming: 1 }[p.source];
}

function pairText(P: Pairing, fn: FnDecl): string {
  // a byte contract read from `nbytes / size_of::<f32>()` items: the buffer holds `nbytes` bytes
  const len = P.unit === "bytes" && P.len.divSizeofs.length === 1 && !P.len.sizeofs.length ? { ...P.len, divSizeofs: [] } : P.len;
  return `\`${P.ptrName}\` holds \`${idxTermText(len, fn)}\` ${P.unit} (from ${P.evidence})`;
}

// ---------------------------------------------------------------------------------------------
// C / C++ call sites

function scopeOf(model: Model, cs: CallSite): CFnScope | undefined {
  const bf = model.files.get(cs.file)?.extra.buffers as CBufferFacts | undefined;
  return bf?.fns.find((f) => f.name === cs.inFn && f.cls === cs.inClass && f.range.line <= cs.range.line && f.range.endLine >= cs.range.endLine);
}

function varOf(sc: CFnScope | undefined, name: string, line: number): CVar | undefined {
  if (!sc) return undefined;
  let best: CVar | undefined;
  const rank = { global: 0, field: 1, param: 2, local: 3 };
  for (const v of sc.vars) if (v.name === name && (v.kind !== "local" || v.line <= line) && (!best || rank[v.kind] > rank[best.kind] || (v.kind === "local" && best.kind === "local" && v.line >= best.line))) best = v;
  return best;
}

function identName(e: Expr): string | undefined {
  let cur = e;
  for (let g = 0; g < 20; g++) {
    if (cur.k === "ident") return cur.name;
    if (cur.k === "cast") { cur = cur.e; continue; }
    if (cur.k === "call" && cur.recv && (cur.callee === "data" || cur.callee === "get")) { cur = cur.recv; continue; }
    if (cur.k === "un" && cur.op === "&" && cur.e.k === "index") { cur = cur.e.e; continue; }
    if (cur.k === "field") return cur.name;
    return undefined;
  }
  return undefined;
}

/** The variable a length argument measures: `n_in`, `v.size()`, `std::size(v)`. */
function lenIdent(e: Expr): string | undefined {
  if (e.k === "call" && e.recv && (e.callee === "size" || e.callee === "length")) return identName(e.recv);
  if (e.k === "call" && !e.recv && /(^|::)size$/.test(e.callee) && e.args[0]) return identName(e.args[0]);
  if (e.k === "cast") return lenIdent(e.e);
  return identName(e);
}

const OUT_NAME = /(^|_)(out|output|outputs|dst|dest|y|result|res|mag|power)(_|$|\d)|^out|out$/i;
const IN_NAME = /(^|_)(in|input|inputs|src|source|x|samples)(_|$|\d)|^in[A-Z_]|^in$|_in$/i;

function checkCalls(model: Model, out: Finding[]): void {
  for (const f of model.files.values()) {
    if (f.lang === "rust") continue;
    // a call to a name this file declares `static` is a call to that function (C 6.2.2: internal
    // linkage), not to the seam symbol of the same name
    const local = new Set(f.fns.filter((x) => x.isStatic).map((x) => x.name));
    for (const cs of f.calls) {
      if (cs.recv) continue;
      const sym = cs.callee.split("::").pop()!;
      if (cs.callee === sym && local.has(sym)) continue;
      const g = model.symbols.get(sym);
      if (!g || !g.rust.length) continue;
      const k = contractOf(model, sym);
      if (!k) continue;
      const decl = k.c ?? k.rust!;
      const side = decl.lang === "rust" ? "rust" : "c";
      if (cs.args.length !== decl.params.length) continue; // arity is another family's finding
      const sc = scopeOf(model, cs);
      const rel = (P?: Pairing) => [{ range: decl.nameRange, message: `declaration of \`${decl.name}\`` }, ...(P ? [{ range: P.at, message: `contract: ${P.evidence}` }] : [])];
      const rustWrites = (pi: number): string | undefined => {
        const r = k.rust;
        const bf = r?.body?.buffers as RustBufferFacts | undefined;
        const nm = r?.params[pi]?.name;
        if (!bf || !nm) return undefined;
        const s = bf.slices.find((x) => x.root === nm && x.mut);
        if (s) return `\`from_raw_parts_mut(${nm}, …)\` at ${loc(s.range)}`;
        const w = bf.writes.find((x) => x.root === nm);
        if (w) return `\`${w.how}\` at ${loc(w.range)}`;
        return undefined;
      };
      decl.params.forEach((p, pi) => {
        const a = cs.args[pi]!;
        const pt = pointee(model, p.type, side);
        // --- item size of a pointer argument
        if (pt && a.type) {
          const at = pointee(model, a.type, "c");
          const P = itemSize(model, pt, side);
          const A = itemSize(model, at, "c");
          const castFrom = (a as typeof a & { castFrom?: AbiType }).castFrom;
          const nm = identName(a.expr);
          const v = nm ? varOf(sc, nm, cs.range.line) : undefined;
          const from = castFrom ?? v?.castFrom;
          const S = itemSize(model, pointee(model, from, "c"), "c");
          const pair = k.pairs.get(pi);
          // In C++ a `double *` does not convert to `float *` without a cast (the compiler rejects
          // the call, C++17 [conv.ptr]); in C it is only a diagnosed constraint violation that
          // compilers let through with a warning — that is the slip that compiles.
          if (P && A && A !== P && f.lang !== "cpp") {
            out.push(finding(ITEM_SIZE, a.range, `\`${a.text}\` points to ${typeText(at!)} (${A}-byte items) but parameter \`${p.name}\` of \`${decl.name}\` takes ${typeText(pt)} (${P}-byte items)${pair ? `; ${pairText(pair, decl)}` : ""}`, rel(pair)));
          } else if (P && A && S && S !== A && pair?.lenParam !== undefined && pair.unit === "items") {
            // `(const float *)cbuf` of complex items: the count must be scaled by S / A
            const la = cs.args[pair.lenParam];
            const lt = la && lenTerm(la.expr, undefined, 0, true);
            const ratio = S / A;
            // The kernel may scale the count itself (`from_raw_parts(x, 2 * nbins)`): compare the
            // number of parameter items actually read, argument factor × contract factor.
            const eff = lt ? (numPart(model, lt, "c") ?? 1) * pair.len.coef : 0;
            const scaled = lt && Math.abs(eff % ratio) < 1e-9 && eff >= ratio;
            if (la && !scaled && ratio > 1 && Number.isInteger(ratio)) {
              out.push(finding(ITEM_SIZE, a.range, `\`${a.text}\` is a buffer of ${typeText(pointee(model, from, "c")!)} (${S}-byte items) passed as ${typeText(pt)} (${P}-byte items), but the count \`${la.text}\` is not scaled by ${ratio}: ${pairText(pair, decl)}; pass \`${ratio} * ${la.text}\``, rel(pair)));
            }
          }
          // --- const output
          const constArg = (a.type.k === "ptr" && !a.type.mut) || (from?.k === "ptr" && !from.mut && a.expr.k === "cast");
          if (p.type.k === "ptr" && p.type.mut && constArg) {
            const w = rustWrites(pi);
            const acc = pair?.access === "write_only" || pair?.access === "read_write";
            if (w || acc) out.push(finding(CONST_OUT, a.range, `\`${a.text}\` is a const buffer, but \`${decl.name}\` writes through \`${p.name}\` (${w ?? pair!.evidence})`, rel(pair)));
          }
        }
      });
      // --- lengths: bytes vs items
      const seenLen = new Set<number>();
      for (const [pi, P] of k.pairs) {
        if (P.lenParam === undefined || P.len.names.length !== 1 || seenLen.has(P.lenParam)) continue;
        seenLen.add(P.lenParam);
        const la = cs.args[P.lenParam];
        if (!la) continue;
        const pt = pointee(model, decl.params[pi]?.type, side);
        if (P.unit === "bytes") {
          const f = itemsForBytes(model, cs, sc, decl, k, pi, P, pt, side);
          if (f) out.push(finding(UNIT, la.range, f.message, rel(P), { severity: f.severity, data: { pairing: P.source } }));
          continue;
        }
        const T = itemSize(model, pt, side);
        if (!T || T === 1) continue;
        const lt = lenTerm(la.expr);
        const isBytes = (lt && lt.sizeofs.length > lt.divSizeofs.length) || (la.expr.k === "sizeof" && !!la.expr.expr) || (la.expr.k === "bin" && containsSizeofVar(la.expr));
        if (isBytes) {
          out.push(finding(UNIT, la.range, `\`${la.text}\` is a byte count, but \`${decl.params[P.lenParam]!.name}\` counts ${typeText(pt!)} items: ${pairText(P, decl)}; pass the number of items`, rel(P), { data: { pairing: P.source } }));
        }
      }
      // --- swapped buffers (by const-ness and names)
      const ptrIdx = decl.params.map((p, i) => ({ p, i })).filter((x) => isBufferPtr(model, x.p.type, side));
      for (const x of ptrIdx) for (const y of ptrIdx) {
        if (x.i >= y.i || x.p.type.k !== "ptr" || y.p.type.k !== "ptr") continue;
        const xIn = !x.p.type.mut && y.p.type.mut, yIn = !y.p.type.mut && x.p.type.mut;
        if (!xIn && !yIn) continue;
        const inP = xIn ? x : y, outP = xIn ? y : x;
        const ai = cs.args[inP.i]!, ao = cs.args[outP.i]!;
        const ni = identName(ai.expr) ?? "", no = identName(ao.expr) ?? "";
        const aoConst = ao.type?.k === "ptr" && !ao.type.mut;
        if ((OUT_NAME.test(ni) && IN_NAME.test(no) && !OUT_NAME.test(no)) || (aoConst && ai.type?.k === "ptr" && ai.type.mut && OUT_NAME.test(ni))) {
          out.push(finding(SWAPPED, cs.calleeRange, `\`${decl.name}\` reads \`${inP.p.name}\` and writes \`${outP.p.name}\`, but this call passes \`${ai.text}\` as the input and \`${ao.text}\` as the output: the arguments look swapped`, rel()));
        }
      }
      // --- swapped lengths
      const lensP = [...k.pairs.values()].filter((P) => P.lenParam !== undefined && P.len.names.length === 1);
      for (const P of lensP) for (const Q of lensP) {
        if (P.ptr >= Q.ptr || P.lenParam === Q.lenParam) continue;
        const lp = cs.args[P.lenParam!]!, lq = cs.args[Q.lenParam!]!;
        const pn = decl.params[P.lenParam!]!.name, qn = decl.params[Q.lenParam!]!.name;
        const ap = lenIdent(lp.expr), aq = lenIdent(lq.expr);
        const bufP = identName(cs.args[P.ptr]!.expr), bufQ = identName(cs.args[Q.ptr]!.expr);
        const crossed = (ap === qn && aq === pn) || (!!bufP && !!bufQ && !!ap && !!aq && (ap.includes(bufQ) && aq.includes(bufP)) && !(ap.includes(bufP) || aq.includes(bufQ)));
        if (crossed) out.push(finding(SWAPPED, cs.calleeRange, `the lengths look swapped: \`${lp.text}\` is passed for \`${pn}\` (length of \`${P.ptrName}\`) and \`${lq.text}\` for \`${qn}\` (length of \`${Q.ptrName}\`)`, rel(P)));
      }
    }
  }
}

/**
 * An item count passed where the kernel takes bytes (`xc_scale_raw(power, n * nchan_, g)` for
 * `size_t nbytes`). Reported only on evidence that holds for correct code's opposite:
 *   - the buffer argument has a known item type wider than one byte (the argument's pointee, else
 *     the parameter's; a `void *`/`char *`/`uint8_t *` buffer, or one cast from a byte pointer,
 *     is counted in bytes already);
 *   - the length argument is a product of integer literals and at least one count that reads as
 *     items: a name by the naming conventions of model/pairing.ts (`n`, `nchan_`,
 *     `noutput_items`, `*_len`; not one spelled like the kernel's own byte parameter), or `.size()`
 *     of a container of items wider than a byte; no `sizeof` anywhere, and no local it names
 *     initialised from a `sizeof` or a byte-named count.
 * Error when the byte contract is explicit (access attribute, `__sized_by`, the ferrule
 * annotation, a Rust body dividing the parameter by `size_of`), warning when only names say it.
 */
function itemsForBytes(model: Model, cs: CallSite, sc: CFnScope | undefined, decl: FnDecl, k: FnContract, pi: number, P: Pairing, pt: AbiType | undefined, side: "rust" | "c"): { message: string; severity: Finding["severity"] } | undefined {
  const ba = cs.args[pi], la = cs.args[P.lenParam!];
  if (!ba || !la) return undefined;
  const line = cs.range.line;
  // a buffer cast from bytes (`(float *)raw_u8`) may well be counted in bytes
  const nm = identName(ba.expr);
  const v = ba.expr.k === "ident" && nm ? varOf(sc, nm, line) : undefined;
  const from = (ba as typeof ba & { castFrom?: AbiType }).castFrom ?? v?.castFrom;
  const F = itemSize(model, pointee(model, from, "c"), "c");
  if (F !== undefined && F <= 1) return undefined;
  const at = pointee(model, ba.type, "c");
  const A = itemSize(model, at, "c");
  const elem = A !== undefined ? at! : pt;
  const E = A ?? itemSize(model, pt, side);
  if (!elem || !E || E <= 1) return undefined;
  const own = new Set([decl.params[P.lenParam!]?.name, k.rust?.params[P.lenParam!]?.name].filter((x): x is string => !!x).map(memberStem));
  const names: string[] = [];
  const conts: string[] = [];
  // the container whose `.size()` / `std::size()` a call takes
  const sizeOf = (e: Expr): CVar | undefined => {
    if (e.k !== "call") return undefined;
    const target = e.recv && (e.callee === "size" || e.callee === "length") ? e.recv : !e.recv && /(^|::)size$/.test(e.callee) ? e.args[0] : undefined;
    const cn = target && identName(target);
    return cn ? varOf(sc, cn, line) : undefined;
  };
  const byteSize = (e: Expr): boolean => {
    const cv = sizeOf(e);
    return !!cv?.container && !!cv.elem && (itemSize(model, cv.elem, "c") ?? 0) <= 1;
  };
  const leaf = (e: Expr, depth: number): boolean => {
    if (depth > 12) return false;
    switch (e.k) {
      case "num": return Number.isInteger(e.value) && e.value > 0;
      case "cast": return leaf(e.e, depth + 1);
      case "bin": return e.op === "*" && leaf(e.l, depth + 1) && leaf(e.r, depth + 1);
      case "ident":
      case "field": {
        const stem = memberStem(e.name);
        if (countUnit(stem) !== "items" || own.has(stem)) return false;
        const lv = e.k === "ident" ? varOf(sc, e.name, line) : undefined;
        if (lv?.init && mayCountBytes(lv.init, byteSize)) return false;
        names.push(`\`${e.name}\``);
        return true;
      }
      case "call": {
        const cv = sizeOf(e);
        const S = cv?.container && cv.elem ? itemSize(model, cv.elem, "c") : undefined;
        if (!S || S <= 1) return false;
        const cn = cv!.name;
        conts.push(`\`${cn}\` holds ${typeText(cv!.elem!)} elements`);
        return true;
      }
    }
    return false;
  };
  if (!leaf(la.expr, 0) || (!names.length && !conts.length)) return undefined;
  const explicit = EXPLICIT.has(P.source) || (P.source === "rust-body" && P.len.divSizeofs.length > P.len.sizeofs.length);
  const tn = typeText(elem);
  const reads = [...(names.length ? [`${names.join(", ")} ${names.length === 1 ? "reads as an item count" : "read as item counts"}`] : []), ...conts].join("; ");
  return {
    severity: explicit ? "error" : "warning",
    message: `\`${la.text}\` counts ${tn} items (${reads}), but \`${decl.params[P.lenParam!]!.name}\` of \`${decl.name}\` is in bytes: ${pairText(P, decl)}; the kernel covers only the first 1/${E} of \`${ba.text}\`; pass \`${la.text} * sizeof(${tn})\``,
  };
}

/** A member's name without the `m_` prefix or trailing `_` of a class field (`nchan_` → `nchan`). */
function memberStem(name: string): string {
  return name.replace(/_$/, "").replace(/^m_/, "");
}

/** Whether a local's initialiser may make it a byte count: a `sizeof`, a byte-named name (`nbytes`),
 * or the size of a container of bytes (`wire.size()` of a `std::vector<uint8_t>`). */
function mayCountBytes(e: Expr, byteSize: (call: Expr) => boolean, depth = 0): boolean {
  if (depth > 20) return true;
  const r = (x: Expr) => mayCountBytes(x, byteSize, depth + 1);
  switch (e.k) {
    case "sizeof": return true;
    case "ident": return countUnit(memberStem(e.name)) === "bytes";
    case "bin": return r(e.l) || r(e.r);
    case "un": case "cast": return r(e.e);
    case "call": return byteSize(e) || e.args.some(r) || (!!e.recv && r(e.recv));
    case "field": return countUnit(memberStem(e.name)) === "bytes" || r(e.e);
    case "index": return r(e.e) || r(e.idx);
    case "other": return true; // not looked into: could hold one
  }
  return false;
}

function containsSizeofVar(e: Expr): boolean {
  if (e.k === "sizeof") return true;
  if (e.k === "bin" && e.op === "*") return containsSizeofVar(e.l) || containsSizeofVar(e.r);
  return false;
}

// ---------------------------------------------------------------------------------------------
// Block port item sizes

export interface PortDeclPattern {
  /** Callee name, matched against the call's full name or its trailing `::` segments. */
  call: string;
  /** 0-based argument positions that are item sizes, one port each. */
  item_size_args: number[];
  /** "in" / "out": each call declares ports of that direction; "seq": the first such call in a
   * constructor declares the inputs, the second the outputs. */
  direction: "in" | "out" | "seq";
}

export interface PortSettings {
  decl: PortDeclPattern[];
  work_methods: string[];
}

/** Defaults: the widely used `io_signature::make(min, max, item_size)` family (common practice in
 * C++ block code), and per-port `add_input_port(item_size)` / `add_output_port(item_size)` calls. */
export const DEFAULT_PORTS: PortSettings = {
  decl: [
    { call: "io_signature::make", item_size_args: [2], direction: "seq" },
    { call: "io_signature::make2", item_size_args: [2, 3], direction: "seq" },
    { call: "io_signature::make3", item_size_args: [2, 3, 4], direction: "seq" },
    { call: "add_input_port", item_size_args: [0], direction: "in" },
    { call: "add_output_port", item_size_args: [0], direction: "out" },
  ],
  work_methods: ["work", "process"],
};

export function portSettings(model: Model): PortSettings {
  const raw = model.config.families.ports as Record<string, unknown> | undefined;
  if (!raw || typeof raw !== "object") return DEFAULT_PORTS;
  const s: PortSettings = { decl: DEFAULT_PORTS.decl, work_methods: DEFAULT_PORTS.work_methods };
  if (Array.isArray(raw.decl)) {
    const list: PortDeclPattern[] = [];
    for (const d of raw.decl as Record<string, unknown>[]) {
      if (!d || typeof d.call !== "string") continue;
      const args = Array.isArray(d.item_size_args) ? (d.item_size_args as unknown[]).map(Number).filter((x) => Number.isInteger(x) && x >= 0) : [0];
      const dir = d.direction === "in" || d.direction === "out" || d.direction === "seq" ? d.direction : "seq";
      list.push({ call: d.call, item_size_args: args, direction: dir });
    }
    s.decl = raw.replace_defaults === true ? list : [...list, ...DEFAULT_PORTS.decl];
  }
  if (Array.isArray(raw.work_methods)) s.work_methods = (raw.work_methods as unknown[]).filter((x): x is string => typeof x === "string");
  return s;
}

function calleeMatches(callee: string, pat: string): boolean {
  const c = callee.replace(/\s+/g, "");
  return c === pat || c.endsWith("::" + pat);
}

interface Port { dir: "in" | "out"; k: number; size: Expr; text: string; range: Range }

function checkPorts(model: Model, out: Finding[]): void {
  const settings = portSettings(model);
  for (const f of model.files.values()) {
    if (f.lang === "rust") continue;
    const bf = f.extra.buffers as CBufferFacts | undefined;
    if (!bf) continue;
    const byClass = new Map<string, Port[]>();
    const ctorCalls = f.calls.filter((c) => c.inClass && c.inFn === c.inClass).sort((a, b) => a.range.line - b.range.line || a.range.col - b.range.col);
    for (const c of ctorCalls) {
      const ports = byClass.get(c.inClass!) ?? [];
      const pat = settings.decl.find((p) => calleeMatches(c.callee, p.call));
      if (!pat) continue;
      let dir: "in" | "out";
      if (pat.direction === "seq") {
        const seqSeen = (ports as (Port & { seq?: number })[]).filter((p) => (p as { seq?: number }).seq !== undefined);
        const calls = new Set(seqSeen.map((p) => (p as { seq?: number }).seq));
        dir = calls.size === 0 ? "in" : "out";
        if (calls.size >= 2) continue;
      } else dir = pat.direction;
      const seqId = pat.direction === "seq" ? c.range.line * 10000 + c.range.col : undefined;
      for (const ai of pat.item_size_args) {
        const a = c.args[ai];
        if (!a) continue;
        const kIdx = ports.filter((p) => p.dir === dir).length;
        const port: Port & { seq?: number } = { dir, k: kIdx, size: a.expr, text: a.text, range: a.range };
        if (seqId !== undefined) port.seq = seqId;
        ports.push(port);
      }
      byClass.set(c.inClass!, ports);
    }
    for (const [cls, ports] of byClass) {
      for (const sc of bf.fns.filter((x) => x.cls === cls && settings.work_methods.includes(x.name))) checkWork(model, f.calls, sc, ports, out);
    }
  }
}

/** Which port a local's initialiser reads: `(T *)inputs[k]`, `static_cast<T *>(in_buf)`. */
function portOfInit(e: Expr | undefined, sc: CFnScope): { dir: "in" | "out"; k: number } | undefined {
  let cur = e;
  while (cur?.k === "cast") cur = cur.e;
  if (!cur) return undefined;
  const params = sc.vars.filter((v) => v.kind === "param");
  if (cur.k === "index" && cur.e.k === "ident" && cur.idx.k === "num") {
    const nm = cur.e.name;
    const p = params.find((v) => v.name === nm);
    if (!p) return undefined;
    const dir = /out/i.test(nm) ? "out" : /in/i.test(nm) ? "in" : undefined;
    return dir ? { dir, k: cur.idx.value } : undefined;
  }
  if (cur.k === "ident") {
    const p = params.find((v) => v.name === (cur as { name: string }).name);
    if (!p || p.type.k !== "ptr" || p.type.to.k !== "void") return undefined;
    const voids = params.filter((v) => v.type.k === "ptr" && v.type.to.k === "void");
    const pm = p.type.mut;
    const dir = pm ? "out" : "in";
    const same = voids.filter((v) => v.type.k === "ptr" && v.type.mut === pm);
    return { dir, k: same.indexOf(p) };
  }
  return undefined;
}

function checkWork(model: Model, calls: CallSite[], sc: CFnScope, ports: Port[], out: Finding[]): void {
  const reported = new Set<string>();
  for (const v of sc.vars) {
    if (v.kind !== "local" || v.type.k !== "ptr") continue;
    const pk = portOfInit(v.init, sc);
    if (!pk) continue;
    const port = ports.find((p) => p.dir === pk.dir && p.k === pk.k);
    if (!port) continue;
    const dt = lenTerm(port.size);
    if (!dt) continue;
    const D = numPart(model, dt, "c");
    const S = itemSize(model, pointee(model, v.type, "c"), "c");
    if (!D || !S) continue;
    const vnames = dt.names; // symbolic factors (vlen)
    const related = [{ range: port.range, message: `${pk.dir === "in" ? "input" : "output"} port ${pk.k} declares item size \`${port.text}\`` }];
    // kernel calls in this method that pass this buffer
    const uses: { cs: CallSite; pi: number; P?: Pairing; decl: FnDecl }[] = [];
    for (const cs of calls) {
      if (cs.inFn !== sc.name || cs.inClass !== sc.cls || cs.recv) continue;
      if (cs.range.line < sc.range.line || cs.range.line > sc.range.endLine) continue;
      const sym = cs.callee.split("::").pop()!;
      const k = model.symbols.get(sym)?.rust.length ? contractOf(model, sym) : undefined;
      if (!k) continue;
      cs.args.forEach((a, pi) => {
        if (identName(a.expr) === v.name) uses.push({ cs, pi, P: k.pairs.get(pi), decl: k.c ?? k.rust! });
      });
    }
    if (Math.abs(D - S) > 1e-9) {
      const ratio = D / S;
      let ok = false;
      if (Number.isInteger(ratio) && ratio > 1 && uses.length) {
        ok = uses.every((u) => {
          const la = u.P?.lenParam !== undefined ? u.cs.args[u.P.lenParam] : undefined;
          const lt = la && lenTerm(la.expr, undefined, 0, true);
          const eff = lt ? (numPart(model, lt, "c") ?? 0) * (u.P?.len.coef ?? 1) : 0;
          return !!lt && Math.abs(eff % ratio) < 1e-9 && eff >= ratio;
        });
      }
      if (!ok) {
        const tn = typeText(pointee(model, v.type, "c")!);
        const flow = uses[0] ? `; it flows into \`${uses[0].decl.name}\` as \`${uses[0].decl.params[uses[0].pi]?.name}\`${uses[0].P?.lenParam !== undefined ? ` with count \`${uses[0].cs.args[uses[0].P.lenParam]?.text}\`` : ""}` : "";
        out.push(finding(PORT_SIZE, v.range, `\`${v.name}\` reads ${pk.dir === "in" ? "input" : "output"} port ${pk.k} as ${tn} (${S}-byte items), but the constructor declares its item size as \`${port.text}\` (${D}${vnames.length ? " × " + vnames.join(" × ") : ""} bytes)${flow}`, related));
      }
      continue;
    }
    // vector port: counts must be multiplied by the vector length
    if (!vnames.length) continue;
    for (const u of uses) {
      if (u.P?.lenParam === undefined) continue;
      const la = u.cs.args[u.P.lenParam];
      const lt = la && lenTerm(la.expr, undefined, 0, true);
      if (!la || !lt) continue;
      const mentions = vnames.every((vn) => lt.names.includes(vn) || u.cs.args.some((a) => exprMentions(a.expr, vn, sc, u.cs.range.line)));
      if (mentions) continue;
      const key = `${la.range.file}:${la.range.line}:${la.range.col}`;
      if (reported.has(key)) continue;
      reported.add(key);
      out.push(finding(VECTOR_COUNT, la.range, `\`${v.name}\` is vector port ${pk.k} (item size \`${port.text}\`: ${vnames.join(" × ")} values per item), but \`${u.decl.name}\` gets \`${la.text}\` as the count of \`${u.decl.params[u.pi]?.name}\` (${pairText(u.P, u.decl)}); pass \`${la.text} * ${vnames.join(" * ")}\``, related));
    }
  }
}

/** Whether `e` mentions `name` (or a member spelled `name_`), also through local initialisers. */
function exprMentions(e: Expr, name: string, sc?: CFnScope, line = Infinity, depth = 0): boolean {
  if (depth > 8) return false;
  const r = (x: Expr) => exprMentions(x, name, sc, line, depth + 1);
  switch (e.k) {
    case "ident": {
      if (e.name === name || e.name.replace(/_$/, "") === name || e.name.replace(/^m_/, "") === name) return true;
      const v = varOf(sc, e.name, line);
      return !!v && v.kind === "local" && !!v.init && r(v.init);
    }
    case "bin": return r(e.l) || r(e.r);
    case "un": return r(e.e);
    case "cast": return r(e.e);
    case "call": return e.args.some(r);
    case "field": return e.name === name || e.name.replace(/_$/, "") === name;
  }
  return false;
}

export const buffersFamily: RuleFamily = {
  name: "buffers",
  rules: RULES,
  check(model: Model): Finding[] {
    const out: Finding[] = [];
    for (const g of model.symbols.values()) {
      if (!g.rust.length) continue;
      const k = contractOf(model, g.symbol);
      if (k) checkRust(model, k, out);
    }
    checkCalls(model, out);
    checkPorts(model, out);
    return out;
  },
};
