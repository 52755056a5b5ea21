// Extract layer entry: (path, text) → FileFacts. A pure function of its inputs, so callers may
// cache the result by content hash. Never throws: trouble becomes a notice on the file.

import { getLanguage, grammarQuery, initParsers, isHeader, langOf, parseText, ParseTimeout, type Tree } from "../parse/parser.js";
import type { FileFacts, ItemCache, Lang } from "../model/types.js";
import { emptyFacts, ExtractTimeout, extractDeadlinePassed, forgetWalks, setExtractDeadline } from "./common.js";
import { extractC } from "./c.js";
import { extractRust } from "./rust.js";
import { blankAttributeMacros } from "./macros.js";
import "./plugins/index.js"; // rule families' body and call-site extractors register themselves
import type { Suppression } from "../model/types.js";

export { initParsers };

export const DEFAULT_MAX_FILE_BYTES = 2_000_000;

const ALLOW_RE = /ferrule-allow\(([^)]*)\)\s*(?::\s*(.*?))?\s*(?:\*\/)?$/;

/** Collects `ferrule-allow(rule): reason` comments (comment nodes only, found by a cursor walk). */
/** Collects `ferrule-allow(rule): reason` comments, found with a tree-sitter query (runs in wasm). */
function collectSuppressions(t: Tree, facts: FileFacts): void {
  const out: Suppression[] = [];
  const lang: Lang = facts.lang === "rust" ? "rust" : t.getLanguage() === getLanguage("cpp") ? "cpp" : "c";
  const q = grammarQuery(lang, lang === "rust" ? "comments-rust.scm" : "comments-c.scm");
  for (const { node } of q.captures(t.rootNode)) {
    const m = ALLOW_RE.exec(node.text.trim());
    if (!m) continue;
    out.push({
      line: node.startPosition.row, endLine: node.endPosition.row,
      rules: m[1]!.split(",").map((x) => x.trim()).filter(Boolean),
      reason: (m[2] ?? "").trim(),
      range: { file: facts.file, line: node.startPosition.row, col: node.startPosition.column, endLine: node.endPosition.row, endCol: node.endPosition.column },
    });
  }
  facts.extra.suppressions = out;
}

/** ERROR and MISSING nodes in the tree (at most the first 200,000 nodes of a cursor walk). */
function countErrors(t: Tree): number {
  const root = t.rootNode;
  // Only subtrees that contain an error need a visit (tree-sitter sums a subtree's error cost
  // from its children, so `hasError` is false for a subtree without ERROR or MISSING nodes):
  // the same count as the full walk whenever that walk would not stop at its step limit. The
  // cursor's node type is kept (it can say ERROR where Node.type names the aliased symbol).
  if (root.descendantCount <= 200_000) {
    let n = 0;
    const c = root.walk();
    for (;;) {
      if (c.nodeType === "ERROR" || c.nodeIsMissing) n++;
      if (c.currentNode.hasError && c.gotoFirstChild()) continue;
      while (!c.gotoNextSibling()) {
        if (!c.gotoParent()) { c.delete(); return n; }
      }
    }
  }
  let n = 0;
  const c = root.walk();
  // Count ERROR/MISSING nodes with a bounded cursor walk (no recursion).
  let steps = 0;
  for (;;) {
    if (steps++ > 200_000) break;
    if (c.nodeType === "ERROR" || c.nodeIsMissing) n++;
    if (c.gotoFirstChild()) continue;
    while (!c.gotoNextSibling()) {
      if (!c.gotoParent()) { c.delete(); return n; }
    }
  }
  c.delete();
  return n;
}

export interface ExtractOptions {
  maxFileBytes?: number;
  /** Time budget for parsing + extracting one file (default 10 s, a guard against pathological
   * input; an editor passes a tighter one, e.g. 1500 ms). Past it the file's facts are partial and
   * it carries one file-skipped notice saying so. */
  timeBudgetMs?: number;
  /** Attribute/export macro names to blank before reading C/C++ (setting `strip_macros`). */
  stripMacros?: readonly string[];
  /** A previous tree of this file, already adjusted with tree.edit(...), for incremental re-parsing
   * (used by the language server). Ignored when its grammar differs from the one chosen now. */
  oldTree?: Tree;
  /** When given, the final tree is handed to the caller (who must delete it) instead of being deleted. */
  keepTree?: (tree: Tree) => void;
  /** Item facts of the previous extraction of this file, for reuse (Rust files). */
  itemCache?: ItemCache;
}

function reusable(old: Tree | undefined, lang: Lang): Tree | undefined {
  try {
    return old && old.getLanguage() === getLanguage(lang) ? old : undefined;
  } catch {
    return undefined;
  }
}

export const DEFAULT_TIME_BUDGET_MS = 10_000;

function partlyRead(file: string, budget: number): FileFacts["notices"][number] {
  return {
    rule: "file-skipped",
    severity: "info",
    message: `skipped: ${file}: reading it took longer than ${budget} ms, so its facts are incomplete (findings that involve it may be missing)`,
    range: { file, line: 0, col: 0, endLine: 0, endCol: 0 },
  };
}

/** Facts of a file ferrule did not read: empty, with the one `file-skipped` notice saying why. */
export function skippedFacts(file: string, why: string): FileFacts {
  const f = emptyFacts(file, langOf(file) ?? "c");
  f.notices.push({ rule: "file-skipped", severity: "info", message: `skipped: ${file}: ${why}`, range: { file, line: 0, col: 0, endLine: 0, endCol: 0 } });
  return f;
}

export function extractFile(file: string, text: string, opts: ExtractOptions = {}): FileFacts {
  const lang = langOf(file) ?? "c";
  const max = opts.maxFileBytes ?? DEFAULT_MAX_FILE_BYTES;
  if (text.length > max) {
    return skippedFacts(file, `${text.length} characters, above the limit of ${max} (setting max_file_bytes)`);
  }
  if (text.charCodeAt(0) === 0xfeff) text = " " + text.slice(1); // BOM: keep columns stable
  let tree: Tree | undefined;
  const budget = opts.timeBudgetMs ?? DEFAULT_TIME_BUDGET_MS;
  setExtractDeadline(performance.now() + budget, budget);
  const timed = (f: FileFacts): FileFacts => {
    if (extractDeadlinePassed()) f.notices.push(partlyRead(file, budget));
    return f;
  };
  try {
    if (lang === "rust") {
      tree = parseText("rust", text, reusable(opts.oldTree, "rust"), budget);
      const rf = extractRust(file, tree, opts.itemCache, text);
      if (text.includes("ferrule-allow")) collectSuppressions(tree, rf);
      return timed(rf);
    }
    let useLang: Lang = lang;
    tree = parseText(lang, text, reusable(opts.oldTree, lang), budget);
    if (lang === "c" && tree.rootNode.hasError) {
      // A .h file may hold C++; keep whichever grammar reads it with fewer errors. A .c file stays
      // C, but the bundled C grammar misreads some C11/GCC spellings the C++ grammar reads
      // (`union __attribute__((aligned(16))) u {…}`, `_Alignas(8) long x;`): use the C++ tree
      // when it has fewer errors.
      const alt = parseText("cpp", text, reusable(opts.oldTree, "cpp"));
      if (countErrors(alt) < countErrors(tree)) {
        tree.delete();
        tree = alt;
        useLang = isHeader(file) ? "cpp" : "c";
      } else alt.delete();
    }
    const blanked = blankAttributeMacros(tree, text, opts.stripMacros);
    if (blanked !== undefined) {
      const treeLang: Lang = tree.getLanguage() === getLanguage("cpp") ? "cpp" : "c";
      tree.delete();
      tree = parseText(treeLang, blanked);
    }
    const facts = extractC(file, tree, useLang);
    facts.lang = lang === "c" && useLang === "cpp" ? "cpp" : lang;
    if (text.includes("ferrule-allow")) collectSuppressions(tree, facts);
    return timed(facts);
  } catch (e) {
    const f = emptyFacts(file, lang);
    if (e instanceof ExtractTimeout || e instanceof ParseTimeout) {
      f.notices.push(partlyRead(file, budget));
      return f;
    }
    if (e instanceof RangeError && /call stack/i.test(e.message)) {
      // pathological nesting (thousands of levels of pointers, generics or brackets)
      return skippedFacts(file, "nested too deeply to read");
    }
    f.notices.push({
      rule: "internal-error",
      severity: "error",
      message: `ferrule could not read ${file}: ${(e as Error).message}`,
      range: { file, line: 0, col: 0, endLine: 0, endCol: 0 },
    });
    return f;
  } finally {
    setExtractDeadline(Infinity);
    if (tree) forgetWalks(tree);
    if (tree && opts.keepTree) opts.keepTree(tree);
    else tree?.delete();
  }
}
