#!/usr/bin/env node
// Language-server latency, measured over the protocol as an editor sees it:
//   - edit → diagnostics: a single-line edit in a 5,000-line file inside a generated workspace of
//     at least 200,000 lines; the time from sending textDocument/didChange to receiving the
//     publishDiagnostics for that document version (median and p95). Every other edit introduces
//     a parameter mismatch and the next one removes it, and the run checks the diagnostic really
//     appears and clears.
//   - the same for an edit in the header that declares the edited function (size_t → uint32_t and
//     back), which takes the file-level scope;
//   - first diagnostics: from textDocument/didOpen of that file (workspace already indexed) to its
//     first publishDiagnostics; and the cold start (spawn → workspace indexed and checked).
// The server's own analysis time per edit (ferrule/stats) is reported beside the protocol time.
//
// usage: node scripts/bench/lsp.mjs [--lines 200000] [--edits 60] [--out DIR] [--reuse yes]
// (--reuse yes: measure the workspace a previous run generated in DIR instead of generating it again)
// Exported: measureLsp({ workspace, file, edits }) for a workspace you already have.
// Run by scripts/bench.mjs (prints one JSON line on stdout).

import * as fs from "node:fs";
import * as path from "node:path";
import { spawn } from "node:child_process";
import { fileURLToPath, pathToFileURL } from "node:url";
import { createRequire } from "node:module";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const require = createRequire(import.meta.url);
const rpc = require("vscode-jsonrpc/node");

const quantile = (xs, q) => {
  const s = [...xs].sort((a, b) => a - b);
  if (!s.length) return undefined;
  const i = Math.min(s.length - 1, Math.max(0, Math.ceil(q * s.length) - 1));
  return +s[i].toFixed(1);
};

/** Makes a ≥5,000-line Rust file by merging kernel modules of one crate (symbols stay unique). */
export function makeBigFile(ws, minLines = 5000) {
  const crates = fs.readdirSync(path.join(ws, "crates")).map((c) => path.join(ws, "crates", c, "src"));
  const mods = crates
    .map((src) => fs.readdirSync(src).filter((f) => f.endsWith(".rs") && f !== "lib.rs").map((f) => path.join(src, f)))
    .sort((a, b) => b.length - a.length)[0];
  const src = path.dirname(mods[0]);
  const big = path.join(src, "big_kernels.rs");
  const parts = [];
  let lines = 0;
  for (const m of mods) {
    if (lines >= minLines) break;
    const t = fs.readFileSync(m, "utf8");
    parts.push(`// ---- merged from ${path.basename(m)} ----\n` + t);
    lines += t.split("\n").length;
    fs.rmSync(m);
  }
  fs.writeFileSync(big, parts.join("\n"));
  return big;
}

function lineCount(dir) {
  let n = 0;
  const walk = (d) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (/\.(rs|h|cc|cpp|c|hpp)$/.test(e.name)) n += fs.readFileSync(p, "utf8").split("\n").length;
    }
  };
  walk(dir);
  return n;
}

export async function measureLsp({ workspace, file, edits = 60, pauseMs = 120 }) {
  const t0 = performance.now();
  const proc = spawn(process.execPath, [path.join(ROOT, "bin/ferrule.js"), "lsp", "--stdio"], { stdio: ["pipe", "pipe", "pipe"] });
  let stderr = "";
  proc.stderr.on("data", (d) => (stderr += d));
  const conn = rpc.createMessageConnection(new rpc.StreamMessageReader(proc.stdout), new rpc.StreamMessageWriter(proc.stdin));
  const waiters = [];
  const published = new Map();
  conn.onNotification("textDocument/publishDiagnostics", (p) => {
    const at = performance.now();
    published.set(p.uri, p);
    for (const w of [...waiters]) if (w.pred(p)) { waiters.splice(waiters.indexOf(w), 1); w.resolve(at); }
  });
  conn.onRequest("workspace/configuration", (p) => p.items.map(() => ({})));
  conn.onRequest("window/workDoneProgress/create", () => null);
  conn.onRequest("client/registerCapability", () => null);
  conn.onNotification("window/logMessage", () => {});
  conn.onNotification("window/showMessage", () => {});
  conn.onNotification("$/progress", () => {});
  conn.listen();
  const waitPublish = (pred, ms = 60_000) => new Promise((resolve, reject) => {
    const w = { pred, resolve };
    waiters.push(w);
    setTimeout(() => { const i = waiters.indexOf(w); if (i >= 0) { waiters.splice(i, 1); reject(new Error(`no diagnostics within ${ms} ms\n${stderr.slice(-2000)}`)); } }, ms).unref();
  });
  const uriOf = (f) => pathToFileURL(f).href;
  try {
    await conn.sendRequest("initialize", { processId: process.pid, rootUri: uriOf(workspace), workspaceFolders: [{ uri: uriOf(workspace), name: "bench" }], capabilities: { workspace: { configuration: true }, window: { workDoneProgress: true }, textDocument: { publishDiagnostics: { versionSupport: true, relatedInformation: true } } } });
    await conn.sendNotification("initialized", {});
    // cold start: wait until the workspace is indexed and checked
    for (;;) {
      const s = await conn.sendRequest("ferrule/stats");
      if (s.lastAnalysis) break;
      await new Promise((r) => setTimeout(r, 50));
    }
    const coldMs = performance.now() - t0;
    const stats0 = await conn.sendRequest("ferrule/stats");

    // first diagnostics after opening the big file
    let text = fs.readFileSync(file, "utf8");
    const u = uriOf(file);
    const tOpen = performance.now();
    const firstP = waitPublish((p) => p.uri === u);
    await conn.sendNotification("textDocument/didOpen", { textDocument: { uri: u, languageId: "rust", version: 1, text } });
    const firstMs = (await firstP) - tOpen;

    // the edit: `usize` → `u32` in one exported function's parameter (a mismatch with the
    // header's size_t on 64-bit targets), and back
    const lines = text.split("\n");
    const line = lines.findIndex((l) => /extern "C" fn \w+\(/.test(l) && /: usize/.test(l));
    if (line < 0) throw new Error("no exported function with a usize parameter in the big file");
    const col = lines[line].indexOf(": usize") + 2;
    const lat = [];
    const server = [];
    const publishMs = [];
    let version = 1;
    let correct = true;
    const diagAt = (p) => p.diagnostics.some((d) => d.range.start.line === line && d.code === "param-type-mismatch");
    for (let i = 0; i < edits; i++) {
      const introduce = i % 2 === 0;
      const [from, to] = introduce ? ["usize", "u32"] : ["u32", "usize"];
      version++;
      const v = version;
      const change = { range: { start: { line, character: col }, end: { line, character: col + from.length } }, text: to };
      const pr = waitPublish((p) => p.uri === u && p.version === v);
      const ts = performance.now();
      await conn.sendNotification("textDocument/didChange", { textDocument: { uri: u, version: v }, contentChanges: [change] });
      const at = await pr;
      lat.push(at - ts);
      if (diagAt(published.get(u)) !== introduce) correct = false;
      const s = await conn.sendRequest("ferrule/stats");
      if (s.lastAnalysis) { server.push(s.lastAnalysis.ms); publishMs.push(s.lastAnalysis.publishMs ?? 0); }
      await new Promise((r) => setTimeout(r, pauseMs));
    }
    // the same kind of edit in the header that declares that function (the file-level scope)
    const fnName = /extern "C" fn (\w+)\(/.exec(lines[line])[1];
    const incDir = path.join(workspace, "include");
    const headers = [];
    const walkH = (d) => { for (const e of fs.readdirSync(d, { withFileTypes: true })) { const p = path.join(d, e.name); if (e.isDirectory()) walkH(p); else if (e.name.endsWith(".h")) headers.push(p); } };
    if (fs.existsSync(incDir)) walkH(incDir);
    const header = headers.find((h) => fs.readFileSync(h, "utf8").includes(` ${fnName}(`));
    const hLat = [];
    if (header) {
      const htext = fs.readFileSync(header, "utf8");
      const hu = uriOf(header);
      const hOpen = waitPublish((p) => p.uri === hu);
      await conn.sendNotification("textDocument/didOpen", { textDocument: { uri: hu, languageId: "c", version: 1, text: htext } });
      await hOpen;
      const hl = htext.split("\n");
      const hline = hl.findIndex((l) => l.includes(` ${fnName}(`) && l.includes("size_t n"));
      if (hline >= 0) {
        const hcol = hl[hline].indexOf("size_t n");
        let hv = 1;
        for (let i = 0; i < Math.max(10, Math.floor(edits / 3)); i++) {
          const [from, to] = i % 2 === 0 ? ["size_t", "uint32_t"] : ["uint32_t", "size_t"];
          const v = ++hv;
          const pr = waitPublish((p) => p.uri === hu && p.version === v);
          const ts = performance.now();
          await conn.sendNotification("textDocument/didChange", { textDocument: { uri: hu, version: v }, contentChanges: [{ range: { start: { line: hline, character: hcol }, end: { line: hline, character: hcol + from.length } }, text: to }] });
          hLat.push((await pr) - ts);
          await new Promise((r) => setTimeout(r, pauseMs));
        }
      }
    }
    const stats = await conn.sendRequest("ferrule/stats");
    return {
      headerEditToDiagnostics: hLat.length ? { n: hLat.length, medianMs: quantile(hLat, 0.5), p95Ms: quantile(hLat, 0.95), file: path.relative(workspace, header) } : undefined,
      coldStartMs: Math.round(coldMs), files: stats0.files, findings: stats0.findings,
      firstDiagnosticsMs: +firstMs.toFixed(1),
      editToDiagnostics: { n: lat.length, medianMs: quantile(lat, 0.5), p95Ms: quantile(lat, 0.95), maxMs: quantile(lat, 1), firstMs: +lat[0].toFixed(1) },
      serverAnalysis: { medianMs: quantile(server, 0.5), p95Ms: quantile(server, 0.95), publishMedianMs: quantile(publishMs, 0.5), last: stats.lastAnalysis },
      mismatchAppearsAndClears: correct,
    };
  } finally {
    try { await Promise.race([conn.sendRequest("shutdown"), new Promise((r) => setTimeout(r, 2000))]); conn.sendNotification("exit"); } catch { /* gone */ }
    setTimeout(() => proc.kill("SIGKILL"), 500).unref();
    conn.dispose();
  }
}

async function main() {
  const args = process.argv.slice(2);
  const get = (k, d) => { const i = args.indexOf(k); return i >= 0 ? args[i + 1] : d; };
  const lines = Number(get("--lines", "200000"));
  const edits = Number(get("--edits", "60"));
  const out = path.resolve(get("--out", path.join(ROOT, "bench-out", "lsp-ws")));
  if (!fs.existsSync(path.join(ROOT, "dist/cli.js"))) throw new Error("run `node scripts/build.mjs` first");
  const { generate } = await import("../gen-bench.mjs");
  let big = path.join(out, "crates");
  const existing = fs.existsSync(big) && fs.readdirSync(big).map((c) => path.join(big, c, "src", "big_kernels.rs")).find((f) => fs.existsSync(f));
  if (existing && get("--reuse", "") === "yes") big = existing;
  else {
    generate({ lines, out, seed: 11 });
    big = makeBigFile(out);
  }
  const r = await measureLsp({ workspace: out, file: big, edits });
  const result = {
    name: "lsp", workspaceLines: lineCount(out), bigFileLines: fs.readFileSync(big, "utf8").split("\n").length, ...r,
    aims: { editP95Ms: 50, firstDiagnosticsMs: 500 },
    met: { editP95: r.editToDiagnostics.p95Ms <= 50, firstDiagnostics: r.firstDiagnosticsMs <= 500 },
  };
  process.stderr.write(`[lsp] ${result.workspaceLines} lines, ${r.files} files; edit→diagnostics median ${r.editToDiagnostics.medianMs} ms, p95 ${r.editToDiagnostics.p95Ms} ms (server ${r.serverAnalysis.medianMs}/${r.serverAnalysis.p95Ms} ms); first diagnostics ${r.firstDiagnosticsMs} ms; cold start ${r.coldStartMs} ms\n`);
  console.log(JSON.stringify(result));
  if (!r.mismatchAppearsAndClears) process.exitCode = 1;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main().catch((e) => { console.error(e); process.exit(1); });
}
