// Parallel reading and extraction for large workspaces (the CLI): files are handed out in small
// batches to worker threads, each of which reads the file, parses it with its own copy of the
// grammars, extracts FileFacts (plain data), deletes the tree and posts the facts back. The main
// thread only links the model and runs the rules, exactly as for sequential loading.
//
// Workers run the same bundle as the caller: the entry point must call `runWorkerIfAsked()` first
// thing (see cli/index.ts), which is why callers pass the bundle path explicitly. Without a
// script (tests, which run the TypeScript sources) everything runs in-process.

import * as fs from "node:fs";
import * as os from "node:os";
import { createHash } from "node:crypto";
import { Worker, isMainThread, parentPort, workerData } from "node:worker_threads";
import { extractFile, initParsers, skippedFacts } from "../extract/index.js";
import { emptyFacts } from "../extract/common.js";
import { langOf, parseText } from "../parse/parser.js";
import type { FileFacts } from "../model/types.js";
import { shareStrings } from "./share-strings.js";

export interface LoadedFile {
  file: string;
  /** SHA-1 of the text ("" when the file was skipped). */
  hash: string;
  facts: FileFacts;
}

export type WorkMode = "extract" | "parse";

export interface ParallelOptions {
  maxFileBytes: number;
  /** Bundle to start workers from; without it the work runs in this thread. */
  script?: string;
  /** Number of worker threads; default from availableParallelism (at most 4). */
  workers?: number;
  /** "parse" only reads and parses (the benchmark's floor); facts are then empty. */
  mode?: WorkMode;
  /** Attribute/export macro names to blank (setting `strip_macros`). */
  stripMacros?: readonly string[];
  onProgress?: (done: number, total: number) => void;
}

const WORKER_TAG = "ferrule-extract-worker";
const BATCH = 8;

/** Reads one file and extracts its facts; the same outcomes as Workspace.load (never throws). */
export function readFacts(file: string, maxFileBytes: number, mode: WorkMode = "extract", stripMacros?: readonly string[]): LoadedFile {
  let text: string;
  try {
    const st = fs.statSync(file);
    if (st.size > maxFileBytes * 4) {
      return { file, hash: "", facts: skippedFacts(file, `${st.size} bytes, above the limit of ${maxFileBytes} (setting max_file_bytes)`) };
    }
    text = fs.readFileSync(file, "utf8");
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
  return { file, hash, facts: extractFile(file, text, { maxFileBytes, stripMacros }) };
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
export async function loadFiles(files: string[], opts: ParallelOptions): Promise<LoadedFile[]> {
  const mode = opts.mode ?? "extract";
  const n = opts.script ? workerCount(files.length, opts.workers) : 0;
  if (n === 0) {
    await initParsers();
    const out: LoadedFile[] = [];
    files.forEach((f, i) => {
      out.push(readFacts(f, opts.maxFileBytes, mode, opts.stripMacros));
      if (opts.onProgress && i % 50 === 0) opts.onProgress(i, files.length);
    });
    return out;
  }
  const results: (LoadedFile | undefined)[] = new Array(files.length);
  let next = 0;
  let done = 0;
  const workers: Worker[] = [];
  const pool = new Map<string, string>();
  try {
    await new Promise<void>((resolve) => {
      let live = n;
      const feed = (w: Worker) => {
        if (next >= files.length) {
          w.postMessage({ stop: true });
          return;
        }
        const start = next;
        next = Math.min(files.length, next + BATCH);
        w.postMessage({ start, files: files.slice(start, next) });
      };
      for (let i = 0; i < n; i++) {
        const w = new Worker(opts.script!, { workerData: { tag: WORKER_TAG, maxFileBytes: opts.maxFileBytes, mode, stripMacros: opts.stripMacros ? [...opts.stripMacros] : undefined } });
        workers.push(w);
        w.on("message", (m: { ready?: boolean; start?: number; out?: LoadedFile[] }) => {
          feed(w); // the next batch first, so the worker is not kept waiting while these are stored
          if (m.out && m.start !== undefined) {
            m.out.forEach((r, j) => {
              shareStrings(r, pool); // one copy of each repeated string (see share-strings.ts)
              results[m.start! + j] = r;
            });
            done += m.out.length;
            opts.onProgress?.(done, files.length);
          }
        });
        w.on("error", () => { /* "exit" follows; its unfinished files are redone below */ });
        w.on("exit", () => {
          if (--live === 0) resolve();
        });
      }
    });
  } finally {
    for (const w of workers) void w.terminate();
  }
  // A worker that died mid-batch leaves holes: do those files here.
  const missing = results.some((r) => !r);
  if (missing) await initParsers();
  return results.map((r, i) => r ?? readFacts(files[i]!, opts.maxFileBytes, mode, opts.stripMacros));
}

/** In a worker started by loadFiles: serves batches and returns true. Elsewhere returns false. */
export function runWorkerIfAsked(): boolean {
  if (isMainThread || !parentPort || (workerData as { tag?: string } | null)?.tag !== WORKER_TAG) return false;
  const port = parentPort;
  const { maxFileBytes, mode, stripMacros } = workerData as { maxFileBytes: number; mode: WorkMode; stripMacros?: string[] };
  void initParsers().then(() => {
    port.on("message", (m: { stop?: boolean; start: number; files: string[] }) => {
      if (m.stop) {
        port.close();
        return;
      }
      port.postMessage({ start: m.start, out: m.files.map((f) => readFacts(f, maxFileBytes, mode, stripMacros)) });
    });
    port.postMessage({ ready: true });
  });
  return true;
}
