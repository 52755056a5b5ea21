// Export/attribute macros: `SONAR_API int f(void);` where `#define SONAR_API` is empty or expands
// to `__attribute__((visibility("default")))`/`__declspec(dllexport)`. ferrule does not run a
// preprocessor; instead it blanks such macro names (found as identifier nodes in the tree, never
// by searching the text) and parses again, keeping every position unchanged. Macros defined in
// the same file are found automatically; others come from the `strip_macros` setting.

import type { Node, Tree } from "../parse/parser.js";
import { walkTypes } from "./common.js";

const ATTRIBUTE_LIKE = /^(__attribute__|__declspec|__cdecl|__stdcall|__fastcall|__vectorcall|extern|static|inline|__inline|__forceinline|_Noreturn|__extension__)\b/;

function macroNames(root: Node, extra: readonly string[]): Set<string> {
  const names = new Set(extra);
  walkTypes(root, ["preproc_def", "function_definition", "compound_statement"], (n) => {
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

/** The text with attribute-like macro uses blanked, or undefined when there is nothing to blank. */
export function blankAttributeMacros(tree: Tree, text: string, extra: readonly string[] = []): string | undefined {
  const names = macroNames(tree.rootNode, extra);
  if (names.size === 0) return undefined;
  const spans: [number, number][] = [];
  walkTypes(tree.rootNode, ["preproc_def", "identifier", "type_identifier"], (n) => {
    if (n.type === "preproc_def") return false;
    if (names.has(n.text)) {
      const p = n.parent?.type ?? "";
      // keep `#ifdef SONAR_API` and `#define SONAR_API` themselves
      if (!p.startsWith("preproc_")) spans.push([n.startIndex, n.endIndex]);
    }
    return;
  });
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
