// The seam read through its macros (issue 14): the hydrophone fixture spells its C API through
// nested extern "C" guard macros, export + calling-convention macros (on declarations and on C
// definitions), an alignment macro, array lengths from a macro and from an enum constant, and a
// function-like macro generating prototypes. Two slips are planted: a stage prototype whose
// element type differs from the Rust export, and a Rust mirror with a smaller alignment than the
// C alignment macro gives. Expected: exactly those, at their lines; nothing else.

import { describe, expect, it } from "vitest";
import { analyze, checkDir } from "./helpers/analyze.js";
import { preprocess } from "../server/src/extract/preproc/index.js";
import { evalCondition, MacroTable, tokenize } from "../server/src/extract/preproc/index.js";
import { ALL_TRIPLES } from "../server/src/model/targets.js";

describe("macros fixture (hydrophone)", () => {
  it("reports the two planted slips at their lines and nothing else", async () => {
    const { lines, findings } = await checkDir("macros/hydrophone");
    const serious = findings.filter((f) => f.severity === "error" || f.severity === "warning");
    expect(serious.map((f) => `${f.range.file.split("/").pop()}:${f.range.line + 1} ${f.rule}`).sort()).toEqual([
      // HYDRO_STAGE(\n decimate, int16_t): the finding points at the macro use
      "hydro.h:41 param-type-mismatch",
      "hydro.h:41 param-type-mismatch",
      // #[repr(C, align(16))] against HYDRO_ALIGN(32)
      "hydro.rs:11 mirror-layout-mismatch",
    ]);
    const p = serious.find((f) => f.rule === "param-type-mismatch")!;
    expect(p.message).toContain("int16_t");
    expect(p.range.col).toBe(0); // the start of `HYDRO_STAGE(`
    const m = serious.find((f) => f.rule === "mirror-layout-mismatch")!;
    expect(m.message).toContain("C 32 bytes aligned to 32");
    expect(lines.filter((l) => l.includes("unknown-macro"))).toEqual([]);
  });

  it("a header whose guard macros are not defined anywhere keeps today's reading (an info notice, no wrong finding)", async () => {
    const { findings } = await analyze({
      "probe.h": "#ifndef PROBE_H\n#define PROBE_H\nGEO_API int geo_probe_read(float *out, unsigned n);\n#endif\n",
      "probe.rs": "#[no_mangle]\npub unsafe extern \"C\" fn geo_probe_read(out: *mut f32, n: u32) -> i32 { 0 }\n",
    });
    expect(findings.filter((f) => f.severity === "error")).toEqual([]);
    expect(findings.some((f) => f.rule === "unknown-macro" && f.range.line === 2)).toBe(true);
  });
});

describe("a macro whose definition depends on an undecided build macro (one template file per bit depth)", () => {
  it("gives macro-may-define, not a duplicate `bitfn` or a missing definition; a plainly missing one is still reported", async () => {
    const { findings } = await analyze({
      "depth.h": "#if STACK_DEPTH == 8\n#define bitfn(x) x##_8bit\n#else\n#define bitfn(x) x##_16bit\n#endif\nvoid seis_stack_init_8bit(int *c);\nvoid seis_stack_init_16bit(int *c);\nvoid seis_stack_free(int *c);\n",
      "stack_tmpl.c": "#include \"depth.h\"\nvoid bitfn(seis_stack_init)(int *c) { *c = 0; }\n",
      "stack2_tmpl.c": "#include \"depth.h\"\nvoid bitfn(seis_stack_init)(int *c) { *c = 1; }\n",
      "stack.rs": "#[no_mangle]\npub extern \"C\" fn seis_stack_count() -> i32 { 0 }\n",
    });
    const serious = findings.filter((f) => f.severity === "error" || f.severity === "warning").map((f) => `${f.rule} ${f.range.file.split("/").pop()}:${f.range.line + 1}`);
    expect(serious.filter((x) => !x.startsWith("export-without-declaration"))).toEqual(["declaration-without-definition depth.h:8"]);
    const may = findings.filter((f) => f.rule === "macro-may-define").map((f) => f.range.line + 1).sort();
    expect(may).toEqual([6, 7]);
  });
});

describe("preprocessor: the expanded text keeps the source's lines and maps columns back", () => {
  const env = { targets: ALL_TRIPLES };
  it("a use expands on its line; a multi-line invocation joins onto its first line", () => {
    const src = "#define API __attribute__((visibility(\"default\")))\n#define P(n) int n(void)\nAPI int a(void); API int b;\nP(\n  c); int d;\n";
    const r = preprocess("/w/x.c", src, env);
    const lines = r.text.split("\n");
    expect(lines.length).toBe(src.split("\n").length);
    expect(lines[2]).toBe('__attribute__((visibility("default"))) int a(void); __attribute__((visibility("default"))) int b;');
    expect(lines[3]).toBe("int c(void)");
    expect(lines[4]).toBe("    ; int d;");
    // `a` in the expanded line 2 maps back to its source column (8)
    expect(r.mapCol(2, lines[2]!.indexOf(" a(") + 1)).toBe(src.split("\n")[2]!.indexOf(" a(") + 1);
    // a position inside the expansion maps to the macro use
    expect(r.mapCol(2, 5)).toBe(0);
    expect(r.mapCol(2, 5, true)).toBe(3);
  });
  it("a decided conditional is blanked (every target has 8-bit chars); an undecided one stays as written", () => {
    const src = "#if __CHAR_BIT__ == 8\nint g;\n#else\nint h;\n#endif\n#ifdef SEISMIC_BUILD\nint k;\n#endif\n";
    const r = preprocess("/w/x.c", src, env);
    expect(r.text.split("\n")).toEqual(["", "int g;", "", "", "", "#ifdef SEISMIC_BUILD", "int k;", "#endif", ""]);
  });
  it("a macro defined differently under an undecided condition stays unexpanded and is named in a notice", () => {
    const src = "#ifdef BIG\n#define N 8\n#else\n#define N 4\n#endif\nfloat taps[N];\n";
    const r = preprocess("/w/x.c", src, env);
    expect(r.text.split("\n")[5]).toBe("float taps[N];");
    expect(r.ambiguous).toEqual(["N"]);
    const strict = preprocess("/w/x.c", src, { ...env, strict: true });
    expect(strict.text.split("\n")[5]).toBe("float taps[4];");
  });
  it("target-dependent predefined macros are undecided in a target-neutral reading, decided for one target", () => {
    const src = "#if __SIZEOF_POINTER__ == 8\nint wide;\n#else\nint narrow;\n#endif\n";
    expect(preprocess("/w/x.c", src, env).text).toBe(src);
    expect(preprocess("/w/x.c", src, { targets: ["i686-unknown-linux-gnu"] }).text.split("\n")[3]).toBe("int narrow;");
  });
});

describe("#if evaluation (C11 §6.10.1) is a function of a macro table", () => {
  const ev = (s: string, strict = true) => evalCondition(tokenize(s), new MacroTable(), { strict });
  it("integer constant expressions in intmax_t / uintmax_t", () => {
    expect(ev("(1 << 3) + 2 * 3 == 14")).toBe(true);
    expect(ev("-1 < 0")).toBe(true);
    expect(ev("-1 < 0u")).toBe(false); // -1 converts to UINTMAX_MAX (§6.10.1p4)
    expect(ev("0x7fffffffffffffff + 0 > 0")).toBe(true);
    expect(ev("'a' == 97 && !defined(X)")).toBe(true);
    expect(ev("1 ? 2 : (1 / 0)")).toBe(true);
  });
  it("unknown names: 0 in the standard's reading, undecided otherwise (short-circuit still decides)", () => {
    expect(ev("UNKNOWN_FLAG", true)).toBe(false);
    expect(ev("UNKNOWN_FLAG", false)).toBe(undefined);
    expect(ev("0 && UNKNOWN_FLAG", false)).toBe(false);
    expect(ev("1 || defined(UNKNOWN_FLAG)", false)).toBe(true);
  });
});
