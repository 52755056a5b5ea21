#!/usr/bin/env node
// Measures ferrule on the public repositories listed in docs/real-code.json and compares the
// error/warning findings with the verdicts judged by reading both sides (docs/real-code-verdicts.json).
// Never part of `npm test`: the repositories are not in this tree and are never built or run.
//
//   node scripts/real-code.mjs --root DIR [--root DIR]... [--only owner/name] [--json OUT] [--unjudged OUT]
//
// Each repository is looked for as DIR/<owner>+<name> (an export of the commit named in the
// manifest). For each it runs `ferrule check --format json .` at the repository root and once per
// seam folder (from the root, as a user checking that folder would), and prints a markdown table:
// files read, seconds, findings by severity, and how the error/warning findings were judged.

import { execFileSync } from "node:child_process";
import * as fs from "node:fs";
import * as path from "node:path";
import { parseArgs } from "node:util";
import { fileURLToPath } from "node:url";

const here = path.dirname(fileURLToPath(import.meta.url));
const repoRoot = path.resolve(here, "..");
const { values } = parseArgs({
  options: {
    root: { type: "string", multiple: true, default: [] },
    only: { type: "string", multiple: true, default: [] },
    json: { type: "string" },
    unjudged: { type: "string" },
  },
});
const manifest = JSON.parse(fs.readFileSync(path.join(repoRoot, "docs/real-code.json"), "utf8"));
const verdictsFile = path.join(repoRoot, "docs/real-code-verdicts.json");
const verdicts = fs.existsSync(verdictsFile) ? JSON.parse(fs.readFileSync(verdictsFile, "utf8")).verdicts : {};
const cli = path.join(repoRoot, "bin/ferrule.js");
const SRC = /\.(rs|c|h|cc|cpp|cxx|hh|hpp|hxx)$/;
const SKIP = new Set(["target", "node_modules", ".git", "build", "out", "dist"]);

function countFiles(dir) {
  let n = 0;
  for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
    if (e.isDirectory()) {
      if (!SKIP.has(e.name) && !e.name.startsWith("cmake-build-")) n += countFiles(path.join(dir, e.name));
    } else if (e.isFile() && SRC.test(e.name)) n++;
  }
  return n;
}

export function keyOf(f) {
  return `${f.rule}|${f.file}|${f.line}`;
}

const rows = [];
const unjudged = [];
for (const r of manifest.repos) {
  if (values.only.length && !values.only.includes(r.repo)) continue;
  const dirName = r.repo.replace("/", "+");
  const dir = values.root.map((d) => path.join(d, dirName)).find((d) => fs.existsSync(d));
  if (!dir) {
    console.error(`skip ${r.repo}: not found under ${values.root.join(", ")}`);
    continue;
  }
  const v = verdicts[r.repo] ?? {};
  for (const scope of [".", ...r.seams]) {
    if (!fs.existsSync(path.join(dir, scope))) {
      console.error(`skip ${r.repo} ${scope}: no such folder`);
      continue;
    }
    const t0 = process.hrtime.bigint();
    let out;
    try {
      out = execFileSync(process.execPath, [cli, "check", "--format", "json", scope], { cwd: dir, maxBuffer: 1 << 28, encoding: "utf8", stdio: ["ignore", "pipe", "pipe"] });
    } catch (e) {
      if (e.status !== 1) throw new Error(`${r.repo} ${scope}: exit ${e.status}: ${e.stderr}`);
      out = e.stdout;
    }
    const secs = Number(process.hrtime.bigint() - t0) / 1e9;
    const findings = JSON.parse(out).findings;
    const sev = { error: 0, warning: 0, info: 0, hint: 0 };
    const judged = { true: 0, plausible: 0, false: 0, unjudged: 0 };
    for (const f of findings) {
      sev[f.severity]++;
      if (f.severity !== "error" && f.severity !== "warning") continue;
      const j = v[keyOf(f)];
      if (j) judged[j[0]]++;
      else {
        judged.unjudged++;
        unjudged.push({ repo: r.repo, scope, key: keyOf(f), severity: f.severity, message: f.message });
      }
    }
    rows.push({ repo: r.repo, commit: r.commit, set: r.set, scope, files: countFiles(path.join(dir, scope)), seconds: secs, ...sev, ...judged });
  }
}

const pct = (a, b) => (b ? `${((100 * a) / b).toFixed(0)} %` : "–");
console.log("| repository | commit | set | checked | files | s | error | warning | info | true | plausible | false | unjudged | false share |");
console.log("|---|---|---|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|");
const tot = {};
for (const x of rows) {
  const ew = x.error + x.warning;
  console.log(`| ${x.repo} | ${x.commit.slice(0, 10)} | ${x.set} | ${x.scope === "." ? "whole tree" : x.scope} | ${x.files} | ${x.seconds.toFixed(1)} | ${x.error} | ${x.warning} | ${x.info} | ${x.true} | ${x.plausible} | ${x.false} | ${x.unjudged} | ${pct(x.false, ew)} |`);
  const k = x.scope === "." ? "whole tree" : "seam folders";
  const t = (tot[k] ??= { error: 0, warning: 0, info: 0, true: 0, plausible: 0, false: 0, unjudged: 0 });
  for (const f of Object.keys(t)) t[f] += x[f];
}
for (const [k, t] of Object.entries(tot)) {
  const ew = t.error + t.warning;
  console.log(`| **all, ${k}** | | | | | | ${t.error} | ${t.warning} | ${t.info} | ${t.true} | ${t.plausible} | ${t.false} | ${t.unjudged} | **${pct(t.false, ew)}** |`);
}
if (values.json) fs.writeFileSync(values.json, JSON.stringify(rows, null, 2));
if (values.unjudged) fs.writeFileSync(values.unjudged, JSON.stringify(unjudged, null, 2));
