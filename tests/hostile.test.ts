// Hostile repositories and fail-closed CI: what a committed file or a mistyped flag can do to a
// run. Each test asserts the outcome — exit code, the message naming the file and key, that the
// process finished, that nothing was written — through the built CLI, as CI would run it. The
// spawn timeouts are generous hang guards, not timings (timings belong in `npm run bench`).
import { describe, expect, test, beforeAll } from "vitest";
import { spawn, spawnSync, execFileSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { compileExcludes } from "../server/src/analysis/workspace.js";
import { decodeSource } from "../server/src/analysis/textio.js";
import { Workspace } from "../server/src/analysis/workspace.js";
import { DEFAULTS } from "../server/src/analysis/config.js";
import { registerFamily } from "../server/src/rules/index.js";

const ROOT = path.resolve(__dirname, "..");
const BIN = path.join(ROOT, "bin/ferrule.js");
const HANG = 60_000;

function ferrule(args: string[], cwd: string) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: "utf8", timeout: HANG });
  return { code: r.status, signal: r.signal, out: r.stdout, err: r.stderr };
}

/** `ferrule check --format json` parsed; when stdout is not JSON, the error says why (exit code,
 * signal, stderr) instead of "Unexpected end of JSON input". */
function checkJson(args: string[], cwd: string): { findings: any[] } {
  const r = ferrule(["check", "--format", "json", ...args], cwd);
  try {
    return JSON.parse(r.out);
  } catch {
    throw new Error(`ferrule ${args.join(" ")} in ${cwd}: exit ${r.code}, signal ${r.signal}, stdout ${JSON.stringify(r.out.slice(0, 400))}, stderr ${JSON.stringify(r.err.slice(0, 2000))}`);
  }
}

/** A small workspace with one real slip: `long` (4 bytes on armv7/i686/windows) against `i64`. */
function workspace(files: Record<string, string | Buffer> = {}): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-hostile-"));
  const base: Record<string, string | Buffer> = {
    "include/tally.h": "#include <stdint.h>\n#ifdef __cplusplus\nextern \"C\" {\n#endif\nint64_t tally_sum(const int16_t *xs, long n);\n#ifdef __cplusplus\n}\n#endif\n",
    "src/lib.rs": "#[no_mangle]\npub unsafe extern \"C\" fn tally_sum(xs: *const i16, n: i64) -> i64 {\n    if xs.is_null() || n <= 0 { return 0; }\n    let s = std::slice::from_raw_parts(xs, n as usize);\n    s.iter().map(|&x| x as i64).sum()\n}\n",
    ...files,
  };
  for (const [rel, text] of Object.entries(base)) {
    fs.mkdirSync(path.dirname(path.join(dir, rel)), { recursive: true });
    fs.writeFileSync(path.join(dir, rel), text);
  }
  return dir;
}

function listTree(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else out.push(path.relative(dir, p));
    }
  };
  walk(dir);
  return out.sort();
}

beforeAll(() => {
  if (!fs.existsSync(path.join(ROOT, "dist/cli.js"))) execFileSync(process.execPath, [path.join(ROOT, "scripts/build.mjs")], { cwd: ROOT });
});

describe("config and baseline files a repository controls", () => {
  test("a committed .ferrule.toml that is a named pipe: exit 2 naming the file, no hang", () => {
    const dir = workspace();
    execFileSync("mkfifo", [path.join(dir, ".ferrule.toml")]);
    const r = ferrule(["check", "."], dir);
    expect(r.signal).toBeNull();
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/\.ferrule\.toml.*not a regular file \(a named pipe\)/);
  });

  test("a committed .ferrule.toml linked to /dev/zero: exit 2, memory not grown by reading it", () => {
    const dir = workspace();
    fs.symlinkSync("/dev/zero", path.join(dir, ".ferrule.toml"));
    const r = ferrule(["check", "."], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/\.ferrule\.toml.*(outside the project|not a regular file)/);
  });

  test("a committed .ferrule.toml linked out of the project is not read", () => {
    const outside = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-outside-"));
    fs.writeFileSync(path.join(outside, "cfg.toml"), "targets = [\"x86_64\"]\n");
    const dir = workspace();
    fs.symlinkSync(path.join(outside, "cfg.toml"), path.join(dir, ".ferrule.toml"));
    const r = ferrule(["check", "."], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/\.ferrule\.toml.*a symbolic link to .*outside the project/);
  });

  test("--config and --baseline naming a device or a pipe: exit 2", () => {
    const dir = workspace();
    expect(ferrule(["check", "--config", "/dev/zero", "."], dir)).toMatchObject({ code: 2 });
    execFileSync("mkfifo", [path.join(dir, "base.fifo")]);
    const r = ferrule(["check", "--baseline", "base.fifo", "."], dir);
    expect(r.signal).toBeNull();
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/base\.fifo.*named pipe/);
  });

  test("--baseline with a missing file is an error and writes nothing; --update-baseline creates it", () => {
    const dir = workspace();
    const before = listTree(dir);
    const r = ferrule(["check", "--baseline", "baseline-typo.json", "."], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/baseline-typo\.json: no such file .*--update-baseline/);
    expect(listTree(dir)).toEqual(before);
    const w = ferrule(["check", "--baseline", "b.json", "--update-baseline", "."], dir);
    expect(w.code).toBe(0);
    expect(fs.existsSync(path.join(dir, "b.json"))).toBe(true);
    // and the baseline then absorbs the finding it holds
    expect(ferrule(["check", "--baseline", "b.json", "."], dir).code).toBe(0);
  });

  test.each([["0"], ["-1"], ["1.5"], ["nan"], ["\"big\""]])("max_file_bytes = %s is refused, naming the file and key", (v) => {
    const dir = workspace({ ".ferrule.toml": `max_file_bytes = ${v}\n` });
    const r = ferrule(["check", "."], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/\.ferrule\.toml: key `max_file_bytes`: expected a whole number of bytes/);
  });

  test("a misspelt rule id or an unknown table exits 2 with the valid names", () => {
    const dir = workspace({ ".ferrule.toml": "[rules]\nparam-type-missmatch = \"off\"\n" });
    const r = ferrule(["check", "."], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/key `rules\.param-type-missmatch`: unknown rule id .*did you mean `param-type-mismatch`/);
    const dir2 = workspace({ ".ferrule.toml": "[portz]\ndecl = []\n" });
    const r2 = ferrule(["check", "."], dir2);
    expect(r2.code).toBe(2);
    expect(r2.err).toMatch(/key `portz`: unknown setting — did you mean `ports`\?/);
  });
});

describe("exclude globs", () => {
  test("eight `**/` segments finish (no backtracking), and the pattern still works", async () => {
    const dir = workspace({ "a/b/c/d/e/f/g/h/gen.h": "int gen_only(void);\n" });
    const glob = "**/".repeat(8) + "gen.h";
    const r = ferrule(["check", "--format", "json", "."], workspace({ ".ferrule.toml": `exclude = [${JSON.stringify(glob)}]\n` }));
    expect(r.signal).toBeNull();
    fs.writeFileSync(path.join(dir, ".ferrule.toml"), `exclude = [${JSON.stringify(glob)}]\n`);
    const r2 = ferrule(["check", "--format", "json", "."], dir);
    expect(r2.signal).toBeNull();
    const files = JSON.parse(r2.out).findings.map((f: { file: string }) => f.file);
    expect(files.some((f: string) => f.includes("gen.h"))).toBe(false);
  });

  test("braces, `./` anchors, folder names and `!` take effect; a pattern matching nothing is noted", () => {
    const ex = compileExcludes(["{vendor,third_party}/**", "./gen", "!vendor/keep.h", "nothing-here/**"]);
    expect(ex.test("vendor/dsp.h")).toBe(true);
    expect(ex.test("deep/third_party/fft.c")).toBe(true); // unanchored: any depth
    expect(ex.test("vendor/keep.h")).toBe(false); // taken back by `!`
    expect(ex.test("gen/kernels.h")).toBe(true); // folder name excludes below it
    expect(ex.test("src/gen/kernels.h")).toBe(false); // `./` anchors at the checked folder
    expect(ex.test("src/lib.rs")).toBe(false);
    expect(ex.unused()).toEqual(["nothing-here/**"]);
    const dir = workspace({ ".ferrule.toml": "exclude = [\"nothing-here/**\"]\n" });
    const j = checkJson(["."], dir);
    expect(j.findings.some((f: { message: string }) => /exclude pattern `nothing-here\/\*\*` matches no file/.test(f.message))).toBe(true);
  });
});

describe("line endings and encodings", () => {
  const slipAt = (dir: string) =>
    checkJson(["."], dir).findings
      .filter((f: { rule: string }) => f.rule === "param-type-mismatch")
      .map((f: { file: string; line: number; column: number }) => `${f.file}:${f.line}:${f.column}`);

  test("CR-only line endings give the findings at the lines of the LF file, none invented at line 1", () => {
    const lf = workspace();
    const expected = slipAt(lf);
    expect(expected).toEqual(["include/tally.h:5:38"]);
    const h = fs.readFileSync(path.join(lf, "include/tally.h"), "utf8").replace(/\n/g, "\r");
    const rs = fs.readFileSync(path.join(lf, "src/lib.rs"), "utf8").replace(/\n/g, "\r");
    const cr = workspace({ "include/tally.h": h, "src/lib.rs": rs });
    expect(slipAt(cr)).toEqual(expected);
  });

  test("a UTF-16 header with a byte order mark is decoded (same finding) and noted once", () => {
    const lf = workspace();
    const h = fs.readFileSync(path.join(lf, "include/tally.h"), "utf8");
    const le = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(h, "utf16le")]);
    const dir = workspace({ "include/tally.h": le });
    expect(slipAt(dir)).toEqual(["include/tally.h:5:38"]);
    const notes = checkJson(["."], dir).findings.filter((f: { rule: string }) => f.rule === "file-encoding");
    expect(notes.map((f: { message: string }) => f.message)).toEqual([expect.stringMatching(/UTF-16 \(little-endian/)]);
  });

  test("decodeSource: big-endian UTF-16, a UTF-8 BOM, CRLF kept, invalid UTF-8 noted", () => {
    const be = Buffer.from([0xfe, 0xff, 0x00, 0x69, 0x00, 0x6e, 0x00, 0x74]);
    expect(decodeSource(be).text).toBe("int");
    expect(decodeSource(Buffer.from([0xef, 0xbb, 0xbf, 0x61])).text).toBe("a");
    expect(decodeSource(Buffer.from("a\r\nb\rc")).text).toBe("a\r\nb\nc");
    expect(decodeSource(Buffer.from([0x61, 0xff, 0x62])).note).toMatch(/not valid UTF-8/);
  });
});

describe("fail closed", () => {
  test("a rule family that throws is an error (exit 1), reported once per run with its first frame", async () => {
    registerFamily({
      name: "throws-in-every-chunk",
      rules: [],
      check() {
        throw new TypeError("boom");
      },
    });
    const dir = workspace({ "other/a.h": "int other_a(void);\n", "other/a.c": "int other_a(void) { return 1; }\n" });
    const ws = new Workspace({ ...DEFAULTS });
    const res = await ws.checkChunked([dir], { chunkFiles: 1 });
    expect(res.chunks).toBeGreaterThan(1);
    const internal = res.findings.filter((f) => f.rule === "internal-error");
    expect(internal).toHaveLength(1);
    expect(internal[0]!.severity).toBe("error");
    expect(internal[0]!.message).toMatch(/`throws-in-every-chunk` failed: boom \(at [^)]*hostile\.test\.ts:\d+:\d+\)/);
  });
});

describe("the run always ends", () => {
  test("the language server answers a request after shutdown with the protocol's error", async () => {
    const child = spawn(process.execPath, [BIN, "lsp", "--stdio"], { stdio: ["pipe", "pipe", "pipe"] });
    let buf = "";
    const replies: Record<number, { result?: unknown; error?: { code: number } }> = {};
    child.stdout.on("data", (d: Buffer) => {
      buf += d.toString("utf8");
      for (;;) {
        const m = /Content-Length: (\d+)\r\n\r\n/.exec(buf);
        if (!m) break;
        const start = m.index + m[0].length;
        const len = Number(m[1]);
        if (Buffer.byteLength(buf.slice(start)) < len) break;
        const body = Buffer.from(buf.slice(start)).subarray(0, len).toString("utf8");
        buf = Buffer.from(buf.slice(start)).subarray(len).toString("utf8");
        const msg = JSON.parse(body);
        if (typeof msg.id === "number") replies[msg.id] = msg;
      }
    });
    const send = (m: object) => {
      const s = JSON.stringify({ jsonrpc: "2.0", ...m });
      child.stdin.write(`Content-Length: ${Buffer.byteLength(s)}\r\n\r\n${s}`);
    };
    const wait = async (id: number) => {
      for (let i = 0; i < 600 && !replies[id]; i++) await new Promise((r) => setTimeout(r, 50));
      return replies[id];
    };
    const dir = workspace();
    send({ id: 1, method: "initialize", params: { processId: null, rootUri: `file://${dir}`, capabilities: {} } });
    expect((await wait(1))?.result).toBeTruthy();
    send({ method: "initialized", params: {} });
    send({ id: 2, method: "shutdown" });
    expect(await wait(2)).toMatchObject({ result: null });
    send({ id: 3, method: "textDocument/hover", params: { textDocument: { uri: `file://${dir}/src/lib.rs` }, position: { line: 1, character: 30 } } });
    const r3 = await wait(3);
    child.kill();
    expect(r3?.error?.code).toBe(-32600); // InvalidRequest: the server is shutting down
  }, HANG);
});

describe("budgets and skipped files", () => {
  test("a file started after the run's time budget is skipped with a notice naming the setting", async () => {
    const { extractFile, setRunDeadline } = await import("../server/src/extract/index.js");
    const { initParsers } = await import("../server/src/parse/parser.js");
    await initParsers();
    setRunDeadline(Date.now() - 1);
    try {
      const f = extractFile("/ws/late.h", "int late(void);\n");
      expect(f.fns).toEqual([]);
      expect(f.notices.map((n) => n.message)).toEqual([expect.stringMatching(/total time budget .*max_total_seconds/)]);
    } finally {
      setRunDeadline(Infinity);
    }
    expect(extractFile("/ws/late.h", "int late(void);\n").fns.map((x) => x.name)).toEqual(["late"]);
  });

  test("skipped files are listed; --fail-on-skip makes them fail the run; max_total_seconds is validated", () => {
    const dir = workspace({ ".ferrule.toml": "max_file_bytes = 300\n", "include/big.h": `/* ${"x".repeat(2000)} */\nint big(void);\n` });
    const r = ferrule(["check", "."], dir);
    expect(r.err).toMatch(/1 file\(s\) not read .*include\/big\.h/);
    const clean = workspace({ ".ferrule.toml": "max_file_bytes = 300\ntargets = [\"x86_64\"]\n", "include/big.h": `/* ${"x".repeat(2000)} */\nint big(void);\n` });
    expect(ferrule(["check", "."], clean).code).toBe(0); // long is 8 bytes on x86_64: no slip
    expect(ferrule(["check", "--fail-on-skip", "."], clean).code).toBe(1);
    const bad = workspace({ ".ferrule.toml": "max_total_seconds = 0\n" });
    const b = ferrule(["check", "."], bad);
    expect(b.code).toBe(2);
    expect(b.err).toMatch(/key `max_total_seconds`: expected a number of seconds above 0/);
  });
});

describe("paths a repository's config names", () => {
  test("include_paths outside the project: exit 2 naming the file and key; allowed with --config", () => {
    const outside = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-outside-"));
    const dir = workspace({ ".ferrule.toml": `include_paths = [${JSON.stringify(outside)}, "../"]\n` });
    const r = ferrule(["check", "."], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/\.ferrule\.toml: key `include_paths`: .* is outside the project folder/);
    const named = ferrule(["check", "--config", path.join(dir, ".ferrule.toml"), "."], dir);
    expect(named.code).toBe(1); // the tally slip, checked as usual
  });
});
