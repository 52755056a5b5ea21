// `ferrule layout`: every struct/union/enum found, with its layout on each target.

import type { Model } from "../model/boundary.js";
import type { TypeDecl } from "../model/types.js";
import { declLayout, spellType, type Layout } from "../model/layout.js";
import { shortTriple, type Triple } from "../model/targets.js";
import { rel } from "./format.js";

export interface LayoutJsonType {
  name: string;
  language: "c" | "rust";
  file: string;
  line: number;
  kind: string;
  targets: Record<string, { size: number; align: number; fields: { name: string; offset: number; size: number; align: number; bitOffset?: number; bits?: number }[]; holes?: [number, number][]; notPortable?: string; unknown?: string }>;
}

export function layoutTypes(model: Model, cwd: string): LayoutJsonType[] {
  const out: LayoutJsonType[] = [];
  for (const f of model.files.values()) {
    for (const d of f.types) {
      if (d.kind === "alias" || d.kind === "opaque" || d.opaqueMarker || d.generic) continue;
      const side = d.lang === "rust" ? "rust" : "c";
      const t: LayoutJsonType = { name: d.name, language: side, file: rel(cwd, d.file), line: d.range.line + 1, kind: d.kind, targets: {} };
      for (const tr of model.targets) {
        const l = declLayout(d, { model, side, triple: tr });
        t.targets[tr] = {
          size: l.size, align: l.align,
          fields: (l.fields ?? []).map((x) => ({ name: x.name, offset: x.offset, size: x.size, align: x.align, ...(x.bits !== undefined ? { bitOffset: x.bitOffset, bits: x.bits } : {}) })),
          ...(l.holes?.length ? { holes: l.holes } : {}),
          ...(l.notPortable ? { notPortable: l.notPortable } : {}),
          ...(l.unknown ? { unknown: l.unknown } : {}),
        };
      }
      out.push(t);
    }
  }
  return out;
}

/**
 * A per-target table of one type: used by the text format and the editor hover. One row per field
 * (its type as the source spells it, then `@offset (size)` per target), a `(padding)` row after
 * any field that is followed by padding on some target, and size / alignment at the bottom.
 */
export function layoutTable(d: TypeDecl, model: Model, targets: Triple[] = model.targets): string {
  const side = d.lang === "rust" ? "rust" : "c";
  const ls: [Triple, Layout][] = targets.map((t) => [t, declLayout(d, { model, side, triple: t })]);
  const head = ["field", "type", ...targets.map(shortTriple)];
  const rows: string[][] = [];
  const first = ls.find(([, l]) => l.fields?.length)?.[1];
  const names = first?.fields?.map((f) => f.name) ?? [];
  const holeAt = (l: Layout, at: number): number | undefined => l.holes?.find(([o]) => o === at)?.[1];
  if (d.kind === "enum") {
    for (const e of d.enumerators) rows.push([e.name, "= " + (e.value ?? e.text), ...ls.map(() => "")]);
  }
  names.forEach((n, i) => {
    const decl = d.fields.find((f) => f.name === n) ?? d.fields[i];
    rows.push([n || "(anonymous)", decl ? spellType(decl.type, side) + (decl.bits !== undefined ? ` : ${decl.bits}` : "") : "", ...ls.map(([, l]) => {
      const f = l.fields?.[i];
      if (!f) return "—";
      return f.bits !== undefined ? `@${f.offset} bits ${f.bitOffset! % 8}+${f.bits}` : `@${f.offset} (${f.size})`;
    })]);
    if (d.kind === "union") return;
    const pads = ls.map(([, l]) => {
      const f = l.fields?.[i];
      if (!f || f.bits !== undefined) return undefined;
      return holeAt(l, f.offset + f.size);
    });
    if (pads.some((x) => x !== undefined)) rows.push(["  (padding)", "", ...pads.map((x) => (x === undefined ? "" : `${x} byte${x === 1 ? "" : "s"}`))]);
  });
  if (d.kind === "union") {
    const pads = ls.map(([, l]) => l.holes?.[0]?.[1]);
    if (pads.some((x) => x !== undefined)) rows.push(["  (padding)", "", ...pads.map((x) => (x === undefined ? "" : `${x} byte${x === 1 ? "" : "s"}`))]);
  }
  rows.push(["size / align", "", ...ls.map(([, l]) => (l.unknown || l.notPortable ? "?" : `${l.size} / ${l.align}`))]);
  const notes = ls.filter(([, l]) => l.unknown || l.notPortable).map(([t, l]) => `${shortTriple(t)}: ${l.unknown ?? `layout not portable: ${l.notPortable}`}`);
  const w = head.map((_, i) => Math.max(head[i]!.length, ...rows.map((r) => r[i]!.length)));
  const line = (r: string[]) => "| " + r.map((c, i) => c.padEnd(w[i]!)).join(" | ") + " |";
  return [line(head), "|" + w.map((x) => "-".repeat(x + 2)).join("|") + "|", ...rows.map(line), ...notes.map((n) => `note: ${n}`)].join("\n");
}

export function formatLayoutText(model: Model, cwd: string): string {
  const parts: string[] = [];
  for (const f of model.files.values()) {
    for (const d of f.types) {
      if (d.kind === "alias" || d.kind === "opaque" || d.opaqueMarker || d.generic) continue;
      parts.push(`${d.lang === "rust" ? "Rust" : "C"} ${d.kind} ${d.name} — ${rel(cwd, d.file)}:${d.range.line + 1}\n${layoutTable(d, model)}`);
    }
  }
  return parts.join("\n\n") + "\n";
}
