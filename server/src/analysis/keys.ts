// The names a file's facts declare and use: how analysis relates files without building a model.
// The language server's scoped re-check (lsp/engine.ts) and the CLI's chunked check
// (analysis/chunks.ts) both take "the files a finding can depend on" from these keys:
//   s:SYMBOL  a linked function symbol;  t:NAME  a type name (normalised), or the scalar a
//             constructor's or release function's handle points to (t:char, t:f32);
//   h:STEM    a constructor/releaser name stem of the ownership family;
//   r:NAME    a Rust function with body facts, and a Rust call the ownership rules resolve by
//             name across files (rules/ownership.ts CrateIndex: a method call always, a plain
//             call when the calling file has no such function of its own).
// Two files relate when one declares a name the other declares or uses, or both use a type.
// (`r:` names are the exception: two files that merely declare one helper name do not relate;
// a call relates its file to every declarer of the name, which decides how it resolves.)

import { normName } from "../model/boundary.js";
import type { AbiType, FileFacts } from "../model/types.js";
import type { RustOwnFacts } from "../model/ownership.js";
import { pairingStems, scalarPointeeKey } from "../rules/ownership.js";

export interface Keys {
  decl: Set<string>;
  use: Set<string>;
}

/** Names a file's facts declare (D) and use (U), for the dependency index. */
/** The file's Rust functions with body facts and no `self`: a plain call to one of these names
 * resolves in the file (rules/ownership.ts CrateIndex prefers the caller's file). */
export function localHelpers(f: FileFacts): Set<string> {
  const out = new Set<string>();
  for (const fn of f.fns) {
    const own = (fn.body as { ownership?: RustOwnFacts } | undefined)?.ownership;
    if (fn.lang === "rust" && own && !own.hasSelf) out.add(fn.name);
  }
  return out;
}

/** `local`: the plain-call names that resolve in the caller's file (default: this facts'
 * localHelpers; the language server passes the whole file's when keying one item). */
export function keysOf(f: FileFacts | undefined, local?: ReadonlySet<string>): Keys {
  const decl = new Set<string>();
  const use = new Set<string>();
  if (!f) return { decl, use };
  const typeRefs = (t: AbiType | undefined, depth = 0): void => {
    if (!t || depth > 12) return;
    switch (t.k) {
      case "named": use.add("t:" + normName(t.name)); break;
      case "ptr": typeRefs(t.to, depth + 1); break;
      case "array": typeRefs(t.of, depth + 1); break;
      case "fn": t.params.forEach((p) => typeRefs(p, depth + 1)); typeRefs(t.ret, depth + 1); break;
      default: break;
    }
  };
  const plain = local ?? localHelpers(f);
  for (const fn of f.fns) {
    const own = (fn.body as { ownership?: RustOwnFacts } | undefined)?.ownership;
    if (fn.lang === "rust" && own) decl.add("r:" + fn.name);
  }
  for (const fn of f.fns) {
    const own = (fn.body as { ownership?: RustOwnFacts } | undefined)?.ownership;
    if (fn.lang === "rust" && own) for (const c of own.calls) if (c.method || !plain.has(c.callee)) use.add("r:" + c.callee);
    // a pointer cast to a crate struct as a call's argument: panic-across-c-abi asks whether any
    // C file declares that struct (rules/ownership.ts, passOn)
    if (fn.lang === "rust" && own) for (const c of own.calls) for (const a of c.args) if (a.cast) use.add("t:" + normName(a.cast));
  }
  for (const fn of f.fns) {
    // Only what the model links across files (as in Model's symbol table): not file-local
    // helpers, not plain Rust functions that are neither extern nor unmangled.
    if ((fn as { internal?: boolean }).internal) continue;
    if (fn.lang === "rust" && fn.role === "export" && !fn.noMangle && !fn.isExtern) continue;
    decl.add("s:" + fn.symbol);
    if (fn.name !== fn.symbol) decl.add("s:" + fn.name);
    fn.params.forEach((p) => typeRefs(p.type));
    typeRefs(fn.ret);
    // what the ownership family relates functions by, beyond their signatures: the name stems
    // of constructor/releaser pairs and the types a Rust body boxes or unboxes
    for (const st of pairingStems(fn.symbol)) decl.add("h:" + st);
    const own = (fn.body as { ownership?: RustOwnFacts } | undefined)?.ownership;
    if (own) {
      for (const p of own.produces) if (p.inner) use.add("t:" + normName(p.inner));
      for (const r of own.releases) if (r.inner) use.add("t:" + normName(r.inner));
      // a constructor or release function whose handle points to a scalar (a boxed byte frame, a
      // C string): the ownership family pairs them by that pointee when no name stem does
      if (own.produces.length || own.releases.length) {
        for (const t of [fn.ret, ...fn.params.map((p) => p.type)]) {
          const k = scalarPointeeKey(t);
          if (k) use.add(k);
        }
      }
    }
  }
  for (const t of f.types) {
    decl.add("t:" + normName(t.name));
    if (t.tag) decl.add("t:" + normName(t.tag));
    t.fields.forEach((x) => typeRefs(x.type));
    typeRefs(t.aliasOf);
  }
  for (const d of f.defines) decl.add("t:" + normName(d.name));
  for (const c of f.calls) use.add("s:" + c.callee);
  for (const a of f.asserts) use.add("t:" + normName(a.typeName));
  // a name an item-level macro invocation mentions may be a symbol it defines (rules/symbols.ts)
  for (const m of f.macroItems ?? []) for (const x of m.names) use.add("s:" + x);
  return { decl, use };
}

/** Whether names relate (as Engine.relatedTo relates files): a name one declares and the other
 * declares or uses, or a type both use. */
export function touchesKeys(k: Keys, K: Keys): boolean {
  for (const x of k.decl) if ((K.decl.has(x) && !x.startsWith("r:")) || K.use.has(x)) return true;
  for (const x of k.use) if (K.decl.has(x) || (K.use.has(x) && x.startsWith("t:"))) return true;
  return false;
}

