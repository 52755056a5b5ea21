// Compiler oracles for ferrule's tests.
//
// Every function here asks a real compiler a batch of questions in ONE invocation and returns the
// compiler's answers as numbers:
//  - cValuesClang / cxxValuesClang: clang --target=TRIPLE, C11 / C++17, freestanding. The answers
//    are read back from the assembly clang emits for a `const unsigned ferrule_vals[]` array whose
//    initialisers are the questions (integer constant expressions such as `sizeof(long)`).
//  - cValuesGcc: the same through the Debian gcc cross compilers (Linux targets only).
//  - rustValuesHost: rustc for the host (x86_64-unknown-linux-gnu); the program is built and run.
//  - rustLayoutCross: rustc's own layout of Rust primitive types for any of the five targets,
//    read from the LLVM IR of a `#![no_core]` crate (no standard library for those targets is
//    installed, so the crate cannot use core; see the comment on that function).
//
// The assembly/IR readers below read compiler OUTPUT (one data directive per line), not user code,
// so plain line matching is used; ferrule's own parsing of C and Rust goes through tree-sitter.
// Two sentinel values bracket every array, and the number of values must equal the number of
// questions, so a reader that silently misses data fails loudly instead of making a test vacuous.

import { execFileSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import type { Triple } from "../../server/src/model/targets";
import { NO_CORE_LANG_ITEMS } from "../helpers/rust-cross";

export type { Triple };

/** The five targets ferrule models (Rust target triples). */
export const TRIPLES: readonly Triple[] = [
  "x86_64-unknown-linux-gnu",
  "aarch64-unknown-linux-gnu",
  "armv7-unknown-linux-gnueabihf",
  "i686-unknown-linux-gnu",
  "x86_64-pc-windows-msvc",
];

/**
 * Rust triple -> clang --target value. clang accepts all five Rust spellings as they are (checked
 * with Debian clang 14: each one compiles, and the arch test in tests/targets.oracle.test.ts checks
 * that the predefined architecture macros match). Kept as an explicit table so a future target that
 * needs a different spelling has one place to change.
 */
export const CLANG_TRIPLE: Record<Triple, string> = {
  "x86_64-unknown-linux-gnu": "x86_64-unknown-linux-gnu",
  "aarch64-unknown-linux-gnu": "aarch64-unknown-linux-gnu",
  "armv7-unknown-linux-gnueabihf": "armv7-unknown-linux-gnueabihf",
  "i686-unknown-linux-gnu": "i686-unknown-linux-gnu",
  "x86_64-pc-windows-msvc": "x86_64-pc-windows-msvc",
};

/** Rust triple -> Debian gcc driver. Windows has no gcc here (MSVC ABI; mingw is a different ABI). */
export const GCC_FOR: Partial<Record<Triple, string>> = {
  "x86_64-unknown-linux-gnu": "gcc",
  "aarch64-unknown-linux-gnu": "aarch64-linux-gnu-gcc",
  "armv7-unknown-linux-gnueabihf": "arm-linux-gnueabihf-gcc",
  "i686-unknown-linux-gnu": "i686-linux-gnu-gcc",
};

export const HOST_TRIPLE: Triple = "x86_64-unknown-linux-gnu";

/** Tools rustValuesHost needs: rustc, and cc, through which rustc links the host program. */
export const HOST_RUST_TOOLS = ["rustc", "cc"] as const;

export class OracleError extends Error {
  override name = "OracleError";
}

const haveCache = new Map<string, boolean>();

/** True when `tool --version` runs successfully (result cached per tool). */
export function have(tool: string): boolean {
  let ok = haveCache.get(tool);
  if (ok === undefined) {
    try {
      execFileSync(tool, ["--version"], { stdio: "ignore", timeout: 30_000 });
      ok = true;
    } catch {
      ok = false;
    }
    haveCache.set(tool, ok);
  }
  return ok;
}

/**
 * Test gate for a required tool. Returns true when the tool is present. When it is missing:
 * with env CI set, throws (the test FAILS: an oracle test that silently skips in CI checks
 * nothing); locally, calls `skip` with a message naming the tool and how to get it.
 */
export function requireTool(tool: string, skip: (note: string) => void): boolean {
  if (have(tool)) return true;
  const hint =
    tool === "rustc" ? "install a Rust toolchain" : `apt-get install ${APT_PACKAGE[tool] ?? tool}`;
  const msg = `compiler oracle '${tool}' not found on PATH (${hint})`;
  if (process.env.CI) throw new OracleError(`${msg}; CI is set, so this is a failure, not a skip`);
  skip(`${msg}; skipped locally (set CI=1 to make this a failure)`);
  return false;
}

const APT_PACKAGE: Record<string, string> = {
  clang: "clang",
  gcc: "gcc",
  cc: "gcc (rustc links host programs through cc)",
  "i686-linux-gnu-gcc": "gcc-i686-linux-gnu",
  "arm-linux-gnueabihf-gcc": "gcc-arm-linux-gnueabihf",
  "aarch64-linux-gnu-gcc": "gcc-aarch64-linux-gnu",
};

// ---------------------------------------------------------------------------------------------
// Shared plumbing

const SENTINEL_HEAD = 0xfe44a11e;
const SENTINEL_TAIL = 0x5ea1ed00;
const MAX_BUFFER = 256 * 1024 * 1024;

function withTempDir<T>(fn: (dir: string) => T): T {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-oracle-"));
  try {
    return fn(dir);
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

interface Source {
  text: string;
  /** 1-based line of exprs[0]; expression i is on line firstExprLine + i. */
  firstExprLine: number;
}

function buildSource(head: string, exprs: readonly string[], wrap: (e: string) => string, tail: string): Source {
  for (const e of exprs) {
    if (/[\r\n]/.test(e)) throw new OracleError(`oracle expressions must be one line each: ${JSON.stringify(e)}`);
  }
  const headLines = head.split("\n").length; // head ends with "\n", so this is the next line number
  return { text: head + exprs.map((e) => wrap(e) + ",\n").join("") + tail, firstExprLine: headLines };
}

/** Compiler failure message with each diagnosed line mapped back to the question asked on it. */
function describeFailure(tool: string, args: readonly string[], err: unknown, src: Source, exprs: readonly string[], file: string): OracleError {
  const e = err as { stderr?: Buffer | string; status?: number; message?: string };
  const stderr = e.stderr ? e.stderr.toString() : String(e.message ?? err);
  const base = path.basename(file);
  const culprits = new Set<string>();
  const re = new RegExp(`${base.replace(/\./g, "\\.")}:(\\d+):`, "g");
  for (const m of stderr.matchAll(re)) {
    const i = Number(m[1]) - src.firstExprLine;
    if (i >= 0 && i < exprs.length) culprits.add(`  #${i}: ${exprs[i]}`);
  }
  const shown = stderr.length > 4000 ? stderr.slice(0, 4000) + "\n[...]" : stderr;
  return new OracleError(
    `${tool} ${args.join(" ")} failed (exit ${e.status ?? "?"})` +
      (culprits.size ? `\nquestions on the diagnosed lines:\n${[...culprits].slice(0, 20).join("\n")}` : "") +
      `\n${shown}`,
  );
}

/** Is `.word` a 32-bit directive on this target? (Arm: yes; x86 GAS: no, it is 16-bit.) */
function wordIs32(triple: Triple): boolean {
  return triple.startsWith("aarch64") || triple.startsWith("arm");
}

/**
 * Read the 32-bit values emitted after `label:` in clang/gcc assembly.
 * Accepts .long/.int/.4byte (and .word on Arm) with decimal or hex operands, and .zero/.space/.skip
 * runs of zero bytes. Stops at the first line that is not one of those (label, .size, .ident,
 * blank line, section switch). Any other data directive inside the array is an error.
 * Exported for the parser self-test.
 */
export function parseAsmWords(asm: string, label: string, triple: Triple): number[] {
  const lines = asm.split(/\r?\n/);
  const start = lines.findIndex((l) => l.trim() === `${label}:` || l.trim() === `_${label}:`);
  if (start < 0) throw new OracleError(`label '${label}:' not found in the assembly`);
  const out: number[] = [];
  const dir32 = wordIs32(triple) ? /^(long|int|4byte|word)$/ : /^(long|int|4byte)$/;
  for (let i = start + 1; i < lines.length; i++) {
    const m = /^\s*\.([A-Za-z0-9_]+)\s*(.*)$/.exec(lines[i]!);
    if (!m) break; // blank line, next label, or instruction: end of the array
    const [, d, rest] = m as unknown as [string, string, string];
    if (dir32.test(d)) {
      const op = /^(-?(?:0x[0-9a-fA-F]+|\d+))\b/.exec(rest.trim());
      if (!op) throw new OracleError(`unreadable operand in '${lines[i]!.trim()}'`);
      const v = op[1]!.startsWith("-") ? -Number(op[1]!.slice(1)) : Number(op[1]);
      if (!Number.isSafeInteger(v) || v < -0x80000000 || v > 0xffffffff) {
        throw new OracleError(`operand out of 32-bit range in '${lines[i]!.trim()}'`);
      }
      out.push(v >>> 0);
    } else if (/^(zero|space|skip)$/.test(d)) {
      const n = Number(/^(\d+)/.exec(rest.trim())?.[1]);
      if (!Number.isInteger(n) || n % 4 !== 0) throw new OracleError(`unexpected zero run '${lines[i]!.trim()}'`);
      for (let k = 0; k < n / 4; k++) out.push(0);
    } else if (/^(byte|short|hword|value|2byte|word|quad|8byte|xword|dword|ascii|asciz|string)$/.test(d)) {
      throw new OracleError(`unexpected data directive inside ${label}: '${lines[i]!.trim()}'`);
    } else {
      break; // .size, .ident, .section, .globl, ... : end of the array
    }
  }
  return out;
}

function checkSentinels(vals: number[], n: number, who: string): number[] {
  if (vals.length !== n + 2 || vals[0] !== SENTINEL_HEAD || vals[vals.length - 1] !== SENTINEL_TAIL) {
    throw new OracleError(
      `${who}: read ${vals.length} values for ${n} questions (+2 sentinels); ` +
        `head=${vals[0]} tail=${vals[vals.length - 1]}; the output reader is out of step with the compiler`,
    );
  }
  return vals.slice(1, -1);
}

// ---------------------------------------------------------------------------------------------
// C / C++ through clang and gcc

function cArraySource(prelude: string, exprs: readonly string[], cxx: boolean): Source {
  // C++: namespace-scope const has internal linkage and may be dropped; extern "C" keeps the
  // array emitted under its plain name.
  const decl = cxx ? `extern "C" const unsigned ferrule_vals[] = {\n` : `const unsigned ferrule_vals[] = {\n`;
  const head = `${prelude}\n${decl}0x${SENTINEL_HEAD.toString(16)}u,\n`;
  return buildSource(head, exprs, (e) => `(unsigned)(${e})`, `0x${SENTINEL_TAIL.toString(16)}u\n};\n`);
}

function compileToAsm(tool: string, args: string[], triple: Triple, src: Source, exprs: readonly string[], ext: string): number[] {
  if (!have(tool)) throw new OracleError(`compiler oracle '${tool}' not found on PATH`);
  return withTempDir((dir) => {
    const file = path.join(dir, `ferrule_oracle.${ext}`);
    fs.writeFileSync(file, src.text);
    const fullArgs = [...args, "-o", "-", file];
    let asm: string;
    try {
      asm = execFileSync(tool, fullArgs, { maxBuffer: MAX_BUFFER, stdio: ["ignore", "pipe", "pipe"] }).toString();
    } catch (err) {
      throw describeFailure(tool, fullArgs, err, src, exprs, file);
    }
    return checkSentinels(parseAsmWords(asm, "ferrule_vals", triple), exprs.length, `${tool} (${triple})`);
  });
}

/**
 * Evaluate C integer constant expressions with clang for `triple`, in one compiler run.
 * `prelude` is C placed before the array (includes, typedefs, struct definitions).
 * Each value is converted to `unsigned` (so `(char)-1 < 0` gives 0 or 1, sizes are exact).
 */
export function cValuesClang(triple: Triple, prelude: string, exprs: readonly string[]): number[] {
  const args = [`--target=${CLANG_TRIPLE[triple]}`, "-ffreestanding", "-std=c11", "-S"];
  return compileToAsm("clang", args, triple, cArraySource(prelude, exprs, false), exprs, "c");
}

/** Same as cValuesClang, compiled as C++17 (`-x c++ -std=c++17`). */
export function cxxValuesClang(triple: Triple, prelude: string, exprs: readonly string[]): number[] {
  const args = [`--target=${CLANG_TRIPLE[triple]}`, "-x", "c++", "-std=c++17", "-ffreestanding", "-S"];
  return compileToAsm("clang", args, triple, cArraySource(prelude, exprs, true), exprs, "cc");
}

/** Same as cValuesClang, through the Debian gcc for `triple`. Throws for the Windows target. */
export function cValuesGcc(triple: Triple, prelude: string, exprs: readonly string[]): number[] {
  const gcc = GCC_FOR[triple];
  if (!gcc) throw new OracleError(`no gcc oracle for ${triple}: the Debian gcc cross compilers cover the Linux targets only`);
  const args = ["-ffreestanding", "-std=c11", "-S", "-O0"];
  return compileToAsm(gcc, args, triple, cArraySource(prelude, exprs, false), exprs, "c");
}

// ---------------------------------------------------------------------------------------------
// Rust on the host: build and run

/**
 * Evaluate Rust expressions (anything `as usize` accepts: `size_of::<T>()`, `align_of::<T>()`,
 * `offset_of!(S, f)`, `i8::MIN < 0`, ...) by building and running one program with rustc for the
 * host (x86_64-unknown-linux-gnu). `prelude` holds items (`use`, `#[repr(C)] struct`...).
 * `core::mem::{size_of, align_of, offset_of}` are in scope. Needs `cc` on PATH (rustc's linker);
 * tests gate on HOST_RUST_TOOLS.
 */
export function rustValuesHost(prelude: string, exprs: readonly string[]): number[] {
  if (!have("rustc")) throw new OracleError("compiler oracle 'rustc' not found on PATH");
  if (!have("cc")) throw new OracleError("'cc' not found on PATH: rustc needs it to link the host program");
  const head =
    `#![allow(unused, non_camel_case_types, dead_code)]\n` +
    `use core::mem::{size_of, align_of, offset_of};\n${prelude}\n` +
    `fn main() {\n    let v: &[usize] = &[\n${SENTINEL_HEAD},\n`;
  const src = buildSource(head, exprs, (e) => `(${e}) as usize`, `${SENTINEL_TAIL}\n    ];\n    for x in v { println!("{}", x); }\n}\n`);
  return withTempDir((dir) => {
    const file = path.join(dir, "ferrule_oracle.rs");
    const exe = path.join(dir, "ferrule_oracle");
    fs.writeFileSync(file, src.text);
    const args = ["--edition", "2021", "-O", "--crate-name", "ferrule_oracle", "-o", exe, file];
    try {
      execFileSync("rustc", args, { maxBuffer: MAX_BUFFER, stdio: ["ignore", "pipe", "pipe"] });
    } catch (err) {
      throw describeFailure("rustc", args, err, src, exprs, file);
    }
    const out = execFileSync(exe, [], { maxBuffer: MAX_BUFFER }).toString();
    const vals = out.trim().split("\n").map((l) => {
      const b = BigInt(l.trim());
      if (b > BigInt(Number.MAX_SAFE_INTEGER)) throw new OracleError(`rust value ${l} exceeds 2^53`);
      return Number(b);
    });
    return checkSentinels(vals, exprs.length, "rustc (host)");
  });
}

// ---------------------------------------------------------------------------------------------
// Rust on every target: layout from rustc's LLVM IR

export interface RustPrim {
  /** A Rust type that exists without core: a primitive such as `i128`, `f64`, `char`, `usize`. */
  ty: string;
  /** A constant of that type whose bits are all zero (`0`, `0.0`, `false`, `'\0'`). */
  zero: string;
}

export interface Layout {
  size: number;
  /** Offset of the value in `#[repr(C)] struct { u8, T }`: the alignment that governs struct layout. */
  inStructAlign: number;
}

/**
 * rustc's layout of Rust primitive types for `triple` (any of the five), in one rustc run.
 *
 * Only the host's standard library is installed, and rustc cannot build for another target
 * without one, so the crate is `#![no_core]` and defines the handful of lang items rustc needs
 * for statics. That requires RUSTC_BOOTSTRAP=1 (lets a stable rustc accept unstable features);
 * it is set only in this child process. The lang items are compiler internals and change between
 * rustc releases (`pointee_sized`/`meta_sized` are recent): if this function starts failing after
 * a toolchain upgrade, update NO_CORE_PRELUDE rather than dropping the check.
 *
 * For each type T, two statics are emitted: `T` and `#[repr(C)] W<T>(u8, T)`. Their sizes are read
 * from `--emit llvm-ir` (rustc emits statics as byte arrays: `[N x i8]`), and
 * offset(T in W) = size(W) - size(T), valid because a type's size is a multiple of its alignment
 * (Rust Reference, "Type layout": "The size of a value is always a multiple of its alignment").
 */
export function rustLayoutCross(triple: Triple, prims: readonly RustPrim[]): Layout[] {
  if (!have("rustc")) throw new OracleError("compiler oracle 'rustc' not found on PATH");
  let text = NO_CORE_PRELUDE;
  prims.forEach((p, i) => {
    if (/[\r\n]/.test(p.ty + p.zero)) throw new OracleError("one line per type");
    text += `#[no_mangle] pub static FERRULE_T${i}: ${p.ty} = ${p.zero};\n`;
    text += `#[no_mangle] pub static FERRULE_W${i}: W<${p.ty}> = W(0, ${p.zero});\n`;
  });
  return withTempDir((dir) => {
    const file = path.join(dir, "ferrule_layout.rs");
    fs.writeFileSync(file, text);
    const args = ["--target", triple, "--crate-type", "lib", "--emit", "llvm-ir", "-A", "internal_features", "-o", "-", file];
    let ir: string;
    try {
      ir = execFileSync("rustc", args, {
        maxBuffer: MAX_BUFFER,
        stdio: ["ignore", "pipe", "pipe"],
        env: { ...process.env, RUSTC_BOOTSTRAP: "1" },
      }).toString();
    } catch (err) {
      const e = err as { stderr?: Buffer };
      throw new OracleError(
        `rustc --target ${triple} (no_core layout probe) failed; if the error names a lang item, ` +
          `rustc's internals changed: update NO_CORE_PRELUDE in tests/oracles/compilers.ts\n${e.stderr?.toString() ?? err}`,
      );
    }
    const sizes = new Map<string, number>();
    for (const line of ir.split("\n")) {
      const m = /^@(FERRULE_[TW]\d+) = (?:[a-z_]+ )*constant (.*)$/.exec(line);
      if (!m) continue;
      const rest = m[2]!;
      let typeText: string;
      if (rest.startsWith("<{")) typeText = rest.slice(0, rest.indexOf("}>") + 2);
      else if (rest.startsWith("[")) typeText = rest.slice(0, rest.indexOf("]") + 1);
      else throw new OracleError(`unexpected LLVM IR form for @${m[1]}: ${line}`);
      let size = 0;
      for (const part of typeText.matchAll(/\[(\d+) x i8\]/g)) size += Number(part[1]);
      if (!/^(<\{ )?\[\d+ x i8\](, \[\d+ x i8\])*( \}>)?$/.test(typeText)) {
        throw new OracleError(`unexpected LLVM IR type for @${m[1]}: ${typeText}`);
      }
      sizes.set(m[1]!, size);
    }
    return prims.map((p, i) => {
      const t = sizes.get(`FERRULE_T${i}`);
      const w = sizes.get(`FERRULE_W${i}`);
      if (t === undefined || w === undefined) throw new OracleError(`no static emitted for ${p.ty} on ${triple}`);
      return { size: t, inStructAlign: w - t };
    });
  });
}

const NO_CORE_PRELUDE = `#![feature(no_core, lang_items, auto_traits)]
#![no_core]
#![allow(internal_features, non_camel_case_types)]
${NO_CORE_LANG_ITEMS}#[repr(C)] pub struct W<T>(u8, T);
`;
