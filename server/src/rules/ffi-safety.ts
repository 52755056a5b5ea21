// Rule family "ffi-safety": types in an extern "C" signature must have a C representation.

import type { Model } from "../model/boundary.js";
import type { AbiType, FnDecl } from "../model/types.js";
import { finding, type Finding, type RuleFamily, type RuleMeta } from "./api.js";

export const NOT_C_TYPE: RuleMeta = {
  id: "not-c-representable",
  severity: "error",
  summary: "An extern \"C\" function passes a type that has no C representation (slices, &str, String, Vec, tuples, char, generics, structs without #[repr(C)]).",
  why: "C sees a different number of words or an unspecified layout, so every argument after it is shifted or garbage.",
};

function problem(model: Model, t: AbiType, depth = 0): string | undefined {
  if (depth > 8) return undefined;
  if (t.k === "unsafe" && t.optionOf) t = model.resolve(t, "rust");
  if (t.k === "unsafe") return t.why;
  if (t.k === "ptr") {
    const inner = model.resolve(t.to, "rust");
    if (inner.k === "unsafe") return t.via === "raw" ? undefined : inner.why;
    return undefined; // pointers to anything are pointer-sized; what they point to is the layout rules' job
  }
  if (t.k === "fn") {
    for (const p of t.params) { const q = problem(model, p, depth + 1); if (q) return q; }
    return problem(model, t.ret, depth + 1);
  }
  if (t.k === "named") {
    const r = model.resolve(t, "rust");
    if (r.k !== "named") return problem(model, r, depth + 1);
    const d = model.aggregate(r, "rust");
    if (!d) return undefined;
    if (d.generic) return `\`${d.name}\` is generic`;
    if ((d.kind === "struct" || d.kind === "union") && !d.repr.c && !d.repr.transparent && !d.opaqueMarker) {
      return `\`${d.name}\` is passed by value but is not #[repr(C)] or #[repr(transparent)], so Rust may reorder its fields`;
    }
    if (d.kind === "enum" && !d.repr.c && !d.repr.int && !d.opaqueMarker) return `enum \`${d.name}\` has no #[repr(C)] or #[repr(<int>)]`;
  }
  if (t.k === "array") return "arrays are not passed by value in C (a C array parameter is a pointer); pass a pointer or wrap it in a #[repr(C)] struct";
  return undefined;
}

function check(model: Model, fn: FnDecl, out: Finding[]) {
  if (fn.abi === "Rust") return;
  fn.params.forEach((p, i) => {
    const why = problem(model, p.type);
    if (why) out.push(finding(NOT_C_TYPE, p.typeRange, `parameter ${i + 1} \`${p.name}: ${p.text}\` of extern "${fn.abi}" fn \`${fn.name}\`: ${why}`, [], { data: { fn: fn.id, param: i } }));
  });
  const why = problem(model, fn.ret);
  if (why && fn.retRange) out.push(finding(NOT_C_TYPE, fn.retRange, `return type \`${fn.retText}\` of extern "${fn.abi}" fn \`${fn.name}\`: ${why}`, [], { data: { fn: fn.id, ret: true } }));
}

export const ffiSafetyFamily: RuleFamily = {
  name: "ffi-safety",
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
