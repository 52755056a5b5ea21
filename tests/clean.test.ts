// The false-positive probe: test-fixtures/clean/lightning-frontend is written the way a careful
// team writes the seam (a shared types header, Rust mirrors without the C library prefix, an
// opaque handle owned through std::unique_ptr with a deleter, a capacity parameter for an output
// buffer). ferrule must report nothing there, and the outside check that the code is in fact
// right is the toolchain itself: rustc builds the kernels as a staticlib, g++ builds the blocks
// and a driver that runs them, and Valgrind memcheck (--leak-check=full) must find no error.
// Below, the patterns the probe first flagged (three false positives, fixed) are pinned next to
// the slips the same rules must still report.
import { describe, expect, it } from "vitest";
import { execFileSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { analyze, at, FIXTURES } from "./helpers/analyze.js";
import { expectNoFindings, have, memcheck } from "./helpers/clean.js";
import { mirrorNames } from "../server/src/model/boundary.js";

const DIR = path.join(FIXTURES, "clean", "lightning-frontend");
const TOOLS = have("rustc") && have("g++") && have("valgrind");

const DRIVER = `#include <complex>
#include <cstdio>
#include <vector>
#include "lfe/block.h"
#include "lfe/lfe_kernels.h"

block *make_calibrate_block(const lfe_station_cal &cal, size_t station);
block *make_baseband_block(float phase_inc);
block *make_strike_block(float threshold, uint32_t holdoff, size_t max_strikes);

int main() {
    const int n = 256;
    std::vector<std::complex<float>> iq(n);
    for (int i = 100; i < 104; i++) iq[i] = {3.0f, -1.0f}; // one discharge
    std::vector<lfe_cf32> calibrated(n);
    std::vector<float> env(n);
    std::vector<lfe_strike> strikes(n);
    const lfe_station_cal cal = {1.5, 10, 1, {0, 10, 20, 30, 40, 50, 60, 70}};
    block *c = make_calibrate_block(cal, 2);
    block *b = make_baseband_block(0.1f);
    block *s = make_strike_block(1.0f, 16, 8);
    const void *in0[] = {iq.data()};
    void *out0[] = {calibrated.data()};
    const void *in1[] = {calibrated.data()};
    void *out1[] = {env.data()};
    const void *in2[] = {env.data()};
    void *out2[] = {strikes.data()};
    int ok = c->work(n, in0, out0) == n && b->work(n, in1, out1) == n;
    int found = s->work(n, in2, out2);
    std::printf("strikes %d, first at %llu ns\\n", found, found ? (unsigned long long)strikes[0].t_ns : 0ULL);
    delete c;
    delete b;
    delete s;
    return ok && found == 1 ? 0 : 3;
}
`;

describe("clean workspace: lightning-frontend", () => {
  it("ferrule reports nothing, in-process and through the shipped CLI (exit 0, the aid-not-proof line)", async () => {
    await expectNoFindings("lightning-frontend");
  });

  it.skipIf(!TOOLS)("the code is right: rustc + g++ build it, and it runs clean under Valgrind memcheck", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-clean-"));
    try {
      const lib = path.join(dir, "liblfe.a");
      execFileSync("rustc", ["--edition=2021", "--crate-type", "staticlib", "-C", "panic=abort", "-g", "-o", lib, path.join(DIR, "kernels", "src", "lib.rs")], { stdio: "pipe" });
      fs.writeFileSync(path.join(dir, "driver.cc"), DRIVER);
      const exe = path.join(dir, "run");
      const blocks = fs.readdirSync(path.join(DIR, "blocks")).map((f) => path.join(DIR, "blocks", f));
      execFileSync("g++", ["-std=c++17", "-Wall", "-Werror", "-g", "-O0", "-I", path.join(DIR, "include"), "-o", exe, path.join(dir, "driver.cc"), ...blocks, lib, "-lpthread", "-ldl", "-lm"], { stdio: "pipe" });
      const r = memcheck(exe);
      expect(r.stderr).toBe("");
      expect(r.stdout).toMatch(/strikes 1, first at 101000 ns/);
      expect(r.status).toBe(0);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);
});

describe("what the probe first flagged, next to the slips the same rules still report", () => {
  it("mirror names: the C library prefix and `_t` may be dropped on the Rust side (common practice)", () => {
    expect(mirrorNames("Strike", "lfe_strike")).toBe(true);
    expect(mirrorNames("StationCal", "lfe_station_cal")).toBe(true);
    expect(mirrorNames("Cf32", "lfe_cf32_t")).toBe(true);
    expect(mirrorNames("Config", "LFE_CONFIG")).toBe(true);
    expect(mirrorNames("LfeStrike", "lfe_strike")).toBe(true);
    expect(mirrorNames("Strike", "lfe_gate_cfg")).toBe(false);
    expect(mirrorNames("Cal", "lfe_station_cal_x")).toBe(false);
  });

  const header = (param: string) => `#include <stdint.h>
typedef struct lfe_strike { uint64_t t_ns; float energy; uint32_t mask; } lfe_strike;
typedef struct lfe_gate_cfg { uint64_t hold_ns; float level; uint32_t flags; } lfe_gate_cfg;
void lfe_store(${param});
`;
  const rust = `#[repr(C)]
pub struct Strike { pub t_ns: u64, pub energy: f32, pub mask: u32 }
#[no_mangle]
pub extern "C" fn lfe_store(s: *const Strike) { let _ = s; }
`;

  it("a mirror named without the C prefix is the same type; an unrelated struct of the same size is still reported", async () => {
    const clean = await analyze({ "k.h": header("const lfe_strike *s"), "k.rs": rust });
    expect(at(clean.findings, "param-type-mismatch")).toEqual([]);
    const slip = await analyze({ "k.h": header("const lfe_gate_cfg *s"), "k.rs": rust });
    expect(at(slip.findings, "param-type-mismatch")).toEqual(["k.h:4"]);
    const f = slip.findings.find((x) => x.rule === "param-type-mismatch")!;
    expect(f.message).toContain("`Strike` in Rust but `lfe_gate_cfg` in C (same size, different types)");
    expect(f.severity).toBe("warning");
  });

  const trig = (sliceLen: string, cap = "max_out") => ({
    "t.h": `#include <stddef.h>
size_t lfe_run(const float *env, size_t n, float *out, size_t ${cap});
`,
    "t.rs": `#[no_mangle]
pub unsafe extern "C" fn lfe_run(env: *const f32, n: usize, out: *mut f32, ${cap}: usize) -> usize {
    let e = std::slice::from_raw_parts(env, n);
    let o = std::slice::from_raw_parts_mut(out, ${sliceLen});
    let mut k = 0usize;
    for (d, s) in o.iter_mut().zip(e.iter()) { *d = *s; k = k.saturating_add(1); }
    k
}
`,
  });

  it("an output capacity (`max_out`) is the length of `out`; slicing `out` with the input's length is still reported", async () => {
    const clean = await analyze(trig("max_out"));
    expect(at(clean.findings, "slice-length-mismatch")).toEqual([]);
    // a name no convention reads as a count: the body's own pairing is not another buffer's length
    const room = await analyze(trig("room", "room"));
    expect(at(room.findings, "slice-length-mismatch")).toEqual([]);
    const slip = await analyze(trig("n"));
    expect(at(slip.findings, "slice-length-mismatch")).toEqual(["t.rs:4"]);
    expect(slip.findings.find((x) => x.rule === "slice-length-mismatch")!.message).toContain("`n` is the length of `env`");
  });
});

describe("messages say what the slip is", () => {
  const iq = (len: string) => ({
    "iq.h": `#include <stddef.h>
#include <stdint.h>
/* ferrule-buffers: iq[2*n] */
float xc_iq_power(const int16_t *iq, size_t n);
`,
    "iq.rs": `#[no_mangle]
pub unsafe extern "C" fn xc_iq_power(iq: *const i16, n: usize) -> f32 {
    let s = std::slice::from_raw_parts(iq, ${len});
    s.iter().map(|&v| f32::from(v) * f32::from(v)).sum()
}
`,
  });

  it("a slice of `n` int16 items where the contract says `2*n` is a wrong length, not bytes taken for items (2 is also the item size)", async () => {
    const { findings } = await analyze(iq("n"));
    expect(findings.map((f) => `${f.rule} ${f.range.file.split("/").pop()}:${f.range.line + 1}`)).toEqual(["slice-length-mismatch iq.rs:3"]);
    expect(findings[0]!.message).toContain("slice over `iq` has length `n`, but the contract says");
    // the real unit slip keeps its message: an item count divided by the item size
    const unit = await analyze(iq("2 * n / std::mem::size_of::<i16>()"));
    const buf = unit.findings.filter((f) => f.rule !== "panic-across-c-abi"); // (`2 * n` may overflow there)
    expect(buf.map((f) => f.rule)).toEqual(["length-unit-mismatch"]);
    expect(buf[0]!.message).toContain("divides an item count by the item size as if it were bytes");
    expect((await analyze(iq("2 * n"))).findings).toEqual([]);
  });
});
