// The language server's analysis engine: open documents with their tree-sitter trees, the
// workspace index, and incremental re-checking.
//
// An edit re-parses one file (tree-sitter incremental parse from the edited previous tree), then
// re-runs the rules over a sub-model holding only the boundary items that edit can affect: the
// files that declare or use the names the file declares (before and after the edit), the files
// that include it, and, as context, the declarations and includes those files rely on. Findings
// whose primary location lies in an affected file are replaced; all others stand. When the
// scope would cover most of the workspace, or on idle after a burst of edits, a full check runs
// and its result replaces everything (so the scoped result can never drift for long).
//
// No protocol types here: server.ts turns the results into LSP messages.

import * as fs from "node:fs";
import * as path from "node:path";
import { Workspace, listSources } from "../analysis/workspace.js";
import type { FerruleConfig } from "../analysis/config.js";
import type { Finding } from "../rules/api.js";
import type { Model } from "../model/boundary.js";
import { normName } from "../model/boundary.js";
import type { AbiType, FileFacts, ItemCache } from "../model/types.js";
import { langOf, type Tree } from "../parse/parser.js";

export interface Pos {
  line: number;
  character: number;
}

export interface ContentChange {
  range?: { start: Pos; end: Pos };
  text: string;
}

export interface OpenDoc {
  file: string;
  version: number;
  text: string;
  /** Start offset of each line (UTF-16 code units), kept in step with `text`. */
  lineStarts: number[];
  tree?: Tree;
  /** Item facts of the last extraction, reused for unchanged items (Rust). */
  items?: ItemCache;
}

function computeLineStarts(text: string): number[] {
  const out = [0];
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10) out.push(i + 1);
    else if (c === 13) {
      if (text.charCodeAt(i + 1) === 10) i++;
      out.push(i + 1);
    }
  }
  return out;
}

export function offsetAt(doc: { text: string; lineStarts: number[] }, p: Pos): number {
  if (p.line >= doc.lineStarts.length) return doc.text.length;
  if (p.line < 0) return 0;
  const start = doc.lineStarts[p.line]!;
  const next = p.line + 1 < doc.lineStarts.length ? doc.lineStarts[p.line + 1]! : doc.text.length;
  return Math.max(start, Math.min(start + p.character, next));
}

function positionAfter(start: Pos, inserted: string): Pos {
  const lines = computeLineStarts(inserted);
  if (lines.length === 1) return { line: start.line, character: start.character + inserted.length };
  return { line: start.line + lines.length - 1, character: inserted.length - lines[lines.length - 1]! };
}

/** Names a file's facts declare (D) and use (U), for the dependency index. */
function keysOf(f: FileFacts | undefined): { decl: Set<string>; use: Set<string> } {
  const decl = new Set<string>();
  const use = new Set<string>();
  if (!f) return { decl, use };
  const typeRefs = (t: AbiType | undefined, depth = 0): void => {
    if (!t || depth > 12) return;
    switch (t.k) {
      case "named": use.add("t:" + normName(t.name)); break;
      case "ptr": typeRefs(t.to, depth + 1); break;
      case "array": typeRefs(t.of, depth + 1); break;
      case "fn": t.params.forEach((p) => typeRefs(p, depth + 1)); typeRefs(t.ret, depth + 1); break;
      default: break;
    }
  };
  for (const fn of f.fns) {
    // Only what the model links across files (as in Model's symbol table): not file-local
    // helpers, not plain Rust functions that are neither extern nor unmangled.
    if ((fn as { internal?: boolean }).internal) continue;
    if (fn.lang === "rust" && fn.role === "export" && !fn.noMangle && !fn.isExtern) continue;
    decl.add("s:" + fn.symbol);
    if (fn.name !== fn.symbol) decl.add("s:" + fn.name);
    fn.params.forEach((p) => typeRefs(p.type));
    typeRefs(fn.ret);
  }
  for (const t of f.types) {
    decl.add("t:" + normName(t.name));
    if (t.tag) decl.add("t:" + normName(t.tag));
    t.fields.forEach((x) => typeRefs(x.type));
    typeRefs(t.aliasOf);
  }
  for (const d of f.defines) decl.add("t:" + normName(d.name));
  for (const c of f.calls) use.add("s:" + c.callee);
  for (const a of f.asserts) use.add("t:" + normName(a.typeName));
  return { decl, use };
}

export interface AnalysisResult {
  findings: Finding[];
  /** Files whose findings were recomputed (all files for a full check). */
  affected: Set<string> | "all";
  /** Files whose facts were re-extracted. */
  changed: string[];
  scope: "full" | "scoped";
  ms: number;
  /** Files in the sub-model of a scoped check. */
  context?: number;
}

export class Engine {
  ws: Workspace;
  readonly docs = new Map<string, OpenDoc>();
  findings: Finding[] = [];
  private dirty = new Set<string>();
  private removed = new Set<string>();
  private decl = new Map<string, Set<string>>(); // key → files declaring it
  private use = new Map<string, Set<string>>(); // key → files using it
  private fileKeys = new Map<string, { decl: Set<string>; use: Set<string> }>();
  private fullModel: Model | undefined;
  /** The last whole-workspace model (include graph for scoping; may lag one edit behind). */
  private linkModel: Model | undefined;
  /** Pending "full check" request (after config change or on idle). */
  needFull = true;
  roots: string[] = [];
  lastContext = 0;

  constructor(ws: Workspace) {
    this.ws = ws;
  }

  /** Builds the index from disk (open documents keep their editor text). */
  scan(roots: string[], onProgress?: (done: number, total: number) => void): number {
    this.roots = roots;
    const walk = listSources(roots, this.ws.config.exclude);
    this.ws.walkNotices.length = 0;
    this.ws.walkNotices.push(...walk.notices);
    walk.files.forEach((f, i) => {
      if (!this.docs.has(f)) this.ws.load(f);
      this.reindex(f);
      if (onProgress && i % 25 === 0) onProgress(i, walk.files.length);
    });
    for (const d of this.docs.values()) this.syncDoc(d);
    this.needFull = true;
    return walk.files.length;
  }

  /** Replaces the workspace (config change): keeps open documents. */
  reset(ws: Workspace): void {
    this.ws = ws;
    for (const d of this.docs.values()) {
      d.tree?.delete();
      d.tree = undefined;
    }
    this.decl.clear();
    this.use.clear();
    this.fileKeys.clear();
    this.fullModel = this.linkModel = undefined;
    this.findings = [];
    this.needFull = true;
  }

  open(file: string, text: string, version: number): void {
    const old = this.docs.get(file);
    old?.tree?.delete();
    const d: OpenDoc = { file, version, text, lineStarts: computeLineStarts(text) };
    this.docs.set(file, d);
    this.syncDoc(d);
  }

  /** Applies LSP content changes (incremental or full) to the text and edits the kept tree. */
  change(file: string, changes: ContentChange[], version: number): void {
    const d = this.docs.get(file);
    if (!d) return;
    for (const c of changes) {
      if (!c.range) {
        d.text = c.text;
        d.lineStarts = computeLineStarts(d.text);
        d.tree?.delete();
        d.tree = undefined;
        continue;
      }
      const start = offsetAt(d, c.range.start);
      const end = Math.max(start, offsetAt(d, c.range.end));
      const startPos = { line: c.range.start.line, character: start - (d.lineStarts[c.range.start.line] ?? 0) };
      const oldEndPos = { line: c.range.end.line, character: end - (d.lineStarts[Math.min(c.range.end.line, d.lineStarts.length - 1)] ?? 0) };
      d.text = d.text.slice(0, start) + c.text + d.text.slice(end);
      d.lineStarts = computeLineStarts(d.text);
      const newEnd = positionAfter(startPos, c.text);
      try {
        d.tree?.edit({
          startIndex: start, oldEndIndex: end, newEndIndex: start + c.text.length,
          startPosition: { row: startPos.line, column: startPos.character },
          oldEndPosition: { row: oldEndPos.line, column: oldEndPos.character },
          newEndPosition: { row: newEnd.line, column: newEnd.character },
        });
      } catch {
        d.tree?.delete();
        d.tree = undefined;
      }
    }
    d.version = version;
    this.dirty.add(file);
  }

  close(file: string): void {
    const d = this.docs.get(file);
    if (!d) return;
    d.tree?.delete();
    this.docs.delete(file);
    // back to the disk version
    if (fs.existsSync(file)) {
      this.ws.load(file);
      this.reindex(file);
      this.dirty.add(file);
    } else this.fileRemoved(file);
  }

  /** A file changed on disk (watched files); open documents win over disk. */
  diskChanged(file: string, kind: "created" | "changed" | "deleted"): void {
    if (!langOf(file) || this.docs.has(file)) return;
    if (kind === "deleted") {
      this.fileRemoved(file);
      return;
    }
    if (this.ws.config.exclude.length && !listSources([file], this.ws.config.exclude).files.length) return;
    this.ws.load(file);
    this.dirty.add(file);
  }

  private fileRemoved(file: string): void {
    if (!this.ws.has(file)) return;
    this.removed.add(file);
    this.dirty.add(file);
  }

  private syncDoc(d: OpenDoc): void {
    this.dirty.add(d.file);
  }

  get hasWork(): boolean {
    return this.dirty.size > 0 || this.needFull;
  }

  /** Re-extracts dirty files (incrementally for open documents), then re-checks. */
  analyze(forceFull = false): AnalysisResult {
    const t0 = performance.now();
    const changed: string[] = [];
    const oldKeys = new Map<string, { decl: Set<string>; use: Set<string> }>();
    for (const file of this.dirty) {
      oldKeys.set(file, this.fileKeys.get(file) ?? { decl: new Set(), use: new Set() });
      if (this.removed.has(file)) {
        this.ws.remove(file);
        this.removed.delete(file);
        this.unindex(file);
        changed.push(file);
        continue;
      }
      const d = this.docs.get(file);
      if (d) {
        let fresh: Tree | undefined;
        const itemCache: ItemCache = { prev: d.items?.prev ?? new Map(), next: new Map(), consts: d.items?.consts };
        const did = this.ws.update(file, d.text, { oldTree: d.tree, keepTree: (t) => { fresh = t; }, itemCache });
        if (did) d.items = { prev: itemCache.next, next: new Map(), consts: itemCache.consts };
        if (fresh) {
          if (d.tree && d.tree !== fresh) d.tree.delete();
          d.tree = fresh;
        }
        if (did) changed.push(file);
      } else changed.push(file);
      this.reindex(file);
    }
    this.dirty.clear();

    const full = forceFull || this.needFull;
    if (!full && changed.length === 0) {
      return { findings: this.findings, affected: new Set(), changed, scope: "scoped", ms: performance.now() - t0 };
    }
    if (!full) {
      const { affected, context } = this.scopeOf(changed, oldKeys);
      this.lastContext = context.size;
      if (context.size <= Math.max(40, this.fileKeys.size * 0.4)) {
        const { findings } = this.ws.checkSubset(context);
        const keep = this.findings.filter((f) => !affected.has(f.range.file));
        const fresh = findings.filter((f) => affected.has(f.range.file));
        this.findings = sortFindings([...keep, ...fresh]);
        this.fullModel = undefined;
        this.needFull = false;
        return { findings: this.findings, affected, changed, scope: "scoped", ms: performance.now() - t0, context: context.size };
      }
    }
    this.ws.invalidate();
    this.findings = this.ws.check();
    this.fullModel = this.linkModel = this.ws.model();
    this.needFull = false;
    return { findings: this.findings, affected: "all", changed, scope: "full", ms: performance.now() - t0 };
  }

  /** The whole-workspace model (rebuilt lazily after edits; cheap: facts are cached). */
  model(): Model {
    this.fullModel ??= this.ws.model();
    this.linkModel = this.fullModel;
    return this.fullModel;
  }

  private reindex(file: string): void {
    this.unindex(file);
    const k = keysOf(this.ws.facts(file));
    this.fileKeys.set(file, k);
    for (const x of k.decl) addTo(this.decl, x, file);
    for (const x of k.use) addTo(this.use, x, file);
  }

  private unindex(file: string): void {
    const k = this.fileKeys.get(file);
    if (!k) return;
    for (const x of k.decl) this.decl.get(x)?.delete(file);
    for (const x of k.use) this.use.get(x)?.delete(file);
    this.fileKeys.delete(file);
  }

  /** Which files' findings an edit can change (affected) and which files the rules need to see
   * to recompute them (context). */
  scopeOf(changed: string[], oldKeys: Map<string, { decl: Set<string>; use: Set<string> }>): { affected: Set<string>; context: Set<string> } {
    const affected = new Set<string>(changed);
    const model = this.lastModel();
    for (const file of changed) {
      const now = this.fileKeys.get(file) ?? { decl: new Set<string>(), use: new Set<string>() };
      const before = oldKeys.get(file) ?? { decl: new Set<string>(), use: new Set<string>() };
      // Everything that declares or uses what this file declares (before or after the edit),
      // and the declarers of what it uses (their "no user"/pairing findings can change too).
      for (const k of [...now.decl, ...before.decl]) {
        this.decl.get(k)?.forEach((f) => affected.add(f));
        this.use.get(k)?.forEach((f) => affected.add(f));
      }
      for (const k of [...now.use, ...before.use]) this.decl.get(k)?.forEach((f) => affected.add(f));
      // Files that include it (types resolve through includes).
      if (model) for (const f of model.includersOf(file)) affected.add(f);
    }
    // Files of earlier findings that touch a changed file on either side.
    const changedSet = new Set(changed);
    for (const f of this.findings) {
      if (changedSet.has(f.range.file) || f.related.some((r) => changedSet.has(r.range.file))) {
        affected.add(f.range.file);
        for (const r of f.related) affected.add(r.range.file);
      }
    }
    const context = new Set<string>(affected);
    for (const file of affected) {
      const k = this.fileKeys.get(file);
      if (!k) continue;
      for (const x of k.decl) {
        this.decl.get(x)?.forEach((f) => context.add(f));
        this.use.get(x)?.forEach((f) => context.add(f));
      }
      for (const x of k.use) this.decl.get(x)?.forEach((f) => context.add(f));
    }
    // Include closure of the context (the headers its types come from).
    const stack = [...context];
    while (stack.length) {
      const file = stack.pop()!;
      const facts = this.ws.facts(file);
      if (!facts) continue;
      for (const inc of facts.includes) {
        if (inc.system) continue;
        const r = model?.includeTarget(inc) ?? model?.resolveInclude(file, inc.path);
        if (r && !context.has(r) && this.ws.has(r)) {
          context.add(r);
          stack.push(r);
        }
      }
    }
    for (const f of [...context]) if (!this.ws.has(f)) context.delete(f);
    return { affected, context };
  }

  private lastModel(): Model | undefined {
    return this.fullModel ?? this.linkModel;
  }

  /** Text of a file: the open document, else the disk. */
  text(file: string): string | undefined {
    const d = this.docs.get(file);
    if (d) return d.text;
    try {
      return fs.readFileSync(file, "utf8");
    } catch {
      return undefined;
    }
  }

  dispose(): void {
    for (const d of this.docs.values()) d.tree?.delete();
  }
}

function addTo(m: Map<string, Set<string>>, k: string, v: string): void {
  let s = m.get(k);
  if (!s) m.set(k, (s = new Set()));
  s.add(v);
}

export function sortFindings(out: Finding[]): Finding[] {
  return out.sort((a, b) => a.range.file.localeCompare(b.range.file) || a.range.line - b.range.line || a.range.col - b.range.col || a.rule.localeCompare(b.rule));
}

export function relPath(roots: string[], file: string): string {
  for (const r of roots) {
    const rel = path.relative(r, file);
    if (!rel.startsWith("..") && !path.isAbsolute(rel)) return rel;
  }
  return file;
}
