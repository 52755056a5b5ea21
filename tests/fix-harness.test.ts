// Fix harness (issue #17, part 1): applies every fix ferrule offers on every fixture folder, the
// demo and the clean probes, writes the result into a temp copy, compiles what it touched and
// re-checks it. Oracles: rustc (`--edition 2021 --crate-type lib --emit=metadata`), gcc/g++
// `-fsyntax-only` with the folder's include dirs. A file must compile after the fix only if it
// compiled before. It prints every fix applied and whether it built.
// KNOWN_BROKEN lists the fixes that do not yet pass (what is left of #17); the test fails when a
// new fix breaks, and when a listed one starts to pass (so the list only shrinks).
import { expect, test } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import * as crypto from "node:crypto";
import { execFileSync } from "node:child_process";
import { analyze, FIXTURES } from "./helpers/analyze.js";
import { applyEdits } from "./helpers/edits.js";
import { fixesFor } from "../server/src/fixes/index.js";

const SRC = /\.(rs|h|hpp|c|cc|cpp)$/;

function roots(): string[] {
  const out = new Set<string>();
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (SRC.test(p)) {
        const parts = path.relative(FIXTURES, p).split(path.sep);
        const n = parts[0] === "sonar-demo" ? 1 : parts[0] === "rules" || ["bad", "good", "good-macros"].includes(parts[2] ?? "") ? 3 : 2;
        out.add(parts.slice(0, n).join("/"));
      }
    }
  };
  walk(FIXTURES);
  return [...out].sort();
}

function load(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (SRC.test(p)) out[p] = fs.readFileSync(p, "utf8");
    }
  };
  walk(dir);
  return out;
}

const cache = new Map<string, boolean>();
/** Does `file` (with these texts of the folder) compile? Writes the folder into a temp copy. */
function compiles(root: string, texts: Record<string, string>, file: string): boolean {
  const key = crypto.createHash("sha1").update(file + "\0" + JSON.stringify(Object.entries(texts).sort())).digest("hex");
  const hit = cache.get(key);
  if (hit !== undefined) return hit;
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-fix-"));
  try {
    for (const [p, t] of Object.entries(texts)) {
      const q = path.join(tmp, path.relative(root, p));
      fs.mkdirSync(path.dirname(q), { recursive: true });
      fs.writeFileSync(q, t);
    }
    const incs = [...new Set(Object.keys(texts).filter((p) => /\.(h|hpp)$/.test(p)).flatMap((p) => {
      const d = path.dirname(path.join(tmp, path.relative(root, p)));
      return [d, path.dirname(d)];
    }))].flatMap((d) => ["-I", d]);
    const q = path.join(tmp, path.relative(root, file));
    let args: [string, string[]];
    if (file.endsWith(".rs")) args = ["rustc", ["--edition", "2021", "--crate-type", "lib", "--emit=metadata", "-A", "warnings", "--out-dir", tmp, q]];
    else if (/\.(cc|cpp|hpp)$/.test(file)) args = ["g++", ["-std=c++17", "-fsyntax-only", ...incs, q]];
    else if (file.endsWith(".h")) args = ["gcc", ["-std=c11", "-fsyntax-only", "-x", "c", ...incs, q]];
    else args = ["gcc", ["-std=c11", "-fsyntax-only", ...incs, q]];
    let ok = true;
    try { execFileSync(args[0], args[1], { stdio: "pipe", timeout: 60_000 }); } catch { ok = false; }
    cache.set(key, ok);
    return ok;
  } finally {
    fs.rmSync(tmp, { recursive: true, force: true });
  }
}

// root|rule|fix title → why it does not pass yet (the rest of #17).
const KNOWN_BROKEN: Record<string, string> = {
  "signatures/callback-mismatch|callback-mismatch|Change the Rust parameter to match C: `*mut Option<unsafe extern \"C\" fn(f32, *mut core::ffi::c_void) -> core::ffi::c_int>`": "an imported declaration: callers pass the old type; finding still there",
  "signatures/pointer-constness|pointer-constness|Change the Rust parameter to match C: `*mut f32`": "an imported declaration: the Rust callers pass the old pointer type",
  "buffers/copy-count-mismatch/bad|panic-across-c-abi|Catch panics: wrap the body in std::panic::catch_unwind and return nothing on panic": "the wrapped body shows a copy-count-mismatch the rule did not see before",
  "macros/hydrophone|header-lacks-c-linkage|Wrap the declarations in an extern \"C\" guard for C++": "the guard lands where the finding is still reported",
  "macros/hydrophone|return-type-mismatch|Replace the C prototype with one generated from the Rust signature": "generated prototype drops the header's macros/typedef names: hydro.h and hydro.c no longer compile",
  "macros/hydrophone|param-type-mismatch|Change the C parameter to match Rust: `const float *in`": "hydro.h/hydro.c no longer compile; the declaration is lost",
  "macros/hydrophone|param-type-mismatch|Change the C parameter to match Rust: `float *out`": "hydro.h/hydro.c no longer compile; the declaration is lost",
  "ownership/panic-across-c-abi|panic-across-c-abi|Catch panics: wrap the body in std::panic::catch_unwind and return `-1` on panic": "a helper's assert is still reported after wrapping",
  "ownership/panic-across-c-abi|panic-across-c-abi|Catch panics: wrap the body in std::panic::catch_unwind and return `f32::NAN` on panic": "a helper's assert is still reported after wrapping",
  "ownership/panic-across-c-abi|panic-across-c-abi|Catch panics: wrap the body in std::panic::catch_unwind and return `0` on panic": "a helper's assert is still reported after wrapping",
  "signatures/callback-mismatch|callback-mismatch|Change the Rust parameter to match C: `Option<unsafe extern \"C\" fn(u32, *mut core::ffi::c_void) -> core::ffi::c_int>`": "inline Option<fn> replaces the user's alias; the body's call no longer compiles",
  "signatures/callback-mismatch|callback-mismatch|Change the C parameter to match Rust: `rt_progress_fn cb`": "finding still there",
  "signatures/pointer-constness|pointer-constness|Change the C parameter to match Rust: `const float **rows`": "const float ** is still writable at the outer level: new pointer-constness",
  "sonar-demo|param-type-mismatch|Change the C parameter to match Rust: `float *output`": "the C++ caller passes std::vector<double> data: beamformer_block.cc no longer compiles",
  "sonar-demo|callback-mismatch|Change the Rust parameter to match C: `Option<unsafe extern \"C\" fn(*mut core::ffi::c_void, f32)>`": "inline Option<fn> replaces the user's alias; the body's call no longer compiles",
};

test("every offered fix removes its finding, adds none, and builds where the original built", async () => {
  const report: string[] = [];
  const broken: Record<string, string> = {};
  for (const rel of roots()) {
    const root = path.join(FIXTURES, rel);
    const texts = load(root);
    const { ws, findings } = await analyze(texts);
    const model = ws.model();
    for (const f of findings) {
      for (const fix of fixesFor(f, model)) {
        const id = `${rel}|${f.rule}|${fix.title}`;
        const problems: string[] = [];
        let after: Record<string, string>;
        try { after = applyEdits(texts, fix.edits); } catch (e) { broken[id] = String(e); continue; }
        const touched = [...new Set(fix.edits.map((e) => e.range.file))];
        // the C/C++ sources of the folder also see a changed header (callers with the old types)
        const toBuild = new Set(touched);
        if (touched.some((t) => /\.(h|hpp)$/.test(t))) for (const p of Object.keys(texts)) if (/\.(c|cc|cpp)$/.test(p)) toBuild.add(p);
        for (const file of toBuild) {
          if (compiles(root, texts, file) && !compiles(root, after, file)) problems.push(`${path.relative(root, file)} no longer compiles`);
        }
        const re = (await analyze(after)).findings;
        if (re.some((g) => g.rule === f.rule && g.message === f.message)) problems.push("finding still there");
        const added = re.filter((g) => (g.severity === "error" || g.severity === "warning") && !findings.some((o) => o.rule === g.rule && o.message === g.message));
        if (added.length) problems.push(`new: ${added.map((g) => `${g.rule}: ${g.message}`).join("; ")}`);
        if (problems.length) broken[id] = problems.join(" | ");
        report.push(`${problems.length ? "FAIL" : "ok  "} ${id}${problems.length ? " — " + problems.join(" | ") : ""}`);
      }
    }
  }
  console.log(`fix harness: ${report.length} fixes applied\n` + report.join("\n"));
  expect(report.length).toBeGreaterThan(5);
  expect(Object.keys(broken).filter((k) => !(k in KNOWN_BROKEN)), JSON.stringify(broken, null, 1)).toEqual([]);
  expect(Object.keys(KNOWN_BROKEN).filter((k) => !(k in broken)), "listed as broken but passes now: remove it").toEqual([]);
}, 900_000);
