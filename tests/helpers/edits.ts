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
