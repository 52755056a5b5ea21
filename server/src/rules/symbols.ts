// Rule family "symbols": which C symbols exist on which side of the seam, and whether the Rust
// side actually exports them with C linkage.

import type { Model } from "../model/boundary.js";
import type { FnDecl } from "../model/types.js";
import { finding, type Finding, type RuleFamily, type RuleMeta } from "./api.js";

export const NO_C_DECLARATION: RuleMeta = {
  id: "no-c-declaration",
  severity: "warning",
  summary: "A Rust function exported with C linkage has no C or C++ declaration in the workspace.",
  why: "C++ code cannot call it without a declaration; usually the header fell out of step or the name was changed on one side only.",
};
export const NO_DEFINITION: RuleMeta = {
  id: "no-definition",
  severity: "warning",
  summary: "A function declared for the seam (C prototype or Rust extern block item) is defined nowhere in the workspace.",
  why: "The linker matches by name only: a renamed or removed export shows up as an undefined symbol at link time, or links against the wrong library.",
};
export const EXPORT_NOT_UNMANGLED: RuleMeta = {
  id: "export-name-mangled",
  severity: "error",
  summary: "A Rust function that a C declaration names is not exported under that name (no #[no_mangle]/#[export_name]) or does not use the C calling convention.",
  why: "Without #[no_mangle] the symbol gets a Rust-mangled name the C++ side never finds; without extern \"C\" the calling convention is Rust's own and arguments arrive in the wrong registers.",
};
export const DUPLICATE_SYMBOL: RuleMeta = {
  id: "duplicate-symbol",
  severity: "error",
  summary: "The same C symbol is defined more than once across Rust and C/C++.",
  why: "Two definitions of one symbol fail to link, or one silently wins depending on link order.",
};

export const symbolsFamily: RuleFamily = {
  name: "symbols",
  rules: [NO_C_DECLARATION, NO_DEFINITION, EXPORT_NOT_UNMANGLED, DUPLICATE_SYMBOL],
  check(model: Model): Finding[] {
    const out: Finding[] = [];
    const hasRust = model.hasSide("rust");
    const hasC = model.hasSide("c");
    for (const g of model.symbols.values()) {
      const exports = g.rust.filter((f) => f.role === "export");
      const imports = g.rust.filter((f) => f.role === "import");
      const protos = g.c.filter((f) => f.role === "proto");
      const defs = g.c.filter((f) => f.role === "def");
      const properExports = exports.filter((f) => f.noMangle && f.isExtern && f.abi !== "Rust");

      // Rust exports with C linkage but no C-side declaration.
      if (hasC && protos.length === 0 && defs.length === 0) {
        for (const e of properExports) {
          out.push(finding(NO_C_DECLARATION, e.nameRange, `\`${e.symbol}\` is exported to C but no header or C++ file in the workspace declares it`, [], { data: { fn: e.id } }));
        }
      }
      // Exported name problems, only for functions the C side refers to.
      for (const e of exports) {
        if (protos.length === 0 && defs.length === 0 && imports.length === 0) {
          if (e.noMangle && (!e.isExtern || e.abi === "Rust")) {
            out.push(finding(EXPORT_NOT_UNMANGLED, e.nameRange, `\`${e.name}\` has #[no_mangle] but no \`extern "C"\`: it is exported with the Rust calling convention`, [], { data: { fn: e.id, fix: "add-extern" } }));
          }
          continue;
        }
        const other = protos[0] ?? defs[0];
        const rel = other ? [{ range: other.nameRange, message: `declared for C here` }] : [];
        if (!e.noMangle && e.isExtern) {
          out.push(finding(EXPORT_NOT_UNMANGLED, e.nameRange, `\`${e.name}\` is declared in C but the Rust function has no #[no_mangle]: it is exported under a mangled name and the link fails (or binds to something else)`, rel, { data: { fn: e.id, fix: "add-no-mangle" } }));
        } else if (!e.isExtern || e.abi === "Rust") {
          out.push(finding(EXPORT_NOT_UNMANGLED, e.nameRange, `\`${e.name}\` is declared in C but uses the Rust calling convention: add \`extern "C"\``, rel, { data: { fn: e.id, fix: "add-extern" } }));
        }
      }
      // Declared but defined nowhere.
      if (hasRust && exports.length === 0 && defs.length === 0) {
        for (const p of protos) {
          // A function Rust imports is expected to live in a C library, possibly outside the workspace.
          if (!p.inHeader || imports.length) continue;
          out.push(finding(NO_DEFINITION, p.nameRange, `\`${p.name}\` is declared here but neither a Rust export nor a C/C++ definition in the workspace provides it`, [], { data: { fn: p.id } }));
        }
        if (hasC) {
          for (const i of imports) {
            if (protos.length) continue;
            out.push(finding(NO_DEFINITION, i.nameRange, `\`${i.symbol}\` is imported from C but no C/C++ file in the workspace declares or defines it`, [], { data: { fn: i.id } }));
          }
        }
      }
      // Two definitions of one symbol.
      const definers: FnDecl[] = [...properExports, ...defs.filter((d) => d.cLinkage || d.lang === "c")];
      if (definers.length > 1) {
        const [first, ...rest] = definers;
        for (const d of rest) {
          out.push(finding(DUPLICATE_SYMBOL, d.nameRange, `\`${d.symbol}\` is defined more than once`, [{ range: first!.nameRange, message: "also defined here" }]));
        }
      }
    }
    return out;
  },
};
