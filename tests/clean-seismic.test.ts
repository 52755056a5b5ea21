// The second false-positive probe: test-fixtures/clean/seismic-array, a seismic-array acquisition
// front end where Rust calls C kernels (an `extern "C"` block, one item under #[link_name]) and C
// calls a Rust onset picker, over #[repr(C)] mirrors of DMA descriptors and a register block:
// nested structs, fixed arrays, explicit padding for i386, a union, packed and aligned(64) types,
// a #[repr(u8)] enum in a `uint8_t` field, `bool`, an ops table of nullable function pointers,
// a #[repr(transparent)] channel id over `uint32_t`, `Option<NonNull<T>>`, `&mut T`, `*const
// c_char`, `size_t`/`ssize_t`/`int64_t`/`long`. ferrule must report nothing there. What says the
// code is right is outside ferrule:
// - rustc builds the Rust as a staticlib (its const asserts pin the host layout), gcc builds the
//   C kernels and the application with -Wall -Werror, and the linked program runs clean under
//   Valgrind memcheck (--leak-check=full), checking every answer it gets across the seam;
// - the header's _Static_assert numbers (the same numbers as the Rust const asserts) hold under
//   gcc and the Debian cross compilers for i686, armv7 and aarch64, and under clang for
//   x86_64-pc-windows-msvc, so the layouts agree on all five targets ferrule checks.
// Below, the two patterns the probe first flagged (false positives, fixed) are pinned next to the
// slips the same rules must still report.
import { describe, expect, it } from "vitest";
import { execFileSync, spawnSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { analyze, at, FIXTURES } from "./helpers/analyze.js";
import { expectNoFindings, have, memcheck } from "./helpers/clean.js";

const DIR = path.join(FIXTURES, "clean", "seismic-array");
const RUN_TOOLS = have("rustc") && have("gcc") && have("valgrind");
const INCLUDE = path.join(DIR, "include");
const TYPES_H = path.join(INCLUDE, "seis", "seis_types.h");

describe("clean workspace: seismic-array", () => {
  it("ferrule reports nothing, in-process and through the shipped CLI (exit 0, the aid-not-proof line)", async () => {
    await expectNoFindings("seismic-array");
  });

  it.skipIf(!RUN_TOOLS)("the code is right: rustc + gcc build it, and it runs clean under Valgrind memcheck", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-seismic-"));
    try {
      const lib = path.join(dir, "libseis.a");
      // rustc: the const asserts of rust/src/types.rs are evaluated here (host layout)
      execFileSync("rustc", ["--edition=2021", "--crate-type", "staticlib", "-C", "panic=abort", "-g", "-o", lib, path.join(DIR, "rust", "src", "lib.rs")], { stdio: "pipe" });
      const exe = path.join(dir, "acquire");
      const csrc = fs.readdirSync(path.join(DIR, "csrc")).map((f) => path.join(DIR, "csrc", f));
      execFileSync("gcc", ["-std=c11", "-Wall", "-Wextra", "-Werror", "-g", "-O0", "-I", INCLUDE, "-o", exe, path.join(DIR, "app", "acquire.c"), ...csrc, lib, "-lpthread", "-ldl", "-lm"], { stdio: "pipe" });
      const r = memcheck(exe);
      expect(r.stderr).toBe("");
      expect(r.stdout).toMatch(/^onsets 1, first at decimated sample 6\d\d /m);
      expect(r.stdout).toMatch(/^label 07\.0042 x16$/m);
      expect(r.stdout).toMatch(/all checks passed/);
      expect(r.status).toBe(0);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);

  // The five targets' C compilers; the header only needs the freestanding headers (C11 4p6:
  // <stdbool.h>, <stddef.h>, <stdint.h>), so the Windows check needs no MSVC headers.
  const COMPILERS: { target: string; cmd: string; args: string[] }[] = [
    { target: "x86_64-unknown-linux-gnu", cmd: "gcc", args: [] },
    { target: "i686-unknown-linux-gnu", cmd: "i686-linux-gnu-gcc", args: [] },
    { target: "armv7-unknown-linux-gnueabihf", cmd: "arm-linux-gnueabihf-gcc", args: [] },
    { target: "aarch64-unknown-linux-gnu", cmd: "aarch64-linux-gnu-gcc", args: [] },
    { target: "x86_64-pc-windows-msvc", cmd: "clang", args: ["--target=x86_64-pc-windows-msvc", "-ffreestanding"] },
  ];
  const syntaxCheck = (cmd: string, args: string[], header: string) =>
    spawnSync(cmd, [...args, "-std=c11", "-Wall", "-Werror", "-fsyntax-only", "-x", "c", "-"], { input: header, encoding: "utf8" });

  for (const c of COMPILERS) {
    it.skipIf(!have(c.cmd))(`the header's _Static_assert layout numbers (the Rust const asserts' numbers) hold on ${c.target} (${c.cmd})`, () => {
      const r = syntaxCheck(c.cmd, c.args, fs.readFileSync(TYPES_H, "utf8"));
      expect(r.stderr).toBe("");
      expect(r.status).toBe(0);
    });
  }

  it.skipIf(!have("gcc") || !have("i686-linux-gnu-gcc"))("the asserts have teeth: without the explicit reserved word, `addr` moves to offset 4 on i686 only (System V i386 psABI: 4-byte uint64_t in structs)", () => {
    const text = fs.readFileSync(TYPES_H, "utf8");
    const stripped = text.replace("    uint32_t rsvd0;\n", "");
    expect(stripped).not.toBe(text);
    expect(syntaxCheck("gcc", [], stripped).status).toBe(0);
    const r = syntaxCheck("i686-linux-gnu-gcc", [], stripped);
    expect(r.status).not.toBe(0);
    expect(r.stderr).toMatch(/addr at 8 on every target/);
  });
});

describe("what the probe first flagged, next to the slips the same rules still report", () => {
  // Rust Reference, "Type layout": a #[repr(transparent)] struct has the same layout and ABI as
  // its single non-zero-sized field.
  const chan = (inner: string) => ({
    "k.h": `#include <stdint.h>
typedef uint32_t chan_id;
typedef struct desc { uint64_t addr; chan_id chan; uint32_t len; } desc;
void k_route(chan_id c, const desc *d);
`,
    "k.rs": `use std::marker::PhantomData;
#[repr(transparent)]
#[derive(Clone, Copy)]
pub struct ChanId(pub ${inner}, PhantomData<u8>);
#[repr(C)]
pub struct Desc { pub addr: u64, pub chan: ChanId, pub len: u32 }
#[no_mangle]
pub extern "C" fn k_route(c: ChanId, d: *const Desc) { let _ = (c, d); }
`,
  });

  it("a #[repr(transparent)] newtype over u32 is a `uint32_t` typedef, as a parameter and as a mirrored field; over u16 or i32 it is still reported", async () => {
    const clean = await analyze(chan("u32"));
    expect(clean.findings.map((f) => `${f.rule} ${f.message}`)).toEqual([]);
    const narrow = await analyze(chan("u16"));
    expect(at(narrow.findings, "param-type-mismatch")).toEqual(["k.h:4"]);
    expect(narrow.findings.find((f) => f.rule === "param-type-mismatch")!.message).toContain("`u16` is 2-byte but `uint32_t` is 4-byte");
    expect(at(narrow.findings, "mirror-layout-mismatch")).toEqual(["k.rs:6"]);
    const signed = await analyze(chan("i32"));
    expect(at(signed.findings, "param-signedness")).toEqual(["k.h:4"]);
  });

  it("a transparent newtype against a one-field C struct stays a pair of named types (not unwrapped)", async () => {
    const r = await analyze({
      "k.h": `#include <stdint.h>
typedef struct gate { uint32_t level; } gate;
typedef struct mask { uint32_t bits; } mask;
void k_gate(gate g);
`,
      "k.rs": `#[repr(transparent)]
pub struct Mask(pub u32);
#[no_mangle]
pub extern "C" fn k_gate(g: Mask) { let _ = g; }
`,
    });
    expect(at(r.findings, "param-type-mismatch")).toEqual(["k.h:4"]);
  });

  // An enum field is only undefined behaviour when C writes the bytes Rust then reads as the enum
  // (Rust Reference, "Behavior considered undefined": producing an invalid value).
  // (`batch`: a record nested in another #[repr(C)] type counts as C-written whoever passes the
  // outer type, so the clean variants leave it out)
  const rec = (sig: string, extra = "", batch = false) => ({
    "r.h": `#include <stdint.h>
#include <stdbool.h>
typedef struct rec { uint64_t t; uint8_t gain; bool ok; uint8_t rsvd[6]; } rec;
${batch ? "typedef struct batch { uint32_t n; uint32_t rsvd; rec first; } batch;\n" : ""}typedef struct picker picker;
${extra}`,
    "r.rs": `#[repr(u8)]
#[derive(Clone, Copy)]
pub enum Gain { X1 = 0, X4 = 1 }
#[repr(C)]
#[derive(Clone, Copy)]
pub struct Rec { pub t: u64, pub gain: Gain, pub ok: bool, pub rsvd: [u8; 6] }
${batch ? "#[repr(C)]\npub struct Batch { pub n: u32, pub rsvd: u32, pub first: Rec }\n" : ""}pub struct Picker { last: Option<Rec> }
${sig}
`,
  });

  it("a record only Rust writes (returned by value by an export, passed to C behind a const pointer) may hold a Rust enum; one C can write is still reported", async () => {
    const exportRet = await analyze(rec(`#[no_mangle]
pub unsafe extern "C" fn r_last(p: *const Picker) -> Rec { (*p).last.unwrap_or(Rec { t: 0, gain: Gain::X1, ok: false, rsvd: [0; 6] }) }`, "rec r_last(const picker *p);\n"));
    expect(at(exportRet.findings, "enum-from-c-int")).toEqual([]);
    const importConst = await analyze(rec(`extern "C" { pub fn c_publish(r: *const Rec); }`, "void c_publish(const rec *r);\n"));
    expect(at(importConst.findings, "enum-from-c-int")).toEqual([]);

    // C hands Rust the bytes: an export's parameter, an import's out-pointer, a nested record
    const exportParam = await analyze(rec(`#[no_mangle]
pub unsafe extern "C" fn r_put(r: *const Rec) { let _ = r; }`, "void r_put(const rec *r);\n"));
    expect(at(exportParam.findings, "enum-from-c-int")).toEqual(["r.rs:6"]);
    const importOut = await analyze(rec(`extern "C" { pub fn c_fill(r: *mut Rec) -> i32; }`, "int c_fill(rec *r);\n"));
    expect(at(importOut.findings, "enum-from-c-int")).toEqual(["r.rs:6"]);
    const nested = await analyze(rec(`#[no_mangle]
pub unsafe extern "C" fn r_batch(b: *const Batch) { let _ = b; }`, "void r_batch(const batch *b);\n", true));
    expect(at(nested.findings, "enum-from-c-int")).toEqual(["r.rs:6"]);
    // an import returning it, and a record only a name match pairs (it may arrive through a void *)
    const importRet = await analyze(rec(`extern "C" { pub fn c_next() -> Rec; }`, "rec c_next(void);\n"));
    expect(at(importRet.findings, "enum-from-c-int")).toEqual(["r.rs:6"]);
    const byName = await analyze(rec(""));
    expect(at(byName.findings, "enum-from-c-int")).toEqual(["r.rs:6"]);
  });
});
