// Export/attribute macros: `SONAR_API int f(void);` where `#define SONAR_API` is empty or expands
// to `__attribute__((visibility("default")))`/`__declspec(dllexport)`. ferrule does not run a
// preprocessor; instead it blanks such macro names (found as identifier nodes in the tree, never
// by searching the text) and parses again, keeping every position unchanged. Macros defined in
// the same file are found automatically; others come from the `strip_macros` setting.

import type { Node, Tree } from "../parse/parser.js";
import { walkFile, walkTypes } from "./common.js";

const ATTRIBUTE_LIKE = /^(__attribute__|__declspec|__cdecl|__stdcall|__fastcall|__vectorcall|extern|static|inline|__inline|__forceinline|_Noreturn|__extension__)\b/;

function macroNames(root: Node, extra: readonly string[]): Set<string> {
  const names = new Set(extra);
  walkFile(root, ["preproc_def", "function_definition", "compound_statement"], (n) => {
    if (n.type === "preproc_def") {
      const name = n.childForFieldName("name")?.text;
      const value = n.childForFieldName("value")?.text.trim() ?? "";
      if (name && (value === "" || ATTRIBUTE_LIKE.test(value))) names.add(name);
      return false;
    }
    if (n.type === "function_definition" || n.type === "compound_statement") return false;
    return;
  });
  return names;
}

/** The identifier or type_identifier node spanning exactly [start, end) that a walk of the whole
 * tree for those types would reach (not inside a `#define`, at most 400 levels deep), or null. */
function macroUse(root: Node, start: number, end: number): Node | null {
  let n: Node | null = root.descendantForIndex(start, end);
  // the deepest node covering the span; an identifier is a leaf, so it is that node when it exists
  while (n && n.startIndex === start && n.endIndex === end && n.type !== "identifier" && n.type !== "type_identifier") n = n.parent;
  if (!n || n.startIndex !== start || n.endIndex !== end) return null;
  let depth = 0;
  for (let p = n.parent; p; p = p.parent) {
    if (p.type === "preproc_def") return null;
    depth++;
  }
  return depth <= 400 ? n : null;
}

/** The text with attribute-like macro uses blanked, or undefined when there is nothing to blank. */
export function blankAttributeMacros(tree: Tree, text: string, extra: readonly string[] = []): string | undefined {
  const names = macroNames(tree.rootNode, extra);
  if (names.size === 0) return undefined;
  const spans: [number, number][] = [];
  // Each name's occurrences in the text are only candidates: the tree says which of them are an
  // identifier use (not part of a longer name, a comment or a string). This visits a handful of
  // nodes instead of every identifier of the file.
  const root = tree.rootNode;
  if (names.has("")) {
    // an empty name (a setting) matches the zero-width identifiers the parser inserts as MISSING
    walkTypes(root, ["preproc_def", "identifier", "type_identifier"], (n) => {
      if (n.type === "preproc_def") return false;
      if (names.has(n.text) && !(n.parent?.type ?? "").startsWith("preproc_")) spans.push([n.startIndex, n.endIndex]);
      return;
    });
  } else for (const name of names) {
    for (let at = text.indexOf(name); at >= 0; at = text.indexOf(name, at + 1)) {
      const n = macroUse(root, at, at + name.length);
      if (!n) continue;
      const p = n.parent?.type ?? "";
      // keep `#ifdef SONAR_API` and `#define SONAR_API` themselves
      if (!p.startsWith("preproc_")) spans.push([n.startIndex, n.endIndex]);
    }
  }
  if (spans.length === 0) return undefined;
  let out = "";
  let at = 0;
  for (const [s, e] of spans.sort((a, b) => a[0] - b[0])) {
    if (s < at) continue;
    out += text.slice(at, s) + " ".repeat(e - s);
    at = e;
  }
  return out + text.slice(at);
}
