// The second false-positive probe: test-fixtures/clean/radio-correlator, a radio-telescope
// correlator whose C++ stream blocks call Rust kernels. It leans on C++ block code, buffers and
// handle ownership: int16 I/Q ports (2*n shorts), vector ports of nchan items, a kernel that takes
// a byte count, in-place processing the header allows, std::complex<float> buffers reinterpreted
// as a C {re, im} struct, three opaque handles owned by a move-only RAII class, a unique_ptr with
// the release function as deleter and a shared_ptr with it, borrowed handles, one handle passed to
// another kernel, and a callback with a user pointer. ferrule must report nothing, and the outside
// check that the code is right is the toolchain: rustc builds the kernels as a staticlib (a debug
// build: integer overflow panics, and panic=abort turns that into a crash), gcc builds the C99
// self-test, g++ -Wall -Wextra -Werror builds the blocks and the driver in tools/, and Valgrind
// memcheck (--leak-check=full) must find no error while the driver runs the chain, moves the
// accumulator between owners and releases NULL handles.
// Below, the patterns the probe first flagged (three false positives, fixed) are pinned next to
// the slips of the same shape that the same rules must still report.
import { describe, expect, it } from "vitest";
import { execFileSync, spawnSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { analyze, at, FIXTURES } from "./helpers/analyze.js";
import { expectNoFindings, have, memcheck } from "./helpers/clean.js";

const DIR = path.join(FIXTURES, "clean", "radio-correlator");
const TOOLS = have("rustc") && have("gcc") && have("g++") && have("valgrind");

describe("clean workspace: radio-correlator", () => {
  it("ferrule reports nothing, in-process and through the shipped CLI (exit 0, the aid-not-proof line)", async () => {
    await expectNoFindings("radio-correlator");
  });

  it.skipIf(!TOOLS)("the code is right: rustc, gcc and g++ build it, and it runs clean under Valgrind memcheck", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-correlator-"));
    try {
      const lib = path.join(dir, "libxc.a");
      // no -O: a debug build keeps overflow checks on (rustc -C overflow-checks defaults to debug-assertions)
      execFileSync("rustc", ["--edition=2021", "--crate-type", "staticlib", "-C", "panic=abort", "-g", "-o", lib, path.join(DIR, "kernels", "src", "lib.rs")], { stdio: "pipe" });
      const selftest = path.join(dir, "selftest.o");
      execFileSync("gcc", ["-std=c11", "-Wall", "-Wextra", "-Werror", "-g", "-c", "-o", selftest, path.join(DIR, "tools", "window_selftest.c")], { stdio: "pipe" });
      const exe = path.join(dir, "run");
      const blocks = fs.readdirSync(path.join(DIR, "blocks")).filter((f) => f.endsWith(".cc")).map((f) => path.join(DIR, "blocks", f));
      expect(blocks.length).toBe(4);
      execFileSync("g++", ["-std=c++17", "-Wall", "-Wextra", "-Werror", "-g", "-O0", "-o", exe, path.join(DIR, "tools", "driver.cc"), ...blocks, selftest, lib, "-lpthread", "-ldl", "-lm"], { stdio: "pipe" });
      const r = memcheck(exe);
      expect(r.stderr).toBe("");
      // channel 3 carries 24000/32768 full scale on I and Q: |x|^2 = 2 * 0.7324^2 = 1.0729, times the
      // gain 2, averaged over 4 spectra of which the delay line (one spectrum) zeroes the first
      expect(r.stdout).toBe("avg[3] 1.6093 avg[0] 0.0002515 flagged 1 checksum b8a2d274 window 1\n");
      expect(r.status).toBe(0);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);
});

describe("what the probe first flagged, next to the slips the same rules still report", () => {
  const header = `#include <stddef.h>
typedef struct xc_meter xc_meter;
xc_meter *xc_meter_new(size_t nchan);
void xc_meter_free(xc_meter *m);
`;
  const lib = (free: string) => ({
    "m.h": header,
    "m.rs": `pub struct Meter { nchan: usize }
#[no_mangle]
pub extern "C" fn xc_meter_new(nchan: usize) -> *mut Meter { Box::into_raw(Box::new(Meter { nchan })) }
#[no_mangle]
pub unsafe extern "C" fn xc_meter_free(m: *mut Meter) {
${free}
}
`,
  });

  // core::ptr::NonNull::new returns None for a null pointer and Some of the same pointer otherwise
  // (Rust std docs), so `nn.as_ptr()` is the parameter, checked for NULL. The driver in the
  // fixture releases NULL through such a function under Valgrind.
  it("a release through `NonNull::new(p)` (if let, let-else) takes the handle back and checks NULL", async () => {
    for (const free of [
      "    if let Some(nn) = std::ptr::NonNull::new(m) { drop(Box::from_raw(nn.as_ptr())); }",
      "    let Some(nn) = std::ptr::NonNull::new(m) else { return };\n    drop(Box::from_raw(nn.as_ptr()));",
    ]) {
      const { findings } = await analyze(lib(free));
      expect(at(findings, "handle-no-release")).toEqual([]);
      expect(at(findings, "release-without-null-check")).toEqual([]);
      expect(at(findings, "release-kind-mismatch")).toEqual([]);
    }
  });

  it("a `_free` that only wraps the handle in NonNull, or frees it unchecked, is still reported", async () => {
    const none = await analyze(lib("    if let Some(nn) = std::ptr::NonNull::new(m) { let _ = nn; }"));
    expect(at(none.findings, "handle-no-release")).toEqual(["m.rs:3"]);
    const unchecked = await analyze(lib("    drop(Box::from_raw(m));"));
    expect(at(unchecked.findings, "release-without-null-check")).toEqual(["m.rs:6"]);
    expect(at(unchecked.findings, "handle-no-release")).toEqual([]);
  });

  const kernel = (body: string) => ({
    "k.h": `#include <stddef.h>
/* ferrule-buffers: spec[n*nchan] */
float xc_sum(const float *spec, size_t n, size_t nchan);
`,
    "k.rs": `#[no_mangle]
pub unsafe extern "C" fn xc_sum(spec: *const f32, n: usize, nchan: usize) -> f32 {
    if spec.is_null() { return 0.0; }
${body}
}
`,
  });

  // core::slice::from_raw_parts (Safety): len * size_of::<T>() must not exceed isize::MAX, so for a
  // caller whose buffer really holds n * nchan items the product does not overflow.
  it("a product of names as a slice length (`n * nchan`, `2 * n`) is not an overflow that can panic", async () => {
    const { findings } = await analyze(kernel("    std::slice::from_raw_parts(spec, n * nchan).iter().sum()"));
    expect(at(findings, "panic-across-c-abi")).toEqual([]);
    const twice = await analyze(kernel("    std::slice::from_raw_parts(spec, (2 * n) * nchan).iter().sum()"));
    expect(at(twice.findings, "panic-across-c-abi")).toEqual([]);
  });

  it("the same product outside a slice length, or a sum as the length, is still reported", async () => {
    const loose = await analyze(kernel("    let total = n * nchan;\n    std::slice::from_raw_parts(spec, total).iter().sum()"));
    expect(at(loose.findings, "panic-across-c-abi")).toEqual(["k.rs:4"]);
    expect(loose.findings.find((f) => f.rule === "panic-across-c-abi")!.related.map((r) => r.message)).toEqual(["can panic: n * nchan"]);
    const plus = await analyze(kernel("    std::slice::from_raw_parts(spec, n * nchan + 1).iter().sum()"));
    expect(plus.findings.find((f) => f.rule === "panic-across-c-abi")!.related.map((r) => r.message)).toEqual(["can panic: n * nchan"]);
  });

  const window = (expr: string) => kernel(`    let d = ${expr};\n    std::slice::from_raw_parts(spec, n).iter().sum::<f32>() / d as f32`);

  // Integer overflow panics in debug builds (Rust Reference, "Arithmetic and logical binary
  // operators" / "Overflow"); under `if n > 1` the subtraction `n - 1` cannot wrap. The rustc test
  // below runs both shapes with n = 1.
  it("a subtraction under an `if` that bounds it (`if n > 1 { n - 1 }`, `if a >= b { a - b }`) cannot underflow", async () => {
    for (const expr of ["if n > 1 { n - 1 } else { 1 }", "if 2 <= n { n - 2 } else { 1 }", "if n != 0 && nchan > 0 { n - 1 } else { 1 }", "if n >= nchan { n - nchan } else { 1 }"]) {
      const { findings } = await analyze(window(expr));
      expect(at(findings, "panic-across-c-abi"), expr).toEqual([]);
    }
  });

  it("a subtraction the `if` does not bound (weaker guard, else branch, other name, `||`) is still reported", async () => {
    for (const expr of ["if n > 0 { n - 2 } else { 1 }", "if n > 1 { 1 } else { n - 1 }", "if nchan > 1 { n - 1 } else { 1 }", "if n > 1 || nchan > 1 { n - 1 } else { 1 }", "if n >= nchan { nchan - n } else { 1 }"]) {
      const { findings } = await analyze(window(expr));
      expect(at(findings, "panic-across-c-abi"), expr).toEqual(["k.rs:4"]);
    }
  });

  it.skipIf(!have("rustc"))("rustc agrees: with n = 1 the guarded `n - 1` runs, the unguarded `n - 2` panics in a debug build", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-guard-"));
    try {
      const run = (expr: string) => {
        const src = path.join(dir, "g.rs");
        fs.writeFileSync(src, `fn d(n: usize) -> usize { ${expr} }\nfn main() { let n = std::env::args().count(); println!("{}", d(n)); }\n`);
        const exe = path.join(dir, "g");
        execFileSync("rustc", ["--edition=2021", "-C", "debug-assertions=on", "-o", exe, src], { stdio: "pipe" });
        return spawnSync(exe, [], { encoding: "utf8" }); // no arguments: n = 1
      };
      const guarded = run("if n > 1 { n - 1 } else { 1 }");
      expect(guarded.status).toBe(0);
      expect(guarded.stdout).toBe("1\n");
      const weak = run("if n > 0 { n - 2 } else { 1 }");
      expect(weak.status).not.toBe(0);
      expect(weak.stderr).toMatch(/attempt to subtract with overflow/);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }, 60_000);
});
