// Rust cfg predicates (model/conditions.ts). The per-target configuration options are checked
// against `rustc --print cfg --target=TRIPLE` (the Rust Reference, "Conditional compilation",
// names the options; rustc sets their values per target).
import { describe, expect, test } from "vitest";
import { spawnSync } from "node:child_process";
import { ALL_TRIPLES } from "../server/src/model/targets.js";
import { canHold, condText, envsFor, parseCfg, parseCfgAttr } from "../server/src/model/conditions.js";
import { have } from "./helpers/clean.js";

describe("cfg predicates", () => {
  test("parse all/any/not, options with and without values", () => {
    const c = parseCfg('all(unix, not(feature = "scalar"), any(target_arch = "x86_64", target_arch = "aarch64"))')!;
    expect(condText(c)).toBe('all(unix, not(feature = "scalar"), any(target_arch = "x86_64", target_arch = "aarch64"))');
    expect(parseCfg("all(unix,")).toBeUndefined();
    expect(parseCfgAttr('feature = "ffi", export_name = "hyd_open"')).toEqual({ cond: { k: "is", name: "feature", value: "ffi" }, attrs: ['export_name = "hyd_open"'] });
  });

  test("evaluation per target, with known and open features", () => {
    const envs = envsFor(ALL_TRIPLES, { features: ["simd"], optional: ["ffi"] });
    const holds = (s: string) => ALL_TRIPLES.filter((t) => canHold([parseCfg(s)!], envs.filter((e) => e.triple === t)));
    expect(holds('target_pointer_width = "64"')).toEqual(["x86_64-unknown-linux-gnu", "aarch64-unknown-linux-gnu", "x86_64-pc-windows-msvc"]);
    expect(holds("windows")).toEqual(["x86_64-pc-windows-msvc"]);
    expect(holds('all(unix, target_endian = "little", not(target_arch = "x86"))')).toEqual(["x86_64-unknown-linux-gnu", "aarch64-unknown-linux-gnu", "armv7-unknown-linux-gnueabihf"]);
    expect(holds('target_os = "macos"')).toEqual([]);
    expect(holds("test")).toEqual([]); // never the shipped build
    expect(holds("debug_assertions")).toHaveLength(5); // the dev profile
    expect(holds('not(feature = "simd")')).toEqual([]); // enabled
    expect(holds('feature = "ffi"')).toHaveLength(5); // declared, not enabled: someone may
    expect(holds('feature = "no-such"')).toEqual([]); // not declared: never set
    // twins exclude each other, also with open features
    expect(canHold([parseCfg('feature = "ffi"'), parseCfg('not(feature = "ffi")')], envs)).toBe(false);
    const open = envsFor(ALL_TRIPLES, {});
    expect(canHold([parseCfg('feature = "x"'), parseCfg('not(feature = "x")')], open)).toBe(false);
    expect(canHold([parseCfg('feature = "x"'), parseCfg('feature = "y"')], open)).toBe(true);
  });

  test.skipIf(!have("rustc"))("the options of each target equal rustc --print cfg", () => {
    for (const t of ALL_TRIPLES) {
      const r = spawnSync("rustc", ["--print", "cfg", `--target=${t}`], { encoding: "utf8" });
      expect(r.status, r.stderr).toBe(0);
      const fromRustc = r.stdout.split("\n").filter((l) => l && !l.startsWith("target_feature") && l !== "debug_assertions" && !/^(fmt_debug|overflow_checks|relocation_model|ub_checks|contract_checks|emscripten_wasm_eh|sanitize|target_thread_local|target_has_reliable|target_has_atomic_load_store|target_has_atomic_equal_alignment)/.test(l));
      const env = envsFor([t]).find((e) => !e.set.has("debug_assertions"))!;
      const ours: string[] = [];
      for (const [k, vs] of env.set) {
        if (k === "target_feature") continue;
        if (vs.size === 0) ours.push(k);
        for (const v of vs) ours.push(`${k}="${v}"`);
      }
      expect(ours.sort(), t).toEqual(fromRustc.sort());
    }
  });
});
