// Fuzzing the CLI end to end: `node bin/ferrule.js check --format json` on mutated copies of the
// demo workspace in a temp folder (truncated, NUL bytes, invalid UTF-8 on disk, CRLF, BOM, a 10 MB
// single line, 10,000-deep nesting, a symlink loop, a dangling symlink, a FIFO, an unreadable
// file, a file deleted mid-scan). Exit code is 0 or 1 — never 2 (usage) or a crash — the output
// is the documented JSON, and every odd file yields a result or one "skipped: reason" finding.
// Also: the worker-thread path (many files) gives the same findings as the sequential one.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { spawnSync } from "node:child_process";
import fc from "fast-check";
import { FIXTURES } from "../helpers/analyze.js";
import { corpus, deepNesting, longLine, mutations, RUNS, SEED } from "./corpus.js";
import { listSources } from "../../server/src/analysis/workspace.js";
import { loadFiles } from "../../server/src/analysis/parallel.js";

const ROOT = path.resolve(FIXTURES, "..");
const CLI = path.join(ROOT, "bin", "ferrule.js");
let tmp: string;

interface Run { code: number | null; out: { findings: { rule: string; file: string; line: number; message: string }[] }; stderr: string; ms: number }

function check(dir: string, env: Record<string, string> = {}, uid?: number): Run {
  const t0 = Date.now();
  const r = spawnSync(process.execPath, [CLI, "check", "--format", "json", dir], {
    cwd: dir, encoding: "utf8", timeout: 120_000, maxBuffer: 64 * 1024 * 1024, env: { ...process.env, ...env }, ...(uid !== undefined ? { uid, gid: uid } : {}),
  });
  let out: Run["out"] = { findings: [] };
  try { out = JSON.parse(r.stdout); } catch { /* asserted below */ }
  return { code: r.status, out, stderr: r.stderr, ms: Date.now() - t0 };
}

function demoCopy(name: string): string {
  const dir = path.join(tmp, name);
  fs.cpSync(path.join(FIXTURES, "sonar-demo"), dir, { recursive: true });
  return dir;
}

function sources(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => { for (const e of fs.readdirSync(d, { withFileTypes: true })) { const p = path.join(d, e.name); if (e.isDirectory()) walk(p); else if (e.isFile() && /\.(rs|h|cc|c|cpp|hpp)$/.test(e.name)) out.push(p); } };
  walk(dir);
  return out.sort();
}

beforeAll(() => {
  expect(fs.existsSync(path.join(ROOT, "dist", "cli.js")), "run `node scripts/build.mjs` first (npm test does)").toBe(true);
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-fuzz-cli-"));
  fs.chmodSync(tmp, 0o755);
});
afterAll(() => {
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
});

describe("ferrule check on hostile workspaces", () => {
  test("every kind of damage at once: exit 0/1, JSON out, one clear notice per unreadable file", () => {
    const dir = demoCopy("hostile");
    const files = sources(dir);
    const [a, b, c] = files;
    fs.writeFileSync(a!, mutations.invalidUtf8(mutations.nul(fs.readFileSync(a!), 10), 40));
    fs.writeFileSync(b!, mutations.bom(mutations.crlf(fs.readFileSync(b!))));
    fs.writeFileSync(c!, mutations.truncate(fs.readFileSync(c!), Math.floor(fs.statSync(c!).size / 2)));
    fs.writeFileSync(path.join(dir, "huge.cc"), longLine("c", 10 * 1024 * 1024));
    deepNesting("rs").forEach((s, i) => fs.writeFileSync(path.join(dir, `deep${i}.rs`), s));
    deepNesting("c").forEach((s, i) => fs.writeFileSync(path.join(dir, `deep${i}.h`), s));
    fs.symlinkSync(".", path.join(dir, "loop"));
    fs.symlinkSync("nowhere.h", path.join(dir, "dangling.h"));
    spawnSync("mkfifo", [path.join(dir, "pipe.rs")]); // must not block the reader
    const r = check(dir);
    expect(r.stderr).not.toMatch(/internal error|TypeError|RangeError/);
    expect([0, 1]).toContain(r.code);
    expect(Array.isArray(r.out.findings)).toBe(true);
    const skipped = r.out.findings.filter((f) => f.rule === "file-skipped");
    expect(skipped.filter((f) => f.file.endsWith("huge.cc")).map((f) => f.message)).toEqual([expect.stringMatching(/skipped: .*above the limit/)]);
    expect(skipped.filter((f) => f.file.endsWith("dangling.h")).map((f) => f.message)).toEqual([expect.stringMatching(/skipped: .*cannot read: ENOENT/)]);
    expect(r.out.findings.filter((f) => f.rule === "internal-error")).toEqual([]);
    // the loop is walked once: no file is reported through loop/…
    expect(r.out.findings.filter((f) => f.file.includes("loop/"))).toEqual([]);
    // the demo's own mismatches are still found in the files left intact
    expect(r.out.findings.length).toBeGreaterThan(skipped.length);
  });

  test("an unreadable file (run as an unprivileged user when root) gives one 'cannot read' notice", () => {
    const dir = demoCopy("unreadable");
    const victim = sources(dir)[0]!;
    fs.chmodSync(victim, 0o000);
    for (const p of [dir, ...fs.readdirSync(dir, { recursive: true }).map((x) => path.join(dir, String(x)))]) {
      if (p !== victim) fs.chmodSync(p, fs.statSync(p).isDirectory() ? 0o755 : 0o644);
    }
    const asNobody = process.getuid?.() === 0 ? 65534 : undefined;
    const r = check(dir, {}, asNobody);
    expect([0, 1]).toContain(r.code);
    const notes = r.out.findings.filter((f) => f.rule === "file-skipped" && f.file.endsWith(path.basename(victim)));
    expect(notes.map((f) => f.message)).toEqual([expect.stringMatching(/skipped: .*cannot read: EACCES/)]);
  });

  test("a file deleted between the walk and the read gives one 'cannot read: ENOENT' notice (both loaders)", async () => {
    const dir = demoCopy("deleted");
    const walk = listSources([dir]);
    const victim = walk.files[1]!;
    fs.unlinkSync(victim);
    for (const script of [undefined, path.join(ROOT, "dist", "cli.js")]) {
      const loaded = await loadFiles(walk.files, { maxFileBytes: 2_000_000, script, workers: script ? 1 : undefined });
      expect(loaded.map((l) => l.file)).toEqual(walk.files);
      const v = loaded.find((l) => l.file === victim)!;
      expect(v.facts.notices.map((n) => n.message)).toEqual([expect.stringMatching(/skipped: .*cannot read: ENOENT/)]);
      expect(loaded.filter((l) => l.file !== victim).every((l) => l.facts.notices.length === 0)).toBe(true);
    }
  });

  test("fast-check: random damage to one demo file on disk; the CLI always answers 0/1 with JSON", () => {
    const files = corpus().filter((f) => f.rel.startsWith("sonar-demo"));
    let n = 0;
    fc.assert(
      fc.property(fc.nat(), fc.nat(), fc.constantFrom("truncate", "flip", "nul", "invalidUtf8", "cr"), fc.integer({ min: 1, max: 255 }), (fi, pos, kind, mask) => {
        const dir = demoCopy(`prop${n++}`);
        const f = files[fi % files.length]!;
        const at = pos % Math.max(1, f.bytes.length);
        const m = kind === "truncate" ? mutations.truncate(f.bytes, at) : kind === "flip" ? mutations.flip(f.bytes, at, mask) : kind === "nul" ? mutations.nul(f.bytes, at) : kind === "invalidUtf8" ? mutations.invalidUtf8(f.bytes, at) : mutations.cr(f.bytes);
        fs.writeFileSync(path.join(dir, path.relative("sonar-demo", f.rel)), m);
        const r = check(dir);
        expect([0, 1], r.stderr).toContain(r.code);
        expect(r.out.findings.filter((x) => x.rule === "internal-error")).toEqual([]);
        fs.rmSync(dir, { recursive: true, force: true });
      }),
      { seed: SEED, numRuns: Math.max(4, Math.ceil(RUNS / 8)) },
    );
  });
});

describe("worker threads", () => {
  test("a generated 10k-line workspace: worker threads and one thread give the same findings, the planted ones", async () => {
    const { generate } = (await import(path.join(ROOT, "scripts", "gen-bench.mjs"))) as { generate: (o: { lines: number; out: string; seed: number }) => { expected: { rule: string; file: string; line: number }[]; files: number } };
    const dir = path.join(tmp, "gen");
    const m = generate({ lines: 10_000, out: dir, seed: SEED % 1000 });
    expect(m.files).toBeGreaterThan(48); // FERRULE_WORKERS=2 forces worker threads
    const par = check(dir, { FERRULE_WORKERS: "2" });
    const seq = check(dir, { FERRULE_WORKERS: "0" });
    expect(par.code).toBe(1);
    expect(par.out.findings).toEqual(seq.out.findings);
    const got = par.out.findings.map((f) => `${f.rule} ${f.file}:${f.line}`).sort();
    const want = m.expected.map((e) => `${e.rule} ${e.file}:${e.line}`).sort();
    expect(got).toEqual(want);
  });
});
