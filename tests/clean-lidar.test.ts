// The fifth false-positive probe: test-fixtures/clean/lidar-fpga, a weather-lidar receiver whose
// Rust control daemon drives an FPGA capture engine through a C++ engine library, over mmap'd
// registers and a DMA ring. It leans on layout patterns the other probes lack: CTRL/STATUS
// registers as C++ bit-fields with unnamed reserved bits, mirrored in Rust as plain `u32` words
// (common practice: Rust has no bit-fields); `volatile` register fields; a C11 anonymous union with
// an anonymous struct inside; `#pragma pack(push, 4)` around a `uint64_t`; `alignas(16)` on a
// member (C, through <stdalign.h>) and on a type (C++), mirrored by #[repr(C, align(16))];
// flexible array members mirrored by zero-length arrays (common practice); a C++ `enum class
// rl_mode : uint8_t` mirrored by #[repr(u8)] and only ever written by Rust; functions defined in
// C++ with extern "C" and called from Rust, and the other way round. ferrule must report nothing.
// What says the code is right is outside ferrule:
// - the headers' static asserts hold under clang --target=TRIPLE for all five targets (C11 for the
//   C header, C++17 for both), the Debian gcc cross compilers (C header) and g++ / i686 g++ (C++);
// - rustc builds the daemon as a staticlib (its const asserts pin the host layout), g++ -Wall
//   -Wextra -Werror builds the engine and the driver, and the program runs clean under Valgrind
//   memcheck (--leak-check=full), checking the CTRL word Rust computes against the C++ bit-fields;
// - `ferrule layout --format json` equals the compilers' sizes, alignments, member offsets and
//   bit-field bit offsets on every target, and rustc's own layout of the mirrors (no_core probe,
//   tests/helpers/rust-cross.ts) agrees on the four non-host targets.
// Below, what the probe first flagged (two false positives, fixed) is pinned next to the slips of
// the same shape that the same rules must still report.
import { describe, expect, it } from "vitest";
import { execFileSync, spawnSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { analyze, at, FIXTURES } from "./helpers/analyze.js";
import { expectNoFindings, have, memcheck, ROOT } from "./helpers/clean.js";
import { TRIPLES, GCC_FOR, cValuesClang, cValuesGcc, cxxValuesClang, type Triple } from "./oracles/compilers";
import { rustValuesCross } from "./helpers/rust-cross";

const DIR = path.join(FIXTURES, "clean", "lidar-fpga");
const INCLUDE = path.join(DIR, "include");
const TOOLS = have("rustc") && have("g++") && have("valgrind");

describe("clean workspace: lidar-fpga", () => {
  it("ferrule reports nothing, in-process and through the shipped CLI (exit 0, the aid-not-proof line)", async () => {
    await expectNoFindings("lidar-fpga");
  });

  it.skipIf(!TOOLS)("the code is right: rustc + g++ build it, and it runs clean under Valgrind memcheck", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-lidar-"));
    try {
      const lib = path.join(dir, "librl.a");
      // a debug build: overflow checks on, and panic=abort turns a panic into a crash
      execFileSync("rustc", ["--edition=2021", "--crate-type", "staticlib", "-C", "panic=abort", "-g", "-o", lib, path.join(DIR, "daemon", "src", "lib.rs")], { stdio: "pipe" });
      const exe = path.join(dir, "capture_sim");
      execFileSync("g++", ["-std=c++17", "-Wall", "-Wextra", "-Werror", "-g", "-O0", "-I", INCLUDE, "-o", exe, path.join(DIR, "tools", "capture_sim.cpp"), path.join(DIR, "src", "rl_engine.cpp"), lib, "-lpthread", "-ldl", "-lm"], { stdio: "pipe" });
      const r = memcheck(exe);
      expect(r.stderr).toBe("");
      // five good shots of 16, 20, 24, (28: the failed slot), 32, 36 samples, sample k of shot s = 100 s + k
      expect(r.stdout).toBe("shots 5 energy 52112 ctrl 015abc07\nall checks passed\n");
      expect(r.status).toBe(0);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);

  // The headers need only freestanding headers (C11 4p6: <stdalign.h>, <stddef.h>, <stdint.h>),
  // so the Windows check needs no MSVC headers.
  const syntax = (cmd: string, args: string[], lang: "c" | "c++", include: string) =>
    spawnSync(cmd, [...args, lang === "c" ? "-std=c11" : "-std=c++17", "-Wall", "-Wextra", "-Werror", "-fsyntax-only", "-I", INCLUDE, "-x", lang, "-"], { input: `#include "${include}"\n`, encoding: "utf8" });
  for (const t of TRIPLES) {
    it.skipIf(!have("clang"))(`the headers' static asserts hold under clang --target=${t} (C11 and C++17)`, () => {
      const args = [`--target=${t}`, "-ffreestanding"];
      for (const [lang, h] of [["c", "lidar/rl_ring.h"], ["c++", "lidar/rl_ring.h"], ["c++", "lidar/rl_regs.hpp"]] as const) {
        const r = syntax("clang", args, lang, h);
        expect(`${lang} ${h}: ${r.stderr}`).toBe(`${lang} ${h}: `);
        expect(r.status).toBe(0);
      }
    });
    const gcc = GCC_FOR[t];
    if (gcc) {
      it.skipIf(!have(gcc))(`the C header's _Static_asserts hold under ${gcc} (${t})`, () => {
        const r = syntax(gcc, [], "c", "lidar/rl_ring.h");
        expect(r.stderr).toBe("");
        expect(r.status).toBe(0);
      });
    }
  }
  for (const gxx of ["g++", "i686-linux-gnu-g++"]) {
    it.skipIf(!have(gxx))(`the C++ header's static_asserts hold under ${gxx}`, () => {
      const r = syntax(gxx, [], "c++", "lidar/rl_regs.hpp");
      expect(r.stderr).toBe("");
      expect(r.status).toBe(0);
    });
  }

  it.skipIf(!have("gcc") || !have("i686-linux-gnu-gcc"))("the asserts have teeth: without pack(4), t_ns moves to 8 on every target but i686 (System V i386 psABI: 4-byte uint64_t in structs)", () => {
    const text = fs.readFileSync(path.join(INCLUDE, "lidar", "rl_ring.h"), "utf8");
    const stripped = text.replace("#pragma pack(push, 4)\n", "").replace("#pragma pack(pop)\n", "");
    expect(stripped).not.toBe(text);
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-lidar-h-"));
    try {
      fs.mkdirSync(path.join(dir, "lidar"));
      fs.writeFileSync(path.join(dir, "lidar", "rl_ring.h"), stripped);
      const run = (cmd: string) => spawnSync(cmd, ["-std=c11", "-fsyntax-only", "-I", dir, "-x", "c", "-"], { input: '#include "lidar/rl_ring.h"\n', encoding: "utf8" });
      expect(run("i686-linux-gnu-gcc").status).toBe(0);
      const r = run("gcc");
      expect(r.status).not.toBe(0);
      expect(r.stderr).toMatch(/t_ns right after shot/);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});

// ---------------------------------------------------------------------------------------------
// ferrule's layouts vs the compilers'

interface FieldJson { name: string; offset: number; size: number; align: number; bitOffset?: number; bits?: number }
interface TypeJson { name: string; language: "c" | "rust"; targets: Record<string, { size: number; align: number; fields?: FieldJson[]; notPortable?: string; unknown?: string }> }

function ferruleLayouts(): TypeJson[] {
  const r = spawnSync(process.execPath, [path.join(ROOT, "bin", "ferrule.js"), "layout", "--format", "json", path.relative(ROOT, DIR)], { cwd: ROOT, encoding: "utf8" });
  expect(r.status).toBe(0);
  return (JSON.parse(r.stdout) as { types: TypeJson[] }).types;
}

// C type -> where it is declared; the Rust mirror of each
const C_TYPES: { name: string; header: "c" | "c++"; rust?: string }[] = [
  { name: "rl_slot", header: "c", rust: "RlSlot" },
  { name: "rl_ring", header: "c", rust: "RlRing" },
  { name: "rl_shot_hdr", header: "c", rust: "RlShotHdr" },
  { name: "rl_mode", header: "c++", rust: "RlMode" },
  { name: "rl_ctrl_reg", header: "c++" },
  { name: "rl_status_reg", header: "c++" },
  { name: "rl_regs", header: "c++", rust: "RlRegs" },
  { name: "rl_capture_cfg", header: "c++", rust: "RlCaptureCfg" },
];

/** The compiler questions for one C type and what ferrule says for each, on one target. */
function questions(types: TypeJson[], t: Triple, lang: "c" | "c++", names: string[]): { exprs: string[]; ours: (number | string)[]; bitExprs: string[]; bitOurs: number[] } {
  const exprs: string[] = [];
  const ours: (number | string)[] = [];
  const bitExprs: string[] = [];
  const bitOurs: number[] = [];
  for (const n of names) {
    const ty = types.find((x) => x.language === "c" && x.name === n);
    if (!ty) throw new Error(`ferrule printed no layout for ${n}`);
    const l = ty.targets[t]!;
    exprs.push(`sizeof(${n})`, `${lang === "c" ? "_Alignof" : "alignof"}(${n})`);
    ours.push(l.notPortable ?? l.unknown ?? l.size, l.notPortable ?? l.unknown ?? l.align);
    for (const f of l.fields ?? []) {
      if (!f.name) continue; // the anonymous union
      if (f.bits === undefined) {
        exprs.push(`offsetof(${n}, ${f.name})`);
        ours.push(f.offset);
      } else {
        bitExprs.push(`${n} r{}; r.${f.name} = 1; return r;`);
        bitOurs.push(f.bitOffset!);
      }
    }
  }
  return { exprs, ours, bitExprs, bitOurs };
}

/**
 * The bit each bit-field starts at, as clang lays it out for `t`: one constant object per field
 * with only that field set to 1 (a constexpr lambda, C++17), read back from the bytes clang emits
 * for it (`.byte` lines after the object's label in its assembly output; all five targets are
 * little-endian) — the lowest set bit.
 */
function bitOffsetsClang(t: Triple, prelude: string, bodies: string[]): number[] {
  const tu = prelude + bodies.map((b, i) => `extern "C" const auto rl_bitq${i} = []() { ${b} }();\n`).join("");
  const asm = execFileSync("clang", [`--target=${t}`, "-ffreestanding", "-std=c++17", "-x", "c++", "-S", "-o", "-", "-"], { input: tu, encoding: "utf8" });
  const lines = asm.split("\n");
  return bodies.map((_, i) => {
    const at = lines.findIndex((l) => l === `rl_bitq${i}:`);
    if (at < 0) throw new Error(`no object rl_bitq${i} in clang's output for ${t}`);
    let word = 0;
    for (let k = 0; k < 4; k++) {
      const m = /^\s*\.byte\s+(\d+)/.exec(lines[at + 1 + k] ?? "");
      if (!m) throw new Error(`rl_bitq${i}: expected 4 .byte lines on ${t}, got ${lines.slice(at, at + 6).join(" | ")}`);
      word |= Number(m[1]) << (8 * k);
    }
    return 31 - Math.clz32(word & -word);
  });
}

describe("ferrule layout --format json equals the compilers on every target", () => {
  const C_PRELUDE = `#include "${path.join(INCLUDE, "lidar", "rl_ring.h")}"\n`;
  const CXX_PRELUDE = `#include "${path.join(INCLUDE, "lidar", "rl_regs.hpp")}"\n`;
  for (const t of TRIPLES) {
    it.skipIf(!have("clang"))(`${t}: sizes, alignments, member offsets, bit-field bit offsets (clang; gcc for the C header)`, () => {
      const types = ferruleLayouts();
      const cNames = C_TYPES.filter((x) => x.header === "c").map((x) => x.name);
      const c = questions(types, t, "c", cNames);
      expect(c.ours).toEqual(cValuesClang(t, C_PRELUDE, c.exprs));
      const gcc = GCC_FOR[t];
      if (gcc && have(gcc)) expect(c.ours).toEqual(cValuesGcc(t, C_PRELUDE, c.exprs));
      const cxx = questions(types, t, "c++", C_TYPES.map((x) => x.name));
      expect(cxx.ours).toEqual(cxxValuesClang(t, CXX_PRELUDE, cxx.exprs));
      expect(cxx.bitOurs).toEqual([0, 1, 8, 20, 24, 0, 1, 8, 24]); // enable mode threshold decim irq_en | busy overrun fifo_level last_err
      expect(cxx.bitOurs).toEqual(bitOffsetsClang(t, CXX_PRELUDE, cxx.bitExprs));
      // each Rust mirror has the C type's size, alignment and member offsets
      for (const m of C_TYPES) {
        if (!m.rust) continue;
        const a = types.find((x) => x.language === "rust" && x.name === m.rust)!.targets[t]!;
        const b = types.find((x) => x.language === "c" && x.name === m.name)!.targets[t]!;
        expect({ type: m.rust, size: a.size, align: a.align, offsets: a.fields?.map((f) => f.offset) }).toEqual({ type: m.rust, size: b.size, align: b.align, offsets: b.fields?.map((f) => f.offset) });
      }
    });
  }

  // rustc's own layout of the mirrors on the targets whose standard library is not installed: the
  // same items in a #![no_core] probe (tests/helpers/rust-cross.ts), primitives only. The host
  // build above checks the fixture's own text with its const asserts.
  const MIRRORS = `#[repr(u8)] pub enum RlMode { Idle = 0, Single = 1, Burst = 2, Continuous = 3 }
#[repr(C)] pub struct RlRegs { pub id: u32, pub ctrl: u32, pub status: u32, pub irq_ack: u32, pub ring_bus_addr: u64, pub ring_nslots: u32, pub shots_done: u32 }
#[repr(C, align(16))] pub struct RlCaptureCfg { pub mode: RlMode, pub decim: u8, pub threshold: u16, pub nslots: u32, pub gate_ns: u64 }
#[repr(C)] pub struct RlBusWords { pub lo: u32, pub hi: u32 }
impl Copy for RlBusWords {}
#[repr(C)] pub union RlBusAddr { pub addr: u64, pub words: RlBusWords }
#[repr(C)] pub struct RlSlot { pub bus: RlBusAddr, pub len: u32, pub flags: u16, pub gate: u8, pub status: u8 }
#[repr(C, align(16))] pub struct RlRing { pub magic: u32, pub nslots: u32, pub head: u32, pub tail: u32, pub slots: [RlSlot; 0] }
#[repr(C, packed(4))] pub struct RlShotHdr { pub shot: u32, pub t_ns: u64, pub nsamples: u32, pub samples: [u32; 0] }
`;
  for (const t of TRIPLES.filter((x) => x !== "x86_64-unknown-linux-gnu")) {
    it.skipIf(!have("rustc"))(`${t}: rustc lays the mirrors out as ferrule prints them (no_core probe)`, () => {
      const types = ferruleLayouts();
      const exprs: string[] = [];
      const ours: number[] = [];
      for (const m of C_TYPES) {
        if (!m.rust) continue;
        const l = types.find((x) => x.language === "rust" && x.name === m.rust)!.targets[t]!;
        exprs.push(`size_of::<${m.rust}>()`, `align_of::<${m.rust}>()`);
        ours.push(l.size, l.align);
        for (const f of l.fields ?? []) {
          exprs.push(`offset_of!(${m.rust}, ${f.name})`);
          ours.push(f.offset);
        }
      }
      expect(ours).toEqual(rustValuesCross(t, MIRRORS, exprs));
    });
  }
});

// ---------------------------------------------------------------------------------------------

describe("what the probe first flagged, next to the slips the same rules still report", () => {
  // 1. layout-not-portable on a register word with reserved bits. The System V psABIs and AAPCS
  //    place an unnamed bit-field like a named one (its type counts toward the struct's alignment
  //    on Arm only); Microsoft layout packs a run of bit-fields of one type size into one unit.
  //    Checked against the compilers in tests/layout.test.ts and tests/layout.oracle.test.ts.
  const reg = (fields: string, rustWord: string, attr = "") => ({
    "r.h": `#include <stdint.h>
struct ${attr}rl_gate_reg { ${fields} };
struct rl_block { volatile uint32_t id; volatile struct rl_gate_reg gate; volatile uint32_t count; };
void rl_block_poll(struct rl_block *b);
`,
    "r.rs": `#[repr(C)]
pub struct RlBlock { pub id: u32, pub gate: ${rustWord}, pub count: u32 }
#[no_mangle]
pub unsafe extern "C" fn rl_block_poll(b: *mut RlBlock) { let _ = b; }
`,
  });
  const RESERVED = "uint32_t open : 1; uint32_t : 7; uint32_t width : 12; uint32_t : 12;";

  it("a register of uint32_t bit-fields with unnamed reserved bits is laid out on every target, and its `u32` mirror field is the same bytes", async () => {
    const { findings } = await analyze(reg(RESERVED, "u32"));
    expect(findings.map((f) => `${f.rule} ${f.message}`)).toEqual([]);
  });

  it("still reported: a zero-width bit-field (not portable), a packed bit-field register on windows (not portable)", async () => {
    const zero = await analyze(reg("uint32_t open : 1; uint32_t : 0; uint32_t width : 12;", "u32"));
    expect(at(zero.findings, "layout-not-portable")).toEqual(["r.h:3"]);
    expect(zero.findings.find((f) => f.rule === "layout-not-portable")!.message).toMatch(/zero-width/);
    const packed = await analyze(reg(RESERVED, "u32", "__attribute__((packed)) "));
    expect(at(packed.findings, "layout-not-portable")).toEqual(["r.h:3"]);
    expect(packed.findings.find((f) => f.rule === "layout-not-portable")!.targets).toEqual(["x86_64-pc-windows-msvc"]);
  });

  // Not a false positive, pinned because the fixture leans on it: a C++ `enum class E : uint8_t`
  // may hold any uint8_t value (C++ [dcl.enum]p8: the values of an enumeration with a fixed
  // underlying type are those of that type), so it is the #[repr(u8)] enum's size and is fine
  // while only Rust writes it (the fixture's rl_capture_cfg, behind a const pointer); bytes C++
  // writes into the Rust enum are still reported.
  it("a C++ enum class with a fixed underlying type: same size as #[repr(u8)]; C++ writing it into the Rust enum is still reported", async () => {
    const files = (sig: string, imports: string) => ({
      "m.hpp": `#include <stdint.h>
enum class rl_mode : uint8_t { idle = 0, burst = 2 };
struct rl_cfg { rl_mode mode; uint8_t decim; uint16_t threshold; };
${sig}
`,
      "m.rs": `#[repr(u8)] #[derive(Clone, Copy)] pub enum RlMode { Idle = 0, Burst = 2 }
#[repr(C)] pub struct RlCfg { pub mode: RlMode, pub decim: u8, pub threshold: u16 }
extern "C" { ${imports} }
`,
    });
    const clean = await analyze(files(`extern "C" int32_t rl_set_cfg(const rl_cfg *cfg);`, "fn rl_set_cfg(cfg: *const RlCfg) -> i32;"));
    expect(clean.findings.map((f) => `${f.rule} ${f.message}`)).toEqual([]);
    const filled = await analyze(files(`extern "C" int32_t rl_set_cfg(const rl_cfg *cfg);\nextern "C" int32_t rl_get_cfg(rl_cfg *out);`, "fn rl_set_cfg(cfg: *const RlCfg) -> i32; fn rl_get_cfg(out: *mut RlCfg) -> i32;"));
    expect(filled.findings.map((f) => f.rule)).toEqual(["enum-from-c-int"]);
    expect(at(filled.findings, "enum-from-c-int")).toEqual(["m.rs:2"]);
  });

  // 2. mirror-layout-mismatch on `u32` in Rust against a struct of bit-fields in C, same offset,
  //    size and alignment (common practice: Rust has no bit-fields).
  it("still reported: a narrower word, a word for a bit-field struct that is wider, a signed word, an ordinary struct", async () => {
    const narrow = await analyze(reg(RESERVED, "u16"));
    expect(at(narrow.findings, "mirror-layout-mismatch")).toEqual(["r.rs:2"]);
    // 20 + 20 bits of uint32_t: the second does not fit the first unit, so the register is 8 bytes
    const wide = await analyze(reg("uint32_t lo : 20; uint32_t hi : 20;", "u32"));
    expect(at(wide.findings, "mirror-layout-mismatch")).toEqual(["r.rs:2"]);
    expect(wide.findings.find((f) => f.rule === "mirror-layout-mismatch")!.message).toContain("C offset 4 (8 bytes)");
    // uint8_t then uint32_t bit-fields: one 4-byte unit on System V / AAPCS, two units (8 bytes) under Microsoft rules
    const ms = await analyze(reg("uint8_t open : 1; uint32_t width : 12;", "u32"));
    expect(at(ms.findings, "mirror-layout-mismatch")).toEqual(["r.rs:2"]);
    expect(ms.findings.find((f) => f.rule === "mirror-layout-mismatch")!.targets).toEqual(["x86_64-pc-windows-msvc"]);
    const signed = await analyze(reg(RESERVED, "i32"));
    expect(at(signed.findings, "mirror-layout-mismatch")).toEqual(["r.rs:2"]);
    const plain = await analyze(reg("uint16_t open; uint16_t width;", "u32"));
    expect(at(plain.findings, "mirror-layout-mismatch")).toEqual(["r.rs:2"]);
  });
});
