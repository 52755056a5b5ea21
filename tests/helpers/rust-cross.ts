// rustc's own layout of Rust items on ANY of the five targets, without a standard library for them.
//
// Only the host's standard library is installed, so the crate is `#![no_core]` (the same technique
// as rustLayoutCross in tests/oracles/compilers.ts, which covers primitives only): it declares the
// few lang items rustc needs, the `size_of`/`align_of` intrinsics and the `offset_of` lang item
// (what `core::mem::offset_of!` expands to: `builtin # offset_of(T, field)`). Each question becomes
// a static whose TYPE is `[u8; <answer>]`, so the answers are the array lengths in the LLVM IR
// rustc emits (`@FQ7 = constant [24 x i8] zeroinitializer`). Nothing is linked or run.
// Needs RUSTC_BOOTSTRAP=1 (set only in the child process). The lang items are compiler internals:
// if this starts failing after a toolchain upgrade, update NO_CORE below rather than dropping it.

import { execFileSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import type { Triple } from "../../server/src/model/targets";

/** The lang items every `#![no_core]` probe crate needs (also used by tests/oracles/compilers.ts). */
export const NO_CORE_LANG_ITEMS = `#[lang = "pointee_sized"] pub trait PointeeSized {}
#[lang = "meta_sized"] pub trait MetaSized: PointeeSized {}
#[lang = "sized"] pub trait Sized: MetaSized {}
#[lang = "sync"] pub unsafe auto trait Sync {}
#[lang = "freeze"] pub unsafe auto trait Freeze {}
#[lang = "copy"] pub trait Copy {}
#[lang = "drop_in_place"] pub unsafe fn drop_in_place<T: PointeeSized>(_p: *mut T) {}
`;

const NO_CORE = `#![feature(no_core, lang_items, auto_traits, intrinsics, rustc_attrs, builtin_syntax)]
#![no_core]
#![allow(internal_features, non_camel_case_types, dead_code)]
${NO_CORE_LANG_ITEMS}#[rustc_intrinsic] pub const fn size_of<T>() -> usize;
#[rustc_intrinsic] pub const fn align_of<T>() -> usize;
#[rustc_intrinsic] #[lang = "offset_of"] pub const fn offset_of<T: PointeeSized>(variant: u32, field: u32) -> usize;
impl Copy for u8 {} impl Copy for i8 {} impl Copy for u16 {} impl Copy for i16 {} impl Copy for u32 {}
impl Copy for i32 {} impl Copy for u64 {} impl Copy for i64 {} impl Copy for usize {} impl Copy for isize {}
impl Copy for f32 {} impl Copy for f64 {} impl Copy for bool {}
impl<T: Copy, const N: usize> Copy for [T; N] {}
impl<T: PointeeSized> Copy for *mut T {}
impl<T: PointeeSized> Copy for *const T {}
pub enum c_void {}
`;

/**
 * The C type names of core::ffi for a target (core::ffi: c_long/c_ulong are 32-bit on the ILP32
 * targets and on Windows (LLP64), 64-bit on LP64 — from memory of library/core/src/ffi; the same
 * facts as C's `long`, checked against clang in tests/targets.oracle.test.ts).
 */
function ffiAliases(t: Triple): string {
  const long64 = t === "x86_64-unknown-linux-gnu" || t === "aarch64-unknown-linux-gnu";
  return `pub type c_char = i8; pub type c_short = i16; pub type c_int = i32; pub type c_uint = u32;
pub type c_long = ${long64 ? "i64" : "i32"}; pub type c_ulong = ${long64 ? "u64" : "u32"}; pub type c_ulonglong = u64;
`;
}

/**
 * Evaluates `size_of::<T>()`, `align_of::<T>()` and `offset_of!(T, f)` questions about `items`
 * (Rust items using only primitives, arrays, raw pointers, c_void and the core::ffi c_* names;
 * every type that a union holds must get `impl Copy for T {}` in `items`) for `triple`.
 */
export function rustValuesCross(triple: Triple, items: string, exprs: readonly string[]): number[] {
  const q = exprs.map((e, i) => {
    const m = /^offset_of!\((\w+), (\w+)\)$/.exec(e);
    const v = m ? `builtin # offset_of(${m[1]}, ${m[2]})` : e;
    return `#[no_mangle] pub static FQ${i}: [u8; ${v}] = [0; ${v}];\n`;
  });
  const text = NO_CORE + ffiAliases(triple) + items + q.join("");
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-rust-cross-"));
  try {
    const file = path.join(dir, "probe.rs");
    fs.writeFileSync(file, text);
    let ir: string;
    try {
      ir = execFileSync("rustc", ["--target", triple, "--crate-type", "lib", "--emit", "llvm-ir", "-o", "-", file], {
        maxBuffer: 256 * 1024 * 1024,
        stdio: ["ignore", "pipe", "pipe"],
        env: { ...process.env, RUSTC_BOOTSTRAP: "1" },
      }).toString();
    } catch (err) {
      const e = err as { stderr?: Buffer };
      throw new Error(`rustc --target ${triple} (no_core layout probe) failed; if a lang item is named, update NO_CORE in tests/helpers/rust-cross.ts\n${(e.stderr?.toString() ?? String(err)).slice(0, 4000)}`);
    }
    const got = new Map<number, number>();
    // Reading rustc's OUTPUT (one global per line), not user code.
    for (const line of ir.split("\n")) {
      // a zero-length array is emitted as an empty packed struct: `constant <{}> zeroinitializer`
      const m = /^@FQ(\d+) = (?:[a-z_]+ )*constant (?:\[(\d+) x i8\]|(<\{\}>))/.exec(line);
      if (m) got.set(Number(m[1]), m[3] ? 0 : Number(m[2]));
    }
    return exprs.map((e, i) => {
      const v = got.get(i);
      if (v === undefined) throw new Error(`no static emitted for question ${i} (${e}) on ${triple}`);
      return v;
    });
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

/** The generated Rust items of tests/helpers/layout-gen.ts, rewritten for the no_core probe. */
export function noCoreItems(rust: string, names: string[]): string {
  return rust.split("#[derive(Clone, Copy)]\n").join("") + names.map((n) => `impl Copy for ${n} {}\n`).join("");
}
