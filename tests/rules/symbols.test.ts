import { describe, expect, test } from "vitest";
import { checkDir } from "../helpers/analyze.js";

describe("symbols family", () => {
  test("bad fixture: every symbol slip at its line", async () => {
    const { lines, findings } = await checkDir("rules/symbols/bad");
    expect(lines.sort()).toEqual([
      "strike.h:9 no-definition", // strike_threshold: declared, defined nowhere
      "strike.rs:10 export-name-mangled", // strike_gain: #[no_mangle] without extern "C"
      "strike.rs:16 no-definition", // strike_led_blink: imported, no C side
      "strike.rs:5 no-c-declaration", // strike_count_reset: exported, no header
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
