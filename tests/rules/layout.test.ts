import { describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { execFileSync } from "node:child_process";
import { analyze, at, checkDir, FIXTURES } from "../helpers/analyze.js";
import { rustValuesCross } from "../helpers/rust-cross";
import type { Triple } from "../../server/src/model/targets";

function haveTool(tool: string): boolean {
  try { execFileSync("which", [tool], { stdio: "pipe" }); return true; } catch { return false; }
}

// Facts behind the per-target expectations (each checked against clang/gcc in
// tests/targets.oracle.test.ts and tests/layout.oracle.test.ts):
//  - long is 4 bytes on armv7 (AAPCS, ILP32), i686 (System V i386 psABI, ILP32) and
//    x86_64-windows (Microsoft x64, LLP64); 8 bytes on x86_64 and aarch64 (LP64).
//  - 8-byte integers are 4-aligned inside structs on i686 only (System V i386 psABI Table 2.1);
//    AAPCS aligns them to 8 (so armv7 agrees with the 64-bit targets there).
//  - C enums are int-sized on all five targets; #[repr(u8)] is 1 byte (Rust Reference, "Type layout").

const ARMV7 = "armv7-unknown-linux-gnueabihf";
const I686 = "i686-unknown-linux-gnu";
const WIN = "x86_64-pc-windows-msvc";

describe("layout family: mirror-layout-mismatch", () => {
  test("bad fixture: each mirror reports its first differing field at the Rust field's line", async () => {
    const { lines, findings } = await checkDir("layout/mirror-layout-mismatch/bad");
    expect(lines.sort()).toEqual([
      "lib.rs:8 mirror-layout-mismatch", // i64 vs long
      "lib.rs:14 mirror-layout-mismatch", // fields swapped
      "lib.rs:21 mirror-layout-mismatch", // C is packed, Rust is not
      "lib.rs:26 mirror-layout-mismatch", // C is aligned(64), Rust is not
      "lib.rs:34 mirror-layout-mismatch", // [f32; 15] vs float[16]
      "lib.rs:39 mirror-layout-mismatch", // ferrule-mirror comment; Rust lacks a field
    ].sort());
    const at = (l: number) => findings.find((f) => f.range.line === l - 1)!;
    // c_long vs i64: exactly the targets where long is 4 bytes
    expect(at(8).targets).toEqual([ARMV7, I686, WIN]);
    expect(at(8).message).toContain("field 3 `timestamp_us`");
    expect(at(8).message).toContain("Rust offset 8 (8 bytes), C offset 8 (4 bytes)");
    expect(at(8).message).toContain("(on armv7, i686, x86_64-windows only)");
    expect(at(8).related[0]!.range.file).toMatch(/correlator\.h$/);
    expect(at(8).related[0]!.range.line + 1).toBe(10);
    // swapped fields: every target, with the reorder hint
    expect(at(14).targets).toBeUndefined();
    expect(at(14).message).toContain("fields in a different order?");
    // packed missing in Rust: both offsets, per target (i686 aligns u64 to 4)
    expect(at(21).message).toContain("Rust offset 8 (8 bytes), C offset 1 (8 bytes) on x86_64, aarch64, armv7, x86_64-windows");
    expect(at(21).message).toContain("Rust offset 4 (8 bytes), C offset 1 (8 bytes) on i686");
    expect(at(26).message).toContain("Rust 8 bytes aligned to 4, C 64 bytes aligned to 64");
    expect(at(34).message).toContain("array of 15 in Rust but 16 in C");
    expect(at(39).message).toContain("`overruns` exists only in C");
    // the signature family does not repeat the same size difference at the prototypes
    expect(lines.filter((l) => l.includes("param-type-mismatch"))).toEqual([]);
  });

  test("good fixture: c_long, same order, packed, align(64), right array length → nothing", async () => {
    const { lines } = await checkDir("layout/mirror-layout-mismatch/good");
    expect(lines).toEqual([]);
  });

  test("--target x86_64 alone: the c_long slip is gone, the others stay", async () => {
    const { lines } = await checkDir("layout/mirror-layout-mismatch/bad", { targets: ["x86_64-unknown-linux-gnu"] });
    expect(lines).not.toContain("lib.rs:8 mirror-layout-mismatch");
    expect(lines).toContain("lib.rs:14 mirror-layout-mismatch");
  });

  test("a u64 after a u32: C pins it with aligned(8), the Rust mirror does not → i686 only", async () => {
    const { findings } = await analyze({
      "pkt.h": "#include <stdint.h>\nstruct seis_pkt { uint32_t station; uint64_t t_ns __attribute__((aligned(8))); };\n",
      "lib.rs": "#[repr(C)]\npub struct SeisPkt {\n    pub station: u32,\n    pub t_ns: u64,\n}\n",
    });
    const f = findings.filter((x) => x.rule === "mirror-layout-mismatch");
    expect(f).toHaveLength(1);
    expect(f[0]!.range.line + 1).toBe(4);
    expect(f[0]!.targets).toEqual([I686]);
    expect(f[0]!.message).toContain("Rust offset 4 (8 bytes), C offset 8 (8 bytes)");
  });

  test("[layout.mirrors] in the configuration pairs differently named types", async () => {
    const files = {
      "a.h": "struct tlm_block { int count; float level; };\n",
      "a.rs": "#[repr(C)]\npub struct TelemetryBlock {\n    pub count: i32,\n    pub level: f64,\n}\n",
    };
    const none = await analyze(files);
    expect(none.findings.filter((x) => x.rule === "mirror-layout-mismatch")).toEqual([]);
    const { findings } = await analyze(files, { families: { layout: { mirrors: { TelemetryBlock: "tlm_block" } } } });
    const f = findings.filter((x) => x.rule === "mirror-layout-mismatch");
    expect(f.map((x) => x.range.line + 1)).toEqual([4]);
    expect(f[0]!.related[0]!.message).toContain("[layout.mirrors]");
  });

  test("nested mirrors pair up through fields; typedef'd C names match", async () => {
    const { findings } = await analyze({
      "n.h": "#include <stdint.h>\ntypedef struct { uint16_t id; uint16_t gain; } hydro_ch_t;\ntypedef struct hydro_frame { uint32_t n; hydro_ch_t ch[4]; } hydro_frame_t;\nvoid hydro_put(const hydro_frame_t *f);\n",
      "n.rs": "#[repr(C)]\npub struct HydroCh {\n    pub id: u16,\n    pub gain: u32,\n}\n#[repr(C)]\npub struct HydroFrame {\n    pub n: u32,\n    pub ch: [HydroCh; 4],\n}\n#[no_mangle]\npub unsafe extern \"C\" fn hydro_put(f: *const HydroFrame) {}\n",
    });
    const lines = findings.filter((x) => x.rule === "mirror-layout-mismatch").map((x) => x.range.line + 1).sort();
    // HydroCh.gain (line 4) and HydroFrame.ch (line 9, 32 vs 16 bytes)
    expect(lines).toEqual([4, 9]);
  });
});

describe("layout family: mirror-not-repr-c", () => {
  test("bad: a struct passed by pointer to C, whose C side has a body, without #[repr(C)]", async () => {
    const { lines } = await checkDir("layout/mirror-not-repr-c/bad");
    expect(lines).toEqual(["lib.rs:4 mirror-not-repr-c"]);
  });
  test("good: #[repr(C)]; a Rust-only state behind an opaque C handle needs none", async () => {
    const { lines } = await checkDir("layout/mirror-not-repr-c/good");
    expect(lines).toEqual([]);
  });
});

describe("layout family: enums", () => {
  test("bad: a value differs, repr(u8) vs int-sized C enum, a C value Rust lacks; C ints into Rust enums", async () => {
    const { lines, findings } = await checkDir("layout/mirror-enum-mismatch/bad");
    expect(lines.sort()).toEqual([
      "lib.rs:11 mirror-enum-mismatch",
      "lib.rs:18 enum-from-c-int",
      "lib.rs:18 mirror-layout-mismatch",
      "lib.rs:23 mirror-enum-mismatch",
      "lib.rs:29 enum-from-c-int",
      "lib.rs:6 mirror-enum-mismatch",
    ]);
    const m = (l: number, r: string) => findings.find((f) => f.range.line === l - 1 && f.rule === r)!;
    expect(m(6, "mirror-enum-mismatch").message).toContain("`LightningMode::Armed` = 2 in Rust");
    expect(m(6, "mirror-enum-mismatch").message).toContain("`LM_ARMED`, is 1");
    expect(m(11, "mirror-enum-mismatch").message).toContain("1 byte in Rust but 4 bytes in C");
    expect(m(23, "mirror-enum-mismatch").message).toContain("`SK_UNKNOWN` = 3");
  });
  test("good: same values and sizes; the enum arrives as an integer", async () => {
    const { lines } = await checkDir("layout/mirror-enum-mismatch/good");
    expect(lines).toEqual([]);
  });
  test("enum-from-c-int bad: exported parameter and imported return", async () => {
    const { lines, findings } = await checkDir("layout/enum-from-c-int/bad");
    expect(lines.sort()).toEqual(["lib.rs:12 enum-from-c-int", "lib.rs:17 enum-from-c-int"]);
    expect(findings[0]!.message).toContain("any value other than 0, 1, 2 is undefined behaviour");
  });
  test("enum-from-c-int good: received as i32 and converted", async () => {
    const { lines } = await checkDir("layout/enum-from-c-int/good");
    expect(lines).toEqual([]);
  });
});

describe("layout family: layout-assert-fails", () => {
  test("bad: asserts written for x86_64; Rust and C agree with each other, the asserts fail on i686 only", async () => {
    const { lines, findings } = await checkDir("layout/layout-assert-fails/bad");
    expect(lines.sort()).toEqual([
      "lib.rs:11 layout-assert-fails",
      "lib.rs:12 layout-assert-fails",
      "seismic.h:15 layout-assert-fails",
      "seismic.h:16 layout-assert-fails",
      "seismic.h:17 layout-assert-fails",
      "seismic.h:18 layout-assert-fails",
    ]);
    // no mirror finding: SeisPkt and seis_pkt agree on every target
    expect(lines.some((l) => l.includes("mirror-"))).toBe(false);
    const at = (file: string, l: number) => findings.find((f) => f.range.file.endsWith(file) && f.range.line === l - 1)!;
    // size_of / offset_of! (Rust) and sizeof / offsetof (C): the u64 after a u32 is at 4 on i686
    for (const [file, l] of [["lib.rs", 11], ["lib.rs", 12], ["seismic.h", 15], ["seismic.h", 16]] as const) {
      expect(at(file, l).targets).toEqual([I686]);
    }
    expect(at("lib.rs", 12).message).toContain("`offset_of!(SeisPkt, t_ns) == 8` does not hold on i686: offset_of!(SeisPkt, t_ns) is 4 there (it holds on x86_64, aarch64, armv7, x86_64-windows)");
    expect(at("seismic.h", 15).message).toContain("is 12");
    // a struct with a long and sizeof(long) itself: the ILP32 and LLP64 targets
    expect(at("seismic.h", 17).targets).toEqual([ARMV7, I686, WIN]);
    expect(at("seismic.h", 18).targets).toEqual([ARMV7, I686, WIN]);
  });
  test("good: explicit padding and alignment; asserts hold on every target", async () => {
    const { lines } = await checkDir("layout/layout-assert-fails/good");
    expect(lines).toEqual([]);
  });
  test("C++ static_assert with offsetof and no message, alignof, std::complex", async () => {
    const { findings } = await analyze({
      "c.hpp": "#include <complex>\n#include <cstddef>\nstruct iq_pair { std::complex<float> a; double b; };\nstatic_assert(sizeof(iq_pair) == 16);\nstatic_assert(offsetof(iq_pair, b) == 8);\nstatic_assert(alignof(iq_pair) == 8, \"8\");\n",
    });
    // std::complex<float> is 8 bytes, 4-aligned; double is 4-aligned inside structs on i686 only
    const f = findings.filter((x) => x.rule === "layout-assert-fails");
    expect(f.map((x) => x.range.line + 1)).toEqual([6]);
    expect(f[0]!.targets).toEqual([I686]);
  });
});

describe("layout family: layout-not-portable", () => {
  test("bad: a bit-field struct mirrored in Rust: not portable on windows, compared by size elsewhere", async () => {
    const { lines, findings } = await checkDir("layout/layout-not-portable/bad");
    expect(lines.sort()).toEqual(["lib.rs:4 mirror-layout-mismatch", "telescope.h:4 layout-not-portable"]);
    expect(findings.find((f) => f.rule === "layout-not-portable")!.targets).toEqual([WIN]);
  });
  test("good: the status word is a plain integer", async () => {
    const { lines } = await checkDir("layout/layout-not-portable/good");
    expect(lines).toEqual([]);
  });
});

// Types paired through the signatures that pass them (issue 15, point 4): a Rust struct and a C
// struct at the same parameter are mirrors whatever their names; a same-name pair no seam function
// passes is advice (info); enums compare by member name after the shared prefix, without C's
// trailing count enumerator; fields grouped differently (a Rust `Span { start, end }` for C's
// `start, end`) or a union held by its array member are the same bytes. The oracle: rustc's layout
// of the Rust types (tests/helpers/rust-cross.ts) equals gcc's of the C types on each target a
// Debian cross compiler exists for (C11 6.7.2.1; Rust Reference, "The C representation").
describe("mirror pairs by signature", () => {
  const DIR = "layout/mirror-layout-mismatch/by-signature";
  test("good: grouped fields, a union by its member, enum by member names with a count sentinel; the same-name test double is info only", async () => {
    const { findings } = await checkDir(`${DIR}/good`);
    expect(findings.filter((f) => f.severity !== "info").map((f) => `${f.rule} ${f.range.line + 1}`)).toEqual([]);
    const info = findings.filter((f) => f.severity === "info");
    expect(info.map((f) => `${f.rule} ${path.basename(f.range.file)}:${f.range.line + 1}`)).toEqual(["mirror-not-repr-c picker.rs:34"]);
    expect(info[0]!.message).toContain("paired by name only");
  });
  test("bad: a pointer missing from the grouped span, a coefficient array twice the union, two enum values swapped by name", async () => {
    const { findings } = await checkDir(`${DIR}/bad`);
    const errs = findings.filter((f) => f.severity === "error").map((f) => `${f.rule} ${f.range.line + 1}`);
    expect(errs).toEqual(["mirror-layout-mismatch 13", "mirror-layout-mismatch 21", "mirror-enum-mismatch 29"]);
    expect(findings.find((f) => f.rule === "mirror-enum-mismatch")!.message).toContain("`SEIS_MODE_TRIGGER`, is 1");
    expect(findings.find((f) => f.range.line + 1 === 13)!.related[0]!.message).toContain("both are parameter 1 of `seis_scan`");
  });
  const GCC: Partial<Record<Triple, string>> = { "x86_64-unknown-linux-gnu": "x86_64-linux-gnu-gcc", "i686-unknown-linux-gnu": "i686-linux-gnu-gcc", "aarch64-unknown-linux-gnu": "aarch64-linux-gnu-gcc", "armv7-unknown-linux-gnueabihf": "arm-linux-gnueabihf-gcc" };
  for (const [triple, cc] of Object.entries(GCC) as [Triple, string][]) {
    test.skipIf(!haveTool(cc) || !haveTool("rustc"))(`good fixture: rustc's Rust layout equals ${cc}'s C layout (${triple})`, () => {
      const items = `#[repr(C)] pub struct Span { pub start: *const f32, pub end: *const f32 }
#[repr(C)] pub struct SeisScanWindow { pub span: Span, pub n_ch: u32, pub gain_db: i32 }
#[repr(C)] pub struct SeisStage { pub coef: [i16; 4], pub decim: u32 }
`;
      const [end, nCh, gain, win, decim, stage] = rustValuesCross(triple, items, ["offset_of!(Span, end)", "offset_of!(SeisScanWindow, n_ch)", "offset_of!(SeisScanWindow, gain_db)", "size_of::<SeisScanWindow>()", "offset_of!(SeisStage, decim)", "size_of::<SeisStage>()"]);
      const probe = `#include "seis.h"
_Static_assert(offsetof(seis_window, end) == ${end}, "end");
_Static_assert(offsetof(seis_window, n_ch) == ${nCh}, "n_ch");
_Static_assert(offsetof(seis_window, gain_db) == ${gain}, "gain_db");
_Static_assert(sizeof(seis_window) == ${win}, "window");
_Static_assert(offsetof(seis_stage, decim) == ${decim}, "decim");
_Static_assert(sizeof(seis_stage) == ${stage}, "stage");
`;
      const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-seis-"));
      try {
        fs.writeFileSync(path.join(tmp, "probe.c"), probe);
        execFileSync(cc, ["-std=c11", "-fsyntax-only", "-I", path.join(FIXTURES, DIR, "good"), path.join(tmp, "probe.c")], { stdio: "pipe" });
      } finally {
        fs.rmSync(tmp, { recursive: true, force: true });
      }
    });
  }
});

// Two Rust modules each declare a `Stats`; the exported function's own module's `Stats` is the one
// its signature names (Rust Reference, "Paths": a name resolves in the module that uses it).
describe("a name declared in two modules pairs by the nearest declaration", () => {
  const header = `#include <stdint.h>
typedef struct { uint64_t frames; uint64_t dropped; } hyd_link_stats;
void hyd_link_stats_get(const void *link, hyd_link_stats *out);
`;
  const api = "pub struct Stats { pub frames: usize, pub history: Vec<u64> }\n";
  const ffi = (repr: string) => `${repr}pub struct Stats { frames: u64, dropped: u64 }
#[no_mangle]
pub unsafe extern "C" fn hyd_link_stats_get(link: *const u8, out: *mut Stats) { let _ = link; (*out).frames = 0; (*out).dropped = 0; }
`;
  test("the module's own #[repr(C)] Stats mirrors the C struct: nothing", async () => {
    const { findings } = await analyze({ "link.h": header, "src/stats.rs": api, "src/link/ffi.rs": ffi("#[repr(C)]\n") });
    expect(findings.filter((f) => f.severity !== "info")).toEqual([]);
  });
  test("the module's own Stats without #[repr(C)] is reported, not the other module's", async () => {
    const { findings } = await analyze({ "link.h": header, "src/stats.rs": api, "src/link/ffi.rs": ffi("") });
    expect(at(findings, "mirror-not-repr-c")).toEqual(["src/link/ffi.rs:1"]);
  });
});
