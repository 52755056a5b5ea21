// The fixed CLI interface: `ferrule check [--format text|json|sarif] [--target TRIPLE]... [PATH...]`
// with exit codes 0/1/2 and the JSON shape fixed in DEVELOPERS.md. Runs the built bundle as a
// user would (npm test builds it first).
import { describe, expect, test } from "vitest";
import { spawnSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import Ajv from "ajv-draft-04";

const ROOT = path.resolve(__dirname, "..");
const BIN = path.join(ROOT, "bin/ferrule.js");

function ferrule(args: string[], cwd = ROOT) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: "utf8", timeout: 60_000 });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

describe("ferrule check on the demo", () => {
  test("JSON: documented shape, exit 1, every planted slip with both locations", () => {
    const r = ferrule(["check", "--format", "json", "test-fixtures/sonar-demo"]);
    expect(r.code).toBe(1);
    const j = JSON.parse(r.out);
    expect(j.version).toBe(1);
    for (const f of j.findings) {
      expect(Object.keys(f)).toEqual(expect.arrayContaining(["rule", "severity", "file", "line", "column", "endLine", "endColumn", "message", "related"]));
      expect(["error", "warning", "info", "hint"]).toContain(f.severity);
      expect(f.file).not.toMatch(/^\//); // relative to cwd
      expect(f.line).toBeGreaterThanOrEqual(1);
      expect(f.column).toBeGreaterThanOrEqual(1);
    }
    const find = (rule: string, file: string, line: number) =>
      j.findings.find((f: { rule: string; file: string; line: number }) => f.rule === rule && f.file === file && f.line === line);
    const H = "test-fixtures/sonar-demo/include/sonar_kernels.h";
    const RS = "test-fixtures/sonar-demo/kernels/src/lib.rs";
    // 1: double *output vs *mut f32
    const p1 = find("param-type-mismatch", H, 19);
    expect(p1?.related[0]).toMatchObject({ file: RS, line: 29 });
    // 2: long vs i64 on the three targets where long is 4 bytes
    const p2 = find("param-type-mismatch", H, 26);
    expect(p2?.message).toContain("armv7, i686, x86_64-windows only");
    expect(p2?.related[0]).toMatchObject({ file: RS });
    // 3: const spectrum written by Rust
    expect(find("pointer-constness", H, 24)?.related[0]).toMatchObject({ file: RS });
    // 4: no #[no_mangle]
    expect(find("export-name-mangled", RS, 81)?.related[0]).toMatchObject({ file: H, line: 27 });
    // 5: renamed on one side
    expect(find("declaration-without-definition", H, 20)).toBeTruthy();
    expect(find("export-without-declaration", RS, 46)).toBeTruthy();
    // 6: nullable callback
    expect(find("callback-mismatch", H, 28)?.severity).toBe("warning");
  });

  test("text format: file:line:col: severity: message [rule] and the related location below", () => {
    const r = ferrule(["check", "test-fixtures/sonar-demo"]);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/^test-fixtures\/sonar-demo\/include\/sonar_kernels\.h:19:\d+: error: .* \[param-type-mismatch\]\n {4}test-fixtures\/sonar-demo\/kernels\/src\/lib\.rs:29:\d+: /m);
    expect(r.err).toBe(""); // no progress line on a pipe
  });

  test("on a terminal, a progress line on stderr (run under script(1) for a pseudo-terminal)", () => {
    const r = spawnSync("script", ["-qec", `${process.execPath} ${BIN} check test-fixtures/sonar-demo > /dev/null`, "/dev/null"], { cwd: ROOT, encoding: "utf8", timeout: 60_000 });
    expect(r.stdout).toMatch(/\rferrule: reading \d+\/\d+ files/);
    expect(r.stdout).toContain("\r\x1b[K"); // and the line is cleared afterwards
  });

  test("--target narrows the targets; a target-specific finding disappears on x86_64 alone", () => {
    const all = JSON.parse(ferrule(["check", "--format", "json", "test-fixtures/sonar-demo"]).out).findings.length;
    const one = JSON.parse(ferrule(["check", "--format", "json", "--target", "x86_64-unknown-linux-gnu", "test-fixtures/sonar-demo"]).out).findings;
    expect(one.length).toBe(all - 1);
    expect(one.some((f: { line: number; rule: string }) => f.rule === "param-type-mismatch" && f.line === 26)).toBe(false);
  });

  test("clean workspace exits 0 and says a clean result is not a proof", () => {
    const r = ferrule(["check", "test-fixtures/rules/linkage/good"]);
    expect(r.code).toBe(0);
    expect(r.out).toContain("not a proof of memory safety");
  });

  test("SARIF output validates against the SARIF 2.1.0 schema (OASIS, rtm.5) and carries rule metadata", () => {
    const r = ferrule(["check", "--format", "sarif", "test-fixtures/sonar-demo"]);
    expect(r.code).toBe(1);
    const log = JSON.parse(r.out);
    // Schema: the OASIS SARIF 2.1.0 JSON schema (sarif-2.1.0-rtm.5), shipped as test data.
    const schema = JSON.parse(fs.readFileSync(path.join(__dirname, "data/sarif-2.1.0-rtm.5.json"), "utf8"));
    const ajv = new Ajv({ allErrors: true, strict: false, validateFormats: false, unicodeRegExp: false });
    const validate = ajv.compile(schema);
    const ok = validate(log);
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
    const run = log.runs[0];
    expect(run.tool.driver.rules.map((x: { id: string }) => x.id)).toContain("param-type-mismatch");
    const res = run.results.find((x: { ruleId: string }) => x.ruleId === "param-type-mismatch");
    expect(res.relatedLocations[0].physicalLocation.artifactLocation.uri).toMatch(/lib\.rs$/);
    expect(run.tool.driver.rules[res.ruleIndex].id).toBe("param-type-mismatch");
  });
});

describe("CLI conventions", () => {
  test("--version prints the version of package.json", () => {
    const pkg = JSON.parse(fs.readFileSync(path.join(ROOT, "package.json"), "utf8"));
    const r = ferrule(["--version"]);
    expect(r.code).toBe(0);
    expect(r.out.trim()).toBe(`ferrule ${pkg.version}`);
  });

  test("each command's --help describes each of its flags and exits 0", () => {
    const flags: Record<string, string[]> = {
      check: ["--format", "--target", "--config", "--show-fixes", "--baseline", "--update-baseline", "--fail-on", "--fail-on-skip"],
      layout: ["--format", "--target"],
      lsp: ["--stdio"],
    };
    for (const [cmd, fl] of Object.entries(flags)) {
      const r = ferrule([cmd, "--help"]);
      expect(r.code).toBe(0);
      expect(r.out).toMatch(new RegExp(`^usage: ferrule ${cmd}`));
      for (const f of fl) expect(r.out).toMatch(new RegExp(`^\\s+${f}\\b.*\\S`, "m"));
    }
    // a flag of another command is refused
    expect(ferrule(["layout", "--baseline", "x", "test-fixtures/sonar-demo"]).code).toBe(2);
  });

  test("text prints info and hint as gcc-style `note` lines", () => {
    const json = JSON.parse(ferrule(["check", "--format", "json", "test-fixtures/sonar-demo"]).out).findings as { severity: string; file: string; line: number; column: number }[];
    const notes = json.filter((f) => f.severity === "info" || f.severity === "hint");
    expect(notes.length).toBeGreaterThan(0);
    const text = ferrule(["check", "test-fixtures/sonar-demo"]).out;
    for (const f of notes) expect(text).toContain(`${f.file}:${f.line}:${f.column}: note: `);
    expect(text).not.toMatch(/: (info|hint): /);
  });

  test("--fail-on sets the lowest severity that exits 1", () => {
    // test-fixtures/clean gives notes only
    expect(ferrule(["check", "test-fixtures/clean"]).code).toBe(0);
    expect(ferrule(["check", "--fail-on", "warning", "test-fixtures/clean"]).code).toBe(0);
    expect(ferrule(["check", "--fail-on", "note", "test-fixtures/clean"]).code).toBe(1);
    expect(ferrule(["check", "--fail-on", "error", "test-fixtures/sonar-demo"]).code).toBe(1);
    expect(ferrule(["check", "--fail-on", "fatal", "test-fixtures/clean"]).code).toBe(2);
  });

  test("NO_COLOR and FORCE_COLOR decide colours", () => {
    const run = (env: Record<string, string>) =>
      spawnSync(process.execPath, [BIN, "check", "test-fixtures/sonar-demo"], { cwd: ROOT, encoding: "utf8", timeout: 60_000, env: { ...process.env, NO_COLOR: "", FORCE_COLOR: "", ...env } }).stdout;
    expect(run({})).not.toContain("\x1b["); // not a terminal
    expect(run({ FORCE_COLOR: "1" })).toContain("\x1b[31merror");
    expect(run({ FORCE_COLOR: "1", NO_COLOR: "1" })).not.toContain("\x1b[");
  });
});

describe("usage and configuration errors exit 2 with one line", () => {
  for (const [name, args] of [
    ["unknown flag", ["check", "--frobnicate"]],
    ["unknown target", ["check", "--target", "mips-unknown-linux-gnu", "test-fixtures/sonar-demo"]],
    ["missing path", ["check", "test-fixtures/does-not-exist"]],
    ["unknown format", ["check", "--format", "xml"]],
    ["unknown command", ["frob"]],
  ] as const) {
    test(name, () => {
      const r = ferrule([...args]);
      expect(r.code).toBe(2);
      expect(r.err.trim().split("\n")).toHaveLength(1);
      expect(r.err).toMatch(/^ferrule: /);
    });
  }

  test("a bad .ferrule.toml names the file and the key", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-cfg-"));
    fs.writeFileSync(path.join(dir, ".ferrule.toml"), 'targets = ["x86_64", "pdp11"]\n');
    fs.writeFileSync(path.join(dir, "a.rs"), "");
    const r = ferrule(["check", dir]);
    expect(r.code).toBe(2);
    expect(r.err).toContain(".ferrule.toml");
    expect(r.err).toContain("targets");
    expect(r.err).toContain("pdp11");
    fs.writeFileSync(path.join(dir, ".ferrule.toml"), "targets = [\n");
    const r2 = ferrule(["check", dir]);
    expect(r2.code).toBe(2);
    expect(r2.err).toMatch(/\.ferrule\.toml: not valid TOML/);
  });

  test(".ferrule.toml targets and severity overrides apply", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-cfg-"));
    fs.cpSync(path.join(ROOT, "test-fixtures/sonar-demo"), dir, { recursive: true });
    fs.writeFileSync(path.join(dir, ".ferrule.toml"), 'targets = ["x86_64"]\n[rules]\nparam-type-mismatch = "off"\npointer-constness = "warning"\nexport-name-mangled = "off"\nport-item-size-mismatch = "off"\nlength-unit-mismatch = "off"\ncopyable-owning-wrapper = "off"\n');
    const r = ferrule(["check", "--format", "json", dir]);
    const j = JSON.parse(r.out);
    expect(j.findings.some((f: { rule: string }) => f.rule === "param-type-mismatch")).toBe(false);
    expect(j.findings.find((f: { rule: string }) => f.rule === "pointer-constness").severity).toBe("warning");
    expect(r.code).toBe(0); // nothing left at error severity
  });
});

describe("--version", () => {
  test("prints the package version and exits 0", () => {
    const root = path.resolve(__dirname, "..");
    const pkg = JSON.parse(fs.readFileSync(path.join(root, "package.json"), "utf8"));
    const r = spawnSync(process.execPath, [path.join(root, "bin", "ferrule.js"), "--version"], { encoding: "utf8" });
    expect(r.status).toBe(0);
    expect(r.stdout.trim()).toBe(`ferrule ${pkg.version}`);
  });
});

describe("text format words and colour", () => {
  test("info findings print as `note` (gcc's word); NO_COLOR and FORCE_COLOR decide colour", async () => {
    const { useColor } = await import("../server/src/cli/main.js");
    expect(useColor(true, {})).toBe(true);
    expect(useColor(false, {})).toBe(false);
    expect(useColor(true, { NO_COLOR: "1" })).toBe(false);
    expect(useColor(false, { FORCE_COLOR: "1" })).toBe(true);
    expect(useColor(false, { FORCE_COLOR: "0" })).toBe(false);
    const root = path.resolve(__dirname, "..");
    const r = spawnSync(process.execPath, [path.join(root, "bin", "ferrule.js"), "check", "test-fixtures/sonar-demo"], { cwd: root, encoding: "utf8", env: { ...process.env, FORCE_COLOR: "0", NO_COLOR: "1" } });
    const words = [...r.stdout.matchAll(/^\S+:\d+:\d+: (\w+): /gm)].map((m) => m[1]);
    expect(words).toContain("note");
    expect(words.every((w) => w === "error" || w === "warning" || w === "note")).toBe(true);
  });
});

describe("SARIF fingerprints", () => {
  test("survive inserted lines: the same findings keep the same partialFingerprints", () => {
    const root = path.resolve(__dirname, "..");
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-fp-"));
    fs.cpSync(path.join(root, "test-fixtures/sonar-demo"), dir, { recursive: true });
    const run = () => {
      const r = spawnSync(process.execPath, [path.join(root, "bin", "ferrule.js"), "check", "--format", "sarif", "."], { cwd: dir, encoding: "utf8" });
      const res = JSON.parse(r.stdout).runs[0].results as { ruleId: string; partialFingerprints: Record<string, string>; locations: { physicalLocation: { region: { startLine: number } } }[] }[];
      return res;
    };
    const before = run();
    expect(before.length).toBeGreaterThan(3);
    for (const rel of ["include/sonar_kernels.h", "kernels/src/lib.rs"]) {
      const f = path.join(dir, rel);
      fs.writeFileSync(f, "\n\n" + fs.readFileSync(f, "utf8"));
    }
    const after = run();
    const prints = (rs: typeof before) => rs.map((x) => `${x.ruleId}:${x.partialFingerprints["ferruleFinding/v1"]}`).sort();
    expect(prints(after)).toEqual(prints(before));
    // the lines did move: the fingerprints are not line-based
    expect(after.map((x) => x.locations[0]!.physicalLocation.region.startLine)).not.toEqual(before.map((x) => x.locations[0]!.physicalLocation.region.startLine));
    expect(new Set(prints(before)).size).toBe(before.length);
  });
});

describe("SARIF for code scanning", () => {
  test("rule help, invocation, %SRCROOT%-relative URIs, and accepted findings reported as suppressed with their reason", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-sup-"));
    fs.cpSync(path.join(ROOT, "test-fixtures/sonar-demo"), dir, { recursive: true });
    const sarif = () => JSON.parse(ferrule(["check", "--format", "sarif", "."], dir).out).runs[0];
    const before = sarif();
    const target = before.results.find((x: { ruleId: string }) => x.ruleId === "export-name-mangled");
    expect(target).toBeDefined();
    const uri = target.locations[0].physicalLocation.artifactLocation.uri as string;
    expect(uri).not.toMatch(/^\/|^file:/);
    expect(target.locations[0].physicalLocation.artifactLocation.uriBaseId).toBe("%SRCROOT%");
    expect(before.originalUriBaseIds["%SRCROOT%"].uri).toMatch(/^file:.*\/$/);
    expect(before.invocations[0]).toMatchObject({ executionSuccessful: true, exitCode: 1 });
    const pkg = JSON.parse(fs.readFileSync(path.join(ROOT, "package.json"), "utf8"));
    expect(before.tool.driver.informationUri).toBe(pkg.homepage);
    for (const r of before.tool.driver.rules) {
      expect(r.helpUri).toBe(`${pkg.homepage}/blob/main/docs/rules/${r.id}.md`);
      expect(r.shortDescription.text.length).toBeGreaterThan(0);
      expect(r.fullDescription.text.length).toBeGreaterThan(0);
    }
    // accept it in the source, on the line above
    const file = path.join(dir, uri);
    const lines = fs.readFileSync(file, "utf8").split("\n");
    const at = target.locations[0].physicalLocation.region.startLine - 1;
    lines.splice(at, 0, "// ferrule: accept export-name-mangled because the gain setter is bound by a loader table");
    fs.writeFileSync(file, lines.join("\n"));
    const after = sarif();
    const sup = after.results.filter((x: { suppressions?: unknown[] }) => x.suppressions);
    expect(sup).toHaveLength(1);
    expect(sup[0].ruleId).toBe("export-name-mangled");
    expect(sup[0].suppressions).toEqual([{ kind: "inSource", justification: "the gain setter is bound by a loader table" }]);
    expect(sup[0].partialFingerprints["ferruleFinding/v1"]).toBe(target.partialFingerprints["ferruleFinding/v1"]);
    // JSON and text leave it out
    const json = JSON.parse(ferrule(["check", "--format", "json", "."], dir).out).findings;
    expect(json.filter((f: { rule: string }) => f.rule === "export-name-mangled")).toHaveLength(before.results.filter((x: { ruleId: string }) => x.ruleId === "export-name-mangled").length - 1);
  });
});
