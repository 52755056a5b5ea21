// The facts cache on disk: a file's extracted facts, kept between runs of the CLI (and the
// language server's first scan), so an unchanged file is not parsed again.
//
// An entry is found by a key over everything extraction reads besides the included files: the
// code that extracts (ferrule's version and the running bundle's bytes), the settings that change
// what is read (targets, defines, strip_macros, max_file_bytes, include paths, preprocessor on or
// off), the file's path and the SHA-1 of its text. What comes from OTHER files — the texts
// `#include` brings in, and which file an include names at all (a header added later may take an
// include over) — is kept in the entry as a trace: every question the preprocessor asked the
// include reader, in order, with the answer (the file and the SHA-1 of its text, or none). A hit
// asks the same questions again of the current workspace; only when every answer is the same is
// the entry used (the preprocessor is a function of the text, the settings and those answers, so
// it would ask the same questions and read the same texts). Otherwise the file is read and the
// entry rewritten.
//
// Entries are one file each (`<dir>/<2 hex>/<key>.facts`): a magic, the SHA-1 of the payload, then
// the payload (V8's value serializer, raw deflate). A truncated or corrupted entry fails the check
// and counts as a miss (then rewritten). Writes go to a temporary file in the same folder, renamed
// over the entry: two runs sharing the folder each see a whole entry or none. The folder is
// bounded: after a run that wrote, the oldest entries (by last use) beyond the cap are removed.
// Facts that are partial (the file's time budget ran out, an internal error) are never stored.

import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import * as v8 from "node:v8";
import * as zlib from "node:zlib";
import { createHash } from "node:crypto";
import type { FileFacts } from "../model/types.js";
import type { IncludeSource } from "../extract/preproc/index.js";

const MAGIC = Buffer.from("FRFC1\n");
const FORMAT = 1;
export const DEFAULT_CACHE_MAX_MB = 200;

/** One question the preprocessor asked the include reader, with its answer: [from, path,
 * system, resolved file ("" when none), SHA-1 of its text ("" when none)]. */
export type TraceStep = [string, string, boolean, string, string];

/** What the cache needs to know; plain data (handed to worker threads). */
export interface CacheSpec {
  dir: string;
  /** The code that extracts: version and bundle hash (see codeId). */
  code: string;
  /** The settings that change extraction (see settingsKey). */
  settings: string;
  /** Size cap in bytes. */
  maxBytes: number;
}

/** The default folder: $XDG_CACHE_HOME/ferrule, else ~/.cache/ferrule; on Windows
 * %LOCALAPPDATA%\ferrule\cache. FERRULE_CACHE_DIR overrides it. */
export function defaultCacheDir(env: NodeJS.ProcessEnv = process.env): string | undefined {
  if (env.FERRULE_CACHE_DIR) return path.resolve(env.FERRULE_CACHE_DIR);
  if (process.platform === "win32" && env.LOCALAPPDATA) return path.join(env.LOCALAPPDATA, "ferrule", "cache");
  if (env.XDG_CACHE_HOME && path.isAbsolute(env.XDG_CACHE_HOME)) return path.join(env.XDG_CACHE_HOME, "ferrule");
  let home: string;
  try { home = os.homedir(); } catch { return undefined; }
  return home ? path.join(home, ".cache", "ferrule") : undefined;
}

/** The code that extracts: the version, and the bytes of the running bundle when there is one (a
 * rebuilt ferrule of the same version does not reuse facts an older build extracted). */
export function codeId(version: string, script?: string): string {
  const h = createHash("sha1").update(`ferrule ${version} format ${FORMAT}\0`);
  if (script) {
    try { h.update(fs.readFileSync(script)); } catch { h.update("unreadable bundle"); }
  } else h.update("sources");
  return h.digest("hex");
}

/** The settings that change what extraction reads. */
export function settingsKey(s: { targets: readonly string[]; defines?: Readonly<Record<string, string>>; stripMacros?: readonly string[]; maxFileBytes: number; includePaths?: readonly string[]; preproc: boolean }): string {
  const defines = Object.entries(s.defines ?? {}).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return JSON.stringify([s.preproc, [...s.targets], defines, [...(s.stripMacros ?? [])], s.maxFileBytes, [...(s.includePaths ?? [])]]);
}

/** Whether `dir` lies in (or is) one of `roots` (the checked repository): the cache is never
 * written there. */
export function insideAny(dir: string, roots: readonly string[]): boolean {
  const real = (p: string) => {
    // the folder may not exist yet: resolve its nearest existing ancestor
    let cur = path.resolve(p);
    const rest: string[] = [];
    for (;;) {
      try { return path.join(fs.realpathSync(cur), ...rest.reverse()); } catch { /* up one */ }
      const up = path.dirname(cur);
      if (up === cur) return path.resolve(p);
      rest.push(path.basename(cur));
      cur = up;
    }
  };
  const d = real(dir);
  return roots.some((r) => {
    const rr = real(r);
    return d === rr || d.startsWith(rr.endsWith(path.sep) ? rr : rr + path.sep);
  });
}

const sha1 = (b: string | Uint8Array) => createHash("sha1").update(b).digest("hex");

/** Wraps an include reader so that every question and answer is noted (the entry's trace), with
 * one SHA-1 per included text. */
export function tracingReader(read: ((from: string, inc: string, system: boolean) => IncludeSource | undefined) | undefined, hashes: Map<string, { text: string; hash: string }>): { read: (from: string, inc: string, system: boolean) => IncludeSource | undefined; trace: TraceStep[] } {
  const trace: TraceStep[] = [];
  return {
    trace,
    read: (from, inc, system) => {
      const src = read?.(from, inc, system);
      trace.push([from, inc, system, src?.file ?? "", src ? textHash(src, hashes) : ""]);
      return src;
    },
  };
}

function textHash(src: IncludeSource, hashes: Map<string, { text: string; hash: string }>): string {
  const h = hashes.get(src.file);
  if (h && h.text === src.text) return h.hash;
  const hash = sha1(src.text);
  hashes.set(src.file, { text: src.text, hash });
  return hash;
}

export interface CacheStats {
  hits: number;
  misses: number;
  /** Entries found but not used: corrupted, truncated, or an include answered differently. */
  stale: number;
  writes: number;
  writtenBytes: number;
}

export class FactsCache {
  readonly stats: CacheStats = { hits: 0, misses: 0, stale: 0, writes: 0, writtenBytes: 0 };
  /** One SHA-1 per included text (validation asks about the same headers again and again). */
  private readonly hashes = new Map<string, { text: string; hash: string }>();
  private broken = false;

  constructor(readonly spec: CacheSpec) {}

  keyOf(file: string, hash: string): string {
    return sha1(`${this.spec.code}\0${this.spec.settings}\0${file}\0${hash}`);
  }

  private pathOf(key: string): string {
    return path.join(this.spec.dir, key.slice(0, 2), `${key}.facts`);
  }

  /** The facts stored for this file and text, when the entry is whole and every include is
   * answered as when it was made. */
  get(file: string, hash: string, readInclude: ((from: string, inc: string, system: boolean) => IncludeSource | undefined) | undefined): FileFacts | undefined {
    if (this.broken) return undefined;
    const key = this.keyOf(file, hash);
    const p = this.pathOf(key);
    let buf: Buffer;
    try {
      buf = fs.readFileSync(p);
    } catch {
      this.stats.misses++;
      return undefined;
    }
    const entry = decode(buf);
    if (!entry || entry.key !== key || entry.file !== file) {
      this.stats.stale++;
      return undefined;
    }
    for (const [from, inc, system, was, wasHash] of entry.trace) {
      const src = readInclude?.(from, inc, system);
      if ((src?.file ?? "") !== was || (src ? textHash(src, this.hashes) : "") !== wasHash) {
        this.stats.stale++;
        return undefined;
      }
    }
    this.stats.hits++;
    // last use, for eviction (a failure here only makes the entry look older)
    try { const now = new Date(); fs.utimesSync(p, now, now); } catch { /* read-only cache */ }
    return entry.facts;
  }

  /** A tracing include reader sharing this cache's text hashes. */
  tracing(read: ((from: string, inc: string, system: boolean) => IncludeSource | undefined) | undefined) {
    return tracingReader(read, this.hashes);
  }

  /** Stores whole facts (partial ones are refused); never throws. */
  put(file: string, hash: string, facts: FileFacts, trace: TraceStep[]): void {
    if (this.broken || !storable(facts)) return;
    const key = this.keyOf(file, hash);
    const p = this.pathOf(key);
    let payload: Buffer;
    try {
      payload = zlib.deflateRawSync(v8.serialize({ format: FORMAT, key, file, trace, facts }), { level: 1 });
    } catch {
      return; // facts the serializer cannot take: not cached
    }
    const body = Buffer.concat([MAGIC, Buffer.from(sha1(payload), "hex"), payload]);
    const tmp = `${p}.${process.pid}.${Math.random().toString(36).slice(2)}.tmp`;
    try {
      fs.mkdirSync(path.dirname(p), { recursive: true });
      fs.writeFileSync(tmp, body);
      fs.renameSync(tmp, p);
      this.stats.writes++;
      this.stats.writtenBytes += body.length;
    } catch {
      try { fs.rmSync(tmp, { force: true }); } catch { /* nothing to clean */ }
      // an unwritable folder: stop trying for this run
      if (!fs.existsSync(path.dirname(p))) this.broken = true;
    }
  }
}

function storable(facts: FileFacts): boolean {
  return !facts.notices.some((n) => n.rule === "internal-error" || (n.rule === "file-skipped" && n.message.startsWith("skipped:")));
}

function decode(buf: Buffer): { key: string; file: string; trace: TraceStep[]; facts: FileFacts } | undefined {
  if (buf.length < MAGIC.length + 20 || !buf.subarray(0, MAGIC.length).equals(MAGIC)) return undefined;
  const sum = buf.subarray(MAGIC.length, MAGIC.length + 20).toString("hex");
  const payload = buf.subarray(MAGIC.length + 20);
  if (sha1(payload) !== sum) return undefined;
  try {
    const v = v8.deserialize(zlib.inflateRawSync(payload)) as { format?: number; key?: unknown; file?: unknown; trace?: unknown; facts?: unknown };
    if (v.format !== FORMAT || typeof v.key !== "string" || typeof v.file !== "string" || !Array.isArray(v.trace) || typeof v.facts !== "object" || v.facts === null) return undefined;
    return v as { key: string; file: string; trace: TraceStep[]; facts: FileFacts };
  } catch {
    return undefined;
  }
}

/**
 * Keeps the folder under its cap: when the entries add up to more than `maxBytes`, the least
 * recently used are removed until they fit in 80 % of it. Temporary files older than an hour (a
 * run that died mid-write) go too. Never throws; a file another run removes first is skipped.
 */
export function evict(dir: string, maxBytes: number, now = Date.now()): { removed: number; bytes: number } {
  const entries: { p: string; size: number; t: number }[] = [];
  let total = 0;
  let removed = 0;
  let shards: string[];
  try { shards = fs.readdirSync(dir); } catch { return { removed, bytes: 0 }; }
  for (const s of shards) {
    if (!/^[0-9a-f]{2}$/.test(s)) continue;
    const sd = path.join(dir, s);
    let names: string[];
    try { names = fs.readdirSync(sd); } catch { continue; }
    for (const n of names) {
      const p = path.join(sd, n);
      let st: fs.Stats;
      try { st = fs.statSync(p); } catch { continue; }
      if (!st.isFile()) continue;
      if (n.endsWith(".tmp")) {
        if (now - st.mtimeMs > 3600_000) { try { fs.rmSync(p, { force: true }); removed++; } catch { /* gone */ } }
        continue;
      }
      if (!n.endsWith(".facts")) continue;
      entries.push({ p, size: st.size, t: st.mtimeMs });
      total += st.size;
    }
  }
  if (total <= maxBytes) return { removed, bytes: total };
  entries.sort((a, b) => a.t - b.t);
  const target = maxBytes * 0.8;
  for (const e of entries) {
    if (total <= target) break;
    try { fs.rmSync(e.p, { force: true }); } catch { continue; }
    total -= e.size;
    removed++;
  }
  return { removed, bytes: total };
}
