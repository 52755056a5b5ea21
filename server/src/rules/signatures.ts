// Rule family "signatures": a Rust function and the C/C++ declaration of the same symbol must
// agree on arity, each parameter's type (width, signedness, float/int, pointer depth, pointee
// item, const-ness per pointer level), the return type, callbacks and variadics, on every target.

import type { Model } from "../model/boundary.js";
import type { AbiType, Field, FnDecl, TypeDecl } from "../model/types.js";
import { compareTypes, describeC, describeRust, type GroupedDiff } from "../model/compare.js";
import { NULL_DOC } from "../model/pairing.js";
import { finding, targetPhrase, type Finding, type RuleFamily, type RuleMeta } from "./api.js";
import { findPairs } from "./layout.js";

export const ARITY: RuleMeta = {
  id: "arity-mismatch",
  severity: "error",
  summary: "The Rust function and its C declaration take a different number of parameters, or only one is variadic.",
  why: "The callee reads parameters the caller never passed (garbage registers or stack) or ignores ones it did.",
};
export const PARAM_TYPE: RuleMeta = {
  id: "param-type-mismatch",
  severity: "error",
  summary: "A parameter has a different size, kind (integer/float/pointer), pointer depth or pointee item type on the two sides.",
  why: "The bits are reinterpreted: a float read as an int, a 4-byte length read as 8 bytes, samples of 8 bytes walked in steps of 4.",
};
export const PARAM_SIGN: RuleMeta = {
  id: "param-signedness",
  severity: "warning",
  summary: "A parameter or return is signed on one side and unsigned on the other (including plain char, whose signedness differs between targets).",
  why: "Values past the sign bit change meaning: a negative offset becomes a huge length.",
};
export const CONSTNESS: RuleMeta = {
  id: "pointer-constness",
  severity: "error",
  summary: "A pointer is const on one side and writable on the other (a Rust read-only pointer to an opaque C handle, which C cannot dereference, is not).",
  why: "Rust writing through a pointer the header declares const mutates data the C++ caller believes is unchanged (and may live in read-only memory).",
};
export const RETURN_TYPE: RuleMeta = {
  id: "return-type-mismatch",
  severity: "error",
  summary: "The return type differs between the Rust function and its C declaration.",
  why: "The caller reads the return register (or hidden return pointer) as the wrong type.",
};
export const CALLBACK: RuleMeta = {
  id: "callback-mismatch",
  severity: "error",
  summary: "A function-pointer parameter or field has a different signature or nullability on the two sides.",
  why: "A callback called with the wrong signature corrupts its arguments; a NULL passed where Rust assumes a non-null fn pointer is undefined behaviour.",
};

function paramLabel(i: number, name: string): string {
  return `parameter ${i + 1}${name && name !== "_" ? ` \`${name}\`` : ""}`;
}

function report(out: Finding[], model: Model, diffs: GroupedDiff[], what: string, rust: FnDecl, c: FnDecl, rRange: FnDecl["range"], cRange: FnDecl["range"], data: Record<string, unknown>, isReturn: boolean) {
  for (const d of diffs) {
    const where = targetPhrase(d.targets, model.targets);
    let meta: RuleMeta;
    let severity = undefined as Finding["severity"] | undefined;
    switch (d.kind) {
      case "sign": meta = PARAM_SIGN; break;
      case "const": meta = CONSTNESS; if (!d.rustWrites) severity = "warning"; break;
      case "callback": meta = CALLBACK; break;
      case "nullable": meta = CALLBACK; severity = "warning"; break;
      case "name": meta = PARAM_TYPE; severity = "warning"; break;
      default: meta = isReturn ? RETURN_TYPE : PARAM_TYPE;
    }
    const msg = `\`${c.name}\` ${what}: ${d.detail}${where}`;
    const f = finding(meta, cRange, msg, [{ range: rRange, message: `Rust side of \`${rust.name}\`` }], {
      data: { ...data, rust: rust.id, c: c.id, diff: d.kind },
      targets: d.targets.length === model.targets.length ? undefined : d.targets,
    });
    if (severity) f.severity = severity;
    out.push(f);
  }
}

/** A sentence of the C declaration's comment that names the parameter as a callback it calls
 * (`|cb| will be called for each header`, "after calling `log_func`"): the header makes it
 * required, so a C caller passing NULL breaks the header's own contract. */
const CALLED_DOC = /\b(will be|is|are|gets?|get) called\b|\bcalling\b|\bcalls\b|\bmust not be (NULL|null)\b|\bnon-?null\b|\brequired\b/;
function requiredByDoc(c: FnDecl, name: string): string | undefined {
  if (!c.doc || !name) return undefined;
  const esc = name.replace(/[^\w]/g, "");
  if (!esc) return undefined;
  const named = new RegExp(`\\b${esc}\\b`);
  return c.doc.replace(/\s*\n\s*/g, " ").split(/(?<=[.;])\s+/).find((x) => named.test(x) && CALLED_DOC.test(x) && !NULL_DOC.test(x));
}

/** The Rust function releases what this parameter points to (Box/CString/Arc::from_raw, drop). */
function releasesParam(rust: FnDecl, name: string): boolean {
  const own = rust.body?.ownership as { releases?: { arg: { ident?: string } }[] } | undefined;
  return !!own?.releases?.some((r) => r.arg.ident === name);
}

/** The C pointee of a parameter is a complete struct or union (a record, not a sample buffer). */
function recordPointee(model: Model, t: FnDecl["params"][number]["type"]): boolean {
  const r = model.resolve(t, "c");
  if (r.k !== "ptr") return false;
  const to = model.resolve(r.to, "c");
  if (to.k !== "named") return false;
  const d = model.aggregate(to, "c");
  return !!d && (d.kind === "struct" || d.kind === "union");
}

/**
 * Which pointer-constness differences carry a risk, by who writes:
 * - Rust exports (C calls Rust): Rust writing where C declares const is the error; Rust reading
 *   a record (a struct) C lends writable, or through an inner pointer level, gives C nothing to
 *   fear (`*const z_stream` for `z_stream *`): `info`. A read-only Rust pointer for a writable
 *   sample buffer stays a warning (C may expect it filled). A release function's parameter is
 *   exempt: freeing through a pointer C holds as const is common practice (C11 7.22.3.3 `free`).
 * - Rust imports (Rust calls C): C writing through a pointer Rust declared read-only is the risk
 *   (a warning, as before); Rust declaring writable what C promises not to write is harmless: `info`.
 */
function constSeverity(model: Model, rust: FnDecl, c: FnDecl, i: number, d: GroupedDiff): Finding["severity"] | null {
  const rp = rust.params[i];
  const cp = c.params[i];
  if (!rp || !cp) return d.rustWrites ? "error" : "warning";
  if (rust.role === "export") {
    if (releasesParam(rust, rp.name)) return null;
    if (d.rustWrites) return "error";
    if (d.detail.startsWith("at the inner pointer level") || recordPointee(model, cp.type)) return "info";
    // a read-only Rust pointer for a buffer C expects filled
    return writtenThrough(rust, c, i) ? "warning" : "info";
  }
  if (rust.role === "import") {
    if (d.rustWrites) return "info";
    // Rust lends read-only memory: a risk where the C function writes through it
    return writtenThrough(rust, c, i) ? "warning" : "info";
  }
  return d.rustWrites ? "error" : "warning";
}

/**
 * Whether the names or the comment say the function writes through parameter i (common
 * practice): the parameter is named as an output (`out`, `dst`, `dest`, `result`, …), the
 * function's name has a verb that fills a buffer (`read`, `fill`, `decode`, `scale`, …), or its
 * comment says so (`fills`, `writes`, `in place`, `stores`). Without any of these a writable C
 * pointer Rust only reads is advice (the header could say const), not a risk.
 */
function writtenThrough(rust: FnDecl, c: FnDecl, i: number): boolean {
  const names = [c.params[i]?.name, rust.params[i]?.name];
  if (names.some((n) => !!n && /(^|_)(out|outp|output|outbuf|dst|dest|destination|result|res)(_|$|\d)|^(out|dst|dest)[A-Z0-9]/i.test(n))) return true;
  const words = (n: string) => n.replace(/([a-z0-9])([A-Z])/g, "$1_$2").toLowerCase().split(/_+/);
  const WRITERS = /^(read|fill|get|decode|scale|write|copy|store|load|recv|receive|zero|clear|normali[sz]e|convert|render|pull|pop|dequeue|peek|query|fetch|export|dump|snapshot|encode|compress|decompress|inflate|deflate|mix|sum|accumulate)$/;
  if ([c.name, rust.name].some((n) => words(n).some((w) => WRITERS.test(w)))) return true;
  return /\b(fill(s|ed)?|writes?|written|in[ -]place|stores?|overwrites?|outputs?)\b/i.test(`${c.doc ?? ""} ${rust.doc ?? ""}`);
}

export function compareSignatures(model: Model, rust: FnDecl, c: FnDecl): Finding[] {
  const out: Finding[] = [];
  const targets = model.targets;
  if (rust.params.length !== c.params.length || rust.variadic !== c.variadic) {
    const rv = rust.variadic ? " and is variadic" : "";
    const cv = c.variadic ? " and is variadic" : "";
    out.push(finding(ARITY, c.nameRange, `\`${c.name}\` takes ${c.params.length} parameter(s)${cv} in C but ${rust.params.length}${rv} in Rust`, [{ range: rust.nameRange, message: `Rust side of \`${rust.name}\`` }], { data: { rust: rust.id, c: c.id } }));
  }
  const n = Math.min(rust.params.length, c.params.length);
  for (let i = 0; i < n; i++) {
    const rp = rust.params[i]!;
    const cp = c.params[i]!;
    const diffs: GroupedDiff[] = [];
    const sev = new Map<GroupedDiff, Finding["severity"]>();
    for (const d of compareTypes(model, rp.type, cp.type, targets)) {
      if (d.kind === "nullable" && requiredByDoc(c, cp.name)) continue;
      if (d.kind === "const") {
        const s = constSeverity(model, rust, c, i, d);
        if (s === null) continue;
        if (s) sev.set(d, s);
      }
      diffs.push(d);
    }
    const at = out.length;
    report(out, model, diffs, paramLabel(i, cp.name || rp.name), rust, c, rp.range, cp.range, { param: i }, false);
    for (let k = at; k < out.length; k++) {
      const d = diffs.find((x) => out[k]!.data?.diff === x.kind && out[k]!.message.includes(x.detail));
      const s = d && sev.get(d);
      if (s) out[k]!.severity = s;
      if (s === "info" && d) out[k]!.message += d.rustWrites ? "; C promises not to write through it, so nothing Rust lends is at risk (advice)"
        : rust.role === "import" ? "; neither the names nor the comment say C writes through it, so the memory Rust lends read-only stays unchanged (advice: the header could say const)"
        : "; Rust only reads through it, so nothing C holds changes (advice: the header could say const)";
    }
  }
  report(out, model, compareTypes(model, rust.ret, c.ret, targets), "return type", rust, c, rust.retRange ?? rust.nameRange, c.retRange ?? c.nameRange, { ret: true }, true);
  return out;
}

/** The function type behind a C or Rust type (a pointer to function, or a Rust fn pointer). */
function fnOf(model: Model, t: AbiType, side: "rust" | "c"): (AbiType & { k: "fn" }) | undefined {
  const r = model.resolve(t, side);
  if (r.k === "fn") return r;
  if (r.k === "ptr") {
    const to = model.resolve(r.to, side);
    if (to.k === "fn") return to;
  }
  return undefined;
}

const ALL_ENTRIES = /\b(any|every|all|each)\b[^.;]*\b(entry|entries|callbacks?|hooks?|function pointers?|members?|fields?|handlers?)\b/i;

/** Why C may leave a function-pointer field NULL: `_Nullable` on it, its own comment, or a sentence
 * of the struct's comment that names it (or speaks of every entry). */
function nullFieldEvidence(cd: TypeDecl, f: Field): string | undefined {
  if (f.nullableQual) return `\`_Nullable\` on \`${f.name}\``;
  const sentences = (doc: string) => doc.replace(/\s*\n\s*/g, " ").split(/(?<=[.;])\s+|\n/).map((x) => x.trim()).filter((x) => NULL_DOC.test(x));
  const own = f.doc ? sentences(f.doc)[0] : undefined;
  if (own) return `the comment of \`${f.name}\`: "${own}"`;
  const esc = f.name.replace(/[^\w]/g, "");
  const named = cd.doc && esc ? sentences(cd.doc).find((x) => new RegExp(`\\b${esc}\\b`).test(x) || ALL_ENTRIES.test(x)) : undefined;
  return named ? `the comment of \`${cd.name}\`: "${named}"` : undefined;
}

/**
 * A `#[repr(C)]` mirror of a C struct whose function-pointer field is a plain Rust `extern "C" fn`
 * while the C side says the entry may be NULL. A Rust fn pointer is never null (Rust Reference,
 * "Function pointer types"; the null-pointer optimisation makes `Option<extern "C" fn(..)>` the
 * nullable one with the same size: std::option, "Representation"), so a NULL entry read as the
 * plain type is undefined behaviour even before it is called.
 */
function nullableFnFields(model: Model, out: Finding[]): void {
  for (const p of findPairs(model)) {
    const rd = p.rust, cd = p.c;
    if (rd.kind !== "struct" || cd.kind !== "struct" || !rd.repr.c) continue;
    const n = Math.min(rd.fields.length, cd.fields.length);
    for (let i = 0; i < n; i++) {
      const rf = rd.fields[i]!, cf = cd.fields[i]!;
      const rfn = fnOf(model, rf.type, "rust");
      if (!rfn || rfn.nullable || !fnOf(model, cf.type, "c")) continue;
      const why = nullFieldEvidence(cd, cf);
      if (!why) continue;
      const f = finding(CALLBACK, rf.range,
        `\`${rd.name}.${rf.name}\` is a non-nullable \`extern "C" fn\`, but C may leave \`${cd.name}.${cf.name}\` NULL (${why}); a NULL read as a Rust fn pointer is undefined behaviour: declare it \`Option<unsafe extern "C" fn(..)>\` and check it before calling`,
        [{ range: cf.range, message: `C field \`${cf.name}\` of \`${cd.name}\` (matched because ${p.via})` }],
        { data: { rustType: rd.id, cType: cd.id, field: i, diff: "nullable" } });
      f.severity = p.weak ? "info" : "warning";
      out.push(f);
    }
  }
}

export const signaturesFamily: RuleFamily = {
  name: "signatures",
  rules: [ARITY, PARAM_TYPE, PARAM_SIGN, CONSTNESS, RETURN_TYPE, CALLBACK],
  check(model: Model): Finding[] {
    const out: Finding[] = [];
    for (const g of model.symbols.values()) {
      if (!g.rust.length || !g.c.length) continue;
      // Prefer header prototypes (what C++ callers see); fall back to definitions.
      const cSide = g.c.filter((f) => f.role === "proto" && f.inHeader);
      const cands = cSide.length ? cSide : g.c;
      for (const r of g.rust) {
        if (r.role === "export" && !(r.isExtern && r.abi !== "Rust")) continue; // reported by symbols
        for (const c of cands) out.push(...compareSignatures(model, r, c));
      }
    }
    nullableFnFields(model, out);
    return out;
  },
};

export type { AbiType };
export { describeC, describeRust };
