// A Rust library whose C entry point an Objective-C source declares and calls
// (test-fixtures/project/tide-app, a tide-gauge handheld). ferrule parses no Objective-C; it reads
// the identifiers of `.m`/`.mm` files with the C tokenizer (Objective-C extends C's lexical
// grammar). An export such a file names is reported as info, not as a missing declaration; an
// export nothing names is still a warning. The compilers read the same files: clang on the
// Objective-C source, gcc and g++ on the header, rustc on the crate.
import { describe, expect, test, beforeAll } from "vitest";
import { execFileSync, spawnSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";

const ROOT = path.resolve(__dirname, "..");
const BIN = path.join(ROOT, "bin/ferrule.js");
const APP = path.join(ROOT, "test-fixtures/project/tide-app");

beforeAll(() => {
  if (!fs.existsSync(path.join(ROOT, "dist/cli.js"))) execFileSync(process.execPath, [path.join(ROOT, "scripts/build.mjs")], { cwd: ROOT });
});

function check(dir: string): { file: string; line: number; rule: string; severity: string }[] {
  const r = spawnSync(process.execPath, [BIN, "check", "--format", "json", "."], { cwd: dir, encoding: "utf8", timeout: 120_000 });
  if (!r.stdout) throw new Error(`ferrule printed nothing (exit ${r.status}): ${r.stderr}`);
  return JSON.parse(r.stdout).findings;
}

describe("exports declared in Objective-C sources", () => {
  test("the compilers accept the fixture (clang -x objective-c, gcc, g++, rustc)", () => {
    execFileSync("clang", ["-fsyntax-only", "-x", "objective-c", path.join(APP, "app/AppMain.m")]);
    execFileSync("gcc", ["-fsyntax-only", path.join(APP, "include/tide_gauge.h")]);
    execFileSync("g++", ["-fsyntax-only", "-x", "c++", path.join(APP, "include/tide_gauge.h")]);
    const out = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-objc-"));
    try {
      execFileSync("rustc", ["--crate-type=staticlib", "--emit=metadata", "--out-dir", out, path.join(APP, "src/lib.rs")]);
    } finally {
      fs.rmSync(out, { recursive: true, force: true });
    }
  });
  test("the export the .m file names is info; the export nothing names stays a warning", () => {
    const fs_ = check(APP).filter((f) => f.rule === "export-without-declaration");
    expect(fs_.map((f) => `${f.file}:${f.line} ${f.severity}`).sort()).toEqual(["src/lib.rs:14 warning", "src/lib.rs:8 info"]);
  });
});
