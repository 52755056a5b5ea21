// Shared by the fuzz suites: the seed and run budget, the corpus (every fixture file), and the
// deterministic mutations of the issue (truncation, byte flips, NUL bytes, invalid UTF-8, CRLF,
// BOM, a 10 MB single line, 10,000-deep nesting).
//
// CI runs a fixed seed with a bounded number of runs; set FERRULE_FUZZ_RUNS=100000 (and optionally
// FERRULE_FUZZ_SEED) for a long run.
import * as fs from "node:fs";
import * as path from "node:path";
import { FIXTURES } from "../helpers/analyze.js";

export const SEED = Number(process.env.FERRULE_FUZZ_SEED ?? 20251202);
/** fast-check runs per property (CI default keeps the whole fuzz suite within a few minutes). */
export const RUNS = Number(process.env.FERRULE_FUZZ_RUNS ?? 40);
export const LONG = RUNS > 1000;
/** A hang guard, not a timing (tests assert no wall-clock time; per-file extraction time is
 * measured by `npm run bench`): one file taking longer than this means the time budget failed. */
export const PER_FILE_MS = 30_000;

export interface CorpusFile {
  /** Path relative to test-fixtures/. */
  rel: string;
  bytes: Buffer;
}

const EXT = /\.(rs|h|hpp|hh|c|cc|cpp|cxx)$/;

/** Every source file under test-fixtures/, sorted (deterministic order). */
export function corpus(): CorpusFile[] {
  const out: CorpusFile[] = [];
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (EXT.test(e.name)) out.push({ rel: path.relative(FIXTURES, p), bytes: fs.readFileSync(p) });
    }
  };
  walk(FIXTURES);
  return out;
}

/** Fixture groups (a folder's files analysed together, like a workspace). */
export function groups(): { dir: string; files: CorpusFile[] }[] {
  const by = new Map<string, CorpusFile[]>();
  for (const f of corpus()) {
    const parts = f.rel.split(path.sep);
    // sonar-demo is one workspace; rules/<case>/<bad|good>/... and buffers/... are one each
    const key = parts[0] === "sonar-demo" ? "sonar-demo" : parts.slice(0, Math.min(parts.length - 1, 3)).join("/");
    const arr = by.get(key) ?? [];
    arr.push(f);
    by.set(key, arr);
  }
  return [...by.entries()].map(([dir, files]) => ({ dir, files }));
}

/** Decodes bytes the way the CLI does (fs.readFileSync(file, "utf8")): invalid sequences become U+FFFD. */
export const utf8 = (b: Buffer): string => b.toString("utf8");

export const mutations = {
  truncate: (b: Buffer, at: number) => b.subarray(0, at),
  flip: (b: Buffer, at: number, mask: number) => {
    const c = Buffer.from(b);
    if (c.length) c[at % c.length] ^= mask || 1;
    return c;
  },
  nul: (b: Buffer, at: number) => Buffer.concat([b.subarray(0, at), Buffer.from([0, 0, 0]), b.subarray(at)]),
  invalidUtf8: (b: Buffer, at: number) => Buffer.concat([b.subarray(0, at), Buffer.from([0xc3, 0x28, 0xff, 0xfe, 0xed, 0xa0, 0x80, 0xf0, 0x28, 0x8c]), b.subarray(at)]),
  crlf: (b: Buffer) => Buffer.from(b.toString("latin1").replace(/\r?\n/g, "\r\n"), "latin1"),
  cr: (b: Buffer) => Buffer.from(b.toString("latin1").replace(/\r?\n/g, "\r"), "latin1"),
  bom: (b: Buffer) => Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), b]),
};

/** A single line of `bytes` bytes of plausible tokens for the language of `ext`. */
export function longLine(ext: string, bytes: number): string {
  const unit = ext === "rs" ? "let a = b + 1; " : "int a = b + 1; ";
  return unit.repeat(Math.ceil(bytes / unit.length)).slice(0, bytes);
}

/** 10,000-deep nesting of the kinds each grammar recurses on. */
export function deepNesting(ext: string, depth = 10_000): string[] {
  if (ext === "rs") {
    return [
      `#[no_mangle]\npub extern "C" fn deep(x: ${"*mut ".repeat(depth)}f32) -> i32 { 0 }\n`,
      `#[no_mangle]\npub extern "C" fn deep2(x: ${"Option<".repeat(depth)}u8${">".repeat(depth)}) {}\n`,
      `fn deep3() -> i32 { ${"(".repeat(depth)}1${")".repeat(depth)} }\n`,
      `fn deep4() { ${"{ ".repeat(depth)}${"} ".repeat(depth)} }\n`,
      `type T = ${"[".repeat(depth)}u8${"; 1]".repeat(depth)};\n`,
    ];
  }
  return [
    `int deep(float ${"*".repeat(depth)}x);\n`,
    `int deep2(void) { return ${"(".repeat(depth)}1${")".repeat(depth)}; }\n`,
    `void deep3(void) { ${"{ ".repeat(depth)}${"} ".repeat(depth)} }\n`,
    `typedef int (${"*(".repeat(depth)}f${")".repeat(depth)})(int);\n`,
    `struct S { ${"struct { ".repeat(depth)}int x; ${"} y; ".repeat(depth)} };\n`,
    `#if 1\n`.repeat(depth) + `int z(int);\n` + `#endif\n`.repeat(depth),
  ];
}

export function extOf(rel: string): string {
  return rel.slice(rel.lastIndexOf(".") + 1);
}
