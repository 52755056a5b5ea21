#!/usr/bin/env node
// `npm run bench`: how fast ferrule checks a large mixed workspace, against the floor of just
// parsing it, and against compiling it.
//
// For each size (default 10k, 100k and 1M lines) it generates a seeded workspace with
// scripts/gen-bench.mjs, then measures in separate processes:
//   (a) the parse floor: walk + read + web-tree-sitter parse of every file, nothing else, with the
//       same worker threads as the check (bench-out/floor.js, bundled from scripts/bench-floor.ts);
//   (b) `ferrule check --format json` end to end (bin/ferrule.js, the shipped bundle);
//   (c) b/a; (d) the check's peak RSS (getrusage maxrss of the process, workers included);
//   (e) files/s and lines/s of the check;
//   (f) for the smallest workspace, compiling the same code instead: `rustc --emit=metadata` on each
//       crate (what `cargo check` runs) and `g++ -fsyntax-only` on each block, two jobs at a time
//       like `make -j2` on this 2-core machine, and f/b.
// It also checks that the check reports exactly the planted findings (rule, file, line) and
// nothing else, and runs every sub-benchmark in scripts/bench/*.mjs (each prints one JSON line).
// Prints a table and writes bench-out/bench.json. Exit 1 when the planted check fails.
//
// usage: node scripts/bench.mjs [--sizes 10k,100k,1m] [--runs N] [--no-compile] [--seed S]

import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { spawn, spawnSync } from "node:child_process";
import { fileURLToPath } from "node:url";
import * as esbuild from "esbuild";
import { generate } from "./gen-bench.mjs";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const OUT = path.join(ROOT, "bench-out");
const CLI = path.join(ROOT, "bin", "ferrule.js");

function parseSize(s) {
  const m = /^(\d+(?:\.\d+)?)([km]?)$/i.exec(s.trim());
  if (!m) throw new Error(`bad size ${s}`);
  return Math.round(Number(m[1]) * ({ "": 1, k: 1e3, m: 1e6 }[m[2].toLowerCase()]));
}

const args = process.argv.slice(2);
const opt = { sizes: [10_000, 100_000, 1_000_000], runs: undefined, compile: true, seed: 7 };
for (let i = 0; i < args.length; i++) {
  const a = args[i];
  if (a === "--sizes") opt.sizes = args[++i].split(",").map(parseSize);
  else if (a === "--runs") opt.runs = Number(args[++i]);
  else if (a === "--no-compile") opt.compile = false;
  else if (a === "--seed") opt.seed = Number(args[++i]);
  else throw new Error(`unknown argument ${a}`);
}
if (process.env.BENCH_SIZES) opt.sizes = process.env.BENCH_SIZES.split(",").map(parseSize);

fs.mkdirSync(OUT, { recursive: true });
const HOOK = path.join(OUT, "rss-hook.cjs");
// Preloaded into every measured process: writes its peak RSS (KiB, workers included) at exit.
fs.writeFileSync(HOOK, `process.on("exit", () => { try { require("fs").writeFileSync(process.env.BENCH_RSS_FILE, String(process.resourceUsage().maxRSS)); } catch {} });\n`);
const RSS_FILE = path.join(OUT, "rss.txt");

/** Runs a command, returns wall time (ms), peak RSS (MiB, when the hook ran), stdout, exit code. */
function measure(cmd, argv, env = {}) {
  return new Promise((resolve) => {
    fs.rmSync(RSS_FILE, { force: true });
    const t0 = process.hrtime.bigint();
    const p = spawn(cmd, argv, { cwd: ROOT, env: { ...process.env, ...env, BENCH_RSS_FILE: RSS_FILE }, stdio: ["ignore", "pipe", "pipe"] });
    const chunks = [];
    let err = "";
    p.stdout.on("data", (d) => chunks.push(d));
    p.stderr.on("data", (d) => (err += d));
    p.on("close", (code) => {
      const ms = Number(process.hrtime.bigint() - t0) / 1e6;
      let rss;
      try { rss = Number(fs.readFileSync(RSS_FILE, "utf8")) / 1024; } catch { rss = undefined; }
      resolve({ ms, rss, code, stdout: Buffer.concat(chunks).toString("utf8"), stderr: err });
    });
  });
}

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

async function buildFloor() {
  await esbuild.build({
    entryPoints: [path.join(ROOT, "scripts/bench-floor.ts")], outfile: path.join(OUT, "floor.js"),
    bundle: true, platform: "node", target: "node20", format: "cjs", logLevel: "warning", logOverride: { "empty-import-meta": "silent" },
  });
}

/** Runs jobs (argv arrays) `par` at a time; returns wall ms and failures. */
async function runPool(jobs, par) {
  const t0 = process.hrtime.bigint();
  const failures = [];
  let next = 0;
  const one = async () => {
    while (next < jobs.length) {
      const j = jobs[next++];
      const r = await measure(j[0], j.slice(1));
      if (r.code !== 0) failures.push({ cmd: j.join(" "), stderr: r.stderr.slice(0, 2000) });
    }
  };
  await Promise.all(Array.from({ length: par }, one));
  return { ms: Number(process.hrtime.bigint() - t0) / 1e6, failures };
}

async function compileTime(ws, manifest) {
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-bench-"));
  const jobs = [];
  manifest.crates.forEach((c, i) => jobs.push(["rustc", "--edition", "2021", "--crate-type", "lib", "--crate-name", c, "--emit=metadata", "-o", path.join(tmp, `lib${i}.rmeta`), "--cap-lints", "allow", path.join(ws, "crates", c, "src", "lib.rs")]));
  const blocks = [];
  const walk = (d) => { for (const e of fs.readdirSync(d, { withFileTypes: true })) e.isDirectory() ? walk(path.join(d, e.name)) : e.name.endsWith(".cc") && blocks.push(path.join(d, e.name)); };
  walk(path.join(ws, "blocks"));
  for (const b of blocks) jobs.push(["g++", "-std=c++17", "-fsyntax-only", b]);
  const r = await runPool(jobs, Math.min(2, os.availableParallelism?.() ?? os.cpus().length));
  fs.rmSync(tmp, { recursive: true, force: true });
  return { ms: r.ms, jobs: jobs.length, crates: manifest.crates.length, blocks: blocks.length, failures: r.failures };
}

function plantedCheck(findings, manifest, ws) {
  const key = (f) => `${f.rule} ${f.file}:${f.line}`;
  const rel = (f) => path.relative(ws, path.resolve(ROOT, f));
  const got = new Set(findings.map((f) => key({ rule: f.rule, file: rel(f.file), line: f.line })));
  const want = new Set(manifest.expected.map(key));
  const missing = [...want].filter((k) => !got.has(k));
  const unexpected = [...got].filter((k) => !want.has(k));
  return { planted: want.size, reported: got.size, missing, unexpected, ok: missing.length === 0 && unexpected.length === 0 };
}

async function benchSize(lines) {
  const ws = path.join(OUT, `ws-${lines}`);
  const g0 = Date.now();
  const manifest = generate({ lines, out: ws, seed: opt.seed });
  const genMs = Date.now() - g0;
  const runs = opt.runs ?? (lines >= 1_000_000 ? 1 : 3);
  console.error(`[bench] ${lines} lines: ${manifest.files} files generated in ${genMs} ms; ${runs} run(s) each`);
  // warm the page cache once so neither side pays for the first read
  await measure("node", [path.join(OUT, "floor.js"), ws]);
  const floor = [];
  const check = [];
  let last;
  for (let i = 0; i < runs; i++) {
    const a = await measure("node", ["-r", HOOK, path.join(OUT, "floor.js"), ws]);
    if (a.code !== 0) throw new Error(`parse floor failed: ${a.stderr}`);
    floor.push(a);
    const b = await measure("node", ["-r", HOOK, CLI, "check", "--format", "json", ws]);
    if (b.code !== 0 && b.code !== 1) throw new Error(`ferrule check exited ${b.code}: ${b.stderr}`);
    check.push(b);
    last = b;
  }
  const findings = JSON.parse(last.stdout).findings;
  const planted = plantedCheck(findings, manifest, ws);
  const aMs = median(floor.map((r) => r.ms));
  const bMs = median(check.map((r) => r.ms));
  const row = {
    lines: manifest.lines, files: manifest.files, runs,
    workers: JSON.parse(floor[0].stdout.trim().split("\n").pop()).workers,
    parseFloorMs: Math.round(aMs), checkMs: Math.round(bMs), ratio: +(bMs / aMs).toFixed(3),
    floorRssMiB: Math.round(Math.max(...floor.map((r) => r.rss ?? 0))),
    peakRssMiB: Math.round(Math.max(...check.map((r) => r.rss ?? 0))),
    filesPerSec: Math.round(manifest.files / (bMs / 1000)), linesPerSec: Math.round(manifest.lines / (bMs / 1000)),
    floorRunsMs: floor.map((r) => Math.round(r.ms)), checkRunsMs: check.map((r) => Math.round(r.ms)),
    planted,
  };
  if (opt.compile && lines === Math.min(...opt.sizes)) {
    console.error(`[bench] compiling the ${lines}-line workspace (rustc --emit=metadata, g++ -fsyntax-only)…`);
    const c = await compileTime(ws, manifest);
    row.compile = { ms: Math.round(c.ms), jobs: c.jobs, crates: c.crates, blocks: c.blocks, failures: c.failures.length, ratioToCheck: +(c.ms / bMs).toFixed(1) };
    if (c.failures.length) console.error(`[bench] compile failures:\n${c.failures.map((f) => f.cmd + "\n" + f.stderr).join("\n")}`);
  }
  return row;
}

async function subBenches() {
  const dir = path.join(ROOT, "scripts", "bench");
  if (!fs.existsSync(dir)) return [];
  const out = [];
  for (const f of fs.readdirSync(dir).filter((n) => n.endsWith(".mjs")).sort()) {
    console.error(`[bench] sub-benchmark ${f}…`);
    const r = await measure("node", [path.join(dir, f)]);
    const line = r.stdout.trim().split("\n").filter((l) => l.trim().startsWith("{")).pop();
    let result;
    try { result = line ? JSON.parse(line) : undefined; } catch { result = undefined; }
    out.push({ name: f.replace(/\.mjs$/, ""), ok: r.code === 0 && result !== undefined, ms: Math.round(r.ms), result, error: r.code === 0 ? undefined : r.stderr.slice(-2000) });
  }
  return out;
}

function fmt(n) {
  return n === undefined ? "—" : n.toLocaleString("en-US");
}

async function main() {
  await buildFloor();
  const machine = {
    cpus: os.cpus().length, cpuModel: os.cpus()[0]?.model, memGiB: Math.round(os.totalmem() / 2 ** 30), node: process.version,
    os: `${os.type()} ${os.release()}`, loadAvgStart: os.loadavg().map((x) => +x.toFixed(2)),
    rustc: spawnSync("rustc", ["--version"]).stdout?.toString().trim(), gxx: spawnSync("g++", ["--version"]).stdout?.toString().split("\n")[0],
  };
  const rows = [];
  for (const s of opt.sizes) rows.push(await benchSize(s));
  const subs = await subBenches();
  machine.loadAvgEnd = os.loadavg().map((x) => +x.toFixed(2));

  // Targets from the issue.
  const big = rows.find((r) => r.lines >= 1_000_000) ?? rows[rows.length - 1];
  const scaling = [];
  for (let i = 1; i < rows.length; i++) {
    const lr = rows[i].lines / rows[i - 1].lines;
    const tr = rows[i].checkMs / rows[i - 1].checkMs;
    scaling.push({ from: rows[i - 1].lines, to: rows[i].lines, linesRatio: +lr.toFixed(2), timeRatio: +tr.toFixed(2), ok: tr <= lr * 1.1 });
  }
  const small = rows.find((r) => r.compile);
  const targets = {
    checkOverFloorMax1_3: rows.every((r) => r.ratio <= 1.3),
    compileOverCheckMin20: small ? small.compile.ratioToCheck >= 20 : undefined,
    rssAt1MUnder300MiB: big && big.lines >= 1_000_000 ? big.peakRssMiB <= 300 : undefined,
    scalingTenfoldUnder11x: scaling.every((s) => s.ok),
    plantedFindingsAllReported: rows.every((r) => r.planted.ok),
  };

  const head = ["lines", "files", "workers", "(a) parse floor ms", "(b) check ms", "(c) b/a", "(d) peak RSS MiB", "(e) files/s", "lines/s", "planted found"];
  const body = rows.map((r) => [fmt(r.lines), fmt(r.files), String(r.workers), fmt(r.parseFloorMs), fmt(r.checkMs), r.ratio.toFixed(2), fmt(r.peakRssMiB), fmt(r.filesPerSec), fmt(r.linesPerSec), `${r.planted.planted - r.planted.missing.length}/${r.planted.planted}${r.planted.unexpected.length ? ` (+${r.planted.unexpected.length} unexpected)` : ""}`]);
  const widths = head.map((h, i) => Math.max(h.length, ...body.map((b) => b[i].length)));
  const line = (cells) => "| " + cells.map((c, i) => c.padStart(widths[i])).join(" | ") + " |";
  const out = [line(head), "|" + widths.map((w) => "-".repeat(w + 1) + ":").join("|") + "|", ...body.map(line)];
  if (small) out.push("", `(f) compiling the ${fmt(small.lines)}-line workspace instead (${small.compile.crates} × rustc --emit=metadata, ${small.compile.blocks} × g++ -fsyntax-only, 2 jobs at a time): ${fmt(small.compile.ms)} ms = ${small.compile.ratioToCheck}× the check${small.compile.failures ? ` (${small.compile.failures} job(s) FAILED)` : ""}`);
  for (const s of scaling) out.push(`scaling ${fmt(s.from)} → ${fmt(s.to)} lines (${s.linesRatio}×): time ${s.timeRatio}×`);
  for (const s of subs) out.push(`sub-benchmark ${s.name}: ${s.ok ? JSON.stringify(s.result) : "FAILED"}`);
  const floors = subs.find((s) => s.name === "floors" && s.ok)?.result;
  const bounds = {};
  if (floors) {
    // What the parser binding alone allows (scripts/bench/floors.mjs): the best a check could do.
    if (small) bounds.compileOverCheckAtMost = +(small.compile.ms / floors.startupMs).toFixed(1);
    if (floors.extraction) bounds.checkOverFloorAtLeast = floors.extraction.bound;
    out.push(
      "",
      `bounds from the parser binding alone (sub-benchmark floors): start-up with the grammars loaded takes ${fmt(floors.startupMs)} ms` +
        (small ? `, so (f)/(b) ≤ ${fmt(small.compile.ms)} / ${fmt(floors.startupMs)} = ${bounds.compileOverCheckAtMost}` : "") +
        (floors.extraction
          ? `; finding and reading the nodes extraction starts from costs ${(floors.extraction.bound - 1).toFixed(2)}× the parse on ${floors.extraction.workspace}, so (b)/(a) ≥ ${floors.extraction.bound}`
          : ""),
    );
  }
  out.push("", "targets: " + Object.entries(targets).map(([k, v]) => `${k}=${v === undefined ? "n/a" : v ? "met" : "NOT met"}`).join(", "));
  out.push(`machine: ${machine.cpus} × ${machine.cpuModel}, ${machine.memGiB} GiB, ${machine.os}, node ${machine.node}; load average ${machine.loadAvgStart.join(" ")} at start, ${machine.loadAvgEnd.join(" ")} at end`);
  console.log(out.join("\n"));
  for (const r of rows) {
    if (!r.planted.ok) console.log(`planted check FAILED at ${r.lines} lines: missing ${JSON.stringify(r.planted.missing.slice(0, 20))}, unexpected ${JSON.stringify(r.planted.unexpected.slice(0, 20))}`);
  }
  const json = { version: 1, date: new Date().toISOString(), seed: opt.seed, machine, rows, scaling, targets, bounds, subBenchmarks: subs, table: out.join("\n") };
  fs.writeFileSync(path.join(OUT, "bench.json"), JSON.stringify(json, null, 2) + "\n");
  console.log(`\nwrote ${path.relative(ROOT, path.join(OUT, "bench.json"))}`);
  if (!targets.plantedFindingsAllReported) process.exitCode = 1;
}

await main();
