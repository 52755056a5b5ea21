// Editor features over the boundary model: what is under the cursor, hover text (both sides'
// declarations and per-target layout tables), cross-language definitions and references,
// document symbols. Plain data in, plain data out: server.ts converts to protocol types.

import * as path from "node:path";
import type { Model } from "../model/boundary.js";
import { normName } from "../model/boundary.js";
import type { AbiType, FnDecl, Range, TypeDecl } from "../model/types.js";
import { layoutTable } from "../cli/layout-cmd.js";
import { contractOf } from "../model/pairing.js";

export interface Pos {
  line: number;
  character: number;
}

export type Item =
  | { kind: "fn"; symbol: string; at: Range; decl?: FnDecl }
  | { kind: "type"; decl: TypeDecl; at: Range };

function inside(r: Range, p: Pos): boolean {
  if (p.line < r.line || p.line > r.endLine) return false;
  if (p.line === r.line && p.character < r.col) return false;
  if (p.line === r.endLine && p.character > r.endCol) return false;
  return true;
}

function namedIn(t: AbiType | undefined, depth = 0): string | undefined {
  if (!t || depth > 8) return undefined;
  if (t.k === "named") return t.name;
  if (t.k === "ptr") return namedIn(t.to, depth + 1);
  if (t.k === "array") return namedIn(t.of, depth + 1);
  return undefined;
}

/** The boundary function or type at a position, if any. */
export function itemAt(model: Model, file: string, p: Pos): Item | undefined {
  const facts = model.files.get(file);
  if (!facts) return undefined;
  const side = facts.lang === "rust" ? "rust" : "c";
  const typeNamed = (name: string | undefined, at: Range): Item | undefined => {
    if (!name) return undefined;
    const d = model.aggregate({ k: "named", name }, side) ?? model.typeDecls(name, side)[0];
    return d ? { kind: "type", decl: d, at } : undefined;
  };
  for (const fn of facts.fns) {
    if (inside(fn.nameRange, p)) return { kind: "fn", symbol: fn.symbol, at: fn.nameRange, decl: fn };
  }
  for (const c of facts.calls) {
    if (inside(c.calleeRange, p) && (model.symbols.has(c.callee))) return { kind: "fn", symbol: c.callee, at: c.calleeRange };
  }
  for (const t of facts.types) {
    if (inside(t.nameRange, p)) return { kind: "type", decl: t, at: t.nameRange };
  }
  for (const fn of facts.fns) {
    if (!inside(fn.range, p)) continue;
    for (const prm of fn.params) if (inside(prm.typeRange, p)) { const it = typeNamed(namedIn(prm.type), prm.typeRange); if (it) return it; }
    if (fn.retRange && inside(fn.retRange, p)) { const it = typeNamed(namedIn(fn.ret), fn.retRange); if (it) return it; }
  }
  for (const t of facts.types) {
    if (!inside(t.range, p)) continue;
    for (const f of t.fields) if (inside(f.range, p)) { const it = typeNamed(namedIn(f.type), f.range); if (it) return it; }
    if (t.kind === "alias" && t.aliasOf) { const it = typeNamed(namedIn(t.aliasOf), t.range); if (it) return it; }
    return { kind: "type", decl: t, at: t.nameRange };
  }
  for (const fn of facts.fns) {
    if ((fn.role === "proto" || fn.role === "import") && inside(fn.range, p)) return { kind: "fn", symbol: fn.symbol, at: fn.nameRange, decl: fn };
  }
  return undefined;
}

type TextOf = (file: string) => string | undefined;

function slice(text: string | undefined, r: Range): string | undefined {
  if (text === undefined) return undefined;
  const lines = text.split(/\r?\n/);
  if (r.line >= lines.length) return undefined;
  if (r.line === r.endLine) return lines[r.line]!.slice(r.col, r.endCol);
  const out = [lines[r.line]!.slice(r.col)];
  for (let i = r.line + 1; i < r.endLine && i < lines.length; i++) out.push(lines[i]!);
  out.push((lines[r.endLine] ?? "").slice(0, r.endCol));
  return out.join("\n");
}

/** A one-declaration rendering of a function as its own language writes it. */
export function signatureText(fn: FnDecl, textOf: TextOf): string {
  if (fn.lang === "rust") {
    const ret = fn.retText && fn.retText !== "()" ? ` -> ${fn.retText}` : "";
    const abi = fn.abi ? `extern "${fn.abi}" ` : "";
    const params = fn.params.map((p) => `${p.name}: ${p.text}`);
    if (fn.variadic) params.push("...");
    const attrs = fn.noMangle && fn.role === "export" ? "#[no_mangle]\n" : "";
    // the qualifiers as written (`pub(crate) unsafe extern "C" fn`), when the source is at hand
    const written = slice(textOf(fn.file), { ...fn.range, endLine: fn.nameRange.endLine, endCol: fn.nameRange.endCol })?.replace(/\s+/g, " ").trim();
    if (written && written.endsWith(`fn ${fn.name}`) && !written.includes("#")) return `${attrs}${written}(${params.join(", ")})${ret}`;
    return `${attrs}${fn.isPub ? "pub " : ""}${abi}fn ${fn.name}(${params.join(", ")})${ret}`;
  }
  const text = textOf(fn.file);
  const head = slice(text, { ...fn.range, endLine: fn.nameRange.endLine, endCol: fn.nameRange.endCol });
  const params = fn.params.map((p) => p.text);
  if (fn.variadic) params.push("...");
  if (head !== undefined) return `${head.replace(/\s+/g, " ").trim()}(${params.join(", ") || "void"});`;
  return `${fn.retText} ${fn.name}(${params.join(", ") || "void"});`;
}

function where(roots: string[], r: Range): string {
  let rel = r.file;
  for (const root of roots) {
    const x = path.relative(root, r.file);
    if (!x.startsWith("..") && !path.isAbsolute(x)) { rel = x; break; }
  }
  return `${rel}:${r.line + 1}`;
}

/** Type declarations on the other side that the model pairs with this one (same normalised name). */
export function counterparts(model: Model, d: TypeDecl): TypeDecl[] {
  const want = normName(d.name);
  const wantTag = d.tag ? normName(d.tag) : undefined;
  const out: TypeDecl[] = [];
  for (const f of model.files.values()) {
    const otherSide = (f.lang === "rust") !== (d.lang === "rust");
    for (const t of f.types) {
      if (t === d || t.kind === "alias") continue;
      const n = normName(t.name);
      if (otherSide && (n === want || n === wantTag || (t.tag && normName(t.tag) === want))) out.push(t);
    }
  }
  return out;
}

function layoutBlock(model: Model, d: TypeDecl, roots: string[]): string {
  const lang = d.lang === "rust" ? "Rust" : "C";
  if (d.kind === "opaque" || d.opaqueMarker) return `**${lang} \`${d.name}\`** (${where(roots, d.range)}) is opaque on this side: only pointers to it cross the seam.`;
  if (d.kind === "alias") return "";
  let table: string;
  try {
    table = layoutTable(d, model);
  } catch (e) {
    table = `layout unavailable: ${(e as Error).message}`;
  }
  return `**${lang} ${d.kind} \`${d.name}\`** — layout per target (${where(roots, d.range)}); \`@offset (size)\`, in bytes\n\n\`\`\`text\n${table}\n\`\`\``;
}

/** Aggregates a function's parameters and result point to or pass by value (non-opaque). */
function aggregatesOf(model: Model, fn: FnDecl): TypeDecl[] {
  const side = fn.lang === "rust" ? "rust" : "c";
  const out: TypeDecl[] = [];
  for (const t of [...fn.params.map((p) => p.type), fn.ret]) {
    const n = namedIn(t);
    if (!n) continue;
    const d = model.aggregate({ k: "named", name: n }, side);
    if (d && d.kind !== "opaque" && !d.opaqueMarker && !d.generic && !out.includes(d)) out.push(d);
  }
  return out;
}

export function hoverMarkdown(model: Model, item: Item, textOf: TextOf, roots: string[]): string {
  if (item.kind === "type") {
    const parts = [layoutBlock(model, item.decl, roots)];
    for (const c of counterparts(model, item.decl)) parts.push(layoutBlock(model, c, roots));
    if (parts.length === 1 && item.decl.kind !== "opaque") parts.push(`_No declaration of this type on the other side of the seam was found._`);
    return parts.filter(Boolean).join("\n\n---\n\n");
  }
  const g = model.symbols.get(item.symbol);
  const fns = g ? [...g.rust, ...g.c] : item.decl ? [item.decl] : [];
  const parts: string[] = [`**\`${item.symbol}\`** — boundary function (ferrule)`];
  const rust = fns.filter((f) => f.lang === "rust");
  const c = fns.filter((f) => f.lang !== "rust");
  for (const f of rust) parts.push(`Rust ${f.role === "import" ? "import" : "definition"} — ${where(roots, f.range)}\n\`\`\`rust\n${signatureText(f, textOf)}\n\`\`\``);
  const macros = rust.length ? [] : model.macrosNaming(item.symbol);
  if (macros.length) parts.push(`_No Rust definition ferrule can read; ${macros.map((m) => `\`${m.macro}!\` (${where(roots, m.range)})`).join(", ")} names it and may define it. ferrule expands no macro, so this function is not checked._`);
  else if (!rust.length) parts.push("_No Rust side found in the workspace._");
  for (const f of c) parts.push(`${f.lang === "cpp" ? "C++" : "C"} ${f.role === "def" ? "definition" : "declaration"} — ${where(roots, f.range)}\n\`\`\`${f.lang === "cpp" ? "cpp" : "c"}\n${signatureText(f, textOf)}\n\`\`\``);
  if (!c.length) parts.push("_No C/C++ declaration found in the workspace._");
  const buffers = bufferLines(model, item.symbol);
  if (buffers.length) parts.push(`**Buffers** (pointer ↔ length, as ferrule paired them)\n\n${buffers.join("\n")}`);
  const aggs = new Set<TypeDecl>();
  for (const f of fns) for (const d of aggregatesOf(model, f)) aggs.add(d);
  for (const d of aggs) parts.push(layoutBlock(model, d, roots));
  return parts.join("\n\n");
}

/** The function's buffer contract: each pointer's length, unit and where the pairing comes from. */
function bufferLines(model: Model, symbol: string): string[] {
  let k;
  try {
    k = contractOf(model, symbol);
  } catch {
    return [];
  }
  if (!k) return [];
  const out: string[] = [];
  for (const p of [...k.pairs.values()].sort((a, b) => a.ptr - b.ptr)) {
    const access = p.access && p.access !== "none" ? `, ${p.access.replace("_", "-")}` : "";
    out.push(`- \`${p.ptrName}\` holds \`${p.lenText}\` ${p.unit}${access} — ${p.evidence}`);
  }
  for (const [i, why] of k.nullable) out.push(`- parameter ${i + 1} may be NULL — ${why}`);
  for (const a of k.alias) out.push(`- parameters ${a.a + 1} and ${a.b + 1} may overlap — ${a.evidence}`);
  return out;
}

/** Plain-text layout of one type (both sides) for the "show layout" command. */
export function layoutDocument(model: Model, decls: TypeDecl[], roots: string[]): string {
  const out: string[] = [
    "ferrule layout — sizes, alignments and field offsets in bytes, per target.",
    "`@offset (size)` per field; padding lists `bytes@offset` holes. ferrule is an aid, not a proof of memory safety.",
    "",
  ];
  const seen = new Set<TypeDecl>();
  for (const d of decls) {
    for (const x of [d, ...counterparts(model, d)]) {
      if (seen.has(x) || x.kind === "alias") continue;
      seen.add(x);
      const lang = x.lang === "rust" ? "Rust" : "C";
      if (x.kind === "opaque" || x.opaqueMarker) {
        out.push(`${lang} ${x.name} — ${where(roots, x.range)}: opaque on this side (only pointers cross the seam)`, "");
        continue;
      }
      let table: string;
      try { table = layoutTable(x, model); } catch (e) { table = `layout unavailable: ${(e as Error).message}`; }
      out.push(`${lang} ${x.kind} ${x.name} — ${where(roots, x.range)}`, table, "");
    }
  }
  if (seen.size === 0) out.push("No struct, union or enum found here.");
  return out.join("\n");
}

/** Declarations on the other side of the seam (and C definitions) for the item. */
export function definitions(model: Model, item: Item, fromFile: string): Range[] {
  if (item.kind === "type") {
    const cs = counterparts(model, item.decl);
    const out = cs.map((d) => d.nameRange);
    if (!inside(item.decl.nameRange, { line: item.at.line, character: item.at.col })) out.unshift(item.decl.nameRange);
    return out;
  }
  const g = model.symbols.get(item.symbol);
  if (!g) return item.decl ? [] : [];
  const fromRust = model.files.get(fromFile)?.lang === "rust";
  const self = item.decl;
  const order = fromRust
    ? [...g.c.filter((f) => f.role === "proto"), ...g.c.filter((f) => f.role === "def"), ...g.rust]
    : [...g.rust.filter((f) => f.role === "export"), ...g.c.filter((f) => f.role === "def"), ...g.rust.filter((f) => f.role !== "export"), ...g.c.filter((f) => f.role === "proto")];
  return order.filter((f) => f !== self).map((f) => f.nameRange);
}

export function references(model: Model, item: Item, includeDeclaration: boolean): Range[] {
  if (item.kind === "type") {
    const decls = [item.decl, ...counterparts(model, item.decl)];
    const names = new Set(decls.flatMap((d) => [d.name, d.tag].filter(Boolean) as string[]));
    const out: Range[] = includeDeclaration ? decls.map((d) => d.nameRange) : [];
    for (const f of model.files.values()) {
      for (const fn of f.fns) for (const p of fn.params) { const n = namedIn(p.type); if (n && names.has(n)) out.push(p.typeRange); }
      for (const t of f.types) for (const x of t.fields) { const n = namedIn(x.type); if (n && names.has(n)) out.push(x.range); }
    }
    return out;
  }
  const g = model.symbols.get(item.symbol);
  const out: Range[] = [];
  if (includeDeclaration && g) out.push(...[...g.rust, ...g.c].map((f) => f.nameRange));
  for (const f of model.files.values()) for (const c of f.calls) if (c.callee === item.symbol) out.push(c.calleeRange);
  return out;
}

export interface SymbolInfo {
  name: string;
  detail: string;
  kind: "function" | "struct" | "enum" | "union" | "type";
  range: Range;
  selectionRange: Range;
}

export function documentSymbols(model: Model, file: string): SymbolInfo[] {
  const facts = model.files.get(file);
  if (!facts) return [];
  const out: SymbolInfo[] = [];
  for (const fn of facts.fns) {
    const g = model.symbols.get(fn.symbol);
    if (!g || g.rust.indexOf(fn) < 0 && g.c.indexOf(fn) < 0) continue;
    const other = fn.lang === "rust" ? g.c.length : g.rust.length;
    out.push({ name: fn.symbol, detail: `${fn.role}${other ? " · both sides" : " · one side only"}`, kind: "function", range: fn.range, selectionRange: fn.nameRange });
  }
  for (const t of facts.types) {
    if (t.kind === "alias") continue;
    out.push({ name: t.name, detail: t.kind, kind: t.kind === "opaque" ? "type" : t.kind, range: t.range, selectionRange: t.nameRange });
  }
  return out.sort((a, b) => a.range.line - b.range.line);
}
