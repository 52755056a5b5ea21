import { describe, expect, test } from "vitest";
import { checkDir } from "../helpers/analyze.js";

// Scalar facts behind the per-target expectations (checked against clang/gcc in
// tests/targets.oracle.test.ts): long is 4 bytes on ILP32 (i686 SysV psABI, AAPCS) and on
// Windows x64 (LLP64); size_t is 4 bytes on the ILP32 targets; plain char is unsigned on
// AAPCS and AAPCS64 and signed on x86.
describe("signatures family", () => {
  test("bad fixture: each mismatch at its header line, with the targets it affects", async () => {
    const { lines, findings } = await checkDir("rules/signatures/bad");
    expect(lines.sort()).toEqual([
      "kern.h:7 arity-mismatch",
      "kern.h:8 param-type-mismatch",
      "kern.h:9 return-type-mismatch",
      "kern.h:10 pointer-constness",
      "kern.h:11 param-signedness",
      "kern.h:11 param-type-mismatch",
      "kern.h:12 param-type-mismatch",
      "kern.h:13 param-signedness",
      "kern.h:14 param-type-mismatch",
      "kern.h:15 callback-mismatch",
      "kern.h:16 arity-mismatch",
      "kern.h:17 pointer-constness",
      // ops.rs: #[repr(C)] fn-pointer fields C may leave NULL (the struct's comment names
      // on_overflow; log's own comment; `_Nullable` on on_close); on_strike is required: no finding
      "ops.rs:10 callback-mismatch",
      "ops.rs:11 callback-mismatch",
      "ops.rs:12 callback-mismatch",
    ].sort());
    const byLine = (l: number, rule: string) => findings.find((f) => f.range.line === l - 1 && f.rule === rule)!;
    // usize vs int: a width slip on 64-bit targets, a signedness slip on 32-bit ones
    expect(byLine(11, "param-type-mismatch").targets).toEqual(["x86_64-unknown-linux-gnu", "aarch64-unknown-linux-gnu", "x86_64-pc-windows-msvc"]);
    expect(byLine(11, "param-signedness").targets).toEqual(["armv7-unknown-linux-gnueabihf", "i686-unknown-linux-gnu"]);
    // c_long vs int64_t: only where long is 4 bytes
    expect(byLine(12, "param-type-mismatch").targets).toEqual(["armv7-unknown-linux-gnueabihf", "i686-unknown-linux-gnu", "x86_64-pc-windows-msvc"]);
    expect(byLine(12, "param-type-mismatch").message).toContain("(on armv7, i686, x86_64-windows only)");
    // i8 vs char: only where plain char is unsigned
    expect(byLine(13, "param-signedness").targets).toEqual(["aarch64-unknown-linux-gnu", "armv7-unknown-linux-gnueabihf"]);
    // Rust writing through a pointer the header declares const is an error; the reverse a warning
    expect(byLine(10, "pointer-constness").severity).toBe("error");
    expect(byLine(17, "pointer-constness").severity).toBe("warning");
    // every finding carries the other side as related location
    for (const f of findings) {
      expect(f.related.length).toBeGreaterThan(0);
      expect(f.related[0]!.range.file).toMatch(f.range.file.endsWith("kern.h") ? /kern\.rs$/ : /ops\.h$/);
    }
    // nullable fn-pointer fields: the C field is the related location, the evidence is named
    const field = (l: number) => findings.find((f) => f.range.file.endsWith("ops.rs") && f.range.line === l - 1)!;
    expect(field(10).related[0]!.range.line + 1).toBe(13);
    expect(field(10).message).toContain("on_overflow may be NULL");
    expect(field(11).related[0]!.range.line + 1).toBe(15);
    expect(field(11).message).toContain("the comment of `log`");
    expect(field(12).related[0]!.range.line + 1).toBe(16);
    expect(field(12).message).toContain("`_Nullable` on `on_close`");
    for (const l of [10, 11, 12]) expect(field(l).severity).toBe("warning");
    expect(byLine(8, "param-type-mismatch").related[0]!.range.line + 1).toBe(7);
  });

  test("--target narrows: on x86_64 alone the long/int64 and char slips vanish", async () => {
    const { lines } = await checkDir("rules/signatures/bad", { targets: ["x86_64-unknown-linux-gnu"] });
    expect(lines).not.toContain("kern.h:12 param-type-mismatch");
    expect(lines).not.toContain("kern.h:13 param-signedness");
    expect(lines).toContain("kern.h:8 param-type-mismatch");
  });

  test("good fixture: typedef chains, #define aliases, references, NonNull, Option<fn>, complex, variadic import", async () => {
    const { lines } = await checkDir("rules/signatures/good");
    expect(lines).toEqual([]);
  });
});

describe("pointee signedness", () => {
  test("byte pointers (`*const u8` for `const char *`) are common practice; I/Q sample pointers are not", async () => {
    const { analyze, at } = await import("../helpers/analyze.js");
    const { findings } = await analyze({
      "k.rs": "#[no_mangle]\npub unsafe extern \"C\" fn tag(s: *const u8) {}\n#[no_mangle]\npub unsafe extern \"C\" fn iq(s: *const u16, n: usize) {}\n",
      "k.h": "#include <stdint.h>\n#include <stddef.h>\nvoid tag(const char *s);\nvoid iq(const int16_t *s, size_t n);\n",
    });
    expect(at(findings, "param-signedness")).toEqual(["k.h:4"]);
  });
});

describe("nullable function-pointer fields (callback-mismatch)", () => {
  // A Rust fn pointer is never null (Rust Reference, "Function pointer types"); Option<fn> is the
  // nullable one with the same size (std::option, "Representation").
  const H = `#include <stdint.h>
/* Seismic-array trigger hooks. Any entry may be NULL. */
typedef struct seis_hooks {
    void (*on_trigger)(void *ctx, uint32_t channel);
    void (*on_clear)(void *ctx);
} seis_hooks;
/* Plain table: the host fills every entry. */
typedef struct seis_table {
    void (*on_trigger)(void *ctx, uint32_t channel);
} seis_table;
void seis_install(const seis_hooks *h, const seis_table *t);
`;
  const rs = (hooks: string) => `use core::ffi::c_void;
pub type ClearFn = unsafe extern "C" fn(*mut c_void);
#[repr(C)]
pub struct SeisHooks {
${hooks}
}
#[repr(C)]
pub struct SeisTable {
    pub on_trigger: unsafe extern "C" fn(*mut c_void, u32),
}
#[no_mangle]
pub unsafe extern "C" fn seis_install(h: *const SeisHooks, t: *const SeisTable) {}
`;
  test("a struct comment that says any entry may be NULL covers every fn-pointer field; a table without such words gives nothing", async () => {
    const { analyze, at } = await import("../helpers/analyze.js");
    const { findings } = await analyze({ "trig.h": H, "trig.rs": rs("    pub on_trigger: unsafe extern \"C\" fn(*mut c_void, u32),\n    pub on_clear: ClearFn,") });
    expect(at(findings, "callback-mismatch").sort()).toEqual(["trig.rs:5", "trig.rs:6"]);
  });
  test("Option<unsafe extern \"C\" fn> and Option<alias> fields are correct", async () => {
    const { analyze } = await import("../helpers/analyze.js");
    const { findings } = await analyze({ "trig.h": H, "trig.rs": rs("    pub on_trigger: Option<unsafe extern \"C\" fn(*mut c_void, u32)>,\n    pub on_clear: Option<ClearFn>,") });
    expect(findings.map((f) => `${f.rule} ${f.message}`)).toEqual([]);
  });
});

// Constness by who may write (C11 6.7.3p6: writing through a pointer to a const-qualified object is
// undefined; C11 7.22.3.3: free takes back what it was given, whatever const the caller held it by;
// std::ptr::NonNull has no read-only form). The severities: Rust writing where C says const is an
// error; C possibly writing what Rust lent read-only (an imported function, a sample buffer C
// expects filled) a warning; a record or an inner level Rust only reads, or a writable pointer Rust
// passes to a C function that promises const, is advice.
describe("pointer-constness: who writes", () => {
  test("good: a record and an inner level Rust only reads, a release function, NonNull, a Rust-writable pointer into a C const parameter: info at most", async () => {
    const { findings } = await checkDir("signatures/pointer-constness/who-writes/good");
    expect(findings.filter((f) => f.severity !== "info")).toEqual([]);
    expect(findings.map((f) => `${f.rule} ${f.range.line + 1}`)).toEqual(["pointer-constness 17", "pointer-constness 19", "pointer-constness 24"]);
    expect(findings[0]!.message).toContain("Rust only reads through it");
  });
  test("bad: a buffer C expects filled taken read-only, Rust writing a const config, C writing what Rust lent read-only", async () => {
    const { findings } = await checkDir("signatures/pointer-constness/who-writes/bad");
    expect(findings.filter((f) => f.rule === "pointer-constness").map((f) => `${f.range.line + 1} ${f.severity}`)).toEqual(["14 warning", "15 error", "17 warning"]);
  });
});

// A header comment that says the callback is called makes it required: a NULL there breaks the
// header's contract, so a plain Rust `extern "C" fn` is right (Rust Reference, "Function pointer
// types": never null). A header that allows NULL still needs Option<fn> (std::option,
// "Representation"). A pointer to a function typedef is a callback like any other.
describe("callback-mismatch: required callbacks", () => {
  test("good: callbacks the comments say are called; a pointer to a function typedef", async () => {
    const { lines } = await checkDir("signatures/callback-mismatch/required-callback/good");
    expect(lines).toEqual([]);
  });
  test("bad: a callback the header allows NULL for; a typedef'd callback with a double where C has float", async () => {
    const { findings } = await checkDir("signatures/callback-mismatch/required-callback/bad");
    expect(findings.map((f) => `${f.rule} ${f.range.line + 1} ${f.severity}`)).toEqual(["callback-mismatch 10 warning", "callback-mismatch 12 error"]);
  });
});
