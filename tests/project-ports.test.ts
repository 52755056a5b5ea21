// A C original beside its Rust port (test-fixtures/project/quake-port): patterns first seen on
// public repositories that keep both (measured in docs/real-code.md), in a scenario of our own.
// The good tree gives nothing at error/warning; its twin with planted slips gives exactly them.
//
// Each clean pattern and the source that makes it clean:
// - fuzz/*.c each define `LLVMFuzzerTestOneInput` — libFuzzer's entry point, one program per
//   fuzz target (common practice), so not a duplicate definition;
// - tools/replay is its own program (main.c) with its own copy of a library function;
// - csrc/legacy_v1.c calls its own `static` `quake_picker_run` (C11 6.2.2p3: internal linkage),
//   not the API function of that name, and its `typedef uint32_t quake_bin` is local to that
//   translation unit (C11 6.2.1p4: file scope), so the header's `uint16_t` one is what the API uses;
// - `QuakeMode` is a `#[repr(transparent)]` u32 newtype for the C enum (Rust Reference, "Type
//   layout": transparent has the layout of its one field; a C enum with these values is
//   int-sized on every target here — System V psABI and AAPCS);
// - `QuakeThresholdTag` mirrors `typedef struct QuakeThresholdTag {…} QuakeThreshold` (one type,
//   two names, C11 6.7.2.3 / 6.7.8);
// - the Rust port's own `QuakePicker` state against the C original's `struct quake_picker_s`,
//   which the header leaves opaque: each implementation's private state;
// - quake.h has a second extern "C" section under a build option;
// - csrc/picker_internal.h keeps a prototype nothing defines or calls, in a header whose other
//   functions C defines: a stale declaration, reported as info (the link only fails once
//   something calls it). The same in the Rust crate's API header stays a warning (bad twin).
// The compilers read the same files: gcc -fsyntax-only on every C file, g++ on the header,
// rustc on the crate.
import { describe, expect, test, beforeAll } from "vitest";
import { execFileSync, spawnSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";

const ROOT = path.resolve(__dirname, "..");
const BIN = path.join(ROOT, "bin/ferrule.js");
const GOOD = path.join(ROOT, "test-fixtures/project/quake-port");
const BAD = path.join(ROOT, "test-fixtures/project/quake-port-bad");

beforeAll(() => {
  if (!fs.existsSync(path.join(ROOT, "dist/cli.js"))) execFileSync(process.execPath, [path.join(ROOT, "scripts/build.mjs")], { cwd: ROOT });
});

function check(dir: string): string[] {
  const r = spawnSync(process.execPath, [BIN, "check", "--format", "json", "."], { cwd: dir, encoding: "utf8", timeout: 120_000 });
  if (!r.stdout) throw new Error(`ferrule printed nothing (exit ${r.status}): ${r.stderr}`);
  return JSON.parse(r.stdout).findings
    .filter((f: { severity: string }) => f.severity === "error" || f.severity === "warning")
    .map((f: { file: string; line: number; rule: string }) => `${f.file}:${f.line} ${f.rule}`)
    .sort();
}

function cFiles(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (p.endsWith(".c")) out.push(p);
    }
  };
  walk(dir);
  return out;
}

describe("a C original beside its Rust port", () => {
  test("both trees are valid C and Rust (gcc, g++, rustc)", () => {
    for (const dir of [GOOD, BAD]) {
      for (const f of cFiles(dir)) execFileSync("gcc", ["-std=c11", "-fsyntax-only", f]);
      execFileSync("g++", ["-fsyntax-only", "-x", "c++", path.join(dir, "include/quake.h")]);
      execFileSync("rustc", ["--edition", "2021", "--crate-type", "lib", "--emit=metadata", "-o", path.join(os.tmpdir(), `quake-${process.pid}.rmeta`), path.join(dir, "src/lib.rs")]);
    }
  });

  test("good: no finding at error or warning; the C original's stale prototype is info", () => {
    expect(check(GOOD)).toEqual([]);
    const r = spawnSync(process.execPath, [BIN, "check", "--format", "json", "."], { cwd: GOOD, encoding: "utf8", timeout: 120_000 });
    const infos = JSON.parse(r.stdout).findings.filter((f: { severity: string }) => f.severity === "info").map((f: { file: string; line: number; rule: string }) => `${f.file}:${f.line} ${f.rule}`);
    expect(infos).toContain("csrc/picker_internal.h:8 declaration-without-definition");
  });

  test("bad: exactly the planted slips", () => {
    expect(check(BAD)).toEqual([
      "csrc/picker_simd.c:6 duplicate-symbol", // two C backends in one library folder
      "fuzz/fuzz_run.c:9 item-size-mismatch", // a u32 histogram cast to the API's u16 bins
      "include/quake.h:25 param-type-mismatch", // the newtype is u8, the C enum int-sized
      "include/quake.h:29 declaration-without-definition", // the Rust crate's API header promises it
      "src/lib.rs:18 mirror-layout-mismatch", // `on: f64` where C has float
      "src/lib.rs:8 mirror-enum-mismatch",
    ]);
  });
});
