// The analysis session: file contents → facts (cached by content) → model → findings.
// Used by both the CLI and the language server. The only place (with the CLI) that touches the
// file system, and it only reads.

import * as fs from "node:fs";
import * as path from "node:path";
import picomatch from "picomatch";
import { createHash } from "node:crypto";
import { extractFile, getRunDeadline, initParsers, type ExtractOptions, skippedFacts } from "../extract/index.js";
import { langOf } from "../parse/parser.js";
import { DEFAULT_CONFIG, Model } from "../model/boundary.js";
import type { FileFacts } from "../model/types.js";
import { systemFactsFor } from "./system.js";
import { FAMILIES, runRules, type Finding, type GatheredItem } from "../rules/index.js";
import { DEFAULTS, type FerruleConfig } from "./config.js";
import { suppressedSink } from "./suppress.js";
import { concludeFinished, dedupe, finishFindings, sortFindings } from "./finish.js";
import type { Suppression } from "./suppress.js";
import { loadFiles, loadPacked, type PreprocData } from "./parallel.js";
import { HeapBudget } from "./memory.js";
import { checkChunk, planChunks } from "./chunks.js";
import "./ppcond.js";
import type { Fix } from "../fixes/index.js";
import { IncludeIndex } from "../model/includes.js";
import { encodingNotice, readSource } from "./textio.js";
import type { ProjectInfo } from "../model/project.js";
import type { ModDecl } from "../model/types.js";
import { discoverProject, findProjectRoot } from "./project.js";
import { includeReader } from "./include-reader.js";
import type { PreprocEnv } from "../extract/preproc/index.js";
import { evict, FactsCache, settingsKey, type CacheSpec } from "./facts-cache.js";

export const SKIP_DIRS = new Set(["target", "node_modules", ".git", "build", "out", "dist", ".cache", ".svn", ".hg", "__pycache__"]);

function isSkippedDir(name: string): boolean {
  return SKIP_DIRS.has(name) || name.startsWith("cmake-build-") || (name.startsWith(".") && name !== "." && name !== "..");
}

interface Entry {
  hash: string;
  facts: FileFacts;
}

export interface WalkResult {
  files: string[];
  notices: Finding[];
}

/** Lists the source files under the given paths (absolute), never following a symlink loop, and
 * never following a symlink that leads outside `roots` (default: the given paths). */
export function listSources(paths: string[], exclude: string[] = [], onProgress?: (n: number) => void, roots: string[] = paths): WalkResult {
  const files: string[] = [];
  const notices: Finding[] = [];
  const seen = new Set<string>();
  const rootReals = roots.map((r) => { try { return fs.realpathSync(path.resolve(r)); } catch { return path.resolve(r); } });
  const inside = (real: string) => rootReals.some((r) => real === r || real.startsWith(r.endsWith(path.sep) ? r : r + path.sep));
  const globs = compileExcludes(exclude);
  let base = "";
  const excluded = (p: string) => globs.test(path.relative(base, p).split(path.sep).join("/") || path.basename(p));
  const visit = (p: string, depth: number) => {
    let st: fs.Stats;
    try {
      st = fs.statSync(p);
    } catch (e) {
      notices.push(skipNotice(p, `cannot read: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`));
      return;
    }
    let real: string;
    try { real = fs.realpathSync(p); } catch { real = p; }
    if (!inside(real)) {
      notices.push(skipNotice(p, `a symbolic link to ${real}, outside the workspace and the configured include paths; not followed`));
      return;
    }
    if (seen.has(real)) return;
    seen.add(real);
    if (st.isDirectory()) {
      if (depth > 64) return;
      let names: string[];
      try { names = fs.readdirSync(p).sort(); } catch (e) {
        notices.push(skipNotice(p, `cannot list: ${(e as NodeJS.ErrnoException).code}`));
        return;
      }
      for (const n of names) {
        if (isSkippedDir(n)) {
          try { if (fs.statSync(path.join(p, n)).isDirectory()) continue; } catch { continue; }
        }
        visit(path.join(p, n), depth + 1);
      }
    } else if (st.isFile() && langOf(p) && !excluded(p)) {
      files.push(p);
      if (onProgress && files.length % 200 === 0) onProgress(files.length);
    }
  };
  for (const p of paths) {
    const abs = path.resolve(p);
    base = isDir(abs) ? abs : path.dirname(abs);
    visit(abs, 0);
  }
  for (const g of globs.unused()) {
    notices.push({ rule: "file-skipped", severity: "info", message: `exclude pattern \`${g}\` matches no file under the checked paths`, range: { file: path.resolve(paths[0] ?? "."), line: 0, col: 0, endLine: 0, endCol: 0 }, related: [] });
  }
  return { files, notices };
}

function modsKey(m: readonly ModDecl[] | undefined): string {
  return m ? JSON.stringify(m.map((d) => [d.name, d.path, d.inline, d.cond])) : "";
}

function skipNotice(file: string, why: string): Finding {
  return { rule: "file-skipped", severity: "info", message: `skipped: ${file}: ${why}`, range: { file, line: 0, col: 0, endLine: 0, endCol: 0 }, related: [] };
}

function isDir(p: string): boolean {
  try { return fs.statSync(p).isDirectory(); } catch { return false; }
}

/**
 * The `exclude` globs, compiled once per walk with picomatch (full glob syntax: `**`, braces,
 * classes, `!` to take a path back). A path is relative to the checked folder, with `/`. A
 * pattern that does not start with `/` or `./` matches at any depth, and a pattern naming a
 * folder excludes everything below it (`third_party` = `**\/third_party/**`).
 */
export function compileExcludes(globs: string[]): { test(rel: string): boolean; unused(): string[] } {
  const compiled = globs.map((g) => {
    const neg = g.startsWith("!");
    let body = neg ? g.slice(1) : g;
    const anchored = body.startsWith("/") || body.startsWith("./");
    body = body.replace(/^\.?\/+/, "").replace(/\/+$/, "");
    const pats = anchored ? [body, `${body}/**`] : [body, `${body}/**`, `**/${body}`, `**/${body}/**`];
    return { g, neg, match: picomatch(pats, { dot: true }), used: false };
  });
  const pos = compiled.filter((c) => !c.neg);
  const neg = compiled.filter((c) => c.neg);
  return {
    test(rel: string): boolean {
      let hit = false;
      for (const c of pos) if (c.match(rel)) { c.used = true; hit = true; }
      if (!hit) return false;
      for (const c of neg) if (c.match(rel)) { c.used = true; return false; }
      return true;
    },
    unused: () => compiled.filter((c) => !c.used).map((c) => c.g),
  };
}

/**
 * Whether worker threads should compress the facts they send (analysis/packed.ts). Facts take
 * ~17 bytes of heap per byte of source, so below a few MiB of source holding them as objects is
 * cheap, and faster: the main thread takes them in while the workers still read (at 100k lines,
 * 3.3 MB of source, ~0.7 s of a 5.6 s check), instead of unpacking every chunk after the last file
 * is read. Above it they are compressed (~1.4 bytes per byte of source) to bound memory: at 1M
 * lines the check peaks at ~260 MiB instead of ~750. FERRULE_PACK=1/0 forces either.
 */
export const COMPRESS_ABOVE_BYTES = 4 * 2 ** 20;

function shouldCompress(files: string[]): boolean {
  const env = process.env.FERRULE_PACK;
  if (env === "1" || env === "0") return env === "1";
  let total = 0;
  for (const f of files) {
    try {
      total += fs.statSync(f).size;
    } catch { /* read (and reported) later */ }
    if (total > COMPRESS_ABOVE_BYTES) return true;
  }
  return false;
}

export class Workspace {
  private entries = new Map<string, Entry>();
  private cachedModel: Model | undefined;
  private cachedFindings: Finding[] | undefined;
  readonly walkNotices: Finding[] = [];
  /** The folder the project's build files are read from (analysis/project.ts); unset: none. */
  projectRoot: string | undefined;
  private projectInfo: ProjectInfo | undefined | null = null;
  /** Bumped whenever the project model may have changed (a module declaration, a file added or
   * removed, a build file): the language server then checks everything again. */
  projectVersion = 0;

  constructor(public config: FerruleConfig = DEFAULTS) {}

  /** The facts cache on disk (analysis/facts-cache.ts): its folder, the code's id and the size
   * cap. Unset: no cache. Used by checkChunked, loadAllAsync and load. */
  cacheAt: { dir: string; code: string; maxBytes: number } | undefined;
  /** Files whose facts the last load took from the cache, and those it read. */
  readonly cacheCounts = { hits: 0, misses: 0 };
  private loadCache: FactsCache | undefined;

  /** The cache's full spec under the current settings (`preproc`: the preprocessor reads
   * included files, as every load of a Workspace does). */
  private cacheSpec(): CacheSpec | undefined {
    if (!this.cacheAt) return undefined;
    const settings = settingsKey({ targets: this.config.targets, defines: this.config.defines, stripMacros: this.config.stripMacros, maxFileBytes: this.config.maxFileBytes, includePaths: this.config.includePaths, preproc: true });
    return { ...this.cacheAt, settings };
  }

  /** Keeps the cache folder under its cap after a load that wrote to it. */
  private afterLoad(hits: number, misses: number): void {
    this.cacheCounts.hits += hits;
    this.cacheCounts.misses += misses;
    if (this.cacheAt && misses > 0) evict(this.cacheAt.dir, this.cacheAt.maxBytes);
  }

  /** The project as its build sees it (link units, features, module conditions), or undefined
   * when the tree has no build file ferrule reads. */
  project(): ProjectInfo | undefined {
    if (this.projectInfo === null) {
      this.projectInfo = this.projectRoot
        ? discoverProject(this.projectRoot, [...this.entries.keys()], (f) => this.entries.get(f)?.facts.mods, { features: this.config.features, defines: Object.keys(this.config.defines).length ? this.config.defines : undefined })
        : undefined;
    }
    return this.projectInfo;
  }

  /** Forgets the project model (a build file changed); read again when next needed. */
  invalidateProject(): void {
    this.projectInfo = null;
    this.projectVersion++;
    this.invalidate();
  }

  /** The model settings every model of this workspace is built with. */
  private modelConfig() {
    const project = this.project();
    const includePaths = project?.includeDirs.length ? [...this.config.includePaths, ...project.includeDirs] : this.config.includePaths;
    return { targets: this.config.targets, includePaths, families: this.config.families, project };
  }

  /** C/C++ texts as last given (the preprocessor reads included files from here first, and a
   * changed header re-reads the files that included it). */
  private texts = new Map<string, string>();
  /** Files found by the last walk (an include may name one not loaded yet). */
  private known = new Set<string>();
  private env: Omit<PreprocEnv, "strip" | "strict"> | undefined;

  /** The preprocessor's environment: targets, `defines`, and included files resolved like the
   * include graph, read from the texts given to update() or else from disk. */
  private preprocEnv(): Omit<PreprocEnv, "strip" | "strict"> {
    if (this.env) return this.env;
    const all = () => new Set([...this.known, ...this.entries.keys()]);
    const index = new IncludeIndex((f) => this.entries.has(f) || this.known.has(f), all, this.config.includePaths);
    this.env = { targets: this.config.targets, defines: this.config.defines, readInclude: includeReader(index, this.config.maxFileBytes, (f) => this.texts.get(f)) };
    return this.env;
  }

  static async create(config?: FerruleConfig): Promise<Workspace> {
    await initParsers();
    return new Workspace(config);
  }

  has(file: string): boolean {
    return this.entries.has(file);
  }

  files(): string[] {
    return [...this.entries.keys()];
  }

  facts(file: string): FileFacts | undefined {
    return this.entries.get(file)?.facts;
  }

  /** Sets a file's text; returns false when the content did not change (nothing to redo). With
   * `force`, an unchanged text is read again all the same (same facts; still returns false). */
  update(file: string, text: string, opts: Omit<ExtractOptions, "maxFileBytes"> = {}, force = false): boolean {
    const hash = createHash("sha1").update(text).digest("hex");
    const old = this.entries.get(file);
    const same = !!old && old.hash === hash;
    if (same && !force) return false;
    const isNew = !this.entries.has(file) && !this.known.has(file);
    if (isNew) this.env = undefined; // a new file may change how an include resolves
    const isC = langOf(file) !== "rust";
    if (isC) {
      if (!same) this.env = undefined; // its cached disk text, if any, is stale
      this.texts.set(file, text);
    }
    const facts = extractFile(file, text, { ...opts, maxFileBytes: this.config.maxFileBytes, stripMacros: this.config.stripMacros, preproc: this.preprocEnv() });
    this.entries.set(file, { hash, facts });
    if (this.projectRoot && (!old || modsKey(old.facts.mods) !== modsKey(facts.mods))) this.invalidateProject();
    if (isC && old && !same) {
      // files whose macros came through this one are read again (their cache key includes it)
      for (const [f, e] of this.entries) {
        const reads = (e.facts.extra.preproc as { reads?: string[] } | undefined)?.reads;
        const t = this.texts.get(f);
        if (f !== file && reads?.includes(file) && t !== undefined) {
          this.entries.set(f, { hash: e.hash, facts: extractFile(f, t, { maxFileBytes: this.config.maxFileBytes, stripMacros: this.config.stripMacros, preproc: this.preprocEnv() }) });
          this.rereadDependents.add(f);
        }
      }
    }
    if (same) {
      if (this.cachedModel) this.cachedModel = undefined; // same facts, new objects
      return false;
    }
    this.invalidate();
    return true;
  }

  /** Files re-read because a file they include changed (the language server re-indexes them). */
  readonly rereadDependents = new Set<string>();

  remove(file: string): void {
    this.texts.delete(file);
    this.env = undefined;
    if (this.entries.delete(file)) {
      if (this.projectRoot) this.invalidateProject();
      this.invalidate();
    }
  }

  /** The SHA-1 of a file's text as last read ("" when it was skipped). */
  hashOf(file: string): string | undefined {
    return this.entries.get(file)?.hash;
  }

  /** Reads a file from disk into the workspace; unreadable files become a notice. */
  load(file: string, opts: Omit<ExtractOptions, "maxFileBytes"> = {}): void {
    let text: string;
    let note: string | undefined;
    try {
      const st = fs.statSync(file);
      if (st.size > this.config.maxFileBytes * 4) {
        this.setFacts(file, skippedFacts(file, `${st.size} bytes, above the limit of ${this.config.maxFileBytes} (setting max_file_bytes)`));
        return;
      }
      ({ text, note } = readSource(file));
    } catch (e) {
      this.setFacts(file, skippedFacts(file, `cannot read: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`));
      return;
    }
    if (this.cacheAt && !opts.oldTree && !opts.keepTree && !this.entries.has(file)) {
      // the cache (a first read of a file from disk: the language server's scan)
      const spec = this.cacheSpec()!;
      if (this.loadCache?.spec.settings !== spec.settings || this.loadCache.spec.dir !== spec.dir) this.loadCache = new FactsCache(spec);
      const cache = this.loadCache;
      const hash = createHash("sha1").update(text).digest("hex");
      const isC = langOf(file) !== "rust";
      if (!this.known.has(file)) this.env = undefined; // a new file may change how an include resolves
      if (isC) {
        this.env = undefined;
        this.texts.set(file, text);
      }
      const env = this.preprocEnv();
      const hit = getRunDeadline() > Date.now() ? cache.get(file, hash, env.readInclude) : undefined;
      let facts = hit;
      if (facts) this.cacheCounts.hits++;
      else {
        const traced = cache.tracing(env.readInclude);
        facts = extractFile(file, text, { ...opts, maxFileBytes: this.config.maxFileBytes, stripMacros: this.config.stripMacros, preproc: { ...env, readInclude: traced.read } });
        cache.put(file, hash, facts, traced.trace);
        this.cacheCounts.misses++;
      }
      if (note) facts.notices.push(encodingNotice(file, note));
      this.entries.set(file, { hash, facts });
      if (this.projectRoot) this.invalidateProject();
      this.invalidate();
      return;
    }
    this.update(file, text, opts);
    if (note) this.entries.get(file)?.facts.notices.push(encodingNotice(file, note));
  }

  private setFacts(file: string, facts: FileFacts) {
    if (this.projectRoot && !this.entries.has(file)) this.projectInfo = null;
    this.entries.set(file, { hash: "", facts });
    this.invalidate();
  }

  /** Like loadAll, but reading and extraction run on worker threads when `opts.script` names the
   * running bundle and there are enough files (see analysis/parallel.ts). */
  async loadAllAsync(paths: string[], onProgress?: (n: number, total: number) => void, opts: { script?: string; workers?: number } = {}): Promise<void> {
    const walk = listSources(paths, this.config.exclude, undefined, [...paths, ...this.config.includePaths]);
    this.walkNotices.push(...walk.notices);
    const loaded = await loadFiles(walk.files, { maxFileBytes: this.config.maxFileBytes, stripMacros: this.config.stripMacros, script: opts.script, workers: opts.workers, onProgress, preproc: this.preprocData(walk.files), cache: this.cacheSpec() });
    let hits = 0;
    for (const r of loaded) {
      this.entries.set(r.file, { hash: r.hash, facts: r.facts });
      if (r.cached) hits++;
    }
    this.afterLoad(hits, loaded.length - hits);
    this.projectRoot ??= paths.length ? findProjectRoot(path.resolve(paths[0]!)) : undefined;
    this.projectInfo = null;
    this.invalidate();
  }

  loadAll(paths: string[], onProgress?: (n: number, total: number) => void): void {
    this.projectRoot ??= paths.length ? findProjectRoot(path.resolve(paths[0]!)) : undefined;
    this.projectInfo = null;
    const walk = listSources(paths, this.config.exclude, undefined, [...paths, ...this.config.includePaths]);
    this.walkNotices.push(...walk.notices);
    for (const f of walk.files) this.known.add(f);
    this.env = undefined;
    walk.files.forEach((f, i) => {
      this.load(f);
      if (onProgress && i % 50 === 0) onProgress(i, walk.files.length);
    });
  }

  private preprocData(files: string[]): PreprocData {
    return { files, includePaths: this.config.includePaths, targets: [...this.config.targets], defines: this.config.defines };
  }

  invalidate(): void {
    this.cachedModel = undefined;
    this.cachedFindings = undefined;
  }

  model(): Model {
    if (!this.cachedModel) {
      const facts = [...this.entries.values()].map((e) => e.facts);
      this.cachedModel = new Model(facts, { ...this.modelConfig(), system: systemFactsFor(facts, this.config.targets) });
    }
    return this.cachedModel;
  }

  /** All findings, with severity overrides and suppressions applied, sorted by place. */
  check(): Finding[] {
    if (this.cachedFindings) return this.cachedFindings;
    this.cachedFindings = this.finish([...this.walkNotices, ...runRules(this.model())], this.model());
    return this.cachedFindings;
  }

  /** Like check(), but the workspace checks (rules/api.ts WorkspaceCheck) only gather: their
   * findings are left out, and what they gathered is returned (the language server concludes
   * them itself, from items it keeps per file). */
  checkGathering(): { findings: Finding[]; gathered: Map<string, GatheredItem[]> } {
    const gathered = new Map<string, GatheredItem[]>();
    const findings = this.finish([...this.walkNotices, ...runRules(this.model(), FAMILIES, gathered)], this.model());
    return { findings, gathered };
  }

  /** Runs the rules over a model of only these files (the language server's scoped re-check:
   * an edit re-checks the boundary items it can affect; the caller picks the files, and may
   * stand in a part of a file's facts for the whole). With `gathered`, the workspace checks gather
   * into it instead of concluding on this part. */
  checkSubset(files: Iterable<string>, replace?: Map<string, FileFacts>, gathered?: Map<string, GatheredItem[]>): { findings: Finding[]; model: Model } {
    const facts: FileFacts[] = [];
    for (const f of files) {
      const e = replace?.get(f) ?? this.entries.get(f)?.facts;
      if (e) facts.push(e);
    }
    const sides = { rust: false, c: false };
    for (const e of this.entries.values()) {
      if (e.facts.lang === "rust") sides.rust = true;
      else sides.c = true;
      if (sides.rust && sides.c) break;
    }
    // includes resolve against the whole workspace, as in the full model (a header name that is
    // unique in the part may not be unique in the workspace)
    const mc = this.modelConfig();
    const includeIndex = new IncludeIndex((f) => this.entries.has(f), () => this.entries.keys(), mc.includePaths);
    const model = new Model(facts, { ...mc, workspaceSides: sides, includeIndex, system: systemFactsFor(facts, mc.targets) });
    return { findings: this.finish(runRules(model, FAMILIES, gathered), model), model };
  }

  /**
   * The CLI's check of a workspace in chunks (see analysis/chunks.ts): workers read and extract
   * every file into packed facts (analysis/packed.ts); the files are grouped by what the rules can
   * relate, and each chunk of groups is unpacked, linked and checked on its own, then dropped.
   * The findings are those `check()` gives after loading everything; the facts are not kept, so
   * `model()` and `check()` do not see these files.
   */
  async checkChunked(paths: string[], opts: { script?: string; workers?: number; chunkFiles?: number; withFixes?: boolean; onProgress?: (n: number, total: number) => void; onPhase?: (name: string) => void; root?: string } = {}): Promise<{ findings: Finding[]; suppressed: { finding: Finding; reason: string }[]; fixes: Map<Finding, Fix[]>; files: number; chunks: number; largestChunk: number }> {
    const silenced = new Map<string, { finding: Finding; reason: string }>();
    suppressedSink.record = (f, reason) => silenced.set(`${f.rule}|${f.range.file}|${f.range.line}|${f.range.col}|${f.message}`, { finding: f, reason });
    try {
      return await this.checkChunkedInner(paths, opts, () => [...silenced.values()]);
    } finally {
      suppressedSink.record = undefined;
    }
  }

  private async checkChunkedInner(paths: string[], opts: { script?: string; workers?: number; chunkFiles?: number; withFixes?: boolean; onProgress?: (n: number, total: number) => void; onPhase?: (name: string) => void; root?: string }, silenced: () => { finding: Finding; reason: string }[]) {
    // A sub-folder of a project is read with the project: its other side may lie elsewhere in the
    // tree; only findings located in the given paths are reported.
    const root = opts.root && !paths.some((p) => path.resolve(p) === path.resolve(opts.root!)) ? path.resolve(opts.root) : undefined;
    const readPaths = root ? [root] : paths;
    const walk = listSources(readPaths, this.config.exclude, undefined, [...readPaths, ...this.config.includePaths]);
    this.walkNotices.push(...walk.notices);
    const packed = await loadPacked(walk.files, { maxFileBytes: this.config.maxFileBytes, stripMacros: this.config.stripMacros, script: opts.script, workers: opts.workers, onProgress: opts.onProgress, compress: shouldCompress(walk.files), preproc: this.preprocData(walk.files), cache: this.cacheSpec() });
    const hits = packed.filter((p) => p.cached).length;
    this.afterLoad(hits, packed.length - hits);
    opts.onPhase?.("read+extract");
    this.projectRoot ??= root ?? (paths.length ? findProjectRoot(path.resolve(paths[0]!)) : undefined);
    const modsBy = new Map(packed.filter((p) => p.mods).map((p) => [p.file, p.mods!]));
    const project = this.projectRoot ? discoverProject(this.projectRoot, walk.files, (f) => modsBy.get(f), { features: this.config.features, defines: Object.keys(this.config.defines).length ? this.config.defines : undefined }) : undefined;
    this.projectInfo = project;
    opts.onPhase?.("project");
    const includePaths = project?.includeDirs.length ? [...this.config.includePaths, ...project.includeDirs] : this.config.includePaths;
    const includeIndex = IncludeIndex.of(walk.files, includePaths);
    const sides = { rust: packed.some((p) => p.lang === "rust"), c: packed.some((p) => p.lang !== "rust") };
    const plan = planChunks(packed, includeIndex, Math.max(1, opts.chunkFiles ?? 100));
    const chunks = plan.map((c) => c.map((i) => packed[i]!));
    packed.length = 0; // the files now live in `chunks` only, each let go once checked
    opts.onPhase?.("plan");
    // the system-mirror check reads system headers in this thread (analysis/system.ts), whose
    // parsers are not loaded when the files were read on workers
    await initParsers();
    const ctx = { config: { ...this.config, includePaths }, sides, withFixes: !!opts.withFixes, includeIndex, project };
    // Checked in this thread, one chunk at a time. (Checking chunks on worker threads was measured
    // slower on two cores: 9.6 s against 6.7 s at 1M lines, each worker paying its own start-up
    // and collections.)
    const budget = new HeapBudget(48);
    const gathered = new Map<string, GatheredItem[]>();
    const suppressions = new Map<string, Suppression[]>();
    const results = chunks.map((c, i) => {
      const r = checkChunk(c, ctx, gathered);
      chunks[i] = []; // let this chunk's facts go
      r.suppressions.forEach((v, k) => suppressions.set(k, v));
      budget.step();
      return r;
    });
    const all = finishFindings([...this.walkNotices], new Model([], { ...DEFAULT_CONFIG, workspaceSides: sides }), this.config);
    // the workspace checks, from what every chunk gathered (their fixes need no model)
    all.push(...concludeFinished(gathered, this.config, (file) => suppressions.get(file)));
    const fixes = new Map<Finding, Fix[]>();
    for (const r of results) {
      r.findings.forEach((f, i) => {
        all.push(f);
        const fx = r.fixes?.[i];
        if (fx?.length) fixes.set(f, fx);
      });
    }
    const inPaths = (f: Finding) => !root || paths.some((p) => {
      const a = path.resolve(p);
      return f.range.file === a || f.range.file.startsWith(a.endsWith(path.sep) ? a : a + path.sep);
    });
    return { findings: sortFindings(dedupe(all)).filter(inPaths), suppressed: silenced().filter((s) => inPaths(s.finding)), fixes, files: walk.files.length, chunks: plan.length, largestChunk: Math.max(0, ...plan.map((c) => c.length)) };
  }

  /** Severity overrides, suppressions, de-duplication and ordering. */
  private finish(raw: Finding[], model: Model): Finding[] {
    return finishFindings(raw, model, this.config);
  }
}
