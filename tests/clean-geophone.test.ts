// The sixth false-positive probe: test-fixtures/clean/geophone-mesh, a geophone mesh whose C++
// stream blocks share Rust-owned state through reference-counted and callback-carrying handles:
// a calibration table made with `Arc::into_raw`, retained with `Arc::increment_strong_count` and
// released with `Arc::from_raw`, owned on the C++ side by a copyable class whose copy members
// retain (and a copy-and-swap twin for the tally); an `Arc<Mutex<Tally>>` tally (a `type` alias)
// released with `Arc::decrement_strong_count` and updated from two std::threads through their own
// retained references; a stream that keeps the C callback and its `void *user` in a
// `Box<dyn FnMut>` boxed twice into `*mut c_void`, registered by a C++ block through a static
// trampoline; a mesh opened through an out-parameter (`int gm_mesh_open(…, gm_mesh **out)`).
// ferrule must report nothing. What says the code is right is outside ferrule: rustc builds the
// crate as a staticlib, g++ -std=c++17 -Wall -Wextra -Werror -pthread builds the blocks and the
// driver, and the driver (copies and moves of the owners, two threads, every handle destroyed)
// runs clean under Valgrind memcheck (--leak-check=full).
// Below, what the probe first flagged (four false positives, fixed) is pinned next to the slips
// of the same shape that the same rules must still report.
import { describe, expect, it } from "vitest";
import { execFileSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { analyze, at, FIXTURES } from "./helpers/analyze.js";
import { expectNoFindings, have, memcheck } from "./helpers/clean.js";

const DIR = path.join(FIXTURES, "clean", "geophone-mesh");
const TOOLS = have("rustc") && have("g++") && have("valgrind");

describe("clean workspace: geophone-mesh", () => {
  it("ferrule reports nothing, in-process and through the shipped CLI (exit 0, the aid-not-proof line)", async () => {
    await expectNoFindings("geophone-mesh");
  });

  it.skipIf(!TOOLS)("the code is right: rustc + g++ build it, and the threaded driver runs clean under Valgrind memcheck", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-geophone-"));
    try {
      const lib = path.join(dir, "libgm.a");
      execFileSync("rustc", ["--edition=2021", "--crate-type", "staticlib", "-C", "panic=abort", "-g", "-o", lib, path.join(DIR, "rust", "src", "lib.rs")], { stdio: "pipe" });
      const exe = path.join(dir, "field");
      const blocks = fs.readdirSync(path.join(DIR, "blocks")).filter((f) => f.endsWith(".cpp")).map((f) => path.join(DIR, "blocks", f));
      execFileSync("g++", ["-std=c++17", "-Wall", "-Wextra", "-Werror", "-pthread", "-g", "-O0", "-I", path.join(DIR, "include"), "-o", exe, path.join(DIR, "app", "field.cpp"), ...blocks, lib, "-ldl", "-lm"], { stdio: "pipe" });
      const r = memcheck(exe);
      expect(r.stderr).toBe("");
      // node 1 has gain 2 and node 3 gain 4 (the trampoline saw the scaled blocks); each thread
      // counted 100 spikes x 5 rounds into the one shared tally, plus one event each by hand and
      // one spike of node 3 from the main thread's mesh
      expect(r.stdout).toMatch(/^streams 1 2 blocks$/m);
      expect(r.stdout).toMatch(/^events 500 500 total 1003 peak 4\.00$/m);
      expect(r.stdout).not.toMatch(/FAIL/);
      expect(r.stdout).toMatch(/all checks passed/);
      expect(r.status).toBe(0);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }, 180_000);
});

const rules = (fs_: { rule: string; range: { file: string; line: number } }[]) => fs_.map((f) => `${f.rule}@${f.range.file.replace(/^\/ws\//, "")}:${f.range.line + 1}`).sort();

describe("what the probe first flagged, next to the slips the same rules still report", () => {
  // std docs, `Arc::decrement_strong_count`: "Decrements the strong reference count on the
  // Arc<T> associated with the provided pointer by one … the inner value is dropped" with the
  // last one; equivalent to `drop(Arc::from_raw(ptr))`.
  const TALLY_H = `#include <stdint.h>
typedef struct gm_tally gm_tally;
gm_tally *gm_tally_new(uint32_t nodes);
void gm_tally_release(gm_tally *t);
`;
  const tallyRs = (release: string, make = "Arc::into_raw(Arc::new(Tally { n: nodes }))") => `use std::sync::Arc;
pub struct Tally { n: u32 }
#[no_mangle]
pub extern "C" fn gm_tally_new(nodes: u32) -> *mut Tally { ${make} as *mut Tally }
#[no_mangle]
pub unsafe extern "C" fn gm_tally_release(t: *mut Tally) {
${release}
}
`;

  it("`Arc::decrement_strong_count` in the release function releases the handle (no `handle-no-release`)", async () => {
    const r = await analyze({ "t.h": TALLY_H, "t.rs": tallyRs("    if !t.is_null() { Arc::decrement_strong_count(t); }") });
    expect(rules(r.findings)).toEqual([]);
  });

  it("still reported: no release at all, decrement without a NULL check, decrement of a `Box::into_raw` handle", async () => {
    const none = await analyze({ "t.h": TALLY_H, "t.rs": tallyRs("    let _ = t;") });
    expect(at(none.findings, "handle-no-release")).toEqual(["t.rs:4"]);
    const unchecked = await analyze({ "t.h": TALLY_H, "t.rs": tallyRs("    Arc::decrement_strong_count(t);") });
    expect(rules(unchecked.findings)).toEqual(["release-without-null-check@t.rs:7"]);
    // Box::into_raw then Arc::decrement_strong_count: the Arc header is read where a Box has none
    // (std docs, `Arc::from_raw`: the pointer must come from `Arc::into_raw`)
    const boxed = await analyze({ "t.h": TALLY_H, "t.rs": tallyRs("    if !t.is_null() { Arc::decrement_strong_count(t); }", "Box::into_raw(Box::new(Tally { n: nodes }))") });
    expect(rules(boxed.findings)).toEqual(["release-kind-mismatch@t.rs:7"]);
  });

  // std docs, `Arc::increment_strong_count`: incrementing first and then `Arc::from_raw` gives an
  // owned Arc while the caller keeps its own reference (the doc example does exactly this).
  const MESH_H = `typedef struct gm_calib gm_calib;
typedef struct gm_mesh gm_mesh;
gm_calib *gm_calib_new(void);
void gm_calib_release(gm_calib *c);
gm_mesh *gm_mesh_new(void);
void gm_mesh_attach(gm_mesh *m, gm_calib *c);
void gm_mesh_free(gm_mesh *m);
`;
  const meshRs = (attach: string) => `use std::sync::Arc;
pub struct Calib { g: f32 }
pub struct Mesh { calib: Option<Arc<Calib>> }
#[no_mangle]
pub extern "C" fn gm_calib_new() -> *mut Calib { Arc::into_raw(Arc::new(Calib { g: 1.0 })) as *mut Calib }
#[no_mangle]
pub unsafe extern "C" fn gm_calib_release(c: *mut Calib) { if !c.is_null() { drop(Arc::from_raw(c)); } }
#[no_mangle]
pub extern "C" fn gm_mesh_new() -> *mut Mesh { Box::into_raw(Box::new(Mesh { calib: None })) }
#[no_mangle]
pub unsafe extern "C" fn gm_mesh_free(m: *mut Mesh) { if !m.is_null() { drop(Box::from_raw(m)); } }
unsafe fn share(c: *const Calib, other: *const Calib) -> Arc<Calib> {
    let _ = other;
${attach}
}
#[no_mangle]
pub unsafe extern "C" fn gm_mesh_attach(m: *mut Mesh, c: *mut Calib) {
    let mesh = &mut *m;
    mesh.calib = Some(share(c, c));
}
`;

  it("`increment_strong_count(p)` then `Arc::from_raw(p)` in a borrowing function is a borrow (no `borrower-takes-ownership`)", async () => {
    const r = await analyze({ "m.h": MESH_H, "m.rs": meshRs("    Arc::increment_strong_count(c);\n    Arc::from_raw(c)") });
    expect(rules(r.findings)).toEqual([]);
  });

  it("still `borrower-takes-ownership`: `Arc::from_raw(p)` with no increment, or with the increment on another pointer", async () => {
    const bare = await analyze({ "m.h": MESH_H, "m.rs": meshRs("    Arc::from_raw(c)") });
    // the finding sits at the call of the helper that takes the handle
    expect(at(bare.findings, "borrower-takes-ownership")).toEqual(["m.rs:19"]);
    const other = await analyze({ "m.h": MESH_H, "m.rs": meshRs("    Arc::increment_strong_count(other);\n    Arc::from_raw(c)") });
    expect(at(other.findings, "borrower-takes-ownership")).toEqual(["m.rs:20"]);
  });

  // The Rust Reference, "Type aliases": `type Shared = Mutex<Tally>;` names the same type, so
  // `Arc<Shared>` is the `Arc<Mutex<Tally>>` the constructor made.
  const aliasRs = (alias: string, made: string) => `use std::sync::{Arc, Mutex};
pub struct Tally { n: u32 }
pub struct Probe { n: u32 }
${alias}
#[no_mangle]
pub extern "C" fn gm_tally_new(nodes: u32) -> *mut Shared { Arc::into_raw(Arc::new(${made})) as *mut Shared }
#[no_mangle]
pub unsafe extern "C" fn gm_tally_release(t: *mut Shared) { if !t.is_null() { drop(Arc::from_raw(t)); } }
`;

  it("a release through a `type` alias of the allocated type is not `release-kind-mismatch` (generic `Mutex<Tally>` and plain struct)", async () => {
    const mutex = await analyze({ "t.h": TALLY_H, "t.rs": aliasRs("type Shared = Mutex<Tally>;", "Mutex::new(Tally { n: nodes })") });
    expect(rules(mutex.findings)).toEqual([]);
    const plain = await analyze({ "t.h": TALLY_H, "t.rs": aliasRs("type Shared = Tally;", "Tally { n: nodes }") });
    expect(rules(plain.findings)).toEqual([]);
  });

  it("still `release-kind-mismatch`: the alias names another type than the one allocated", async () => {
    const r = await analyze({ "t.h": TALLY_H, "t.rs": aliasRs("type Shared = Probe;", "Tally { n: nodes }") });
    expect(at(r.findings, "release-kind-mismatch")).toEqual(["t.rs:8"]);
  });

  // C11 6.2.5p1 and 6.5.3.2p4: a pointer to an incomplete struct type cannot be dereferenced, so C
  // can neither read nor write what a `gm_calib *` points to. `Arc::into_raw` returns `*const T`.
  const constRs = `use std::sync::Arc;
pub struct Calib { g: Vec<f32> }
#[repr(C)]
pub struct GmPoint { pub x: f32 }
#[no_mangle]
pub extern "C" fn gm_calib_new() -> *const Calib { Arc::into_raw(Arc::new(Calib { g: Vec::new() })) }
#[no_mangle]
pub unsafe extern "C" fn gm_calib_release(c: *const Calib) { if !c.is_null() { drop(Arc::from_raw(c)); } }
#[no_mangle]
pub unsafe extern "C" fn gm_calib_gains(c: *const Calib) -> *const f32 { (*c).g.as_ptr() }
#[no_mangle]
pub unsafe extern "C" fn gm_calib_touch(c: *mut Calib) { let _ = c; }
static ORIGIN: GmPoint = GmPoint { x: 0.0 };
#[no_mangle]
pub extern "C" fn gm_origin() -> *const GmPoint { &ORIGIN }
`;
  const constH = `typedef struct gm_calib gm_calib;
typedef struct gm_point { float x; } gm_point;
gm_calib *gm_calib_new(void);
void gm_calib_release(gm_calib *c);
float *gm_calib_gains(gm_calib *c);
void gm_calib_touch(const gm_calib *c);
gm_point *gm_origin(void);
`;

  it("a Rust `*const` handle that C spells `gm_calib *` (opaque) is not `pointer-constness`, as a return or a parameter; the non-opaque ones still are", async () => {
    const r = await analyze({ "c.h": constH, "c.rs": constRs });
    // lines 3 and 4 (gm_calib_new's return, gm_calib_release's and gm_calib_gains' parameter) are
    // opaque handles: nothing. Still reported: a writable `float *` to Rust's read-only gains
    // (line 5, C may write into them), a Rust `*mut` where C promises const (line 6, error), and a
    // writable pointer to a complete struct Rust hands out read-only (line 7).
    expect(at(r.findings, "pointer-constness")).toEqual(["c.h:5", "c.h:6", "c.h:7"]);
    expect(r.findings.filter((f) => f.rule === "pointer-constness").map((f) => f.severity)).toEqual(["warning", "error", "warning"]);
    expect(r.findings.filter((f) => f.rule !== "pointer-constness")).toEqual([]);
  });

  // C++ [class.copy.ctor]: a user-written copy constructor replaces the implicit one. One that
  // retains the shared handle gives each copy its own reference; one that only copies the
  // pointer leaves two owners of one reference (double release).
  const ownerCpp = (copy: string) => `#include "t.h"
class tally_ref {
public:
    explicit tally_ref(uint32_t n) : t_(gm_tally_new(n)) {}
    tally_ref(const tally_ref &o) : t_(o.t_) { ${copy} }
    tally_ref &operator=(const tally_ref &) = delete;
    ~tally_ref() { gm_tally_release(t_); }
private:
    gm_tally *t_;
};
`;
  const RETAIN_H = `#ifdef __cplusplus\nextern "C" {\n#endif\n${TALLY_H}void gm_tally_retain(gm_tally *t);\n#ifdef __cplusplus\n}\n#endif\n`;
  const RETAIN_RS = tallyRs("    if !t.is_null() { Arc::decrement_strong_count(t); }") +
    "#[no_mangle]\npub unsafe extern \"C\" fn gm_tally_retain(t: *mut Tally) { if !t.is_null() { Arc::increment_strong_count(t); } }\n";

  it("a copy constructor that retains is a correct copyable owner; one that only copies the pointer is still `copyable-owning-wrapper`", async () => {
    const ok = await analyze({ "t.h": RETAIN_H, "t.rs": RETAIN_RS, "o.cpp": ownerCpp("gm_tally_retain(t_);") });
    expect(rules(ok.findings)).toEqual([]);
    const bad = await analyze({ "t.h": RETAIN_H, "t.rs": RETAIN_RS, "o.cpp": ownerCpp("") });
    expect(at(bad.findings, "copyable-owning-wrapper")).toEqual(["o.cpp:2"]);
  });
});
