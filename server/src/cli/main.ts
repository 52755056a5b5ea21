// The command line: `ferrule check`, `ferrule layout`, `ferrule lsp --stdio`. A thin adapter over
// analysis/ and rules/: it reads arguments and files, prints, and sets the exit code.
//   exit 0: clean (no finding at error severity); 1: findings at error severity; 2: usage/config error.

import * as fs from "node:fs";
import * as path from "node:path";
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

export const VERSION = "0.1.0";

class UsageError extends Error {}

const HELP = `ferrule ${VERSION} — checks the C ABI seam between Rust and C/C++

usage:
  ferrule check [--format text|json|sarif] [--target TRIPLE]... [--config FILE] [--show-fixes]
                [--baseline FILE [--update-baseline]] [--fail-on-skip] [PATH...]
  ferrule layout [--target TRIPLE]... [--format json|text] PATH...
  ferrule lsp --stdio
  ferrule --version

targets: ${ALL_TRIPLES.join(", ")} (also: x86_64, aarch64, armv7, i686, x86_64-windows)
exit codes: 0 clean, 1 findings at error severity, 2 usage or configuration error
`;

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
  baseline?: string;
  updateBaseline: boolean;
}

function parseArgs(argv: string[]): Opts {
  const [cmd, ...rest] = argv;
  if (!cmd || cmd === "--help" || cmd === "-h" || cmd === "help") throw new UsageError("");
  if (!["check", "layout", "lsp"].includes(cmd)) throw new UsageError(`unknown command \`${cmd}\` (expected check, layout or lsp)`);
  const o: Opts = { cmd, format: cmd === "layout" ? "text" : "text", targets: [], paths: [], showFixes: false, stdio: false, failOnSkip: false, updateBaseline: false };
  for (let i = 0; i < rest.length; i++) {
    const a = rest[i]!;
    const val = (): string => {
      const eq = a.indexOf("=");
      if (eq > 0) return a.slice(eq + 1);
      const v = rest[++i];
      if (v === undefined) throw new UsageError(`${a} needs a value`);
      return v;
    };
    const flag = a.split("=")[0];
    if (flag === "--format") {
      const v = val();
      const ok = cmd === "layout" ? ["json", "text"] : ["text", "json", "sarif"];
      if (!ok.includes(v)) throw new UsageError(`unknown format \`${v}\` (expected ${ok.join(", ")})`);
      o.format = v;
    } else if (flag === "--target") {
      const v = val();
      const t = parseTriple(v);
      if (!t) throw new UsageError(`unknown target \`${v}\` (known: ${ALL_TRIPLES.join(", ")})`);
      if (!o.targets.includes(t)) o.targets.push(t);
    } else if (flag === "--config") o.config = val();
    else if (flag === "--show-fixes") o.showFixes = true;
    else if (flag === "--baseline") o.baseline = val();
    else if (flag === "--update-baseline") o.updateBaseline = true;
    else if (flag === "--fail-on-skip") o.failOnSkip = true;
    else if (flag === "--stdio") o.stdio = true;
    // Options language clients add when they start a server (vscode-languageclient appends
    // --clientProcessId=N); vscode-languageserver reads them from argv itself.
    else if (cmd === "lsp" && (flag === "--clientProcessId" || flag === "--node-ipc")) {
      if (flag === "--node-ipc") o.stdio = true;
    }
    else if (a === "--help" || a === "-h") throw new UsageError("");
    else if (a.startsWith("-")) throw new UsageError(`unknown option \`${a}\``);
    else o.paths.push(a);
  }
  if (cmd === "lsp" && !o.stdio) throw new UsageError("lsp needs --stdio");
  if (o.updateBaseline && !o.baseline) throw new UsageError("--update-baseline needs --baseline FILE");
  return o;
}

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
  // include paths are relative to the config file's folder
  cfg.includePaths = cfg.includePaths.map((p) => path.resolve(path.dirname(file), p));
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
    if (argv[0] === "--version" || argv[0] === "-V" || argv[0] === "version") {
      io.stdout(`ferrule ${VERSION}\n`);
      return 0;
    }
    o = parseArgs(argv);
  } catch (e) {
    if (e instanceof UsageError) {
      if (e.message) {
        io.stderr(`ferrule: ${e.message}\n`);
        return 2;
      }
      io.stdout(HELP);
      return argv.length ? 0 : 2;
    }
    throw e;
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
  phase(`check (${res.files} files in ${res.chunks} chunk(s), largest ${res.largestChunk})`);
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
  if (o.format === "json") io.stdout(formatJson(json));
  else if (o.format === "sarif") io.stdout(formatSarif(json, allRules(), VERSION, pathToFileURL(io.cwd).href));
  else io.stdout(formatText(json, useColor(io.isTTY)) + (baselined ? `(${baselined} finding(s) in the baseline not shown)\n` : ""));
  return json.some((f) => f.severity === "error") || (o.failOnSkip && skipped.length > 0) ? 1 : 0;
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

/** Colour on a terminal; `NO_COLOR` (any value) turns it off and `FORCE_COLOR` (not "0") turns
 * it on, the common conventions of command-line tools. */
export function useColor(tty: boolean, env: NodeJS.ProcessEnv = process.env): boolean {
  if (env.NO_COLOR !== undefined && env.NO_COLOR !== "") return false;
  if (env.FORCE_COLOR !== undefined && env.FORCE_COLOR !== "0" && env.FORCE_COLOR !== "false") return true;
  return tty;
}
