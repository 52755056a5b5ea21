import { describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { execFileSync, spawnSync } from "node:child_process";
import { checkDir, FIXTURES } from "../helpers/analyze.js";

function have(tool: string): boolean {
  try { execFileSync("which", [tool], { stdio: "pipe" }); return true; } catch { return false; }
}

describe("c-representation family", () => {
  test("bad fixture: slices, &str, non-repr(C) by value, Vec, tuples, char, bare enum, Rust-ABI fn", async () => {
    const { lines } = await checkDir("rules/c-representation/bad");
    expect(lines).toEqual([12, 15, 18, 21, 24, 27, 30, 33].map((l) => `detector.rs:${l} not-c-representable`));
  });
  test("good fixture: repr(C), repr(transparent), repr(u8), pointers to Rust-only types, references, Option<Box>, Option<fn>", async () => {
    const { lines } = await checkDir("rules/c-representation/good");
    expect(lines).toEqual([]);
  });
});

test("Option<Alias> where the alias is an extern \"C\" fn type (declared anywhere) is a nullable fn pointer", async () => {
  const { analyze } = await import("../helpers/analyze.js");
  const { findings, ws } = await analyze({
    "cb.rs": "use crate::types::StrikeCb;\n#[no_mangle]\npub extern \"C\" fn ld_on(cb: Option<StrikeCb>) {}\n#[no_mangle]\npub extern \"C\" fn ld_bad(cb: Option<Counter>) {}\n",
    "types.rs": "pub type StrikeCb = unsafe extern \"C\" fn(f32);\npub struct Counter { n: u32 }\n",
    "cb.h": "typedef void (*strike_cb)(float);\nvoid ld_on(strike_cb cb);\n",
  });
  expect(findings.filter((f) => f.rule === "not-c-representable").map((f) => f.range.line + 1)).toEqual([5]);
  expect(findings.filter((f) => f.rule === "callback-mismatch")).toEqual([]);
  expect(ws.model().resolve(ws.facts("/ws/cb.rs")!.fns[0]!.params[0]!.type, "rust")).toMatchObject({ k: "fn", nullable: true });
});

// Generic instances, niche wrappers, a name declared in two modules, and wasm imports. The oracle
// is rustc's own `improper_ctypes_definitions` lint (denied): it accepts every signature of the
// good fixture and rejects exactly the four the rule reports as errors in the bad one (the fifth,
// a type from a crate outside the workspace, is an `info`: ferrule cannot see its repr, and the
// oracle build leaves it out).
describe("not-c-representable: generic instances and names declared twice", () => {
  const DIR = path.join(FIXTURES, "c-representation/not-c-representable");
  test("good: repr(C) generic instance, transparent niche wrapper in Option, lifetime-only generics, the module's own repr(C) enum, wasm imports", async () => {
    const { lines } = await checkDir("c-representation/not-c-representable/good");
    expect(lines).toEqual([]);
  });
  test("bad: generic without repr(C), a repr(C) generic over Vec, Option around a raw-pointer wrapper, an enum without repr; a foreign generic is info", async () => {
    const { findings } = await checkDir("c-representation/not-c-representable/bad");
    const nc = findings.filter((f) => f.rule === "not-c-representable");
    expect(nc.filter((f) => f.severity === "error").map((f) => f.range.line + 1)).toEqual([28, 34, 39, 44]);
    expect(nc.filter((f) => f.severity === "info").map((f) => f.range.line + 1)).toEqual([49]);
  });
  test.skipIf(!have("rustc"))("rustc's improper_ctypes_definitions lint agrees on both fixtures", () => {
    const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-nc-"));
    try {
      const lint = (src: string) => {
        const file = path.join(tmp, "lib.rs");
        fs.writeFileSync(file, src);
        const r = spawnSync("rustc", ["--edition", "2021", "--crate-type=lib", "-D", "improper_ctypes_definitions", "-A", "dead_code", "--out-dir", tmp, file], { encoding: "utf8" });
        return [...r.stderr.matchAll(/not FFI-safe\n\s*--> [^:]+:(\d+):/g)].map((m) => Number(m[1]));
      };
      expect(lint(fs.readFileSync(path.join(DIR, "good/capi.rs"), "utf8"))).toEqual([]);
      const bad = fs.readFileSync(path.join(DIR, "bad/capi.rs"), "utf8");
      expect(lint(bad.slice(0, bad.indexOf("#[no_mangle]\npub extern \"C\" fn hyd_tint")))).toEqual([28, 34, 39, 44]);
    } finally {
      fs.rmSync(tmp, { recursive: true, force: true });
    }
  });
});
