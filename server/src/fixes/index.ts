// Fixes: findings (with their structured data) + model → text edits. Used by `--show-fixes` and
// by the language server's code actions. Never writes files: it only describes edits.

import type { Model } from "../model/boundary.js";
import type { FnDecl, Range } from "../model/types.js";
import type { Finding } from "../rules/api.js";
import { cDecl, cPrototype, rustSpell } from "./cgen.js";

export interface TextEdit {
  range: Range;
  newText: string;
}

export interface Fix {
  title: string;
  edits: TextEdit[];
  preferred?: boolean;
}

export type FixProvider = (f: Finding, model: Model) => Fix[];

// A hoisted function rather than a `const`: family modules imported at the end of this file
// (import cycle) call registerFix before this module's body has run.
function providerTable(): Map<string, FixProvider> {
  const holder = providerTable as unknown as { table?: Map<string, FixProvider> };
  return (holder.table ??= new Map());
}

/** Rule families register their fix providers here (one per rule id). */
export function registerFix(rule: string, p: FixProvider): void {
  providerTable().set(rule, p);
}

export function fixesFor(f: Finding, model: Model): Fix[] {
  const p = providerTable().get(f.rule);
  if (!p) return [];
  try {
    return p(f, model);
  } catch {
    return [];
  }
}

const at = (r: Range): Range => ({ ...r, endLine: r.line, endCol: r.col });

function paramSync(f: Finding, model: Model): Fix[] {
  const rust = model.fnById(f.data?.rust);
  const c = model.fnById(f.data?.c);
  if (!rust || !c) return [];
  const out: Fix[] = [];
  if (typeof f.data?.param === "number") {
    const i = f.data.param;
    const rp = rust.params[i];
    const cp = c.params[i];
    if (!rp || !cp) return [];
    // C cannot promise a non-null function pointer, so a nullability slip is fixed on the Rust side only.
    const rustFirst = f.data?.diff === "nullable";
    if (!rustFirst) {
      const cText = cDecl(rp.type, cp.name, model);
      out.push({ title: `Change the C parameter to match Rust: \`${cText}\``, edits: [{ range: cp.range, newText: cText }], preferred: true });
    }
    // A Rust export's body reads or writes through a pointer parameter in its pointee type: changing
    // that type alone (to `*const`, or to another pointee) leaves a body that does not compile
    // (fix harness, tests/fix-harness.test.ts). Not offered until the fix also edits the body.
    const bodyUsesPointer = rust.role === "export" && rp.type.k === "ptr";
    if (rustFirst || !bodyUsesPointer) {
      out.push({ title: `Change the Rust parameter to match C: \`${rustSpell(cp.type, model)}\``, edits: [{ range: rp.typeRange, newText: rustSpell(cp.type, model) }], preferred: rustFirst });
    }
  } else if (f.data?.ret && c.retRange) {
    out.push({ title: "Replace the C prototype with one generated from the Rust signature", edits: [{ range: c.range, newText: cPrototype(rust, model) }], preferred: true });
  }
  return out;
}

function syncWholePrototype(f: Finding, model: Model): Fix[] {
  const rust = model.fnById(f.data?.rust);
  const c = model.fnById(f.data?.c);
  if (!rust || !c || c.role !== "proto" || rust.role !== "export") return [];
  return [{ title: "Replace the C prototype with one generated from the Rust signature", edits: [{ range: c.range, newText: cPrototype(rust, model) }], preferred: true }];
}

function rustExportFix(f: Finding, model: Model): Fix[] {
  const fn = model.fnById(f.data?.fn);
  if (!fn) return [];
  if (f.data?.fix === "add-no-mangle") {
    return [{ title: "Add #[unsafe(no_mangle)]", edits: [{ range: at(fn.range), newText: `#[unsafe(no_mangle)]\n${" ".repeat(fn.range.col)}` }], preferred: true }];
  }
  if (f.data?.fix === "add-extern") {
    // insert `extern "C" ` right before `fn`; the name range starts after `fn `
    const r = { ...fn.nameRange, col: Math.max(0, fn.nameRange.col - 3), endCol: Math.max(0, fn.nameRange.col - 3) };
    return [{ title: 'Add extern "C"', edits: [{ range: r, newText: 'extern "C" ' }], preferred: true }];
  }
  return [];
}

function linkageFix(f: Finding, model: Model): Fix[] {
  const header = f.data?.header;
  if (typeof header !== "string") {
    const fn = model.fnById(f.data?.fn);
    if (!fn) return [];
    return [{ title: 'Declare it extern "C"', edits: [{ range: at(fn.range), newText: 'extern "C" ' }], preferred: true }];
  }
  const facts = model.files.get(header);
  if (!facts) return [];
  const fns = facts.fns.filter((x) => x.role === "proto" && !x.cLinkage);
  if (!fns.length) return [];
  const first = fns.reduce((a, b) => (a.range.line < b.range.line ? a : b));
  const last = fns.reduce((a, b) => (a.range.endLine > b.range.endLine ? a : b));
  const startLine = Math.min(first.range.line, ...(facts.types.map((t) => t.range.line).filter((l) => l < first.range.line && l > first.range.line - 50)));
  return [{
    title: 'Wrap the declarations in an extern "C" guard for C++',
    edits: [
      { range: { file: header, line: startLine, col: 0, endLine: startLine, endCol: 0 }, newText: `#ifdef __cplusplus\nextern "C" {\n#endif\n\n` },
      { range: { file: header, line: last.range.endLine + 1, col: 0, endLine: last.range.endLine + 1, endCol: 0 }, newText: `\n#ifdef __cplusplus\n}\n#endif\n` },
    ],
    preferred: true,
  }];
}

function addDeclarationFix(f: Finding, model: Model): Fix[] {
  const fn: FnDecl | undefined = model.fnById(f.data?.fn);
  if (!fn || fn.role !== "export") return [];
  // The header that already declares most of this Rust file's other exports.
  const siblings = model.files.get(fn.file)?.fns.filter((x) => x.role === "export" && x !== fn) ?? [];
  const votes = new Map<string, FnDecl>();
  for (const s of siblings) {
    const g = model.symbols.get(s.symbol);
    const p = g?.c.find((x) => x.role === "proto" && x.inHeader);
    if (p) {
      const cur = votes.get(p.file);
      if (!cur || p.range.endLine > cur.range.endLine) votes.set(p.file, p);
    }
  }
  const target = [...votes.values()][0];
  if (!target) return [];
  const line = target.range.endLine + 1;
  return [{ title: `Declare \`${fn.symbol}\` in ${target.file.split("/").pop()}`, edits: [{ range: { file: target.file, line, col: 0, endLine: line, endCol: 0 }, newText: cPrototype(fn, model) + "\n" }], preferred: true }];
}

registerFix("param-type-mismatch", paramSync);
registerFix("param-signedness", paramSync);
registerFix("pointer-constness", paramSync);
registerFix("callback-mismatch", paramSync);
registerFix("return-type-mismatch", paramSync);
registerFix("arity-mismatch", syncWholePrototype);
registerFix("export-name-mangled", rustExportFix);
registerFix("header-lacks-c-linkage", linkageFix);
registerFix("export-without-declaration", addDeclarationFix);
import "./ownership.js";
