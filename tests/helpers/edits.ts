// Applies 0-based range edits to texts (what an editor does with a WorkspaceEdit).
import type { TextEdit } from "../../server/src/fixes/index.js";

export function applyEdits(texts: Record<string, string>, edits: TextEdit[]): Record<string, string> {
  const out = { ...texts };
  const byFile = new Map<string, TextEdit[]>();
  for (const e of edits) byFile.set(e.range.file, [...(byFile.get(e.range.file) ?? []), e]);
  for (const [file, es] of byFile) {
    let text = out[file];
    if (text === undefined) throw new Error(`edit for unknown file ${file}`);
    const lines = text.split("\n");
    const offset = (line: number, col: number) => {
      let o = 0;
      for (let i = 0; i < line && i < lines.length; i++) o += lines[i]!.length + 1;
      return o + col;
    };
    // apply from the end so earlier offsets stay valid
    const sorted = [...es].sort((a, b) => offset(b.range.line, b.range.col) - offset(a.range.line, a.range.col));
    for (const e of sorted) {
      const s = offset(e.range.line, e.range.col);
      const t = offset(e.range.endLine, e.range.endCol);
      text = text.slice(0, s) + e.newText + text.slice(t);
    }
    out[file] = text;
  }
  return out;
}

/** The LSP change that replaces the first `from` in `text` by `to` (a range in lines and UTF-16
 * characters), and the text after it. */
export function replaceFirst(text: string, from: string, to: string): { range: { start: { line: number; character: number }; end: { line: number; character: number } }; text: string; after: string; at: number } {
  const at = text.indexOf(from);
  if (at < 0) throw new Error(`not found: ${from}`);
  const before = text.slice(0, at).split("\n");
  const start = { line: before.length - 1, character: before[before.length - 1]!.length };
  const fromLines = from.split("\n");
  const end = fromLines.length === 1 ? { line: start.line, character: start.character + from.length } : { line: start.line + fromLines.length - 1, character: fromLines[fromLines.length - 1]!.length };
  return { range: { start, end }, text: to, after: text.slice(0, at) + to + text.slice(at + from.length), at };
}
