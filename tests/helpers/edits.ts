// Test helper: applies text edits (0-based line/column ranges, as fixes produce them) to
// in-memory file texts keyed by workspace-relative path.
import type { TextEdit } from "../../server/src/fixes/index.js";

export function applyEdits(files: Record<string, string>, edits: TextEdit[]): Record<string, string> {
  const out = { ...files };
  const byFile = new Map<string, TextEdit[]>();
  for (const e of edits) {
    const k = e.range.file.replace(/^\/ws\//, "");
    byFile.set(k, [...(byFile.get(k) ?? []), e]);
  }
  for (const [file, es] of byFile) {
    const text = out[file];
    if (text === undefined) throw new Error(`edit for unknown file ${file}`);
    const lines = text.split("\n");
    const offset = (line: number, col: number) => lines.slice(0, line).reduce((n, l) => n + l.length + 1, 0) + col;
    const sorted = es.map((e) => ({ s: offset(e.range.line, e.range.col), t: offset(e.range.endLine, e.range.endCol), text: e.newText })).sort((a, b) => b.s - a.s);
    let s = text;
    for (const e of sorted) s = s.slice(0, e.s) + e.text + s.slice(e.t);
    out[file] = s;
  }
  return out;
}
