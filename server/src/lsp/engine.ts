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

import { readSource } from "../analysis/textio.js";
import * as fs from "node:fs";
import * as path from "node:path";
import { createHash } from "node:crypto";
import { Workspace, listSources } from "../analysis/workspace.js";
import type { FerruleConfig } from "../analysis/config.js";
import { findProjectRoot } from "../analysis/project.js";
import type { Finding } from "../rules/api.js";
import { workspaceCheckIds, type GatheredItem } from "../rules/index.js";
import { concludeFinished } from "../analysis/finish.js";
import type { Suppression } from "../analysis/suppress.js";
import type { Model } from "../model/boundary.js";
import type { CachedItem, FileFacts, ItemCache, Range } from "../model/types.js";
import { langOf, type Tree } from "../parse/parser.js";
import { keysOf, localHelpers, touchesKeys, type Keys } from "../analysis/keys.js";

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

/**
 * Line starts after replacing [start, end) (on lines startLine..endLine) with `inserted`: lines
 * before the edit keep theirs, the inserted text adds its own, lines after it move by the change
 * in length. (Computing them afresh costs ~10 ms per keystroke on a 5,000-line file.) Any `\r`
 * near the edit takes the full computation, since a `\r\n` pair may have been split or joined.
 */
function editLineStarts(d: { text: string; lineStarts: number[] }, start: number, end: number, startLine: number, endLine: number, inserted: string): number[] {
  const old = d.lineStarts;
  const near = d.text.slice(Math.max(0, start - 1), start + inserted.length + 1);
  if (near.includes("\r") || startLine >= old.length || endLine >= old.length || startLine > endLine) return computeLineStarts(d.text);
  const delta = inserted.length - (end - start);
  const added: number[] = [];
  for (let i = inserted.indexOf("\n"); i >= 0; i = inserted.indexOf("\n", i + 1)) added.push(start + i + 1);
  if (added.length === endLine - startLine) {
    // as many lines as before (the usual keystroke): update in place, nothing allocated
    for (let i = 0; i < added.length; i++) old[startLine + 1 + i] = added[i]!;
    if (delta) for (let i = endLine + 1; i < old.length; i++) old[i] += delta;
    return old;
  }
  const out = new Array<number>(startLine + 1 + added.length + (old.length - endLine - 1));
  let k = 0;
  for (let i = 0; i <= startLine; i++) out[k++] = old[i]!;
  for (const a of added) out[k++] = a;
  for (let i = endLine + 1; i < old.length; i++) out[k++] = old[i]! + delta;
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

/** Whether a Rust file's facts are exactly the facts of its items, in order. */
function fromItems(f: FileFacts, order: NonNullable<ItemCache["order"]>): boolean {
  let nf = 0, nt = 0, na = 0;
  for (const e of order) {
    for (const x of e.item.fns) if (f.fns[nf++] !== x) return false;
    for (const x of e.item.types) if (f.types[nt++] !== x) return false;
    for (const x of e.item.asserts) if (f.asserts[na++] !== x) return false;
  }
  return nf === f.fns.length && nt === f.types.length && na === f.asserts.length && !f.defines.length && !f.calls.length && !f.macroItems?.length;
}

/** The item whose rows (attributes and doc comments included) hold this line. */
function itemAt(line: number, items: Iterable<CachedItem>): CachedItem | undefined {
  for (const it of items) if (line >= it.first && line <= it.last) return it;
  return undefined;
}

const itemKeyCache = new WeakMap<CachedItem, { local: string; keys: Keys }>();
const localCache = new WeakMap<FileFacts, { set: Set<string>; sig: string }>();

/** The helper names local to a file (analysis/keys.ts localHelpers), with a signature. */
function localOf(f: FileFacts | undefined): { set: Set<string>; sig: string } {
  if (!f) return { set: new Set(), sig: "" };
  let l = localCache.get(f);
  if (!l) {
    const set = localHelpers(f);
    localCache.set(f, (l = { set, sig: [...set].sort().join(",") }));
  }
  return l;
}

/** An item that declares no name the seam links (only `r:` helper names): a helper function. */
function isHelper(k: Keys): boolean {
  for (const x of k.decl) if (!x.startsWith("r:")) return false;
  return true;
}

/** Names one Rust item declares and uses (as keysOf for a file), as part of a file whose local
 * helpers are `local` (a plain call to one of them is no cross-file use). */
function itemKeys(it: CachedItem, local: { set: Set<string>; sig: string }): Keys {
  const c = itemKeyCache.get(it);
  if (c && c.local === local.sig) return c.keys;
  const keys = keysOf({ file: "", lang: "rust", fns: it.fns, types: it.types, asserts: it.asserts, includes: [], calls: [], classes: [], defines: [], notices: [], hasErrors: false, extra: {} }, local.set);
  itemKeyCache.set(it, { local: local.sig, keys });
  return keys;
}

export interface AnalysisResult {
  findings: Finding[];
  /** Files whose findings were recomputed (all files for a full check). */
  affected: Set<string> | "all";
  /** Files whose facts were re-extracted. */
  changed: string[];
  /** "items": only the changed items of one Rust document and what links to them (see itemScope). */
  scope: "full" | "scoped" | "items";
  ms: number;
  /** Files in the sub-model of a scoped check. */
  context?: number;
}

const WORKSPACE_CHECKS = workspaceCheckIds();

export class Engine {
  ws: Workspace;
  readonly docs = new Map<string, OpenDoc>();
  findings: Finding[] = [];
  /** What the workspace checks gathered, by check id and file, and their findings (refreshLayer). */
  private readonly gatheredBy = new Map<string, Map<string, GatheredItem[]>>();
  private layer: Finding[] = [];
  private dirty = new Set<string>();
  private removed = new Set<string>();
  private decl = new Map<string, Set<string>>(); // key → files declaring it
  private use = new Map<string, Set<string>>(); // key → files using it
  private fileKeys = new Map<string, { decl: Set<string>; use: Set<string> }>();
  /** Rust files as last read from disk: their text's hash and items (with key offsets). */
  private diskItems = new Map<string, { hash: string; consts?: string; order: ItemCache["order"] }>();
  private fullModel: Model | undefined;
  /** The last whole-workspace model (include graph for scoping; may lag one edit behind). */
  private linkModel: Model | undefined;
  /** Pending "full check" request (after config change or on idle). */
  needFull = true;
  roots: string[] = [];
  lastContext = 0;
  private seenProject = -1;

  /** A build file changed on disk (Cargo.toml, compile_commands.json): read the project again. */
  buildFileChanged(): void {
    this.ws.invalidateProject();
    this.needFull = true;
  }

  constructor(ws: Workspace) {
    this.ws = ws;
  }

  /** Builds the index from disk (open documents keep their editor text). */
  scan(roots: string[], onProgress?: (done: number, total: number) => void): number {
    this.roots = roots;
    // the same project model as the CLI (analysis/project.ts): read from the project root
    this.ws.projectRoot ??= roots.length ? findProjectRoot(roots[0]!) : undefined;
    const walk = listSources(roots, this.ws.config.exclude);
    this.ws.walkNotices.length = 0;
    this.ws.walkNotices.push(...walk.notices);
    walk.files.forEach((f, i) => {
      if (!this.docs.has(f)) this.loadFile(f);
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
    this.diskItems.clear();
    this.fullModel = this.linkModel = undefined;
    this.findings = [];
    this.gatheredBy.clear();
    this.layer = [];
    this.needFull = true;
  }

  /** Reads a file from disk; for Rust, notes where its items are, so that opening it unchanged
   * can reuse them (see open). */
  private loadFile(file: string): void {
    if (langOf(file) !== "rust") {
      this.ws.load(file);
      return;
    }
    const itemCache: ItemCache = { prev: new Map(), next: new Map(), spansOnly: true };
    this.ws.load(file, { itemCache });
    const hash = this.ws.hashOf(file);
    if (itemCache.order && hash) this.diskItems.set(file, { hash, consts: itemCache.consts, order: itemCache.order });
    else if (itemCache.order || !hash) this.diskItems.delete(file);
  }

  open(file: string, text: string, version: number): void {
    const old = this.docs.get(file);
    old?.tree?.delete();
    const d: OpenDoc = { file, version, text, lineStarts: computeLineStarts(text) };
    // Opened as it is on disk: its items' keys come from the text and the offsets noted when the
    // file was read, so the first edit already re-reads only the items it changes.
    const disk = this.diskItems.get(file);
    if (disk && disk.hash === this.ws.hashOf(file) && disk.hash === createHash("sha1").update(text).digest("hex")) {
      const prev = new Map<string, CachedItem>();
      for (const e of disk.order!) if (e.item.span) prev.set(text.slice(e.item.span[0], e.item.span[1]), e.item);
      d.items = { prev, next: new Map(), consts: disk.consts, order: disk.order };
    }
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
      d.lineStarts = editLineStarts(d, start, end, c.range.start.line, c.range.end.line, c.text);
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

  /** Whether an open Rust document has not been read through the item cache yet (see seed). */
  get needsSeed(): boolean {
    for (const d of this.docs.values()) if (!d.items && !this.dirty.has(d.file) && langOf(d.file) === "rust") return true;
    return false;
  }

  /**
   * Reads open Rust documents whose facts did not come through the item cache (rare: a document
   * opened with the text of facts read without noting items) through it, without re-checking
   * anything (their facts do not change), so that the first edit can tell which items it changed.
   * The server calls it after publishing, off the edit path.
   */
  seed(): void {
    for (const d of this.docs.values()) {
      if (d.items || this.dirty.has(d.file) || langOf(d.file) !== "rust") continue;
      const itemCache: ItemCache = { prev: new Map(), next: new Map() };
      let fresh: Tree | undefined;
      this.ws.update(d.file, d.text, { oldTree: d.tree, keepTree: (t) => { fresh = t; }, itemCache }, true);
      if (fresh) {
        if (d.tree && d.tree !== fresh) d.tree.delete();
        d.tree = fresh;
      }
      d.items = { prev: itemCache.next, next: new Map(), consts: itemCache.consts, order: itemCache.order };
      this.reindex(d.file);
    }
  }

  close(file: string): void {
    const d = this.docs.get(file);
    if (!d) return;
    d.tree?.delete();
    this.docs.delete(file);
    // back to the disk version
    if (fs.existsSync(file)) {
      this.loadFile(file);
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
    this.loadFile(file);
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
    const oldFacts = new Map<string, FileFacts | undefined>();
    const itemMoves = new Map<string, { before?: ItemCache["order"]; after?: ItemCache["order"] }>();
    for (const file of this.dirty) {
      oldFacts.set(file, this.ws.facts(file));
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
        if (did) {
          itemMoves.set(file, { before: d.items?.order, after: itemCache.order });
          d.items = { prev: itemCache.next, next: new Map(), consts: itemCache.consts, order: itemCache.order };
        }
        if (fresh) {
          if (d.tree && d.tree !== fresh) d.tree.delete();
          d.tree = fresh;
        }
        if (did) changed.push(file);
      } else changed.push(file);
      this.reindex(file);
    }
    this.dirty.clear();

    // a changed project model (a module declaration, a file added or removed, a build file)
    // can change findings anywhere: check everything
    if (this.ws.projectVersion !== this.seenProject) {
      this.seenProject = this.ws.projectVersion;
      this.needFull = true;
    }
    const full = forceFull || this.needFull;
    if (!full && changed.length === 0) {
      return { findings: this.findings, affected: new Set(), changed, scope: "scoped", ms: performance.now() - t0 };
    }
    if (!full && changed.length === 1) {
      const f = changed[0]!;
      const m = itemMoves.get(f);
      const narrow = m && this.itemScope(f, oldFacts.get(f), m.before, m.after);
      if (narrow) {
        const gathered = new Map<string, GatheredItem[]>();
        const { findings } = this.ws.checkSubset(narrow.context, new Map([[f, narrow.partial]]), gathered);
        const inRows = (rows: [number, number][]) => (r: Range) => rows.some(([a, b]) => r.line >= a && r.line <= b);
        const wasDirty = (r: Range) => narrow.affected.has(r.file) || (r.file === f && inRows(narrow.dirtyBefore)(r));
        const isDirty = (r: Range) => narrow.affected.has(r.file) || (r.file === f && inRows(narrow.dirty)(r));
        // (files with moved findings are republished, not re-checked)
        const touched = this.mergeScoped(findings, gathered, wasDirty, isDirty, { finding: narrow.shift, range: narrow.at });
        this.lastContext = narrow.context.size;
        const affected = new Set([...narrow.affected, f, ...touched]);
        return { findings: this.findings, affected, changed, scope: "items", ms: performance.now() - t0, context: narrow.context.size };
      }
    }
    if (!full) {
      const { affected, context } = this.scopeOf(changed, oldKeys);
      const narrow = this.partnerScope(changed, oldKeys, affected);
      if (narrow && narrow.context.size <= Math.max(40, this.fileKeys.size * 0.4)) {
        this.lastContext = narrow.context.size;
        const gathered = new Map<string, GatheredItem[]>();
        const { findings } = this.ws.checkSubset(narrow.context, narrow.replace, gathered);
        const owned = (r: Range) => {
          if (narrow.full.has(r.file)) return true;
          const dirty = narrow.partial.get(r.file);
          return !!dirty && !!itemAt(r.line, dirty);
        };
        for (const x of this.mergeScoped(findings, gathered, owned, owned)) affected.add(x);
        return { findings: this.findings, affected, changed, scope: "scoped", ms: performance.now() - t0, context: narrow.context.size };
      }
      this.lastContext = context.size;
      if (context.size <= Math.max(40, this.fileKeys.size * 0.4)) {
        const gathered = new Map<string, GatheredItem[]>();
        const { findings } = this.ws.checkSubset(context, undefined, gathered);
        const owned = (r: Range) => affected.has(r.file);
        for (const x of this.mergeScoped(findings, gathered, owned, owned)) affected.add(x);
        return { findings: this.findings, affected, changed, scope: "scoped", ms: performance.now() - t0, context: context.size };
      }
    }
    this.ws.invalidate();
    const whole = this.ws.checkGathering();
    this.gatheredBy.clear();
    this.refreshLayer(whole.gathered, () => true, () => true);
    this.findings = sortFindings([...whole.findings, ...this.layer]);
    this.fullModel = this.linkModel = this.ws.model();
    this.needFull = false;
    return { findings: this.findings, affected: "all", changed, scope: "full", ms: performance.now() - t0 };
  }

  /**
   * Takes in the findings of a scoped re-check: the old findings at places it re-checked
   * (`wasOwned`, before the edit) give way to its findings at those places (`isOwned`, after),
   * the others stay (moved with the edit by `shift`), and the workspace checks conclude again
   * (refreshLayer). Returns the files whose published findings changed beyond the re-checked
   * places: kept findings that moved, and the workspace checks' findings.
   */
  private mergeScoped(
    findings: Finding[], gathered: Map<string, GatheredItem[]>, wasOwned: (r: Range) => boolean, isOwned: (r: Range) => boolean,
    shift?: { finding: (f: Finding) => Finding; range: (r: Range) => Range },
  ): Set<string> {
    const touched = new Set<string>();
    const keep: Finding[] = [];
    for (const x of this.findings) {
      if (WORKSPACE_CHECKS.has(x.rule) || wasOwned(x.range)) continue; // (the layer is concluded again below)
      const y = shift ? shift.finding(x) : x;
      if (y !== x) touched.add(y.range.file);
      keep.push(y);
    }
    const fresh = findings.filter((x) => isOwned(x.range));
    for (const file of this.refreshLayer(gathered, wasOwned, isOwned, shift?.range)) touched.add(file);
    this.findings = sortFindings([...keep, ...fresh, ...this.layer]);
    this.fullModel = undefined;
    this.needFull = false;
    return touched;
  }

  /**
   * The workspace checks (rules/api.ts WorkspaceCheck) compare items across files no relation
   * links, so a scoped re-check cannot conclude them on its part of the workspace. The engine
   * keeps what they gathered per file instead: a re-check replaces the items at the places it
   * re-checked (`wasOwned` before the edit, `isOwned` after), the others move with the edit
   * (`shift`), and the checks conclude again over everything. Returns the files whose
   * workspace-check findings changed (where they are and where their related places are).
   */
  private refreshLayer(gathered: Map<string, GatheredItem[]>, wasOwned: (r: Range) => boolean, isOwned: (r: Range) => boolean, shift?: (r: Range) => Range): Set<string> {
    for (const byFile of this.gatheredBy.values()) {
      for (const [file, items] of byFile) {
        const kept = items.filter((it) => !wasOwned(it.range)).map((it) => (shift ? { ...it, range: shift(it.range) } : it));
        if (kept.length) byFile.set(file, kept);
        else byFile.delete(file);
      }
    }
    for (const [id, items] of gathered) {
      let byFile = this.gatheredBy.get(id);
      if (!byFile) this.gatheredBy.set(id, (byFile = new Map()));
      for (const it of items) {
        if (!isOwned(it.range)) continue;
        const a = byFile.get(it.range.file);
        if (a) a.push(it);
        else byFile.set(it.range.file, [it]);
      }
    }
    const all = new Map<string, GatheredItem[]>();
    for (const [id, byFile] of this.gatheredBy) all.set(id, [...byFile.values()].flat());
    const next = concludeFinished(all, this.ws.config, (file) => this.ws.facts(file)?.extra.suppressions as Suppression[] | undefined);
    const key = (f: Finding) => `${f.rule}|${f.range.file}|${f.range.line}|${f.range.col}|${f.range.endLine}|${f.range.endCol}|${f.message}|${f.related.map((r) => `${r.range.file}:${r.range.line}:${r.range.col}`).join(",")}`;
    const before = new Set(this.layer.map(key));
    const after = new Set(next.map(key));
    const changed = new Set<string>();
    for (const f of this.layer) if (!after.has(key(f))) [f.range, ...f.related.map((r) => r.range)].forEach((r) => changed.add(r.file));
    for (const f of next) if (!before.has(key(f))) [f.range, ...f.related.map((r) => r.range)].forEach((r) => changed.add(r.file));
    this.layer = next;
    return changed;
  }

  /** The whole-workspace model (rebuilt lazily after edits; cheap: facts are cached). */
  model(): Model {
    this.fullModel ??= this.ws.model();
    this.linkModel = this.fullModel;
    return this.fullModel;
  }

  private reindex(file: string): void {
    const facts = this.ws.facts(file);
    const order = this.docs.get(file)?.items?.order;
    let k: { decl: Set<string>; use: Set<string> } | undefined;
    if (order && facts?.lang === "rust") {
      // An open Rust document: the union of its items' (cached) names, when its facts are
      // exactly its items' facts.
      if (fromItems(facts, order)) {
        k = { decl: new Set(), use: new Set() };
        for (const e of order) {
          const ik = itemKeys(e.item, localOf(facts));
          for (const x of ik.decl) k.decl.add(x);
          for (const x of ik.use) k.use.add(x);
        }
      }
    }
    k ??= keysOf(facts);
    const old = this.fileKeys.get(file);
    if (old) {
      // only the differences touch the index
      for (const x of old.decl) if (!k.decl.has(x)) this.decl.get(x)?.delete(file);
      for (const x of old.use) if (!k.use.has(x)) this.use.get(x)?.delete(file);
      for (const x of k.decl) if (!old.decl.has(x)) addTo(this.decl, x, file);
      for (const x of k.use) if (!old.use.has(x)) addTo(this.use, x, file);
    } else {
      for (const x of k.decl) addTo(this.decl, x, file);
      for (const x of k.use) addTo(this.use, x, file);
    }
    this.fileKeys.set(file, k);
  }

  private unindex(file: string): void {
    const k = this.fileKeys.get(file);
    if (!k) return;
    for (const x of k.decl) this.decl.get(x)?.delete(file);
    for (const x of k.use) this.use.get(x)?.delete(file);
    this.fileKeys.delete(file);
  }

  /**
   * The narrower scope of an edit to one open Rust document whose items were read through the
   * item cache: only the items whose text changed (and the items of the file that share a name
   * with them) are re-checked, with the other files that declare or use those names; the file's
   * other findings stand, moved with their items when lines were inserted or removed. Returns
   * undefined when this does not apply (a helper function or a const changed, the file has
   * syntax errors, notices or suppressions, or an earlier finding sits outside every item), and
   * the caller takes the file-level scope.
   */
  private itemScope(file: string, before: FileFacts | undefined, oldOrder: ItemCache["order"], newOrder: ItemCache["order"]): {
    affected: Set<string>; context: Set<string>; partial: FileFacts;
    dirty: [number, number][]; dirtyBefore: [number, number][]; shift: (f: Finding) => Finding; at: (r: Range) => Range;
  } | undefined {
    const after = this.ws.facts(file);
    if (!before || !after || !oldOrder || !newOrder || before.lang !== "rust") return undefined;
    if (before.notices.length || after.notices.length) return undefined;
    // (syntax errors are fine as long as every fact came from an item: the `unsafe extern` block
    // the grammar reads as an error is taken apart by hand, outside the cache)
    if (!fromItems(after, newOrder) || !fromItems(before, oldOrder)) return undefined;
    if (before.extra.suppressions || after.extra.suppressions) return undefined;
    const oldItems = new Set(oldOrder.map((e) => e.item));
    const claimed = new Map<CachedItem, CachedItem>(); // old item → the new item reusing it
    const fresh: CachedItem[] = [];
    for (const e of newOrder) {
      if (e.from && oldItems.has(e.from) && !claimed.has(e.from)) claimed.set(e.from, e.item);
      else fresh.push(e.item);
    }
    const dropped = oldOrder.map((e) => e.item).filter((it) => !claimed.has(it));
    if (!fresh.length && !dropped.length && [...claimed].every(([o, n]) => o.row === n.row)) {
      // (only text outside items changed, nothing moved: no finding can change)
      return { affected: new Set(), context: new Set(), partial: { ...after, fns: [], types: [], asserts: [] }, dirty: [], dirtyBefore: [], shift: (f) => f, at: (r) => r };
    }
    // Names the changed items declare and use.
    const kDecl = new Set<string>();
    const kUse = new Set<string>();
    for (const it of fresh.concat(dropped)) {
      // (an item without facts — a const that is no integer, say — changes nothing; integer
      // consts are part of every item's cache key)
      if (!it.fns.length && !it.types.length && !it.asserts.length) continue;
      const k = itemKeys(it, dropped.includes(it) ? localOf(before) : localOf(after));
      // a helper (no name the seam links) can change what the functions calling it do
      if (isHelper(k) || it.fns.some((fn) => (fn as { internal?: boolean }).internal)) return undefined;
      k.decl.forEach((x) => kDecl.add(x));
      k.use.forEach((x) => kUse.add(x));
    }
    const touches = (k: { decl: Set<string>; use: Set<string> }) => touchesKeys(k, { decl: kDecl, use: kUse });
    // Items of this file to re-check: the changed ones and those sharing a name with them.
    const dirtyItems = new Set<CachedItem>(fresh);
    for (const e of newOrder) if (touches(itemKeys(e.item, localOf(after)))) dirtyItems.add(e.item);
    const dirtyOld = new Set<CachedItem>(dropped);
    for (const [o, n] of claimed) if (dirtyItems.has(n)) dirtyOld.add(o);
    // Other files whose findings can change: those that declare or use a name of a re-checked item.
    const affected = new Set<string>();
    for (const it of [...dirtyItems].concat(dropped)) this.relatedTo(itemKeys(it, dropped.includes(it) ? localOf(before) : localOf(after)), affected);
    const inRows = (line: number, items: Iterable<CachedItem>) => !!itemAt(line, items);
    for (const f of this.findings) {
      const here = (f.range.file === file && inRows(f.range.line, dirtyOld)) || f.related.some((r) => r.range.file === file && inRows(r.range.line, dirtyOld));
      if (here) {
        affected.add(f.range.file);
        for (const r of f.related) affected.add(r.range.file);
      }
    }
    affected.delete(file);
    // Context: the affected files, what they relate to, the headers they include.
    const context = new Set<string>(affected);
    for (const f of affected) {
      const k = this.fileKeys.get(f);
      if (k) this.relatedTo(k, context);
    }
    context.delete(file);
    this.withIncludes(context, file);
    const partial = this.partialOf(file, after, newOrder, dirtyItems, context);
    // Earlier findings in this file (or pointing into it) move with their items.
    const moves: [number, number, number][] = [];
    let moved = false;
    for (const [o, n] of claimed) {
      if (n.row !== o.row) moved = true;
    }
    if (moved) for (const [o, n] of claimed) moves.push([o.first, o.last, n.row - o.row]);
    const oldRows = oldOrder.map((e) => e.item);
    for (const f of this.findings) {
      if (f.range.file === file && !inRows(f.range.line, oldRows)) return undefined;
      for (const r of f.related) if (r.range.file === file && !inRows(r.range.line, oldRows)) return undefined;
    }
    const at = (r: Range): Range => {
      if (r.file !== file) return r;
      const m = moves.find(([a, b]) => r.line >= a && r.line <= b);
      return m && m[2] ? { ...r, line: r.line + m[2], endLine: r.endLine + m[2] } : r;
    };
    const shift = (f: Finding): Finding => {
      if (!moved) return f;
      if (f.range.file !== file && !f.related.some((r) => r.range.file === file)) return f;
      return { ...f, range: at(f.range), related: f.related.map((r) => (r.range.file === file ? { ...r, range: at(r.range) } : r)) };
    };
    const rows = (items: Iterable<CachedItem>) => [...items].map((it) => [it.first, it.last] as [number, number]);
    return { affected, context: new Set([...context, file]), partial, dirty: rows(dirtyItems), dirtyBefore: rows(dirtyOld), shift, at };
  }

  /**
   * Adds the files related to these names: the declarers and users of what they declare, the
   * declarers of what they use, and the other users of a type they use (a constructor and a
   * releaser of one handle type; two callers of one function are not related).
   */
  private relatedTo(k: { decl: Set<string>; use: Set<string> }, into: Set<string>): void {
    for (const x of k.decl) {
      // two declarers of one Rust helper name do not relate (analysis/keys.ts)
      if (!x.startsWith("r:")) this.decl.get(x)?.forEach((f) => into.add(f));
      this.use.get(x)?.forEach((f) => into.add(f));
    }
    for (const x of k.use) {
      this.decl.get(x)?.forEach((f) => into.add(f));
      if (x.startsWith("t:")) this.use.get(x)?.forEach((f) => into.add(f));
    }
  }

  /** Adds the workspace headers the files include (transitively; types resolve through them),
   * except `skip`, and drops files the workspace no longer has. */
  private withIncludes(context: Set<string>, skip?: string): void {
    const model = this.lastModel();
    const stack = [...context];
    while (stack.length) {
      const f = stack.pop()!;
      for (const inc of this.ws.facts(f)?.includes ?? []) {
        if (inc.system) continue;
        const r = model?.includeTarget(inc) ?? model?.resolveInclude(f, inc.path);
        if (r && r !== skip && !context.has(r) && this.ws.has(r)) {
          context.add(r);
          stack.push(r);
        }
      }
    }
    for (const f of [...context]) if (!this.ws.has(f)) context.delete(f);
  }

  /**
   * A Rust file as a sub-model sees it: the re-checked items (`dirty`), the items the context's
   * other files link to, every helper (body rules follow calls into them), and the types those
   * use, declared in this file (to a fixpoint) — whose declarers in other files join `context`.
   */
  private partialOf(file: string, facts: FileFacts, order: NonNullable<ItemCache["order"]>, dirty: Set<CachedItem>, context: Set<string>): FileFacts {
    const ctxKeys = new Set<string>();
    for (const f of context) {
      if (f === file) continue;
      const k = this.fileKeys.get(f);
      k?.decl.forEach((x) => ctxKeys.add(x));
      k?.use.forEach((x) => ctxKeys.add(x));
    }
    const chosen = new Set<CachedItem>();
    const wanted = new Set<string>(); // names the chosen items use
    const choose = (it: CachedItem) => {
      if (chosen.has(it)) return false;
      chosen.add(it);
      itemKeys(it, localOf(facts)).use.forEach((x) => wanted.add(x));
      return true;
    };
    const anyIn = (xs: Set<string>, set: Set<string>) => {
      for (const x of xs) if (set.has(x)) return true;
      return false;
    };
    for (const e of order) {
      const it = e.item;
      const k = itemKeys(it, localOf(facts));
      // helpers (items that declare no linked name, only `r:` helper names) always come along
      if (dirty.has(it) || isHelper(k) || anyIn(k.decl, ctxKeys) || anyIn(k.use, ctxKeys)) choose(it);
    }
    for (let grew = true; grew;) {
      grew = false;
      for (const e of order) if (!chosen.has(e.item) && anyIn(itemKeys(e.item, localOf(facts)).decl, wanted)) grew = choose(e.item) || grew;
    }
    for (const x of wanted) {
      this.decl.get(x)?.forEach((f) => {
        if (f !== file && this.ws.has(f)) context.add(f);
      });
    }
    const partial: FileFacts = { ...facts, fns: [], types: [], asserts: [] };
    for (const e of order) {
      if (!chosen.has(e.item)) continue;
      partial.fns.push(...e.item.fns);
      partial.types.push(...e.item.types);
      partial.asserts.push(...e.item.asserts);
    }
    return partial;
  }

  /**
   * The file-level scope, narrowed for open Rust documents it would re-check only because they
   * link to the edited file (a header, say): of those, only the items sharing a name with the
   * edited file (or holding a finding that points into it) are re-checked, with what links to
   * them; their other findings stand (the document did not change, nothing moved). Undefined
   * when no such document is in scope.
   */
  private partnerScope(changed: string[], oldKeys: Map<string, { decl: Set<string>; use: Set<string> }>, affected: Set<string>): {
    full: Set<string>; partial: Map<string, Set<CachedItem>>; context: Set<string>; replace: Map<string, FileFacts>;
  } | undefined {
    const changedSet = new Set(changed);
    const K = { decl: new Set<string>(), use: new Set<string>() };
    for (const f of changed) {
      for (const k of [this.fileKeys.get(f), oldKeys.get(f)]) {
        k?.decl.forEach((x) => K.decl.add(x));
        k?.use.forEach((x) => K.use.add(x));
      }
    }
    const partial = new Map<string, Set<CachedItem>>();
    const orders = new Map<string, NonNullable<ItemCache["order"]>>();
    for (const r of affected) {
      if (changedSet.has(r)) continue;
      const order = this.docs.get(r)?.items?.order;
      const facts = this.ws.facts(r);
      if (!order || !facts || facts.lang !== "rust" || facts.notices.length || facts.extra.suppressions || !fromItems(facts, order)) continue;
      const dirty = new Set<CachedItem>();
      for (const e of order) if (touchesKeys(itemKeys(e.item, localOf(facts)), K)) dirty.add(e.item);
      let ok = true;
      const items = order.map((e) => e.item);
      for (const f of this.findings) {
        if (f.range.file !== r) continue;
        const it = itemAt(f.range.line, items);
        if (!it) {
          ok = false; // a finding outside every item: cannot tell whether it stands
          break;
        }
        if (f.related.some((x) => changedSet.has(x.range.file))) dirty.add(it);
      }
      if (ok) {
        partial.set(r, dirty);
        orders.set(r, order);
      }
    }
    if (!partial.size) return undefined;
    const full = new Set([...affected].filter((f) => !partial.has(f)));
    const context = new Set<string>(full);
    for (const f of full) {
      const k = this.fileKeys.get(f);
      if (k) this.relatedTo(k, context);
    }
    for (const [r, dirty] of partial) for (const it of dirty) this.relatedTo(itemKeys(it, localOf(this.ws.facts(r))), context);
    for (const r of partial.keys()) context.delete(r);
    this.withIncludes(context);
    const replace = new Map<string, FileFacts>();
    for (const [r, dirty] of partial) replace.set(r, this.partialOf(r, this.ws.facts(r)!, orders.get(r)!, dirty, context));
    for (const r of partial.keys()) context.add(r);
    return { full, partial, context, replace };
  }

  /** Which files' findings an edit can change (affected) and which files the rules need to see
   * to recompute them (context). */
  scopeOf(changed: string[], oldKeys: Map<string, { decl: Set<string>; use: Set<string> }>): { affected: Set<string>; context: Set<string> } {
    const affected = new Set<string>(changed);
    const model = this.lastModel();
    for (const file of changed) {
      const now = this.fileKeys.get(file) ?? { decl: new Set<string>(), use: new Set<string>() };
      const before = oldKeys.get(file) ?? { decl: new Set<string>(), use: new Set<string>() };
      // Everything related to what this file declares or uses, before or after the edit.
      this.relatedTo({ decl: new Set([...now.decl, ...before.decl]), use: new Set([...now.use, ...before.use]) }, affected);
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
      if (k) this.relatedTo(k, context);
    }
    this.withIncludes(context);
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
      return readSource(file).text;
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

/** Orders findings by place (code-unit order of paths: the editor groups them by file anyway,
 * and this runs on every edit). */
export function sortFindings(out: Finding[]): Finding[] {
  const cmp = (x: string, y: string) => (x < y ? -1 : x > y ? 1 : 0);
  return out.sort((a, b) => cmp(a.range.file, b.range.file) || a.range.line - b.range.line || a.range.col - b.range.col || cmp(a.rule, b.rule));
}

export function relPath(roots: string[], file: string): string {
  for (const r of roots) {
    const rel = path.relative(r, file);
    if (!rel.startsWith("..") && !path.isAbsolute(rel)) return rel;
  }
  return file;
}
