// The project model (analysis/project.ts, model/conditions.ts): a multi-crate workspace read as
// its build reads it. test-fixtures/project/beamformer-ws holds realistic, correct seams that gave
// false findings when the tree was one link unit read with every cfg branch at once (programs
// that each define `main` or the same hook, cfg twins, a C reference kernel with a build of its
// own, per-architecture C files, a JVM crate, a crate whose build script writes its header, imports
// from the maths and sound libraries, a wasm_bindgen block), beside one planted slip of each kind.
import { describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { Workspace } from "../server/src/analysis/workspace.js";
import { DEFAULTS } from "../server/src/analysis/config.js";
import { parseConfigText } from "../server/src/analysis/config.js";
import { findProjectRoot } from "../server/src/analysis/project.js";
import { Engine } from "../server/src/lsp/engine.js";
import { run } from "../server/src/cli/main.js";
import type { Finding } from "../server/src/rules/api.js";
import { FIXTURES, analyze, at } from "./helpers/analyze.js";

const WS = path.join(FIXTURES, "project", "beamformer-ws");
const line = (f: Finding) => `${path.relative(WS, f.range.file)}:${f.range.line + 1} ${f.rule}`;

/** The planted slips, each still found (1-based lines). */
const SLIPS = [
  "beam-core/include/beam.h:20 declaration-without-definition", // beam_flush: declared, defined nowhere
  "beam-core/src/kernels.rs:38 export-name-mangled", // beam_level: declared in C, no #[no_mangle]
  "beam-core/src/kernels.rs:50 export-without-declaration", // beam_reset: exported, beam.h lacks it
  "beam-core/src/kernels.rs:63 duplicate-symbol", // beam_sample_rate: cfg(unix) and cfg(64-bit) both hold on x86_64/aarch64
  "beam-core/src/sys.rs:19 declaration-without-definition", // beam_window_fil: a typo of beam_window_fill in a block whose other imports resolve
  "c/host/beam_window.c:18 duplicate-symbol", // beam_gain: C host helper and Rust kernel in one library
];
/** One notice per crate whose exports are declared elsewhere on purpose. */
const NOTES = [
  "beam-jvm/src/lib.rs:5 exports-declared-elsewhere", // Java_… native methods
  "beam-plugin/src/lib.rs:3 exports-declared-elsewhere", // header written by build.rs
];

async function cli(args: string[], cwd = WS): Promise<{ code: number; out: string }> {
  let out = "";
  const code = await run(["check", "--format", "json", ...args], { cwd, stdout: (s) => { out += s; }, stderr: () => {}, isTTY: false });
  return { code, out };
}

describe("project model: beamformer-ws", () => {
  test("the CLI finds each planted slip and nothing on the correct seams beside them", async () => {
    const { out } = await cli(["."]);
    const j = JSON.parse(out) as { findings: { file: string; line: number; rule: string; severity: string; message: string }[] };
    const got = j.findings.map((f) => `${f.file}:${f.line} ${f.rule}`).sort();
    expect(got).toEqual([...SLIPS, ...NOTES].sort());
    // the duplicate of two conditional definitions names the targets where both hold
    const dup = j.findings.find((f) => f.rule === "duplicate-symbol" && f.file.endsWith("kernels.rs"))!;
    expect(dup.message).toMatch(/on x86_64, aarch64 only/);
    expect(j.findings.filter((f) => f.rule === "exports-declared-elsewhere").every((f) => f.severity === "info")).toBe(true);
  });

  test("one model of everything (Workspace.loadAll) gives the same findings as the chunked check", async () => {
    const ws = await Workspace.create();
    ws.loadAll([WS]);
    expect(ws.check().map(line).sort()).toEqual([...SLIPS, ...NOTES].sort());
    for (const chunkFiles of [1, 3]) {
      const r = await new Workspace().checkChunked([WS], { chunkFiles });
      expect(r.findings.map(line).sort(), `chunks of ${chunkFiles}`).toEqual([...SLIPS, ...NOTES].sort());
    }
  });

  test("the language server reads the same project model and gives the same findings", async () => {
    const engine = new Engine(await Workspace.create());
    engine.scan([WS]);
    const r = engine.analyze(true);
    expect(r.findings.map(line).sort()).toEqual([...SLIPS, ...NOTES].sort());
    // an edit that adds a module declaration re-reads the module tree (a full check)
    const lib = path.join(WS, "beam-core/src/lib.rs");
    const text = fs.readFileSync(lib, "utf8");
    engine.open(lib, text, 1);
    engine.analyze();
    engine.change(lib, [{ text: text.replace("#[cfg(target_os = \"macos\")]\nmod mac;", "mod mac;") }], 2);
    const r2 = engine.analyze();
    expect(r2.scope).toBe("full");
    // mac.rs, now compiled on every target, defines beam_gain a third time
    expect(r2.findings.map(line)).toContain("beam-core/src/mac.rs:3 duplicate-symbol");
    const fresh = await Workspace.create();
    fresh.loadAll([WS]);
    fresh.update(lib, text.replace("#[cfg(target_os = \"macos\")]\nmod mac;", "mod mac;"));
    expect(r2.findings.map(line).sort()).toEqual(fresh.check().map(line).sort());
  });

  test("a checked sub-folder is read with its project: the header one level above resolves, and only the folder's findings are reported", async () => {
    expect(findProjectRoot(path.join(WS, "beam-core", "src"))).toBe(WS);
    const { out } = await cli(["beam-core/src"]);
    const got = (JSON.parse(out) as { findings: { file: string; line: number; rule: string }[] }).findings.map((f) => `${f.file}:${f.line} ${f.rule}`).sort();
    expect(got).toEqual(SLIPS.filter((s) => s.startsWith("beam-core/src/")).sort());
  });

  test("features: Cargo defaults and the configured ones decide cfg twins and what the build compiles", async () => {
    const load = async (features: string[]) => {
      const ws = await Workspace.create({ ...DEFAULTS, features });
      ws.loadAll([WS]);
      return ws.model();
    };
    const rustDefs = (m: Awaited<ReturnType<typeof load>>, s: string) => (m.symbols.get(s)?.rust ?? []).filter((f) => f.role === "export").map((f) => f.range.line + 1);
    const dflt = await load([]);
    // default features (simd): one of the two beam_steer twins; beam_sum from Rust
    expect(rustDefs(dflt, "beam_steer")).toEqual([6]);
    expect(rustDefs(dflt, "beam_sum")).toEqual([24]);
    // cfg_attr(feature = "simd", no_mangle) applies
    expect(dflt.symbols.get("beam_norm")!.rust[0]!.noMangle).toBe(true);
    // the C reference build: the Rust beam_sum steps aside
    const ref = await load(["beam-core/c-reference"]);
    expect(rustDefs(ref, "beam_sum")).toEqual([]);
    // a macOS-only module is compiled on no configured target; the test module never ships
    expect(rustDefs(dflt, "beam_gain")).toEqual([44]);
    // an unknown feature name in .ferrule.toml is a configuration error naming file and key
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-proj-"));
    try {
      fs.writeFileSync(path.join(dir, ".ferrule.toml"), 'features = ["not a feature"]\n');
      let err = "";
      const code = await run(["check", "."], { cwd: dir, stdout: () => {}, stderr: (s) => { err += s; }, isTTY: false });
      expect(code).toBe(2);
      expect(err).toMatch(/\.ferrule\.toml: key `features`: `not a feature` is not a Cargo feature name/);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  test("config: features and defines are validated with the file and key named", () => {
    expect(parseConfigText('features = ["simd", "beam-core/wasm"]\n[defines]\nBEAM_CHANNELS = 32\nBEAM_FAST = true\n', "f.toml")).toMatchObject({ features: ["simd", "beam-core/wasm"], defines: { BEAM_CHANNELS: "32", BEAM_FAST: "1" } });
    expect(() => parseConfigText("features = \"simd\"\n", "f.toml")).toThrow(/f\.toml: key `features`: expected a list of strings/);
    expect(() => parseConfigText("[defines]\n\"9X\" = 1\n", "f.toml")).toThrow(/f\.toml: key `defines\.9X`: not a C macro name/);
    expect(() => parseConfigText("[defines]\nX = [1]\n", "f.toml")).toThrow(/key `defines\.X`: expected a string, a number or a boolean/);
    expect(DEFAULTS.features).toEqual([]);
  });

  test("deliberate one-sided symbols: #[no_mangle] extern \"Rust\" and private exports are not reported; a #[no_mangle] fn without extern and a pub export without header are", async () => {
    const { findings } = await analyze({
      "hydro.h": "int hydro_gain(int db);\n",
      "probe.rs": "#[no_mangle]\n#[inline(never)]\nunsafe extern \"C\" fn hydro_bad_handle(p: *const u8) -> bool { p.is_null() }\n#[no_mangle]\npub extern \"C\" fn hydro_reset() -> i32 { 0 }\n",
      "hydro.rs": [
        "#[no_mangle]",
        "pub extern \"C\" fn hydro_gain(db: i32) -> i32 { db }",
        "/// kept by name so it shows in crash backtraces",
        "#[no_mangle]",
        "pub extern \"Rust\" fn hydro_in_user_callback(row: usize) -> usize { row }",
        "#[no_mangle]",
        "pub fn hydro_trim(db: f32) -> f32 { db }",
      ].join("\n"),
    });
    expect(at(findings, "export-name-mangled")).toEqual(["hydro.rs:7"]);
    // a private export kept by name for backtraces is not C API; a pub one without a header is reported
    expect(at(findings, "export-without-declaration")).toEqual(["probe.rs:5"]);
  });
});
