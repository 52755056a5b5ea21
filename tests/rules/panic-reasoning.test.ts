// panic-across-c-abi reasoning about values (issue 15, point 1): a bad and a good fixture per
// shape under test-fixtures/ownership/panic-across-c-abi/{values,dispatch} (hydrophone and lidar
// scenarios of our own). Bad fixtures give the finding at its line with its severity: explicit
// panics on values C hands over (a C string conversion, `unreachable!` on C's mode, an assert a
// C value reaches) are warnings; an index or an integer overflow no guard rules out is info. Good
// fixtures give no panic finding at all. rustc shows the behaviour the rule reasons about: built
// with debug assertions and `-C panic=abort`, the good kernels run clean on the edge inputs that
// make the bad ones abort.
import { describe, expect, it } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { execFileSync, spawnSync } from "node:child_process";
import { analyze } from "../helpers/analyze.js";
import { have } from "../oracles/compilers.js";
import type { Finding } from "../../server/src/rules/api.js";

const ROOT = path.resolve(__dirname, "../../test-fixtures/ownership/panic-across-c-abi");
const RULE = "panic-across-c-abi";

async function run(dir: string): Promise<Finding[]> {
  const text = fs.readFileSync(path.join(ROOT, dir, "lib.rs"), "utf8");
  const { findings } = await analyze({ "lib.rs": text });
  return findings.filter((f) => f.rule === RULE);
}

const lines = (fs_: Finding[]) => fs_.map((f) => `${f.range.line + 1} ${f.severity}`).sort((a, b) => parseInt(a) - parseInt(b));
const show = (fs_: Finding[]) => fs_.map((f) => `${f.range.line + 1} ${f.severity} ${f.message}`).join("\n");

describe("panic-across-c-abi: values", () => {
  it("bad: C string unwrap, unreachable! on C's mode and a helper's assert C's value reaches warn; an unguarded index and overflows are info", async () => {
    const f = await run("values/bad");
    expect(lines(f), show(f)).toEqual(["11 warning", "20 warning", "27 info", "33 info", "39 info", "51 warning"]);
    expect(f.find((x) => x.range.line + 1 === 51)!.message).toContain("`hyd_frame_count` → `frame_count`");
    expect(f.find((x) => x.range.line + 1 === 33)!.message).toMatch(/overflow checks are on/);
  });

  it("good: early returns, loop bounds, masked and %-bounded indices, a % ring, saturating/checked arithmetic, widening, debug_assert!, constant asserts, an exhaustive masked match, a guarded unwrap, a fixed-length try_into and a helper's assert the caller's guard satisfies give nothing", async () => {
    const f = await run("values/good");
    expect(f, show(f)).toEqual([]);
  });
});

describe("panic-across-c-abi: calls resolved by receiver type, and catching helpers", () => {
  it("bad: the crate's own `Frame::push` asserting on C's value, and a closure handed to a helper that does not catch", async () => {
    const f = await run("dispatch/bad");
    expect(lines(f), show(f)).toEqual(["30 warning", "37 warning"]);
    expect(f.find((x) => x.range.line + 1 === 30)!.message).toContain("`lid_add_range` → `push`");
  });

  it("good: `Vec::push` and `Vec<u8>`'s `io::Write::write` are not the crate's `push`/`write`; a closure run by a catch_unwind helper is protected", async () => {
    const f = await run("dispatch/good");
    expect(f, show(f)).toEqual([]);
  });
});

// Integer overflow and indexing panic as the Rust Reference says ("Overflow"; "Array and slice
// indexing expressions"); with panic=abort the process ends with a non-zero status.
describe.skipIf(!have("rustc"))("rustc agrees on the edge inputs", () => {
  const build = (dir: string, main: string) => {
    const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-panic-"));
    const src = path.join(tmp, "k.rs");
    fs.writeFileSync(src, `${fs.readFileSync(path.join(ROOT, dir, "lib.rs"), "utf8")}\n#[allow(unused_unsafe)]\nfn main() {\n    let which: usize = std::env::args().nth(1).unwrap().parse().unwrap();\n${main}\n}\n`);
    const exe = path.join(tmp, "k");
    execFileSync("rustc", ["--edition=2021", "-C", "debug-assertions=on", "-C", "overflow-checks=on", "-C", "panic=abort", "-A", "warnings", "-o", exe, src], { stdio: "pipe" });
    return { tmp, exe, run: (i: number) => spawnSync(exe, [String(i)], { encoding: "utf8" }) };
  };

  it("the bad kernels abort on n = 0, a mode of 7, an index of 8, a hop of 0, a non-UTF-8 label", () => {
    const k = build("values/bad", `    let bytes = [0xffu8, 0];
    unsafe {
        match which {
            0 => { hyd_last_index(0); }
            1 => { hyd_pair_index(1); }
            2 => { hyd_mode_gain(7); }
            3 => { hyd_tap(8); }
            4 => { hyd_frame_count(10, 0); }
            _ => { hyd_label_len(bytes.as_ptr() as *const core::ffi::c_char); }
        }
    }`);
    try {
      const why = [/subtract with overflow/, /subtract with overflow/, /unreachable/, /index out of bounds/, /hop > 0/, /Utf8Error/];
      for (let i = 0; i < 6; i++) {
        const r = k.run(i);
        expect(r.status, `case ${i}`).not.toBe(0);
        expect(r.stderr).toMatch(why[i]!);
      }
    } finally {
      fs.rmSync(k.tmp, { recursive: true, force: true });
    }
  }, 120_000);

  it("the good kernels run clean on the same edge inputs", () => {
    const k = build("values/good", `    let bytes = [0xffu8, 0];
    let one = [1.5f32];
    let ring = [1.0f32, 3.0, 2.0];
    let header = [1u8, 0, 0, 0, 9, 9, 9, 9];
    unsafe {
        let v = match which {
            0 => hyd_swing(one.as_ptr(), 1) + hyd_swing(one.as_ptr(), 0) + hyd_energy(one.as_ptr(), 1),
            1 => hyd_tap(usize::MAX, true) + hyd_tap(usize::MAX, false),
            2 => hyd_ring_peak(ring.as_ptr(), 3, usize::MAX, 10) + hyd_ring_peak(ring.as_ptr(), 0, 5, 5),
            3 => hyd_frames(0, 1, u32::MAX) as f32 + hyd_gain(u32::MAX) + hyd_frame_count(10, 0) as f32,
            _ => (hyd_label_len(bytes.as_ptr() as *const core::ffi::c_char) + hyd_label_len(std::ptr::null())) as f32 + hyd_serial(header.as_ptr()) as f32,
        };
        println!("{v}");
    }`);
    try {
      for (let i = 0; i < 5; i++) {
        const r = k.run(i);
        expect(r.status, `case ${i}: ${r.stderr}`).toBe(0);
      }
    } finally {
      fs.rmSync(k.tmp, { recursive: true, force: true });
    }
  }, 120_000);
});

// Issue 15, point 5: a Rust enum in a field of a struct C fills is advice (the mirror rules compare
// the enums themselves); a C integer passed straight into a Rust enum parameter stays a warning.
describe("enum-from-c-int: a field of a struct C fills is info", () => {
  const files = (rust: string) => ({
    "h.h": `#include <stdint.h>
enum hyd_band { HYD_BAND_LOW = 0, HYD_BAND_HIGH = 1 };
struct hyd_cfg { enum hyd_band band; uint32_t gain; };
int32_t hyd_read_cfg(struct hyd_cfg *out);
void hyd_set_band(enum hyd_band band);
`,
    "h.rs": rust,
  });
  it("the field C fills is reported at info; the parameter at warning", async () => {
    const { findings } = await analyze(files(`#[repr(C)] #[derive(Clone, Copy)] pub enum HydBand { Low = 0, High = 1 }
#[repr(C)] pub struct HydCfg { pub band: HydBand, pub gain: u32 }
extern "C" { fn hyd_read_cfg(out: *mut HydCfg) -> i32; }
#[no_mangle] pub extern "C" fn hyd_set_band(band: HydBand) { let _ = band; }
`));
    const e = findings.filter((f) => f.rule === "enum-from-c-int").map((f) => `${f.range.file.replace(/^\/ws\//, "")}:${f.range.line + 1} ${f.severity}`).sort();
    expect(e).toEqual(["h.rs:2 info", "h.rs:4 warning"]);
  });
});
