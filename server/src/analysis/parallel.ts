// Parallel reading and extraction for large workspaces (the CLI): files are handed out in small
// batches to worker threads, each of which reads the file, parses it with its own copy of the
// grammars, extracts FileFacts (plain data), deletes the tree and posts the facts back. The main
// thread only links the model and runs the rules, exactly as for sequential loading.
//
// Workers run the same bundle as the caller: the entry point must call `runWorkerIfAsked()` first
// thing (see cli/index.ts), which is why callers pass the bundle path explicitly. Without a
// script (tests, which run the TypeScript sources) everything runs in-process.

import { encodingNotice, readSource } from "./textio.js";
import * as fs from "node:fs";
import * as os from "node:os";
import { createHash } from "node:crypto";
import { Worker, isMainThread, parentPort, workerData } from "node:worker_threads";
import { extractFile, getRunDeadline, initParsers, setRunDeadline, skippedFacts } from "../extract/index.js";
import { emptyFacts } from "../extract/common.js";
import { langOf, parseText } from "../parse/parser.js";
import type { FileFacts } from "../model/types.js";
import { shareStrings } from "./share-strings.js";
import { packFacts, type PackedFile } from "./packed.js";
import { HeapBudget } from "./memory.js";
import { IncludeIndex } from "../model/includes.js";
import { includeReader } from "./include-reader.js";
import type { PreprocEnv } from "../extract/preproc/index.js";
import type { Triple } from "../model/targets.js";
import { FactsCache, type CacheSpec } from "./facts-cache.js";

/** What a worker needs to preprocess: every file of the walk (include resolution), the settings. */
export interface PreprocData {
  files: string[];
  includePaths: string[];
  targets: Triple[];
  defines?: Record<string, string>;
}

let envFor: { data: PreprocData; env: Omit<PreprocEnv, "strip" | "strict"> } | undefined;

function preprocEnv(data: PreprocData | undefined, maxFileBytes: number): Omit<PreprocEnv, "strip" | "strict"> | undefined {
  if (!data) return undefined;
  if (envFor?.data !== data) {
    envFor = { data, env: { targets: data.targets, defines: data.defines, readInclude: includeReader(IncludeIndex.of(data.files, data.includePaths), maxFileBytes) } };
  }
  return envFor.env;
}

export interface LoadedFile {
  file: string;
  /** SHA-1 of the text ("" when the file was skipped). */
  hash: string;
  facts: FileFacts;
  /** The facts came from the facts cache (analysis/facts-cache.ts). */
  cached?: boolean;
}

let cacheFor: { spec: CacheSpec; cache: FactsCache } | undefined;

/** This thread's handle on the facts cache of `spec` (one per thread, kept across batches). */
export function openCache(spec: CacheSpec | undefined): FactsCache | undefined {
  if (!spec) return undefined;
  if (cacheFor?.spec.dir !== spec.dir || cacheFor.spec.code !== spec.code || cacheFor.spec.settings !== spec.settings) cacheFor = { spec, cache: new FactsCache(spec) };
  return cacheFor.cache;
}

/** "extract": facts as objects; "parse": only read and parse (the benchmark's floor); "pack":
 * facts packed for the chunked check (analysis/packed.ts). */
export type WorkMode = "extract" | "parse" | "pack";

export interface ParallelOptions {
  maxFileBytes: number;
  /** Bundle to start workers from; without it the work runs in this thread. */
  script?: string;
  /** Number of worker threads; default from availableParallelism (at most 4). */
  workers?: number;
  /** "parse" only reads and parses (the benchmark's floor); facts are then empty. Use loadPacked
   * for "pack". */
  mode?: "extract" | "parse";
  /** Attribute/export macro names to blank (setting `strip_macros`). */
  stripMacros?: readonly string[];
  /** The preprocessor's inputs (without: each file is preprocessed on its own). */
  preproc?: PreprocData;
  /** The facts cache to read and fill (without: none). */
  cache?: CacheSpec;
  onProgress?: (done: number, total: number) => void;
}

const WORKER_TAG = "ferrule-extract-worker";
const BATCH = 8;

/** Reads one file and extracts its facts; the same outcomes as Workspace.load (never throws). */
export function readFacts(file: string, maxFileBytes: number, mode: WorkMode = "extract", stripMacros?: readonly string[], preproc?: PreprocData, cacheSpec?: CacheSpec): LoadedFile {
  let text: string;
  let note: string | undefined;
  try {
    const st = fs.statSync(file);
    if (st.size > maxFileBytes * 4) {
      return { file, hash: "", facts: skippedFacts(file, `${st.size} bytes, above the limit of ${maxFileBytes} (setting max_file_bytes)`) };
    }
    ({ text, note } = readSource(file));
  } catch (e) {
    return { file, hash: "", facts: skippedFacts(file, `cannot read: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`) };
  }
  const hash = createHash("sha1").update(text).digest("hex");
  if (mode === "parse") {
    const lang = langOf(file) ?? "c";
    try {
      if (text.length <= maxFileBytes) parseText(lang, text).delete();
    } catch { /* the floor only measures parsing */ }
    return { file, hash, facts: emptyFacts(file, lang) };
  }
  const env = preprocEnv(preproc, maxFileBytes);
  const cache = openCache(cacheSpec);
  if (!cache) {
    const facts = extractFile(file, text, { maxFileBytes, stripMacros, preproc: env });
    if (note) facts.notices.push(encodingNotice(file, note));
    return { file, hash, facts };
  }
  // (a run whose time budget is spent skips the file, cached or not, as without a cache)
  const hit = getRunDeadline() > Date.now() ? cache.get(file, hash, env?.readInclude) : undefined;
  if (hit) {
    if (note) hit.notices.push(encodingNotice(file, note));
    return { file, hash, facts: hit, cached: true };
  }
  const traced = cache.tracing(env?.readInclude);
  const facts = extractFile(file, text, { maxFileBytes, stripMacros, preproc: env ? { ...env, readInclude: traced.read } : env });
  cache.put(file, hash, facts, traced.trace);
  if (note) facts.notices.push(encodingNotice(file, note));
  return { file, hash, facts };
}

/** The running bundle (dist/cli.js) when this code runs from one; undefined under the test
 * runner, which loads the TypeScript sources. */
export function bundleScript(): string | undefined {
  return typeof __filename === "string" && __filename.endsWith(".js") ? __filename : undefined;
}

/** Worker threads worth starting for this many files (0: do it in this thread). The environment
 * variable FERRULE_WORKERS overrides the choice (0 = no worker threads). */
export function workerCount(nFiles: number, requested?: number): number {
  const env = process.env.FERRULE_WORKERS;
  if (requested === undefined && env !== undefined && env !== "" && Number.isFinite(Number(env))) requested = Number(env);
  if (requested !== undefined) return Math.max(0, Math.min(requested, nFiles));
  // A worker costs ~0.5 s to start (bundle, three grammars, warm-up): below a few hundred files one
  // thread is faster (measured on 2 cores: 82 files 1.6 s in one thread, 2.6 s with two workers).
  if (nFiles < 200) return 0;
  const cores = typeof os.availableParallelism === "function" ? os.availableParallelism() : os.cpus().length;
  return Math.max(1, Math.min(4, cores, Math.ceil(nFiles / 100)));
}

/** Reads and extracts every file; results are in the order of `files`. */
export function loadFiles(files: string[], opts: ParallelOptions): Promise<LoadedFile[]> {
  const mode = opts.mode ?? "extract";
  const pool = new Map<string, string>();
  return runPool<string, LoadedFile>(files, {
    mode,
    workers: opts.script ? workerCount(files.length, opts.workers) : 0,
    script: opts.script,
    data: { maxFileBytes: opts.maxFileBytes, stripMacros: opts.stripMacros ? [...opts.stripMacros] : undefined, preproc: opts.preproc, cache: opts.cache, runDeadline: getRunDeadline() },
    local: (f) => readFacts(f, opts.maxFileBytes, mode, opts.stripMacros, opts.preproc, opts.cache),
    receive: (r) => shareStrings(r, pool), // one copy of each repeated string (see share-strings.ts)
    onProgress: opts.onProgress,
  });
}

/**
 * With a facts cache and worker threads, the files whose entries hold are taken here first: a run
 * over unchanged files then starts no worker (each costs a bundle and three grammars), and one
 * after a small edit starts workers only when the files left to read are worth them.
 */
function cachedFirst(files: string[], opts: Omit<ParallelOptions, "mode">): { hits: Map<number, LoadedFile>; rest: string[] } {
  const hits = new Map<number, LoadedFile>();
  const cache = openCache(opts.cache);
  if (!cache || !opts.script || workerCount(files.length, opts.workers) === 0) return { hits, rest: files };
  const env = preprocEnv(opts.preproc, opts.maxFileBytes);
  const rest: string[] = [];
  files.forEach((file, i) => {
    let r: LoadedFile | undefined;
    try {
      const st = fs.statSync(file);
      if (st.size <= opts.maxFileBytes * 4 && getRunDeadline() > Date.now()) {
        const { text, note } = readSource(file);
        const hash = createHash("sha1").update(text).digest("hex");
        const hit = cache.get(file, hash, env?.readInclude);
        if (hit) {
          if (note) hit.notices.push(encodingNotice(file, note));
          r = { file, hash, facts: hit, cached: true };
        }
      }
    } catch { /* read (and reported) by the pool */ }
    if (r) hits.set(i, r);
    else rest.push(file);
  });
  return { hits, rest };
}

/** Reads and extracts every file into packed form (see analysis/packed.ts); in the order of `files`. */
export async function loadPacked(files: string[], opts: Omit<ParallelOptions, "mode"> & { compress: boolean }): Promise<PackedFile[]> {
  const { hits, rest } = cachedFirst(files, opts);
  if (hits.size === 0) return loadPackedAll(files, opts);
  const read = rest.length ? await loadPackedAll(rest, opts) : [];
  const pool = new Map<string, string>();
  let k = 0;
  return files.map((_f, i) => {
    const h = hits.get(i);
    if (!h) return read[k++]!;
    shareStrings(h.facts, pool);
    // compressed like the workers' results when the workspace is large (memory bound)
    const p = packFacts(h.facts, h.hash, opts.compress);
    p.cached = true;
    return p;
  });
}

function loadPackedAll(files: string[], opts: Omit<ParallelOptions, "mode"> & { compress: boolean }): Promise<PackedFile[]> {
  const pool = new Map<string, string>();
  return runPool<string, PackedFile>(files, {
    mode: "pack",
    workers: opts.script ? workerCount(files.length, opts.workers) : 0,
    script: opts.script,
    data: { maxFileBytes: opts.maxFileBytes, stripMacros: opts.stripMacros ? [...opts.stripMacros] : undefined, compress: opts.compress, preproc: opts.preproc, cache: opts.cache, runDeadline: getRunDeadline() },
    local: (f) => packOne(f, opts.maxFileBytes, opts.stripMacros, false, opts.preproc, opts.cache),
    // facts sent as they are (a structured clone): one copy of each repeated string
    receive: (r) => {
      if (r.facts) shareStrings(r.facts, pool);
    },
    onProgress: opts.onProgress,
  });
}

function packOne(file: string, maxFileBytes: number, stripMacros: readonly string[] | undefined, compress: boolean, preproc?: PreprocData, cache?: CacheSpec): PackedFile {
  const r = readFacts(file, maxFileBytes, "extract", stripMacros, preproc, cache);
  const p = packFacts(r.facts, r.hash, compress);
  if (r.cached) p.cached = true;
  return p;
}

interface PoolJob<I, R> {
  mode: WorkMode;
  workers: number;
  script?: string;
  /** Handed to every worker (structured clone). */
  data: Record<string, unknown>;
  /** Does one item in this thread (no workers, or a worker died with it). */
  local: (item: I) => R;
  receive?: (r: R) => void;
  onProgress?: (done: number, total: number) => void;
}

// A young generation of a few MiB: extraction allocates many short-lived objects, and a small
// nursery keeps each worker's heap small at no cost in time (measured on the 100k bench
// workspace: 4 MiB, 204 MB peak and 4.9 s, against V8's default, 239 MB and 5.3 s).
const WORKER_YOUNG_MIB = 4;

async function runPool<I, R>(items: I[], job: PoolJob<I, R>): Promise<R[]> {
  const n = job.script ? job.workers : 0;
  if (n === 0) {
    await initParsers();
    const out: R[] = [];
    items.forEach((it, i) => {
      out.push(job.local(it));
      if (job.onProgress && i % 50 === 0) job.onProgress(i, items.length);
    });
    return out;
  }
  const results: (R | undefined)[] = new Array(items.length);
  let next = 0;
  let done = 0;
  const workers: Worker[] = [];
  try {
    await new Promise<void>((resolve) => {
      let live = n;
      const feed = (w: Worker) => {
        if (next >= items.length) {
          w.postMessage({ stop: true });
          return;
        }
        const start = next;
        next = Math.min(items.length, next + BATCH);
        w.postMessage({ start, items: items.slice(start, next) });
      };
      for (let i = 0; i < n; i++) {
        const w = new Worker(job.script!, { workerData: { tag: WORKER_TAG, mode: job.mode, ...job.data }, resourceLimits: { maxYoungGenerationSizeMb: WORKER_YOUNG_MIB } });
        workers.push(w);
        w.on("message", (m: { ready?: boolean; start?: number; out?: R[] }) => {
          feed(w); // the next batch first, so the worker is not kept waiting while these are stored
          if (m.out && m.start !== undefined) {
            m.out.forEach((r, j) => {
              job.receive?.(r);
              results[m.start! + j] = r;
            });
            done += m.out.length;
            job.onProgress?.(done, items.length);
          }
        });
        w.on("error", () => { /* "exit" follows; its unfinished items are redone below */ });
        w.on("exit", () => {
          if (--live === 0) resolve();
        });
      }
    });
  } finally {
    for (const w of workers) void w.terminate();
  }
  // A worker that died mid-batch leaves holes: do those items here.
  const missing = results.some((r) => !r);
  if (missing) await initParsers();
  return results.map((r, i) => r ?? job.local(items[i]!));
}

/** In a worker started by runPool: serves batches and returns true. Elsewhere returns false. */
export function runWorkerIfAsked(): boolean {
  if (isMainThread || !parentPort || (workerData as { tag?: string } | null)?.tag !== WORKER_TAG) return false;
  const port = parentPort;
  const data = workerData as { mode: WorkMode; maxFileBytes: number; stripMacros?: string[]; compress?: boolean; preproc?: PreprocData; cache?: CacheSpec; runDeadline?: number };
  if (typeof data.runDeadline === "number") setRunDeadline(data.runDeadline);
  const mode = data.mode;
  // the heap of a worker that packs its results holds only garbage between batches
  const budget = new HeapBudget(32);
  let serve: (items: unknown[]) => { out: unknown[]; moved: ArrayBuffer[] };
  if (mode === "pack") {
    // packed facts are moved, not copied (their buffers are transferred)
    serve = (items) => {
      const out = (items as string[]).map((f) => packOne(f, data.maxFileBytes, data.stripMacros, !!data.compress, data.preproc, data.cache));
      return { out, moved: out.flatMap((p) => (p.packed ? [p.packed.buffer as ArrayBuffer] : [])) };
    };
  } else {
    serve = (items) => ({ out: (items as string[]).map((f) => readFacts(f, data.maxFileBytes, mode, data.stripMacros, data.preproc, data.cache)), moved: [] });
  }
  void initParsers().then(() => {
    port.on("message", (m: { stop?: boolean; start: number; items: unknown[] }) => {
      if (m.stop) {
        port.close();
        return;
      }
      const { out, moved } = serve(m.items);
      port.postMessage({ start: m.start, out }, moved);
      if (mode === "pack" && data.compress) budget.step();
    });
    port.postMessage({ ready: true });
  });
  return true;
}
