// Helpers shared by the extractors: ranges, comments, small constant evaluation.

import type { Node } from "../parse/parser.js";
import type Parser from "web-tree-sitter";
import type { AbiType, FileFacts, Lang, Range } from "../model/types.js";

let columnMap: ((line: number, col: number, end?: boolean) => number) | undefined;

/** While a file read through the preprocessor is extracted: maps a column of the expanded text
 * to the source's (lines are the same), so every range points at the source. */
export function setColumnMap(m: ((line: number, col: number, end?: boolean) => number) | undefined): void {
  columnMap = m;
}

export function rangeOf(file: string, n: Node): Range {
  const s = n.startPosition;
  const e = n.endPosition;
  if (columnMap) return { file, line: s.row, col: columnMap(s.row, s.column), endLine: e.row, endCol: columnMap(e.row, e.column, true) };
  return { file, line: s.row, col: s.column, endLine: e.row, endCol: e.column };
}

export function emptyFacts(file: string, lang: Lang): FileFacts {
  return {
    file, lang, fns: [], types: [], asserts: [], includes: [], calls: [], classes: [],
    defines: [], notices: [], hasErrors: false, extra: {},
  };
}

/** Comment lines immediately above `n` (siblings), markers stripped, in source order. */
export function docAbove(n: Node, skipTypes: string[] = ["attribute_item"]): string {
  const lines: string[] = [];
  let p = n.previousSibling;
  let lastRow = n.startPosition.row;
  while (p) {
    if (skipTypes.includes(p.type)) {
      lastRow = p.startPosition.row;
      p = p.previousSibling;
      continue;
    }
    if (p.type !== "comment" && p.type !== "line_comment" && p.type !== "block_comment") break;
    if (p.endPosition.row < lastRow - 1) break;
    lines.unshift(stripComment(p.text));
    lastRow = p.startPosition.row;
    p = p.previousSibling;
  }
  return lines.join("\n").trim();
}

/** A trailing comment on the same line as the end of `n`. */
export function trailingComment(n: Node): string {
  const s = n.nextSibling;
  if (s && (s.type === "comment" || s.type === "line_comment") && s.startPosition.row === n.endPosition.row) {
    return stripComment(s.text);
  }
  return "";
}

export function stripComment(t: string): string {
  if (t.startsWith("/*")) {
    return t
      .replace(/^\/\*+!?/, "")
      .replace(/\*+\/$/, "")
      .split("\n")
      .map((l) => l.replace(/^\s*\*+ ?/, ""))
      .join("\n")
      .trim();
  }
  return t
    .split("\n")
    .map((l) => l.replace(/^\s*\/\/[\/!]?\s?/, ""))
    .join("\n")
    .trim();
}

/** Integer value of a literal text (C or Rust spelling), or null. */
export function parseIntLit(text: string): number | null {
  let t = text.replace(/_/g, "").trim();
  t = t.replace(/(u8|u16|u32|u64|u128|usize|i8|i16|i32|i64|i128|isize)$/, "");
  t = t.replace(/[uUlL]+$/, "");
  let v: number;
  if (/^0[xX][0-9a-fA-F]+$/.test(t)) v = parseInt(t.slice(2), 16);
  else if (/^0[bB][01]+$/.test(t)) v = parseInt(t.slice(2), 2);
  else if (/^0[oO][0-7]+$/.test(t)) v = parseInt(t.slice(2), 8);
  else if (/^0[0-7]+$/.test(t)) v = parseInt(t, 8);
  else if (/^[0-9]+$/.test(t)) v = parseInt(t, 10);
  else return null;
  return Number.isFinite(v) ? v : null;
}

/**
 * Evaluates a constant integer expression node (literals, + - * / % << >> | & ^ ~, unary -, parens,
 * and names found in `names`). Works for both the C and the Rust grammar. Returns null when unknown.
 */
export function evalConst(n: Node | null, names: Map<string, number> = new Map(), depth = 0): number | null {
  if (!n || depth > 200) return null;
  switch (n.type) {
    case "number_literal":
    case "integer_literal":
      return parseIntLit(n.text);
    case "char_literal": {
      const m = /^'(.)'$/.exec(n.text);
      return m ? m[1]!.charCodeAt(0) : null;
    }
    case "parenthesized_expression":
      return evalConst(n.namedChild(0), names, depth + 1);
    case "identifier":
      return names.get(n.text) ?? null;
    case "unary_expression": {
      const v = evalConst(n.namedChild(0), names, depth + 1);
      if (v === null) return null;
      const op = n.child(0)?.text;
      if (op === "-") return -v;
      if (op === "+") return v;
      if (op === "~" || op === "!") return ~v;
      return null;
    }
    case "binary_expression": {
      const l = evalConst(n.childForFieldName("left"), names, depth + 1);
      const r = evalConst(n.childForFieldName("right"), names, depth + 1);
      const op = n.childForFieldName("operator")?.text ?? n.child(1)?.text;
      if (l === null || r === null) return null;
      switch (op) {
        case "+": return l + r;
        case "-": return l - r;
        case "*": return l * r;
        case "/": return r === 0 ? null : Math.trunc(l / r);
        case "%": return r === 0 ? null : l % r;
        case "<<": return r > 52 ? null : l * 2 ** r;
        case ">>": return Math.floor(l / 2 ** r);
        case "|": return l | r;
        case "&": return l & r;
        case "^": return l ^ r;
      }
      return null;
    }
    case "type_cast_expression":
    case "cast_expression":
      return evalConst(n.childForFieldName("value") ?? n.namedChild(n.namedChildCount - 1), names, depth + 1);
  }
  return null;
}

/** Thrown by `walk` when the file's time budget (ExtractOptions.timeBudgetMs) is spent. */
export class ExtractTimeout extends Error {}

let deadline = Infinity;
let budgetMs = 0;
/** Sets (or, with Infinity, clears) the time by which the current file's extraction must end. */
export function setExtractDeadline(at: number, budget = 0): void {
  deadline = at;
  budgetMs = budget;
}
export function extractDeadlinePassed(): boolean {
  return performance.now() > deadline;
}

/** Depth-first walk that never recurses deeper than `maxDepth` (10,000-deep input must not overflow).
 * Throws ExtractTimeout once the file's time budget is spent (checked every 512 nodes). */
export function walk(root: Node, visit: (n: Node) => boolean | void, maxDepth = 400): void {
  let count = 0;
  // Two parallel stacks (no tuple per node), and one wasm call for all children of a node
  // (n.child(i) is one call each, and O(i) inside tree-sitter).
  const nodes: Node[] = [root];
  const depths: number[] = [0];
  while (nodes.length) {
    const n = nodes.pop()!;
    const d = depths.pop()!;
    if ((++count & 511) === 0 && performance.now() > deadline) throw new ExtractTimeout(`extraction stopped after ${budgetMs} ms`);
    if (visit(n) === false) continue;
    if (d >= maxDepth) continue;
    const cs = n.children;
    // web-tree-sitter caches the array on the node: drop it so a visited subtree does not stay
    // reachable from the root for the whole walk (measured: most of the GC time on big files).
    (n as unknown as { _children?: unknown })._children = undefined;
    for (let i = cs.length - 1; i >= 0; i--) {
      const c = cs[i];
      if (c) {
        nodes.push(c);
        depths.push(d + 1);
      }
    }
  }
}

const SMALL_SUBTREE = 48; // characters
// A query runs to its end in one wasm call; above this the JS walk, which checks the time budget
// as it goes, keeps a pathological file (a 1.5 MB line) within its budget.
const LARGE_SUBTREE = 200_000;
const typeSets = new WeakMap<readonly string[], Set<string>>();

/** One compiled query per grammar and list of types: `[(a) (b) …] @n`. */
const typeQueries = new WeakMap<object, Map<string, Parser.Query | null>>();

function queryFor(root: Node, types: readonly string[]): Parser.Query | null {
  const lang = (root as unknown as { tree: { language: Parser.Language } }).tree.language;
  let m = typeQueries.get(lang);
  if (!m) typeQueries.set(lang, (m = new Map()));
  const key = types.join(",");
  let q = m.get(key);
  if (q === undefined) {
    // A type the grammar does not have would be a query error; no node can have it anyway.
    const known = types.filter((t) => lang.idForNodeType(t, true) !== null);
    q = known.length ? lang.query(`[${known.map((t) => `(${t})`).join(" ")}] @n`) : null;
    m.set(key, q);
  }
  return q;
}

/** The nodes of these types under `root`, down to `maxDepth`, in document order (an ancestor
 * before the descendants that start where it starts). */
function capture(root: Node, types: readonly string[], maxDepth: number): Node[] {
  const q = queryFor(root, types);
  if (!q) return [];
  // each end offset read once (a call into wasm), not once per comparison
  const found = q.captures(root, { maxStartDepth: maxDepth }).map((c) => ({ n: c.node, s: c.node.startIndex, e: c.node.endIndex }));
  found.sort((a, b) => a.s - b.s || b.e - a.e);
  return found.map((x) => x.n);
}

/** Types the whole-file walks of the C/C++ extractors ask for (c.ts, macros.ts, the buffers and
 * ownership plugins): found once per tree. A walk asking for other types runs its own search. */
export const TOP_TYPES = [
  "preproc_include", "preproc_def", "preproc_call", "function_definition", "declaration", "field_declaration", "type_definition",
  "struct_specifier", "union_specifier", "enum_specifier", "call_expression", "static_assert_declaration", "class_specifier",
  "template_declaration", "compound_statement", "enumerator", "parameter_declaration",
];
const TOP_TYPES_SET: Set<string> = new Set(TOP_TYPES);
const topNodes = new WeakMap<object, TopNodes>();

/** The whole-file search of TOP_TYPES: one capture name per type, so each found node's type comes
 * with it (reading `node.type` is a call into wasm, and every whole-file walk filters the list). */
const topQueries = new WeakMap<object, Parser.Query | null>();

/** A whole file's TOP_TYPES nodes with their types, in walkTypes' order. */
interface TopNodes {
  nodes: Node[];
  types: string[];
}

/**
 * The TOP_TYPES nodes of a whole file (what `capture(root, TOP_TYPES, 400)` finds, in the same
 * order, each with its type) minus those nested in a compound statement that is itself inside a
 * function definition: every walkFile leaves those out anyway (each either lists
 * `compound_statement` and returns false for it, or returns false for `function_definition`), so
 * it visits the same nodes as with the full list, and the list each walk filters is shorter.
 * Only span containment decides (nodes nest or are disjoint, so a non-empty node strictly inside
 * another's span is its descendant); a node sharing a span or an empty one is kept, which is
 * always safe. (Skipping function bodies inside the search itself, with byte ranges between them,
 * was measured: tree-sitter's cursor then walks up to each range again, and that costs as much as
 * stepping through the bodies.)
 */
function captureTop(root: Node): TopNodes {
  const lang = (root as unknown as { tree: { language: Parser.Language } }).tree.language;
  let q = topQueries.get(lang);
  if (q === undefined) {
    const known = TOP_TYPES.filter((t) => lang.idForNodeType(t, true) !== null);
    q = known.length ? lang.query(`[${known.map((t) => `(${t}) @${t}`).join(" ")}]`) : null;
    topQueries.set(lang, q);
  }
  if (!q) return { nodes: [], types: [] };
  const found = q.captures(root, { maxStartDepth: 400 }).map((c) => ({ n: c.node, t: c.name, s: c.node.startIndex, e: c.node.endIndex }));
  found.sort((a, b) => a.s - b.s || b.e - a.e);
  const nodes: Node[] = [];
  const types: string[] = [];
  // The outermost open function definition and the compound statements strictly inside it.
  let fnEnd = -1;
  let fnStart = -1;
  const blocks: { s: number; e: number }[] = [];
  for (const x of found) {
    if (x.s >= fnEnd) { fnEnd = -1; blocks.length = 0; }
    while (blocks.length && x.s >= blocks[blocks.length - 1]!.e) blocks.pop();
    if (x.e > x.s && blocks.some((b) => x.s >= b.s && x.e <= b.e && (x.s > b.s || x.e < b.e))) continue;
    nodes.push(x.n);
    types.push(x.t);
    if (x.t === "function_definition" && fnEnd < 0 && x.e > x.s) { fnStart = x.s; fnEnd = x.e; }
    else if (x.t === "compound_statement" && fnEnd >= 0 && x.e > x.s && x.s >= fnStart && x.e <= fnEnd && (x.s > fnStart || x.e < fnEnd)) blocks.push({ s: x.s, e: x.e });
  }
  return { nodes, types };
}

/** Drops what walkTypes keeps for a tree (call when its extraction is done: a tree the language
 * server keeps for incremental re-parsing must not keep these nodes alive too). */
export function forgetWalks(tree: object): void {
  topNodes.delete(tree);
  subIndexes.delete(tree);
  if (active?.tree === tree) active = undefined;
}

/** The nodes of some types under one small subtree, found by one search (see indexSubtree). */
interface SubIndex {
  tree: object;
  id: number;
  start: number;
  end: number;
  types: Set<string>;
  nodes: Node[];
}
const subIndexes = new WeakMap<object, Map<number, SubIndex>>();
let active: SubIndex | undefined;
/** Subtrees of at most this many nodes cannot nest deeper than the walks' depth limit. */
const INDEX_MAX_NODES = 400;

/**
 * Finds once, inside wasm, the nodes of `types` under `scope` (a function body, a function
 * definition); until another subtree is indexed, every walkTypes whose root lies inside `scope` and
 * whose types are among these takes its nodes from that list instead of searching again (the
 * extractors walk the same body several times: each rule family, and nested expressions). Only
 * done for subtrees of at most INDEX_MAX_NODES nodes: no node there is deeper than the depth
 * limit, so the answers are exactly those of a search from each root. Asking again for the same
 * subtree (another family) reuses its list when it holds the types.
 */
export function indexSubtree(scope: Node, types: readonly string[]): void {
  const tree = (scope as unknown as { tree: object }).tree;
  let m = subIndexes.get(tree);
  const old = m?.get(scope.id);
  if (old && types.every((t) => old.types.has(t))) {
    active = old;
    return;
  }
  active = undefined;
  if (scope.descendantCount > INDEX_MAX_NODES) return;
  const all = old ? [...new Set([...old.types, ...types])] : [...new Set(types)];
  all.sort();
  const ix: SubIndex = { tree, id: scope.id, start: scope.startIndex, end: scope.endIndex, types: new Set(all), nodes: capture(scope, all, 400) };
  if (!m) subIndexes.set(tree, (m = new Map()));
  m.set(scope.id, ix);
  active = ix;
}

/** Whether `n` (found in `root`'s range) is `root` or one of its descendants. */
function isUnder(n: Node, root: Node): boolean {
  if (n.id === root.id) return true;
  for (let p = n.parent; p && p.startIndex >= root.startIndex && p.endIndex <= root.endIndex; p = p.parent) {
    if (p.id === root.id) return true;
  }
  return false;
}

/** walkTypes' nodes from the active index, or undefined when it cannot answer for this root. */
function fromIndex(root: Node, want: Set<string>, types: readonly string[]): Node[] | undefined {
  const ix = active;
  if (!ix || (root as unknown as { tree: object }).tree !== ix.tree) return undefined;
  const s = root.startIndex;
  const e = root.endIndex;
  if (s < ix.start || e > ix.end) return undefined;
  // a node with the scope's exact span other than the scope itself may be an ancestor of it
  if (s === ix.start && e === ix.end && root.id !== ix.id) return undefined;
  for (const t of types) if (!ix.types.has(t)) return undefined;
  const nodes = ix.nodes;
  let lo = 0;
  let hi = nodes.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (nodes[mid]!.startIndex < s) lo = mid + 1;
    else hi = mid;
  }
  const out: Node[] = [];
  for (let i = lo; i < nodes.length; i++) {
    const n = nodes[i]!;
    const ns = n.startIndex;
    if (ns > e) break;
    const ne = n.endIndex;
    if (ne > e || !want.has(n.type)) continue;
    // Nodes are nested or disjoint, so one strictly inside the root's span is a descendant; the
    // same span or an empty one may also be an ancestor or a neighbour: ask the tree.
    if ((ns === s && ne === e) || ns === ne) {
      if (!isUnder(n, root)) continue;
    }
    out.push(n);
  }
  return out;
}

/**
 * `walk` restricted to the node types in `types`: visits, in the same (document) order, exactly the
 * nodes `walk(root, (n) => types.includes(n.type) ? visit(n) : undefined)` would, and `visit`
 * returning false leaves out that node's descendants in the same way. The nodes are found inside
 * wasm by a tree-sitter query (one alternation of the types, down to the same depth limit as
 * `walk`), so the nodes between them never become JS objects — much faster than a JS walk when
 * the types are rare (calls, declarations, function definitions). Small subtrees take the JS walk
 * (cheaper than the query's fixed cost), and so do very large ones (see LARGE_SUBTREE). Checks the time budget like `walk`.
 */
export function walkTypes(root: Node, types: readonly string[], visit: (n: Node) => boolean | void, maxDepth = 400): void {
  walkTypesIn(root, types, visit, maxDepth, false);
}

/**
 * `walkTypes` over a whole C/C++ file, for a walk that leaves function bodies out: `types` lists
 * `compound_statement` or `function_definition`, and `visit` returns false for every node of those
 * two types it gets (checked; a walk that does not is a programming error and throws). Such walks
 * share one search per tree (see captureTop), which finds nothing nested in a function body.
 */
export function walkFile(root: Node, types: readonly string[], visit: (n: Node) => boolean | void): void {
  walkTypesIn(root, types, visit, 400, root.parent === null && (types.includes("compound_statement") || types.includes("function_definition")));
}

function walkTypesIn(root: Node, types: readonly string[], visit: (n: Node) => boolean | void, maxDepth: number, fileWalk: boolean): void {
  let foundTypes: string[] | undefined;
  const size = root.endIndex - root.startIndex;
  let found: Node[] | undefined;
  if (active && maxDepth === 400) {
    let set = typeSets.get(types);
    if (!set) typeSets.set(types, (set = new Set(types)));
    found = fromIndex(root, set, types);
  }
  if (found) {
    // taken from the active index (see indexSubtree)
  } else if (size < SMALL_SUBTREE || size > LARGE_SUBTREE) {
    let set = typeSets.get(types);
    if (!set) typeSets.set(types, (set = new Set(types)));
    const s = set;
    walk(root, (n) => (s.has(n.type) ? visit(n) : undefined), maxDepth);
    return;
  } else if (fileWalk && types.every((t) => TOP_TYPES_SET.has(t))) {
    // A walk of the whole file for declaration-level types: several extractors do one each, so the
    // nodes of all of them are found in one search per tree and each walk takes its types.
    const tree = (root as unknown as { tree: object }).tree;
    let all = topNodes.get(tree);
    if (!all) topNodes.set(tree, (all = captureTop(root)));
    let set = typeSets.get(types);
    if (!set) typeSets.set(types, (set = new Set(types)));
    const want = set;
    found = [];
    foundTypes = [];
    for (let i = 0; i < all.nodes.length; i++) {
      if (want.has(all.types[i]!)) {
        found.push(all.nodes[i]!);
        foundTypes.push(all.types[i]!);
      }
    }
  } else found = capture(root, types, maxDepth);
  let count = 0;
  // A node whose visit returned false covers the ones that follow it up to its end offset;
  // nothing inside it is visited, so one offset is enough.
  let skipEnd = -1;
  for (let i = 0; i < found.length; i++) {
    const n = found[i]!;
    if ((++count & 511) === 0 && performance.now() > deadline) throw new ExtractTimeout(`extraction stopped after ${budgetMs} ms`);
    if (n.startIndex < skipEnd) continue; // inside a node whose visit returned false
    if (visit(n) === false) skipEnd = n.endIndex;
    else if (foundTypes && (foundTypes[i] === "compound_statement" || foundTypes[i] === "function_definition")) {
      throw new Error(`walkFile: visit must return false for ${foundTypes[i]}`);
    }
  }
}

export const VOID: AbiType = { k: "void" };
