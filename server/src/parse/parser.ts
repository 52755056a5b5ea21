// Parse layer: text → tree-sitter tree. Grammars are loaded once per process (see grammars/).
// Callers own the returned tree and must delete() it (trees live in wasm memory).

import { Parser, loadLanguage, queryText, type GrammarName } from "../../../grammars/index.js";
import type { Lang } from "../model/types.js";

export type Tree = Parser.Tree;
export type Node = Parser.SyntaxNode;

const parsers = new Map<GrammarName, Parser>();
let ready: Promise<void> | undefined;

/** Loads all three grammars; must be awaited once before parseText. */
export function initParsers(): Promise<void> {
  ready ??= (async () => {
    for (const g of ["rust", "c", "cpp"] as GrammarName[]) {
      const lang = await loadLanguage(g);
      const p = new Parser();
      p.setLanguage(lang);
      parsers.set(g, p);
    }
    const probe = parsers.get("c")!.parse("");
    memoiseNodeGetters(Object.getPrototypeOf(probe.rootNode) as object);
    probe.delete();
    // Warm-up: V8 compiles wasm functions lazily on first call (seconds for the 4.6 MB C++
    // grammar on a busy machine); pay that here rather than inside the first file's time budget.
    for (const [g, src] of WARM_UP) parsers.get(g)!.parse(src).delete();
  })();
  return ready;
}

const WARM_UP: [GrammarName, string][] = [
  ["rust", `#[repr(C)] pub struct S { a: u32 }\n#[no_mangle] pub unsafe extern "C" fn f(p: *const f32, n: usize) -> i32 { let v = unsafe { *p }; if v > 0.0 { 1 } else { n as i32 } }\n`],
  ["c", `#include <stddef.h>\ntypedef struct s { int a; float b[4]; } s;\nint f(const float *p, size_t n);\nstatic int g(int x) { return x > 0 ? f(0, 1) : -x; }\n`],
  ["cpp", `#include <vector>\nextern "C" { int f(const float *p, unsigned long n); }\nnamespace k { class b { public: int w(const void *i) { auto *p = static_cast<const float *>(i); return f(p, 1); } private: std::vector<int> v_; }; }\n`],
];

const MEMO_GETTERS = ["typeId", "endIndex", "endPosition", "childCount", "namedChildCount", "isNamed", "hasError", "isMissing", "text", "parent"] as const;

/** A node's memoised answers, one object of one fixed shape per node (V8 keeps the accesses
 * monomorphic; properties added to the node objects one by one made every node shape differ). */
class NodeMemo {
  typeId: unknown = undefined;
  endIndex: unknown = undefined;
  endPosition: unknown = undefined;
  childCount: unknown = undefined;
  namedChildCount: unknown = undefined;
  isNamed: unknown = undefined;
  hasError: unknown = undefined;
  isMissing: unknown = undefined;
  text: unknown = undefined;
  parent: unknown = undefined;
  fields: Map<number, unknown> | undefined = undefined;
}

/**
 * Memoises the read-only getters of syntax nodes. Each web-tree-sitter getter crosses into wasm
 * on every access (and `type`, `text`, `childForFieldName` are asked many times per node by the
 * extractors); a node's answers never change because ferrule never edits a tree in place (it
 * re-parses), so the first answer is kept with the node. `childForFieldName` also looks the
 * field up in a map instead of searching the grammar's field list on every call. Measured:
 * scripts/bench.mjs.
 */
function memoiseNodeGetters(proto: object): void {
  const p = proto as Record<string, unknown> & { __ferruleMemo?: boolean };
  if (p.__ferruleMemo) return;
  p.__ferruleMemo = true;
  for (const name of MEMO_GETTERS) {
    const d = Object.getOwnPropertyDescriptor(proto, name);
    if (!d?.get) continue;
    const orig = d.get;
    Object.defineProperty(proto, name, {
      configurable: true,
      get(this: { _memo?: NodeMemo }) {
        const m = (this._memo ??= new NodeMemo());
        let v = m[name];
        if (v === undefined) m[name] = v = orig.call(this);
        return v;
      },
    });
  }
  const byField = p.childForFieldId as ((id: number) => unknown) | undefined;
  if (typeof byField === "function") {
    Object.defineProperty(proto, "childForFieldId", {
      configurable: true,
      writable: true,
      value(this: { _memo?: NodeMemo }, id: number) {
        const memo = (this._memo ??= new NodeMemo());
        const m = (memo.fields ??= new Map());
        let v = m.get(id);
        if (v === undefined) m.set(id, (v = byField.call(this, id)));
        return v;
      },
    });
    const fieldIds = new WeakMap<object, Map<string, number>>();
    const idOf = (lang: { fields: (string | null)[] }, name: string): number => {
      let m = fieldIds.get(lang);
      if (!m) {
        m = new Map();
        // the first index of each name, as fields.indexOf would find it
        lang.fields.forEach((f, i) => { if (f !== null && !m!.has(f)) m!.set(f, i); });
        fieldIds.set(lang, m);
      }
      return m.get(name) ?? -1;
    };
    Object.defineProperty(proto, "childForFieldName", {
      configurable: true,
      writable: true,
      value(this: { tree: { language: { fields: (string | null)[] } }; childForFieldId(id: number): unknown }, name: string) {
        const id = idOf(this.tree.language, name);
        return id !== -1 ? this.childForFieldId(id) : null;
      },
    });
  }
}

export function isReady(): boolean {
  return parsers.size === 3;
}

/** Grammar used for a source language. C headers are parsed with the C++ grammar when they
 * contain C++ constructs; callers decide by file extension and content (see langOf). */
export function parseText(lang: Lang, text: string, old?: Tree, timeoutMs = 0): Tree {
  const p = parsers.get(lang);
  if (!p) throw new Error("parsers not initialised: await initParsers() first");
  // tree-sitter gives up after the timeout (web-tree-sitter then throws "Parsing failed").
  p.setTimeoutMicros(Math.max(0, Math.round(timeoutMs * 1000)));
  try {
    return p.parse(text, old);
  } catch (e) {
    if (timeoutMs > 0) throw new ParseTimeout(`parsing took longer than ${timeoutMs} ms`);
    throw e;
  } finally {
    if (timeoutMs > 0) p.setTimeoutMicros(0);
  }
}

/** Thrown by parseText when its timeout passed. */
export class ParseTimeout extends Error {}

export function getLanguage(lang: Lang): Parser.Language {
  const p = parsers.get(lang);
  if (!p) throw new Error("parsers not initialised: await initParsers() first");
  return p.getLanguage();
}

const RUST_EXT = new Set([".rs"]);
const C_EXT = new Set([".c", ".h"]);
const CPP_EXT = new Set([".cc", ".cpp", ".cxx", ".hpp", ".hh", ".hxx", ".h++", ".c++"]);

/** Language of a file by its extension; undefined for files ferrule does not read. */
export function langOf(file: string): Lang | undefined {
  const dot = file.lastIndexOf(".");
  if (dot < 0) return undefined;
  const ext = file.slice(dot).toLowerCase();
  if (RUST_EXT.has(ext)) return "rust";
  if (C_EXT.has(ext)) return "c";
  if (CPP_EXT.has(ext)) return "cpp";
  return undefined;
}

export function isHeader(file: string): boolean {
  return /\.(h|hpp|hh|hxx)$/i.test(file);
}

const queries = new Map<string, Parser.Query>();

/** A query file of grammars/queries compiled for a grammar, once per process. */
export function grammarQuery(lang: Lang, file: string): Parser.Query {
  const key = `${lang}:${file}`;
  let q = queries.get(key);
  if (!q) {
    q = getLanguage(lang).query(queryText(file));
    queries.set(key, q);
  }
  return q;
}
