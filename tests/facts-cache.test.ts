// The facts cache on disk (server/src/analysis/facts-cache.ts): a check that takes facts from the
// cache reports exactly what a check without it reports — on every fixture, after an included
// header changes, after a header is added that an include then names, with corrupted entries, and
// with two runs sharing the folder. `--no-cache` writes nothing, and the cache is never written
// inside the checked folder.
import { afterAll, describe, expect, test } from "vitest";
import { spawn } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { run } from "../server/src/cli/main.js";
import { evict } from "../server/src/analysis/facts-cache.js";

const ROOT = path.resolve(__dirname, "..");
const BIN = path.join(ROOT, "bin/ferrule.js");
const TMP = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-cache-test-"));
afterAll(() => fs.rmSync(TMP, { recursive: true, force: true }));

let n = 0;
const freshDir = () => path.join(TMP, `cache-${n++}`);

/** One in-process `ferrule check --format json`; returns the findings and the cache's counts
 * (from the FERRULE_TIMINGS line). */
async function check(target: string, cache: string[] , cwd = ROOT) {
  let out = "";
  let err = "";
  const was = process.env.FERRULE_TIMINGS;
  process.env.FERRULE_TIMINGS = "1";
  try {
    await run(["check", "--format", "json", ...cache, target], { cwd, stdout: (s) => (out += s), stderr: (s) => (err += s), isTTY: false });
  } finally {
    if (was === undefined) delete process.env.FERRULE_TIMINGS;
    else process.env.FERRULE_TIMINGS = was;
  }
  const m = /facts cache (\d+) hit\(s\), (\d+) read/.exec(err);
  return { findings: JSON.parse(out).findings as unknown[], hits: m ? Number(m[1]) : -1, reads: m ? Number(m[2]) : -1, err };
}

function entries(dir: string): string[] {
  if (!fs.existsSync(dir)) return [];
  return fs.readdirSync(dir, { recursive: true, encoding: "utf8" }).filter((f) => f.endsWith(".facts")).map((f) => path.join(dir, f));
}

describe("facts cache: a warm check equals a cold one", () => {
  const fixtures = fs.readdirSync(path.join(ROOT, "test-fixtures")).filter((d) => fs.statSync(path.join(ROOT, "test-fixtures", d)).isDirectory());
  test.each(fixtures)("test-fixtures/%s: uncached, cold and warm runs give the same findings", async (fx) => {
    const target = path.join("test-fixtures", fx);
    const dir = freshDir();
    const none = await check(target, ["--no-cache"]);
    const cold = await check(target, ["--cache-dir", dir]);
    const warm = await check(target, ["--cache-dir", dir]);
    expect(cold.findings).toEqual(none.findings);
    expect(warm.findings).toEqual(none.findings);
    expect(cold.hits).toBe(0);
    expect(cold.reads).toBeGreaterThan(0);
    // every file the cold run read whole is taken from the cache
    expect(warm.reads).toBe(0);
    expect(warm.hits).toBe(cold.reads);
  });
});

/** A small seismic-array workspace: the export's parameter type comes through a macro of an
 * included header. */
function seismicWorkspace(): string {
  const ws = fs.mkdtempSync(path.join(TMP, "seismic-"));
  fs.mkdirSync(path.join(ws, "include"));
  fs.mkdirSync(path.join(ws, "src"));
  fs.writeFileSync(path.join(ws, "include", "geo_types.h"), "#ifndef GEO_TYPES_H\n#define GEO_TYPES_H\n#define GEO_SAMPLE float\n#endif\n");
  fs.writeFileSync(path.join(ws, "include", "geo.h"), '#ifndef GEO_H\n#define GEO_H\n#include "geo_types.h"\n#ifdef __cplusplus\nextern "C" {\n#endif\nvoid geo_stack_traces(const GEO_SAMPLE *traces, size_t n);\n#ifdef __cplusplus\n}\n#endif\n#endif\n');
  fs.writeFileSync(path.join(ws, "src", "lib.rs"), "#[no_mangle]\npub unsafe extern \"C\" fn geo_stack_traces(traces: *const f32, n: usize) {\n    let _ = (traces, n);\n}\n");
  return ws;
}

const mismatches = (fs_: unknown[]) => (fs_ as { rule: string; line: number }[]).filter((f) => f.rule === "param-type-mismatch");

describe("facts cache: facts that depend on other files", () => {
  test("editing an included header: the including file is read again, findings equal an uncached run", async () => {
    const ws = seismicWorkspace();
    const dir = freshDir();
    const first = await check(ws, ["--cache-dir", dir], ws);
    expect(mismatches(first.findings)).toEqual([]);
    // the macro now names double: geo.h's declaration no longer matches *const f32
    fs.writeFileSync(path.join(ws, "include", "geo_types.h"), "#ifndef GEO_TYPES_H\n#define GEO_TYPES_H\n#define GEO_SAMPLE double\n#endif\n");
    const warm = await check(ws, ["--cache-dir", dir], ws);
    const none = await check(ws, ["--no-cache"], ws);
    expect(mismatches(none.findings).length).toBeGreaterThan(0);
    expect(warm.findings).toEqual(none.findings);
    // geo_types.h and geo.h were read again (geo.h's entry named the old text of geo_types.h);
    // lib.rs came from the cache
    expect(warm.reads).toBe(2);
    expect(warm.hits).toBe(1);
  });

  test("a header added next to the including file takes the include over: read again", async () => {
    const ws = seismicWorkspace();
    fs.mkdirSync(path.join(ws, "src", "c"));
    // geo.h moves beside a C file that includes it; geo_types.h stays in include/ (found as the
    // workspace's only file of that name)
    fs.renameSync(path.join(ws, "include", "geo.h"), path.join(ws, "src", "c", "geo.h"));
    const dir = freshDir();
    const first = await check(ws, ["--cache-dir", dir], ws);
    expect(mismatches(first.findings)).toEqual([]);
    // a geo_types.h beside geo.h now wins the lookup (the including file's folder first)
    fs.writeFileSync(path.join(ws, "src", "c", "geo_types.h"), "#define GEO_SAMPLE double\n");
    const warm = await check(ws, ["--cache-dir", dir], ws);
    const none = await check(ws, ["--no-cache"], ws);
    expect(warm.findings).toEqual(none.findings);
    expect(mismatches(none.findings).length).toBeGreaterThan(0);
  });
});

describe("facts cache: damage and sharing", () => {
  test("truncated and corrupted entries are ignored and written again", async () => {
    const target = "test-fixtures/sonar-demo";
    const dir = freshDir();
    const cold = await check(target, ["--cache-dir", dir]);
    const files = entries(dir).sort();
    expect(files.length).toBe(cold.reads);
    const [a, b, c] = files as [string, string, string];
    fs.truncateSync(a, Math.floor(fs.statSync(a).size / 2));
    const buf = fs.readFileSync(b);
    buf[buf.length - 3] ^= 0xff;
    fs.writeFileSync(b, buf);
    fs.writeFileSync(c, "");
    const warm = await check(target, ["--cache-dir", dir]);
    expect(warm.findings).toEqual(cold.findings);
    expect(warm.reads).toBe(3);
    expect(warm.hits).toBe(cold.reads - 3);
    // rewritten whole: the next run takes all of them from the cache
    const again = await check(target, ["--cache-dir", dir]);
    expect(again.reads).toBe(0);
    expect(again.findings).toEqual(cold.findings);
  });

  test("two runs sharing one cache folder at once give the uncached findings", async () => {
    const dir = freshDir();
    const target = "test-fixtures/rules";
    const none = await check(target, ["--no-cache"]);
    const spawnRun = () => new Promise<string>((resolve) => {
      const p = spawn(process.execPath, [BIN, "check", "--format", "json", "--cache-dir", dir, target], { cwd: ROOT });
      let out = "";
      p.stdout.on("data", (d) => (out += d));
      p.on("close", () => resolve(out));
    });
    const outs = await Promise.all([spawnRun(), spawnRun(), spawnRun()]);
    for (const o of outs) expect(JSON.parse(o).findings).toEqual(none.findings);
    // no temporary file left behind, and every entry whole: a fourth run reads nothing
    expect(fs.readdirSync(dir, { recursive: true, encoding: "utf8" }).filter((f) => f.endsWith(".tmp"))).toEqual([]);
    const p = spawn(process.execPath, [BIN, "check", "--format", "json", "--cache-dir", dir, target], { cwd: ROOT, env: { ...process.env, FERRULE_TIMINGS: "1" } });
    let err = "";
    let out = "";
    p.stderr.on("data", (d) => (err += d));
    p.stdout.on("data", (d) => (out += d));
    await new Promise((r) => p.on("close", r));
    expect(JSON.parse(out).findings).toEqual(none.findings);
    expect(err).toMatch(/facts cache \d+ hit\(s\), 0 read/);
  }, 180_000);
});

describe("facts cache: where it writes", () => {
  test("--no-cache writes nothing, not even the default folder", async () => {
    const dir = freshDir();
    const was = process.env.FERRULE_CACHE_DIR;
    process.env.FERRULE_CACHE_DIR = dir;
    try {
      const r = await check("test-fixtures/sonar-demo", ["--no-cache"]);
      expect(r.findings.length).toBeGreaterThan(0);
      expect(fs.existsSync(dir)).toBe(false);
      // the same run without the flag does use that folder
      await check("test-fixtures/sonar-demo", []);
      expect(entries(dir).length).toBeGreaterThan(0);
    } finally {
      if (was === undefined) delete process.env.FERRULE_CACHE_DIR;
      else process.env.FERRULE_CACHE_DIR = was;
    }
  });

  test("a cache folder inside the checked folder is not used", async () => {
    const ws = seismicWorkspace();
    const inside = path.join(ws, "cache-here");
    const r = await check(ws, ["--cache-dir", inside], ws);
    expect(r.err).toMatch(/inside the checked folder; not used/);
    expect(fs.existsSync(inside)).toBe(false);
  });

  test("--cache-dir and --no-cache together are a usage error", async () => {
    let err = "";
    const code = await run(["check", "--no-cache", "--cache-dir", freshDir(), "test-fixtures/sonar-demo"], { cwd: ROOT, stdout: () => {}, stderr: (s) => (err += s), isTTY: false });
    expect(code).toBe(2);
    expect(err).toMatch(/exclude each other/);
  });

  test("eviction keeps the folder under its cap, least recently used first", async () => {
    const dir = freshDir();
    await check("test-fixtures/rules", ["--cache-dir", dir]);
    const files = entries(dir);
    const sizes = files.map((f) => fs.statSync(f).size);
    const total = sizes.reduce((a, b) => a + b, 0);
    // the first file was used last; the others long ago
    const old = new Date(Date.now() - 86_400_000);
    files.slice(1).forEach((f, i) => fs.utimesSync(f, new Date(old.getTime() + i), new Date(old.getTime() + i)));
    const cap = Math.floor(total / 2);
    const r = evict(dir, cap);
    expect(r.bytes).toBeLessThanOrEqual(cap);
    expect(r.removed).toBeGreaterThan(0);
    expect(fs.existsSync(files[0]!)).toBe(true);
    const left = entries(dir);
    expect(left.reduce((a, f) => a + fs.statSync(f).size, 0)).toBe(r.bytes);
  });
});
