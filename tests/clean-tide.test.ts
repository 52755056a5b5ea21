// The sixth false-positive probe: test-fixtures/clean/tide-gauge, a tide-gauge telemetry unit
// whose C console and C++ uplink call Rust kernels through one hand-written header. It leans on
// strings, byte buffers and error reporting across the seam, which the other probes lack:
// - owned strings: `CString::into_raw` from two constructors, one `tg_string_free` doing
//   `CString::from_raw` after a NULL check (Rust std docs, `CString::from_raw`: only with a pointer
//   from `CString::into_raw`); C++ holds one in `std::unique_ptr<char, decltype(&tg_string_free)>`
//   and also copies one into `std::string` then frees it; C frees one and sets it to NULL;
// - borrowed strings: static `b"...\0"` names and a thread-local last-error `CString` (valid until
//   the next call on the thread), printed or copied by the callers and never freed;
// - strings in: NUL-terminated through `CStr::from_ptr`, and (pointer, length) read as bytes with
//   `from_raw_parts(buf as *const u8, len)` (NULL allowed with length 0);
// - caller buffers: `tg_format_report(r, out, out_len)` in the snprintf convention (C: writes at
//   most n bytes including the NUL, returns the length needed; common practice for such APIs),
//   called with a size query (NULL, 0) then a `std::vector<char>` of that size, and with a
//   too-small stack array `sizeof tiny`; a `buf_size` variant written through
//   `from_raw_parts_mut(buf as *mut u8, buf_size)`; a `uint8_t *frame, size_t frame_cap` encoder
//   returning bytes written (0 when too small); `char station[TG_NAME_MAX]` / `uint8_t name[...]`
//   fields mirrored as `[c_char; N]` / `[u8; N]`;
// - owned bytes: a `Box<[u8]>` handed to C as its data pointer and length, taken back by
//   `tg_bytes_free(p, len)` with `Box::from_raw(ptr::slice_from_raw_parts_mut(p, len))` (std docs,
//   `ptr::slice_from_raw_parts_mut` and `Box::from_raw`), held in C++ by a `unique_ptr<uint8_t[]>`
//   whose deleter carries the length;
// - errors: `int` codes with an out-parameter, and a `bool` success flag.
// What says the code is right is outside ferrule: rustc builds the crate as a staticlib, gcc
// -std=c11 and g++ -std=c++17 (-Wall -Wextra -Werror) build the callers, and the driver runs every
// call, the size query and the too-small buffers clean under Valgrind memcheck (--leak-check=full),
// checking the results (the CRC-16/CCITT-FALSE check value 0x29B1 of "123456789" is the
// catalogued one, common practice).
// Below, what the probe first flagged (a false positive, fixed) is pinned next to the slips of the
// same shape that the ownership rules must still report.
import { describe, expect, it } from "vitest";
import { execFileSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { analyze, FIXTURES } from "./helpers/analyze.js";
import { expectNoFindings, have, memcheck } from "./helpers/clean.js";
import type { Finding } from "../server/src/rules/api.js";

const DIR = path.join(FIXTURES, "clean", "tide-gauge");
const RUN_TOOLS = have("rustc") && have("gcc") && have("g++") && have("valgrind");

describe("clean workspace: tide-gauge", () => {
  it("ferrule reports nothing, in-process and through the shipped CLI (exit 0)", async () => {
    await expectNoFindings("tide-gauge");
  });

  it.skipIf(!RUN_TOOLS)("the code is right: rustc + gcc + g++ build it, and it runs clean under Valgrind memcheck", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-tide-"));
    try {
      const lib = path.join(dir, "libtg.a");
      execFileSync("rustc", ["--edition=2021", "--crate-type", "staticlib", "-C", "panic=abort", "-g", "-o", lib, path.join(DIR, "rust", "src", "lib.rs")], { stdio: "pipe" });
      const inc = ["-I", path.join(DIR, "include"), "-I", path.join(DIR, "app")];
      const obj = path.join(dir, "console.o");
      execFileSync("gcc", ["-std=c11", "-Wall", "-Wextra", "-Werror", "-g", "-O0", ...inc, "-c", "-o", obj, path.join(DIR, "app", "console.c")], { stdio: "pipe" });
      const exe = path.join(dir, "tide");
      execFileSync("g++", ["-std=c++17", "-Wall", "-Wextra", "-Werror", "-g", "-O0", ...inc, "-o", exe,
        path.join(DIR, "app", "main.cpp"), path.join(DIR, "app", "uplink.cpp"), obj, lib, "-lpthread", "-ldl", "-lm"], { stdio: "pipe" });
      const r = memcheck(exe);
      expect(r.stderr).toBe("");
      // errors reported through the borrowed last-error message
      expect(r.stdout).toMatch(/^line 3 rejected: syntax error \(bad time\)$/m);
      expect(r.stdout).toMatch(/^line 4 rejected: out of range \(bad level\)$/m);
      // the 40-byte stack buffer truncates (39 bytes + NUL) and says how much was needed
      expect(r.stdout).toMatch(/^harbour-mouth-e: n=3 min=1188 mm max=13\.\.\. \(60 bytes needed\)$/m);
      expect(r.stdout).toMatch(/^frame 33 bytes crc [0-9a-f]{4}$/m);
      expect(r.stdout).not.toMatch(/FAILED/);
      expect(r.stdout).toMatch(/all checks passed/);
      expect(r.status).toBe(0);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);
});

describe("what the probe first flagged, next to the slips the same rules still report", () => {
  // Two kinds of owned memory reach C as a byte pointer: a string (`CString::into_raw`, `char *`)
  // and a boxed byte slice (`Box<[u8]>`, `uint8_t *` plus its length). Each has its own release
  // function. A `char`/`uint8_t` pointer is data, not a handle type, so it alone does not say
  // which release function belongs to which constructor.
  const HDR = `#include <stddef.h>
#include <stdint.h>
char *tg_station_name(uint32_t id);
void tg_string_free(char *s);
uint8_t *tg_encode_alloc(size_t n, size_t *out_len);
void tg_bytes_free(uint8_t *p, size_t len);
`;
  const STR_RS = `use std::ffi::CString;
use std::os::raw::c_char;
#[no_mangle]
pub extern "C" fn tg_station_name(id: u32) -> *mut c_char {
    match CString::new(format!("STN{id:02}")) { Ok(s) => s.into_raw(), Err(_) => std::ptr::null_mut() }
}
#[no_mangle]
pub unsafe extern "C" fn tg_string_free(s: *mut c_char) {
    if s.is_null() { return; }
    drop(CString::from_raw(s));
}
`;
  const bytesRs = (free: string) => `use std::ptr;
#[no_mangle]
pub unsafe extern "C" fn tg_encode_alloc(n: usize, out_len: *mut usize) -> *mut u8 {
    if out_len.is_null() { return ptr::null_mut(); }
    let boxed: Box<[u8]> = vec![0x7e; n].into_boxed_slice();
    *out_len = boxed.len();
    Box::into_raw(boxed) as *mut u8
}
#[no_mangle]
pub unsafe extern "C" fn tg_bytes_free(p: *mut u8, len: usize) {
${free}
}
`;
  const GOOD_FREE = `    if p.is_null() { return; }
    drop(Box::from_raw(ptr::slice_from_raw_parts_mut(p, len)));`;
  const own = (fs_: Finding[]) => fs_.map((f) => `${f.rule}@${f.range.file.replace(/^\/ws\//, "")}:${f.range.line + 1}`);

  it("a CString release and a boxed-byte-slice release side by side: each pairs with its own constructor, nothing reported", async () => {
    // was: release-kind-mismatch, `tg_string_free` (CString::from_raw) paired with `tg_encode_alloc`
    // (Box::into_raw) because both pass a byte pointer; and `Box::from_raw(ptr::slice_from_raw_parts_mut(p, len))`
    // was not seen as taking `p` back
    const r = await analyze({ "tg.h": HDR, "text.rs": STR_RS, "bytes.rs": bytesRs(GOOD_FREE) });
    expect(own(r.findings)).toEqual([]);
    // `slice::from_raw_parts_mut(p, len)` (a `&mut [u8]`, coerced to `*mut [u8]`) is the same release
    const r2 = await analyze({ "tg.h": HDR, "text.rs": STR_RS, "bytes.rs": bytesRs(GOOD_FREE.replace("ptr::slice_from_raw_parts_mut", "std::slice::from_raw_parts_mut")) });
    expect(own(r2.findings)).toEqual([]);
  });

  it("the boxed-slice release is now read as a release: without its NULL check it is reported", async () => {
    // std docs, `Box::from_raw`: the pointer must come from `Box::into_raw`; NULL never does
    const r = await analyze({ "tg.h": HDR, "text.rs": STR_RS, "bytes.rs": bytesRs("    drop(Box::from_raw(ptr::slice_from_raw_parts_mut(p, len)));") });
    expect(own(r.findings)).toEqual(["release-without-null-check@bytes.rs:11"]);
  });

  it("still `release-kind-mismatch`: a CString taken back with Box::from_raw by the release function of its own name", async () => {
    // std docs, `CString::from_raw`: only a pointer from `CString::into_raw` may be taken back, and
    // only by it (a `Box<c_char>` would free the whole string as a one-byte allocation)
    const rs = `use std::ffi::CString;
use std::os::raw::c_char;
#[no_mangle]
pub extern "C" fn tg_label_new(id: u32) -> *mut c_char {
    match CString::new(format!("L{id}")) { Ok(s) => s.into_raw(), Err(_) => std::ptr::null_mut() }
}
#[no_mangle]
pub unsafe extern "C" fn tg_label_free(s: *mut c_char) {
    if s.is_null() { return; }
    drop(Box::from_raw(s));
}
`;
    const r = await analyze({ "l.h": "#include <stdint.h>\nchar *tg_label_new(uint32_t id);\nvoid tg_label_free(char *s);\n", "l.rs": rs });
    expect(own(r.findings)).toEqual(["release-kind-mismatch@l.rs:10"]);
  });

  it("still reported: a byte buffer whose only release takes it back as a CString (now: no release function of its kind)", async () => {
    const r = await analyze({ "tg.h": HDR.replace("void tg_bytes_free(uint8_t *p, size_t len);\n", ""), "text.rs": STR_RS, "bytes.rs": bytesRs("").replace(/#\[no_mangle\]\npub unsafe extern "C" fn tg_bytes_free[^]*$/, "") });
    expect(own(r.findings)).toEqual(["handle-no-release@bytes.rs:3"]);
  });

  it("the C side: a string freed by the byte release and a frame freed by the string release are `handle-kind-mismatch`", async () => {
    // each release rebuilds another allocation than the one made (a Box<[u8]> of the wrong length,
    // a CString over bytes with no NUL): undefined behaviour (std docs, `Box::from_raw`, `CString::from_raw`)
    const c = `#include "tg.h"
void console(void) {
    char *name = tg_station_name(3);
    tg_bytes_free((uint8_t *)name, 5);
    size_t len = 0;
    uint8_t *frame = tg_encode_alloc(8, &len);
    tg_string_free((char *)frame);
}
`;
    const r = await analyze({ "tg.h": HDR, "text.rs": STR_RS, "bytes.rs": bytesRs(GOOD_FREE), "console.c": c });
    expect(own(r.findings).sort()).toEqual(["handle-kind-mismatch@console.c:4", "handle-kind-mismatch@console.c:7"]);
    const ok = c.replace("tg_bytes_free((uint8_t *)name, 5)", "tg_string_free(name)").replace("tg_string_free((char *)frame)", "tg_bytes_free(frame, len)");
    expect(own((await analyze({ "tg.h": HDR, "text.rs": STR_RS, "bytes.rs": bytesRs(GOOD_FREE), "console.c": ok })).findings)).toEqual([]);
  });
});
