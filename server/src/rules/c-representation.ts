// Rule family "c-representation": types in an extern "C" signature must have a C representation.

import type { Model } from "../model/boundary.js";
import type { AbiType, FnDecl } from "../model/types.js";
import { finding, type Finding, type RuleFamily, type RuleMeta } from "./api.js";

export const NOT_C_TYPE: RuleMeta = {
  id: "not-c-representable",
  severity: "error",
  summary: "An extern \"C\" function passes a type that has no C representation (slices, &str, String, Vec, tuples, char, generics, structs without #[repr(C)]).",
  why: "C sees a different number of words or an unspecified layout, so every argument after it is shifted or garbage.",
};

interface Problem {
  why: string;
  /** The type's declaration is not in the workspace (another crate): its layout is unknown, not wrong. */
  unknown?: boolean;
}

/**
 * Why a type has no C representation, or undefined. `from` is the file of the function, so a name
 * declared in more than one module is read from the nearest declaration.
 */
function problem(model: Model, t: AbiType, from: string, depth = 0): Problem | undefined {
  if (depth > 8) return undefined;
  if (t.k === "unsafe" && t.optionOf) t = model.resolve(t, "rust");
  if (t.k === "unsafe" && t.generic) return genericProblem(model, t, t.generic, from, depth);
  if (t.k === "unsafe") return { why: t.why };
  if (t.k === "ptr") {
    const inner = model.resolve(t.to, "rust");
    // a reference or Box to a sized generic instance is one pointer like any other
    if (inner.k === "unsafe" && !inner.generic) return t.via === "raw" ? undefined : { why: inner.why };
    return undefined; // pointers to anything are pointer-sized; what they point to is the layout rules' job
  }
  if (t.k === "fn") {
    for (const p of t.params) { const q = problem(model, p, from, depth + 1); if (q) return q; }
    return problem(model, t.ret, from, depth + 1);
  }
  if (t.k === "named") {
    const r = model.resolve(t, "rust");
    if (r.k !== "named") return problem(model, r, from, depth + 1);
    const d = model.aggregate(r, "rust", from);
    if (!d) return undefined;
    if (d.generic) return { why: `\`${d.name}\` is generic` };
    if ((d.kind === "struct" || d.kind === "union") && !d.repr.c && !d.repr.transparent && !d.opaqueMarker) {
      return { why: `\`${d.name}\` is passed by value but is not #[repr(C)] or #[repr(transparent)], so Rust may reorder its fields` };
    }
    if (d.kind === "enum" && !d.repr.c && !d.repr.int && !d.opaqueMarker) return { why: `enum \`${d.name}\` has no #[repr(C)] or #[repr(<int>)]` };
  }
  if (t.k === "array") return { why: "arrays are not passed by value in C (a C array parameter is a pointer); pass a pointer or wrap it in a #[repr(C)] struct" };
  return undefined;
}

/**
 * An instance of a generic type (`WithOffset<*const u8>`): a #[repr(C)] or #[repr(transparent)]
 * generic struct is laid out by the C rules for each instance (Rust Reference, "Type layout": the
 * representation applies to every instantiation), so the instance has a C layout when its type
 * arguments do. A generic type declared in no file of the workspace (another crate) is unknown.
 */
function genericProblem(model: Model, t: AbiType & { k: "unsafe" }, g: { name: string; args: AbiType[] }, from: string, depth: number): Problem | undefined {
  const decls = model.typeDecls(g.name, "rust");
  if (!decls.length) return { why: t.why, unknown: true };
  const d = model.aggregate({ k: "named", name: g.name }, "rust", from);
  if (!d) return { why: t.why };
  if ((d.kind === "struct" || d.kind === "union") && (d.repr.c || d.repr.transparent)) {
    for (const a of g.args) {
      const q = problem(model, a, from, depth + 1);
      if (q) return { ...q, why: `type argument of \`${g.name}\`: ${q.why}` };
    }
    return undefined;
  }
  if (d.kind === "enum" && (d.repr.c || d.repr.int)) return undefined;
  return { why: `\`${g.name}\` is generic and has no #[repr(C)] or #[repr(transparent)]` };
}

function report(out: Finding[], q: Problem, range: FnDecl["range"], message: string, data: Record<string, unknown>) {
  const f = finding(NOT_C_TYPE, range, q.unknown ? `${message} (declared outside this workspace: ferrule cannot see whether it has #[repr(C)])` : message, [], { data });
  if (q.unknown) f.severity = "info";
  out.push(f);
}

function check(model: Model, fn: FnDecl, out: Finding[]) {
  if (fn.abi === "Rust") return;
  fn.params.forEach((p, i) => {
    const q = problem(model, p.type, fn.file);
    if (q) report(out, q, p.typeRange, `parameter ${i + 1} \`${p.name}: ${p.text}\` of extern "${fn.abi}" fn \`${fn.name}\`: ${q.why}`, { fn: fn.id, param: i });
  });
  const q = problem(model, fn.ret, fn.file);
  if (q && fn.retRange) report(out, q, fn.retRange, `return type \`${fn.retText}\` of extern "${fn.abi}" fn \`${fn.name}\`: ${q.why}`, { fn: fn.id, ret: true });
}

export const cRepresentationFamily: RuleFamily = {
  name: "c-representation",
  rules: [NOT_C_TYPE],
  check(model: Model): Finding[] {
    const out: Finding[] = [];
    for (const f of model.files.values()) {
      if (f.lang !== "rust") continue;
      for (const fn of f.fns) {
        const internal = (fn as FnDecl & { internal?: boolean }).internal;
        if (internal || !fn.isExtern) continue;
        check(model, fn, out);
      }
    }
    return out;
  },
};
