import { describe, expect, test } from "vitest";
import { checkDir } from "../helpers/analyze.js";

describe("symbols family", () => {
  test("bad fixture: every symbol slip at its line", async () => {
    const { lines, findings } = await checkDir("rules/symbols/bad");
    expect(lines.sort()).toEqual([
      "strike.h:9 declaration-without-definition", // strike_threshold: declared, defined nowhere
      "strike.rs:10 export-name-mangled", // strike_gain: #[no_mangle] without extern "C"
      "strike.rs:16 declaration-without-definition", // strike_led_blink: imported, no C side
      "strike.rs:5 export-without-declaration", // strike_count_reset: exported, no header
      "strike.rs:7 export-name-mangled", // strike_window_ms: extern "C" without #[no_mangle]
      "strike_fallback.c:2 duplicate-symbol", // strike_rate: defined in Rust and in C
    ].sort());
    const dup = findings.find((f) => f.rule === "duplicate-symbol")!;
    expect(dup.related[0]!.range.file).toMatch(/strike\.rs$/);
    const mangled = findings.find((f) => f.rule === "export-name-mangled" && f.range.line === 6)!;
    expect(mangled.related[0]!.range.file).toMatch(/strike\.h$/);
    expect(mangled.related[0]!.range.line + 1).toBe(7);
  });

  test("good fixture: #[unsafe(no_mangle)], #[unsafe(export_name)], unsafe extern blocks, C definitions", async () => {
    const { lines } = await checkDir("rules/symbols/good");
    expect(lines).toEqual([]);
  });
});

describe("export macros", () => {
  test("QUAKE_API / QUAKE_CALL defined in the header are blanked; static inline helpers are not symbols", async () => {
    const { lines, ws } = await checkDir("rules/symbols/good-macros");
    expect(lines).toEqual([]);
    const h = [...ws.model().files.values()].find((f) => f.file.endsWith("quake.h"))!;
    const win = h.fns.find((f) => f.name === "quake_window")!;
    expect(win.ret).toEqual({ k: "ptr", to: { k: "scalar", s: "float" }, mut: false, via: "raw" });
    expect(win.nameRange.line + 1).toBe(15); // positions are unchanged by the blanking
  });
  test("a macro defined in another file needs strip_macros", async () => {
    const { analyze } = await import("../helpers/analyze.js");
    const files = {
      "api.h": "#include \"export.h\"\nRADIO_API int radio_tune(double hz);\n",
      "export.h": "#define RADIO_API __attribute__((visibility(\"default\")))\n",
      "radio.rs": "#[no_mangle]\npub extern \"C\" fn radio_tune(hz: f64) -> i32 { 0 }\n",
    };
    const without = await analyze(files);
    expect(without.findings.map((f) => `${f.rule}@${f.range.file}:${f.range.line + 1}`)).toEqual(["unknown-macro@/ws/api.h:2"]);
    const withCfg = await analyze(files, { stripMacros: ["RADIO_API"] });
    expect(withCfg.findings.map((f) => f.rule)).toEqual([]);
  });
});
