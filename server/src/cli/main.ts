// The command line: `ferrule check`, `ferrule layout`, `ferrule lsp --stdio`. A thin adapter over
// analysis/ and rules/: it reads arguments and files, prints, and sets the exit code.
//   exit 0: clean (no finding at error severity); 1: findings at error severity; 2: usage/config error.

import * as fs from "node:fs";
import * as path from "node:path";
import { parseArgs as nodeParseArgs } from "node:util";
import { pathToFileURL } from "node:url";
import { Workspace } from "../analysis/workspace.js";
import { bundleScript } from "../analysis/parallel.js";
import { CONFIG_FILE, ConfigError, DEFAULTS, parseConfigText, type FerruleConfig } from "../analysis/config.js";
import { ALL_TRIPLES, parseTriple, type Triple } from "../model/targets.js";
import { allRules } from "../rules/index.js";
import { formatJson, formatSarif, formatText, toJsonFinding, type JsonFinding } from "./format.js";
import { formatLayoutText, layoutTypes } from "./layout-cmd.js";
import { makeBaseline, newSince, readBaseline } from "./baseline.js";
import { readSmallRegularFile, UnsafeFileError } from "../analysis/textio.js";
import { setRunDeadline } from "../extract/index.js";
import { findProjectRoot } from "../analysis/project.js";
import { codeId, defaultCacheDir, insideAny } from "../analysis/facts-cache.js";

import pkg from "../../../package.json";

/** The version of the package (package.json), printed by `--version`. */
export const VERSION: string = pkg.version;

class UsageError extends Error {}

type Level = "error" | "warning" | "note";

const USAGE = `ferrule ${VERSION} — checks the C ABI seam between Rust and C/C++

usage:
  ferrule check [--format text|json|sarif] [--target TRIPLE]... [--config FILE] [--show-fixes]
                [--baseline FILE [--update-baseline]] [--fail-on error|warning|note]
                [--fail-on-skip] [--cache-dir DIR | --no-cache] [PATH...]
  ferrule layout [--target TRIPLE]... [--format json|text] PATH...
  ferrule lsp --stdio
  ferrule --version
  ferrule COMMAND --help

targets: ${ALL_TRIPLES.join(", ")} (also: x86_64, aarch64, armv7, i686, x86_64-windows)
facts cache: unchanged files are not read again; default folder $XDG_CACHE_HOME/ferrule or
  ~/.cache/ferrule (%LOCALAPPDATA%\\ferrule\\cache on Windows; FERRULE_CACHE_DIR overrides it)
exit codes: 0 clean, 1 findings at or above --fail-on (default: error), 2 usage or configuration error
colours: text output is coloured on a terminal; NO_COLOR (any value) turns colours off, FORCE_COLOR=1 on
`;

const HELPS: Record<string, string> = {
  check: `usage: ferrule check [OPTIONS] [PATH...]

Reads the Rust and C/C++ files under each PATH (default: the current folder) without building
them and reports slips at the seam between them.

options:
  --format text|json|sarif   output: gcc-style lines (default), JSON version 1, or SARIF 2.1.0
  --target TRIPLE            check for this target (repeatable; default: the targets in
                             .ferrule.toml, else ferrule's default set)
  --config FILE              use this .ferrule.toml instead of the nearest one above PATH
  --show-fixes               print the edits of each finding's quick-fix (text, JSON and SARIF)
  --baseline FILE            report only findings not in FILE (a baseline written earlier)
  --update-baseline          write every current finding to the --baseline FILE and report none
  --fail-on error|warning|note
                             lowest severity that makes the run exit 1 (default: error)
  --fail-on-skip             exit 1 when a file was not read (size, time, or an error)
  --cache-dir DIR            folder of the facts cache (default: $XDG_CACHE_HOME/ferrule or ~/.cache/ferrule)
  --no-cache                 read every file; write no cache
  -h, --help                 this text

exit codes: 0 nothing at or above --fail-on, 1 findings at or above it, 2 usage or configuration error
targets: ${ALL_TRIPLES.join(", ")}
`,
  layout: `usage: ferrule layout [OPTIONS] PATH...

Prints the size, alignment and field offsets ferrule computes for each #[repr(C)] struct and
C struct under PATH, per target.

options:
  --format text|json   output (default: text)
  --target TRIPLE      target to lay out for (repeatable)
  -h, --help           this text
`,
  lsp: `usage: ferrule lsp --stdio

Runs the language server over standard input and output (Language Server Protocol).

options:
  --stdio        talk LSP over stdin/stdout (required)
  -h, --help     this text
`,
};

interface Opts {
  cmd: string;
  format: string;
  targets: Triple[];
  paths: string[];
  config?: string;
  showFixes: boolean;
  stdio: boolean;
  /** --fail-on-skip: a file skipped for size, time or an error fails the run (exit 1). */
  failOnSkip: boolean;
  /** --fail-on: the lowest severity that fails the run. */
  failOn: Level;
  baseline?: string;
  updateBaseline: boolean;
  /** --cache-dir DIR: the facts cache's folder; --no-cache: none. */
  cacheDir?: string;
  noCache: boolean;
  /** set by --help / --version: the text to print, exit 0. */
  print?: string;
}

const OPTIONS = {
  format: { type: "string" },
  target: { type: "string", multiple: true },
  config: { type: "string" },
  "show-fixes": { type: "boolean" },
  baseline: { type: "string" },
  "update-baseline": { type: "boolean" },
  "fail-on": { type: "string" },
  "fail-on-skip": { type: "boolean" },
  "cache-dir": { type: "string" },
  "no-cache": { type: "boolean" },
  stdio: { type: "boolean" },
  help: { type: "boolean", short: "h" },
  // options language clients add when they start a server (vscode-languageclient appends
  // --clientProcessId=N); vscode-languageserver reads them from argv itself
  clientProcessId: { type: "string" },
  "node-ipc": { type: "boolean" },
} as const;

const ALLOWED: Record<string, string[]> = {
  check: ["format", "target", "config", "show-fixes", "baseline", "update-baseline", "fail-on", "fail-on-skip", "cache-dir", "no-cache", "help"],
  layout: ["format", "target", "cache-dir", "no-cache", "help"],
  lsp: ["stdio", "help", "clientProcessId", "node-ipc"],
};

function parseArgs(argv: string[]): Opts {
  const [cmd, ...rest] = argv;
  if (cmd === "--version" || cmd === "-V") return { ...blank("version"), print: `ferrule ${VERSION}\n` };
  if (!cmd) throw new UsageError("");
  if (cmd === "--help" || cmd === "-h" || cmd === "help") return { ...blank("help"), print: USAGE };
  if (!["check", "layout", "lsp"].includes(cmd)) throw new UsageError(`unknown command \`${cmd}\` (expected check, layout or lsp)`);
  let parsed;
  try {
    parsed = nodeParseArgs({ args: rest, options: OPTIONS, allowPositionals: true, strict: true });
  } catch (e) {
    // node's messages name the option; keep them on one line
    const m = /Unknown option '([^']+)'/.exec((e as Error).message);
    throw new UsageError(m ? `unknown option \`${m[1]}\` (see ferrule ${cmd} --help)` : (e as Error).message.split("\n")[0]!);
  }
  const v = parsed.values as Record<string, unknown>;
  for (const k of Object.keys(v)) {
    if (!ALLOWED[cmd]!.includes(k)) throw new UsageError(`unknown option \`--${k}\` for ${cmd} (see ferrule ${cmd} --help)`);
  }
  const o: Opts = blank(cmd);
  if (v.help) return { ...o, print: HELPS[cmd] };
  if (v.format !== undefined) {
    const f = String(v.format);
    const ok = cmd === "layout" ? ["json", "text"] : ["text", "json", "sarif"];
    if (!ok.includes(f)) throw new UsageError(`unknown format \`${f}\` (expected ${ok.join(", ")})`);
    o.format = f;
  }
  for (const t of (v.target as string[] | undefined) ?? []) {
    const tr = parseTriple(t);
    if (!tr) throw new UsageError(`unknown target \`${t}\` (known: ${ALL_TRIPLES.join(", ")})`);
    if (!o.targets.includes(tr)) o.targets.push(tr);
  }
  if (v["fail-on"] !== undefined) {
    const f = String(v["fail-on"]);
    if (f !== "error" && f !== "warning" && f !== "note") throw new UsageError(`unknown --fail-on level \`${f}\` (expected error, warning or note)`);
    o.failOn = f;
  }
  if (typeof v.config === "string") o.config = v.config;
  if (typeof v.baseline === "string") o.baseline = v.baseline;
  o.showFixes = !!v["show-fixes"];
  o.updateBaseline = !!v["update-baseline"];
  o.failOnSkip = !!v["fail-on-skip"];
  if (typeof v["cache-dir"] === "string") o.cacheDir = v["cache-dir"];
  o.noCache = !!v["no-cache"];
  o.stdio = !!v.stdio || !!v["node-ipc"];
  o.paths = parsed.positionals;
  if (cmd === "lsp" && !o.stdio) throw new UsageError("lsp needs --stdio");
  if (o.updateBaseline && !o.baseline) throw new UsageError("--update-baseline needs --baseline FILE");
  if (o.noCache && o.cacheDir !== undefined) throw new UsageError("--cache-dir and --no-cache exclude each other");
  return o;
}

function blank(cmd: string): Opts {
  return { cmd, format: "text", targets: [], paths: [], showFixes: false, stdio: false, failOnSkip: false, failOn: "error", updateBaseline: false, noCache: false };
}

/** Colours on stdout: NO_COLOR (non-empty) turns them off, FORCE_COLOR (not 0/false) turns them on (https://no-color.org, common practice). */
export function useColor(isTTY: boolean, env: NodeJS.ProcessEnv = process.env): boolean {
  if (env.NO_COLOR) return false;
  const force = env.FORCE_COLOR;
  if (force !== undefined && force !== "") return force !== "0" && force !== "false";
  return isTTY;
}

const RANK: Record<string, number> = { error: 3, warning: 2, info: 1, hint: 1 };
const LEVEL_RANK: Record<Level, number> = { error: 3, warning: 2, note: 1 };

function findConfig(paths: string[], cwd: string): string | undefined {
  const starts = paths.length ? paths.map((p) => path.resolve(cwd, p)) : [cwd];
  for (const s of starts) {
    let dir = fs.existsSync(s) && fs.statSync(s).isDirectory() ? s : path.dirname(s);
    for (let i = 0; i < 40; i++) {
      const c = path.join(dir, CONFIG_FILE);
      if (fs.existsSync(c)) return c;
      const up = path.dirname(dir);
      if (up === dir) break;
      dir = up;
    }
  }
  return undefined;
}

export function loadConfig(file: string | undefined, cwd: string, named = false): FerruleConfig {
  if (!file) return DEFAULTS;
  const shown = path.relative(cwd, file) || file;
  let text: string;
  try {
    // a committed config may be a pipe, a device or a link out of the project: read it only when
    // it is a small regular file (a link only within the folder it configures, unless the user
    // named it with --config)
    text = readSmallRegularFile(file, { root: named ? undefined : path.dirname(file) });
  } catch (e) {
    if (e instanceof UnsafeFileError) throw new ConfigError(shown, "", e.message);
    throw new ConfigError(shown, "", `cannot read: ${(e as NodeJS.ErrnoException).code}`);
  }
  const cfg = parseConfigText(text, shown);
  // include paths are relative to the config file's folder; a config the repository holds (found
  // by walking up, not named with --config) may not point ferrule outside its own folder
  const home = path.dirname(path.resolve(file));
  cfg.includePaths = cfg.includePaths.map((p) => path.resolve(home, p));
  if (!named) {
    for (const p of cfg.includePaths) {
      const rel = path.relative(home, p);
      if (rel.startsWith("..") || path.isAbsolute(rel)) {
        throw new ConfigError(shown, "include_paths", `\`${p}\` is outside the project folder ${home}; a repository's own config cannot make ferrule read there (name the file with --config, or set the editor's ferrule.includePaths, to allow it)`);
      }
    }
  }
  return cfg;
}

export interface RunIO {
  cwd: string;
  stdout: (s: string) => void;
  stderr: (s: string) => void;
  /** stdout is a terminal (colours). */
  isTTY: boolean;
  /** stderr is a terminal (progress line); defaults to isTTY. */
  stderrTTY?: boolean;
}

export async function run(argv: string[], io: RunIO): Promise<number> {
  let o: Opts;
  try {
    o = parseArgs(argv);
  } catch (e) {
    if (e instanceof UsageError) {
      if (e.message) {
        io.stderr(`ferrule: ${e.message}\n`);
        return 2;
      }
      io.stdout(USAGE);
      return 2;
    }
    throw e;
  }
  if (o.print !== undefined) {
    io.stdout(o.print);
    return 0;
  }
  if (o.cmd === "lsp") {
    const { startServer } = await import("../lsp/server.js");
    startServer();
    return -1; // keeps running
  }
  const paths = o.paths.length ? o.paths : ["."];
  for (const p of paths) {
    if (!fs.existsSync(path.resolve(io.cwd, p))) {
      io.stderr(`ferrule: no such file or folder: ${p}\n`);
      return 2;
    }
  }
  let cfg: FerruleConfig;
  try {
    const cfgFile = o.config ? path.resolve(io.cwd, o.config) : findConfig(paths, io.cwd);
    cfg = loadConfig(cfgFile, io.cwd, !!o.config);
  } catch (e) {
    if (e instanceof ConfigError) {
      io.stderr(`ferrule: configuration error: ${e.message}\n`);
      return 2;
    }
    throw e;
  }
  if (o.targets.length) cfg = { ...cfg, targets: o.targets };
  // (no grammars loaded here: reading happens on worker threads for large checks, and
  // loadFiles loads them in this thread when it reads here; ~70 MB of RSS saved with workers)
  const ws = new Workspace(cfg);
  const progress = (io.stderrTTY ?? io.isTTY)
    ? (n: number, total: number) => io.stderr(`\rferrule: reading ${n}/${total} files…`)
    : undefined;
  // FERRULE_TIMINGS=1: phase times on stderr (for the benchmark and for users asking "why slow").
  const timings = process.env.FERRULE_TIMINGS === "1";
  let t0 = performance.now();
  const phase = (name: string) => {
    if (!timings) return;
    const t = performance.now();
    io.stderr(`ferrule: timing ${name} ${(t - t0).toFixed(0)} ms, heap ${(process.memoryUsage().heapUsed / 2 ** 20).toFixed(0)} MiB, rss ${(process.memoryUsage().rss / 2 ** 20).toFixed(0)} MiB\n`);
    t0 = t;
  };
  const roots = paths.map((p) => path.resolve(io.cwd, p));
  // the facts cache (analysis/facts-cache.ts): never inside the checked repository
  const cacheDir = o.noCache ? undefined : o.cacheDir !== undefined ? path.resolve(io.cwd, o.cacheDir) : defaultCacheDir();
  if (cacheDir) {
    const repo = roots.map((r) => findProjectRoot(r) ?? r);
    if (insideAny(cacheDir, [...roots, ...repo])) io.stderr(`ferrule: the facts cache ${cacheDir} lies inside the checked folder; not used (pass --cache-dir elsewhere, or --no-cache)\n`);
    else ws.cacheAt = { dir: cacheDir, code: codeId(VERSION, bundleScript()), maxBytes: cfg.cacheMaxMb * 2 ** 20 };
  }
  if (o.cmd === "layout") {
    await ws.loadAllAsync(roots, progress, { script: bundleScript() });
    if (progress) io.stderr("\r\x1b[K");
    phase("read+extract");
    if (o.format === "json") io.stdout(JSON.stringify({ version: 1, types: layoutTypes(ws.model(), io.cwd) }, null, 2) + "\n");
    else io.stdout(formatLayoutText(ws.model(), io.cwd));
    return 0;
  }

  // `check` reads the workspace in chunks of related files (analysis/chunks.ts): the findings are
  // those of one model of everything, with one chunk's facts in memory at a time.
  const chunkFiles = Number(process.env.FERRULE_CHUNK_FILES) || undefined;
  setRunDeadline(Date.now() + cfg.maxTotalSeconds * 1000);
  // the project root (.ferrule.toml, Cargo workspace, compile_commands.json): a sub-folder is
  // read with its project, and only its own findings are reported
  const projectRoot = roots.length === 1 ? findProjectRoot(roots[0]!) : undefined;
  const res = await ws.checkChunked(roots, { script: bundleScript(), chunkFiles, withFixes: o.showFixes, onProgress: progress, onPhase: phase, root: projectRoot });
  if (progress) io.stderr("\r\x1b[K");
  phase(`check (${res.files} files in ${res.chunks} chunk(s), largest ${res.largestChunk}; facts cache ${ws.cacheAt ? `${ws.cacheCounts.hits} hit(s), ${ws.cacheCounts.misses} read` : "off"})`);
  let json: JsonFinding[] = res.findings.map((f) => {
    const j = toJsonFinding(f, io.cwd);
    const fx = res.fixes.get(f);
    if (fx) {
      j.fixes = fx.map((x) => ({
        title: x.title,
        edits: x.edits.map((e) => ({ file: toJsonFinding({ ...f, range: e.range, related: [] }, io.cwd).file, line: e.range.line + 1, column: e.range.col + 1, endLine: e.range.endLine + 1, endColumn: e.range.endCol + 1, newText: e.newText })),
      }));
    }
    return j;
  });
  let baselined = 0;
  if (o.baseline) {
    const file = path.resolve(io.cwd, o.baseline);
    if (!o.updateBaseline && !fs.existsSync(file)) {
      // a mistyped path must not turn into a fresh baseline that hides every finding
      io.stderr(`ferrule: baseline ${o.baseline}: no such file (to create it, run once with --update-baseline)\n`);
      return 2;
    }
    if (o.updateBaseline) {
      // The only file `check` ever writes, and only where the user named it.
      fs.writeFileSync(file, JSON.stringify(makeBaseline(json), null, 2) + "\n");
      io.stderr(`ferrule: wrote baseline of ${json.length} finding(s) to ${o.baseline}\n`);
      baselined = json.length;
      json = [];
    } else {
      let base;
      try {
        base = readBaseline(file);
      } catch (e) {
        io.stderr(`ferrule: baseline ${o.baseline}: ${(e as Error).message}\n`);
        return 2;
      }
      const fresh = newSince(json, base);
      baselined = json.length - fresh.length;
      json = fresh;
    }
  }
  // files not read (size, time, errors): listed, and with --fail-on-skip they fail the run
  const skipped = json.filter((f) => f.rule === "file-skipped" && f.message.startsWith("skipped:"));
  if (skipped.length && o.format === "text") {
    io.stderr(`ferrule: ${skipped.length} file(s) not read (their findings are missing): ${skipped.slice(0, 10).map((f) => f.file).join(", ")}${skipped.length > 10 ? ", …" : ""}\n`);
  }
  phase("findings");
  const exitCode = json.some((f) => RANK[f.severity]! >= LEVEL_RANK[o.failOn]) || (o.failOnSkip && skipped.length > 0) ? 1 : 0;
  if (o.format === "json") io.stdout(formatJson(json));
  else if (o.format === "sarif") {
    const lines = new Map<string, string[] | undefined>();
    const lineText = (file: string, line: number) => {
      if (!lines.has(file)) {
        let text: string[] | undefined;
        try {
          // a file this run has read already (its findings' file), again as a small regular file
          text = readSmallRegularFile(path.resolve(io.cwd, file), { limit: 64 * 2 ** 20 }).split(/\r?\n/);
        } catch {
          text = undefined;
        }
        lines.set(file, text);
      }
      return lines.get(file)?.[line - 1];
    };
    const suppressed = res.suppressed.map((s) => ({ finding: toJsonFinding(s.finding, io.cwd), reason: s.reason }));
    io.stdout(formatSarif(json, allRules(), { version: VERSION, rootUri: pathToFileURL(io.cwd).href, homepage: pkg.homepage, exitCode, lineText, suppressed }));
  } else io.stdout(formatText(json, useColor(io.isTTY)) + (baselined ? `(${baselined} finding(s) in the baseline not shown)\n` : ""));
  return exitCode;
}

export async function main(): Promise<void> {
  try {
    const code = await run(process.argv.slice(2), {
      cwd: process.cwd(),
      stdout: (s) => process.stdout.write(s),
      stderr: (s) => process.stderr.write(s),
      isTTY: !!process.stdout.isTTY,
      stderrTTY: !!process.stderr.isTTY,
    });
    if (code >= 0) process.exitCode = code;
  } catch (e) {
    process.stderr.write(`ferrule: internal error: ${(e as Error).stack ?? e}\n`);
    process.exitCode = 2;
  }
}

