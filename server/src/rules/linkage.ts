// Rule family "linkage": a C++ translation unit must see seam functions with C linkage.

import type { Model } from "../model/boundary.js";
import { finding, type Finding, type RuleFamily, type RuleMeta } from "./api.js";

export const CXX_LINKAGE: RuleMeta = {
  id: "header-lacks-c-linkage",
  severity: "error",
  summary: "A C++ file sees a seam function without extern \"C\" (directly, or through a header it includes that has no extern \"C\" guard).",
  why: "A C++ compiler mangles the name (e.g. with parameter types encoded), so the call links against a symbol Rust never exported.",
};

/**
 * Whether a file is compiled as C++: a C++ source (`.cpp`, `.cc`, …), a C++ header (`.hpp`, …), or
 * a `.h` whose text only C++ can read (a class, a template). A `.h` the C++ grammar merely read with
 * fewer errors (C11 `_Atomic`, GCC attribute spellings) is a C header: only its C++ includers make
 * it C++.
 */
function compiledAsCxx(model: Model, file: string): boolean {
  const f = model.files.get(file);
  if (!f || f.lang !== "cpp") return false;
  return !/\.h$/i.test(file) || !!f.cxxSyntax;
}

export const linkageFamily: RuleFamily = {
  name: "linkage",
  rules: [CXX_LINKAGE],
  check(model: Model): Finding[] {
    const out: Finding[] = [];
    for (const g of model.symbols.values()) {
      const rustProvides = g.rust.some((f) => f.role === "export" && f.noMangle) || g.c.some((f) => f.role === "def" && f.lang === "c");
      const rustCalls = g.rust.some((f) => f.role === "import");
      if (!rustProvides && !rustCalls) continue;
      for (const p of g.c) {
        if (p.cLinkage) continue;
        const facts = model.files.get(p.file);
        if (!facts) continue;
        if (facts.lang === "cpp" && !p.inHeader) {
          if (p.role === "def" && !rustCalls) continue; // a C++ function of the same name that nobody imports
          // declared earlier with C linkage in a header this file includes: the later declaration
          // or definition keeps that linkage (C++ [dcl.link]: a declaration without a linkage
          // specification after one with it does not change the function's linkage)
          if (g.c.some((q) => q !== p && q.inHeader && q.cLinkage && model.includersOf(q.file).includes(p.file))) continue;
          out.push(finding(CXX_LINKAGE, p.nameRange, `\`${p.name}\` is declared in a C++ file without extern "C": C++ looks for a mangled name and the link fails`, [], { data: { fn: p.id } }));
          continue;
        }
        if (p.inHeader) {
          const cxx = model.includersOf(p.file).filter((f) => compiledAsCxx(model, f));
          if (cxx.length === 0 && !compiledAsCxx(model, p.file)) continue;
          const inc = cxx[0];
          const rel = inc ? [{ range: { file: inc, line: 0, col: 0, endLine: 0, endCol: 0 }, message: "included by this C++ file" }] : [];
          const incRef = inc ? model.files.get(inc)?.includes.find((i) => model.includeTarget(i) === p.file) : undefined;
          if (incRef) rel[0]!.range = incRef.range;
          out.push(finding(CXX_LINKAGE, p.nameRange, `\`${p.name}\` has no extern "C" linkage in this header${inc ? `, which ${inc.split("/").pop()} includes` : ""}: wrap the declarations in \`#ifdef __cplusplus extern "C" { #endif\``, rel, { data: { fn: p.id, header: p.file } }));
        }
      }
    }
    return out;
  },
};
