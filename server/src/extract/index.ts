// Extract layer entry: (path, text) → FileFacts. A pure function of its inputs, so callers may
// cache the result by content hash. Never throws: trouble becomes a notice on the file.

import { getLanguage, grammarQuery, initParsers, isHeader, langOf, parseText, ParseTimeout, type Tree } from "../parse/parser.js";
import type { FileFacts, ItemCache, Lang } from "../model/types.js";
import { emptyFacts, ExtractTimeout, extractDeadlinePassed, forgetWalks, setExtractDeadline } from "./common.js";
import { extractC } from "./c.js";
import { extractRust } from "./rust.js";
import { blankAttributeMacros } from "./macros.js";
import { preprocess, type PreprocEnv } from "./preproc/index.js";
import { rangeOf, setColumnMap } from "./common.js";
import { ALL_TRIPLES } from "../model/targets.js";
import "./plugins/index.js"; // rule families' body and call-site extractors register themselves
import type { Suppression } from "../model/types.js";

export { initParsers };

export const DEFAULT_MAX_FILE_BYTES = 2_000_000;

function lineStarts(text: string): number[] {
  const out = [0];
  for (let i = text.indexOf("\n"); i >= 0; i = text.indexOf("\n", i + 1)) out.push(i + 1);
  return out;
}

// `ferrule: accept rule-a, rule-b because <reason>`. Text after the rule list that does not start
// with `because` is not a reason: the comment accepts nothing and is reported.
const ACCEPT_RE = /ferrule:\s*accept\s+([a-z0-9-]+(?:\s*,\s*[a-z0-9-]+)*)(.*)$/;
const BECAUSE_RE = /^\s*because\b\s*(.*?)\s*(?:\*\/)?$/;

/** Collects `ferrule: accept rule because reason` comments, found with a tree-sitter query (runs in wasm). */
function collectSuppressions(t: Tree, facts: FileFacts): void {
  const out: Suppression[] = [];
  const lang: Lang = facts.lang === "rust" ? "rust" : t.getLanguage() === getLanguage("cpp") ? "cpp" : "c";
  const q = grammarQuery(lang, lang === "rust" ? "comments-rust.scm" : "comments-c.scm");
  for (const { node } of q.captures(t.rootNode)) {
    const m = ACCEPT_RE.exec(node.text.trim());
    if (!m) continue;
    out.push({
      line: node.startPosition.row, endLine: node.endPosition.row,
      rules: m[1]!.split(",").map((x) => x.trim()).filter(Boolean),
      reason: (BECAUSE_RE.exec(m[2] ?? "")?.[1] ?? "").trim(),
      range: rangeOf(facts.file, node),
    });
  }
  facts.extra.suppressions = out;
}

/**
 * A header is read for C and C++ includers alike, with its `__cplusplus` conditionals left
 * undecided; when they wrap `extern "C"` in ways the one reading cannot pair (`#ifdef
 * __cplusplus class … extern "C" { #else … #endif`), the header is read once more as a C++
 * translation unit sees it, and the prototypes that reading puts in an extern "C" block get C
 * linkage (C++ [dcl.link]). Only for headers that spell `extern "C"` and have prototypes without it.
 */
function cxxLinkage(file: string, text: string, facts: FileFacts, opts: ExtractOptions, budget: number): void {
  const env = opts.preproc || { targets: ALL_TRIPLES };
  const pp = preprocess(file, text, { ...env, strip: opts.stripMacros, asCxx: true });
  const t = parseText("cpp", pp.text, undefined, budget);
  try {
    setColumnMap(pp.changed ? pp.mapCol : undefined);
    const cxx = extractC(file, t, "cpp");
    const linked = new Set(cxx.fns.filter((f) => f.cLinkage).map((f) => `${f.name}@${f.range.line}`));
    for (const f of facts.fns) if (!f.cLinkage && linked.has(`${f.name}@${f.range.line}`)) f.cLinkage = true;
  } finally {
    forgetWalks(t);
    t.delete();
  }
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
  /** The C preprocessor's environment (targets, settings, included files). Without it C/C++ is
   * read as written, with only `strip_macros` and attribute-like macros of the file blanked. */
  preproc?: Omit<PreprocEnv, "strip" | "strict"> | false;
}

function reusable(old: Tree | undefined, lang: Lang): Tree | undefined {
  try {
    return old && old.getLanguage() === getLanguage(lang) ? old : undefined;
  } catch {
    return undefined;
  }
}

export const DEFAULT_TIME_BUDGET_MS = 10_000;

/** The end of the whole run's time budget (`Date.now()` ms; set by the CLI and handed to worker
 * threads): a file started after it is skipped, and no file's budget (its re-parses included)
 * reaches past it, so crafted files cannot add up to an unbounded run. */
let runDeadline = Infinity;
export function setRunDeadline(ms: number): void {
  runDeadline = ms;
}
export function getRunDeadline(): number {
  return runDeadline;
}

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
  let expandedTree = false;
  const left = runDeadline - Date.now();
  if (left <= 0) return skippedFacts(file, "the run's total time budget was spent before this file was read (setting max_total_seconds)");
  const budget = Math.max(1, Math.min(opts.timeBudgetMs ?? DEFAULT_TIME_BUDGET_MS, left));
  const t0 = performance.now();
  setExtractDeadline(t0 + budget, budget);
  // what is left of this file's budget, for a re-parse of the same text
  const rest = () => Math.max(1, budget - (performance.now() - t0));
  const timed = (f: FileFacts): FileFacts => {
    if (extractDeadlinePassed()) f.notices.push(partlyRead(file, budget));
    return f;
  };
  try {
    if (lang === "rust") {
      tree = parseText("rust", text, reusable(opts.oldTree, "rust"), budget);
      const rf = extractRust(file, tree, opts.itemCache, text);
      if (text.includes("ferrule:")) collectSuppressions(tree, rf);
      return timed(rf);
    }
    let useLang: Lang = lang;
    // The preprocessor's text keeps the source's lines; columns map back through setColumnMap.
    // A tree of expanded text is never reused for an edit of the source (its offsets differ).
    let src = text;
    let expanded = false;
    let pp: ReturnType<typeof preprocess> | undefined;
    if (opts.preproc !== false) {
      pp = preprocess(file, text, { ...(opts.preproc ?? { targets: ALL_TRIPLES }), strip: opts.stripMacros });
      if (pp.changed) {
        src = pp.text;
        expanded = true;
        setColumnMap(pp.mapCol);
      }
    }
    const old = expanded ? undefined : opts.oldTree;
    tree = parseText(lang, src, reusable(old, lang), budget);
    if (lang === "c" && tree.rootNode.hasError) {
      // A .h file may hold C++; keep whichever grammar reads it with fewer errors. A .c file stays
      // C, but the bundled C grammar misreads some C11/GCC spellings the C++ grammar reads
      // (`union __attribute__((aligned(16))) u {…}`, `_Alignas(8) long x;`): use the C++ tree
      // when it has fewer errors.
      const alt = parseText("cpp", src, reusable(old, "cpp"), rest());
      if (countErrors(alt) < countErrors(tree)) {
        tree.delete();
        tree = alt;
        useLang = isHeader(file) ? "cpp" : "c";
      } else alt.delete();
    }
    if (opts.preproc === false) {
      const blanked = blankAttributeMacros(tree, text, opts.stripMacros);
      if (blanked !== undefined) {
        const treeLang: Lang = tree.getLanguage() === getLanguage("cpp") ? "cpp" : "c";
        tree.delete();
        tree = parseText(treeLang, blanked, undefined, rest());
      }
    }
    // the caller would edit a kept tree with the source's offsets: keep none of expanded text
    expandedTree = expanded;
    const facts = extractC(file, tree, useLang);
    facts.lang = lang === "c" && useLang === "cpp" ? "cpp" : lang;
    if (pp && isHeader(file) && text.includes('extern "C"') && facts.fns.some((f) => !f.cLinkage && !f.isStatic)) {
      cxxLinkage(file, text, facts, opts, rest());
      setColumnMap(expanded ? pp.mapCol : undefined);
    }
    if (pp) {
      facts.extra.preproc = { envKey: pp.envKey, reads: pp.reads };
      if (pp.regions.length) {
        // members under a condition only some targets meet (`#ifdef __LP64__`): kept with it
        for (const t of facts.types) {
          for (const fd of t.fields) {
            const cs = pp.regions.filter((r) => r.line <= fd.range.line && fd.range.line <= r.endLine).map((r) => `(${r.cond})`);
            if (cs.length) fd.ppCond = cs.join(" && ");
          }
        }
      }
      if (pp.undecided.length) {
        // uses of a macro whose definition ferrule cannot decide: the names they may define
        const starts = lineStarts(text);
        const pos = (o: number) => {
          let lo = 0, hi = starts.length - 1;
          while (lo < hi) { const mid = (lo + hi + 1) >> 1; if (starts[mid]! <= o) lo = mid; else hi = mid - 1; }
          return { line: lo, col: o - starts[lo]! };
        };
        // `void bitfn(dav1d_init)(void) {…}`: the grammar reads the unexpanded macro as the
        // function's name; that name is no symbol, the macro items say what it may define
        // (unless a candidate reading keeps the name: `#define dav1d_log dav1d_log`)
        const macroNames = new Set(pp.undecided.map((u) => u.macro));
        for (const u of pp.undecided) if (u.keepsName) macroNames.delete(u.macro);
        if (macroNames.size) facts.fns = facts.fns.filter((f) => !macroNames.has(f.name));
        for (const u of pp.undecided) {
          const a = pos(u.s), b = pos(u.e);
          (facts.macroItems ??= []).push({ macro: u.macro, names: u.names, range: { file, line: a.line, col: a.col, endLine: b.line, endCol: b.col }, c: true });
        }
      }
      if (pp.ambiguous.length) {
        facts.notices.push({
          rule: "unknown-macro",
          severity: "info",
          message: `macros defined differently under conditions ferrule cannot decide are left unexpanded: ${pp.ambiguous.slice(0, 8).map((m) => `\`${m}\``).join(", ")}${pp.ambiguous.length > 8 ? ", …" : ""}; declarations using them may not be checked (list the build's macros under \`defines\` in .ferrule.toml)`,
          range: { file, line: 0, col: 0, endLine: 0, endCol: 0 },
        });
      }
    }
    if (text.includes("ferrule:")) collectSuppressions(tree, facts);
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
    setColumnMap(undefined);
    if (tree) forgetWalks(tree);
    if (tree && opts.keepTree && !expandedTree) opts.keepTree(tree);
    else tree?.delete();
  }
}
