// Benchmark: layout of 10,000 types on all five targets.
//
// Generates 10,000 C and Rust aggregates in memory (structs, unions, enums; scalars, arrays,
// pointers, nested by value; packed, aligned, #pragma pack, repr(C, packed(N)/align(N))), builds
// one boundary model from them and times the first (uncached) layout of every type on every target.
// No parsing is involved: this measures server/src/model/layout.ts alone.
//
//   node scripts/bench/layout.mjs          # prints one line and a JSON object
//   import { run } from "./scripts/bench/layout.mjs"; await run()  →  { name, ms, types, layouts }
//
// The TypeScript sources are bundled on the fly with esbuild (a devDependency) into a temporary
// ESM file, so the benchmark needs no build step and never touches dist/.

import * as esbuild from "esbuild";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");

async function loadEngine() {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-bench-layout-"));
  const entry = path.join(dir, "entry.ts");
  fs.writeFileSync(
    entry,
    `export { declLayout } from ${JSON.stringify(path.join(root, "server/src/model/layout.ts"))};\n` +
      `export { Model } from ${JSON.stringify(path.join(root, "server/src/model/boundary.ts"))};\n` +
      `export { ALL_TRIPLES } from ${JSON.stringify(path.join(root, "server/src/model/targets.ts"))};\n`,
  );
  const out = path.join(dir, "engine.mjs");
  await esbuild.build({ entryPoints: [entry], bundle: true, platform: "node", format: "esm", outfile: out, logLevel: "error" });
  try {
    return await import(pathToFileURL(out).href);
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

/** A small deterministic PRNG (mulberry32) so every run lays out the same 10,000 types. */
function rng(seed) {
  return () => {
    seed |= 0;
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const C_SCALARS = ["char", "uchar", "short", "ushort", "int", "uint", "long", "ulong", "llong", "ullong", "float", "double", "ldouble", "bool", "u8", "u16", "u32", "u64", "i64", "size_t"];
const R_SCALARS = ["u8", "i8", "u16", "i16", "u32", "i32", "u64", "i64", "f32", "f64", "usize", "isize", "bool", "long", "int"];

export function generate(n = 10_000, seed = 1234) {
  const rand = rng(seed);
  const pick = (a) => a[Math.floor(rand() * a.length)];
  const range = (file) => ({ file, line: 0, col: 0, endLine: 0, endCol: 0 });
  const files = { c: [], rust: [] };
  // Types other types may nest by value: only shallow ones (nesting depth ≤ 2), as in real headers,
  // so sizes stay realistic instead of growing geometrically along a 10,000-type chain.
  const names = { c: [], rust: [] };
  const depthOf = new Map();
  for (let i = 0; i < n; i++) {
    const lang = i % 2 === 0 ? "c" : "rust";
    const file = lang === "c" ? "/bench/types.h" : "/bench/types.rs";
    const name = lang === "c" ? `bench_t${i}` : `BenchT${i}`;
    let depth = 0;
    const r = rand();
    const kind = r < 0.08 ? "enum" : r < 0.18 ? "union" : "struct";
    const decl = { id: `${file}#${name}#${i}`, lang, kind, name, fields: [], enumerators: [], repr: { c: true }, range: range(file), nameRange: range(file), file, doc: "", attrs: [] };
    if (kind === "enum") {
      const nv = 2 + Math.floor(rand() * 8);
      for (let k = 0; k < nv; k++) decl.enumerators.push({ name: `V${k}`, value: k * (rand() < 0.2 ? 1000 : 1), text: "", range: range(file) });
      if (lang === "rust" && rand() < 0.5) decl.repr = { int: pick(["u8", "u16", "u32", "i32"]) };
    } else {
      const nf = 1 + Math.floor(rand() * 12);
      for (let k = 0; k < nf; k++) {
        const prev = names[lang];
        const x = rand();
        let type;
        if (x < 0.55 || prev.length === 0) type = { k: "scalar", s: pick(lang === "c" ? C_SCALARS : R_SCALARS) };
        else if (x < 0.7) type = { k: "array", of: { k: "scalar", s: pick(lang === "c" ? C_SCALARS : R_SCALARS) }, len: 1 + Math.floor(rand() * 16) };
        else if (x < 0.8) type = { k: "ptr", to: { k: "void" }, mut: true };
        else {
          const ref = prev[Math.max(0, prev.length - 1 - Math.floor(rand() * 50))];
          depth = Math.max(depth, depthOf.get(ref) + 1);
          type = x < 0.95 ? { k: "named", name: ref } : { k: "array", of: { k: "named", name: ref }, len: 1 + Math.floor(rand() * 3) };
        }
        const f = { name: `f${k}`, type, text: "", range: range(file) };
        if (lang === "c" && rand() < 0.05) f.attrs = [`__attribute__((aligned(${pick([2, 4, 8, 16])})))`];
        decl.fields.push(f);
      }
      const y = rand();
      if (y < 0.08) decl.repr.packed = lang === "c" ? 1 : pick([1, 2, 4]);
      else if (y < 0.16) decl.repr.align = pick([8, 16, 32, 64]);
      else if (y < 0.22 && lang === "c") decl.pragmaPack = pick([1, 2, 4, 8]);
    }
    files[lang].push(decl);
    if (kind !== "enum") {
      depthOf.set(name, decl.fields.length ? depth : 0);
      if (depth < 2) names[lang].push(name);
    }
  }
  const facts = (file, lang, types) => ({ file, lang, fns: [], types, asserts: [], includes: [], calls: [], classes: [], defines: [], notices: [], hasErrors: false, extra: {} });
  return [facts("/bench/types.h", "c", files.c), facts("/bench/types.rs", "rust", files.rust)];
}

export async function run({ types = 10_000 } = {}) {
  const { Model, declLayout, ALL_TRIPLES } = await loadEngine();
  const model = new Model(generate(types));
  const decls = [...model.files.values()].flatMap((f) => f.types);
  const t0 = performance.now();
  const c0 = process.cpuUsage();
  let unknown = 0;
  for (const d of decls) {
    for (const triple of ALL_TRIPLES) {
      const l = declLayout(d, { model, side: d.lang === "rust" ? "rust" : "c", triple });
      if (l.unknown) unknown++;
    }
  }
  const ms = performance.now() - t0;
  const cpu = process.cpuUsage(c0);
  if (unknown) throw new Error(`benchmark data produced ${unknown} unknown layouts: the generator is out of step with the engine`);
  // cpuMs: CPU time of this process during the loop (wall-clock ms also counts time the OS gave
  // to other processes on a busy machine).
  const cpuMs = (cpu.user + cpu.system) / 1000;
  return { name: "layout", ms: Math.round(ms * 10) / 10, cpuMs: Math.round(cpuMs * 10) / 10, types: decls.length, layouts: decls.length * ALL_TRIPLES.length };
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const r = await run();
  console.log(`layout: ${r.types} types × 5 targets (${r.layouts} layouts) in ${r.ms} ms (${r.cpuMs} ms CPU)`);
  console.log(JSON.stringify(r));
}
