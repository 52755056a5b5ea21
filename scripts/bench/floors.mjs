// Benchmark: how low the check's time could go with this parser binding, measured.
//
// Two floors that bound the ratio targets from below, whatever ferrule does on top:
//
// 1. Start-up: a process that starts Node, loads the web-tree-sitter runtime and the three
//    grammars (with the CLI's V8 flag, --liftoff-only) and exits, reading no file. `ferrule check`
//    cannot finish sooner than this, so compile time / this is the most (f)/(b) can be.
// 2. Finding and reading the nodes: on the largest generated workspace present, in one thread,
//    (P) parse every file, (F) find the nodes of the types extraction starts from — the C/C++
//    declaration-level types of extract/common.ts (TOP_TYPES) and the Rust items, calls and
//    attributes — with `descendantsOfType`, one wasm call per file and the cheapest search
//    web-tree-sitter offers (measured ~35 % cheaper than a query for the same types), and (R) read
//    the text of each found node's named children, one level down. Extraction needs at least F and
//    R (it also reads deeper: declarators, types, arguments), and the rules come after, so
//    (P + F + R) / P bounds (b)/(a) from below for the same workspace, leaving out only start-up,
//    which both share (it weighs little at 1M lines).
//
//   node scripts/bench/floors.mjs      # prints one line and a JSON object
//
// The TypeScript sources are bundled on the fly with esbuild (a devDependency) into a temporary
// ESM file, as in layout.mjs; dist/ is not touched.

import * as esbuild from "esbuild";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import * as v8 from "node:v8";
import { spawnSync } from "node:child_process";
import { fileURLToPath, pathToFileURL } from "node:url";

v8.setFlagsFromString("--liftoff-only"); // as in server/src/cli/index.ts

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");

const RUST_TYPES = [
  "function_item", "function_signature_item", "foreign_mod_item", "struct_item", "union_item", "enum_item", "type_item",
  "const_item", "static_item", "mod_item", "impl_item", "attribute_item", "call_expression", "let_declaration",
];

async function load() {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-bench-floors-"));
  const entry = path.join(dir, "entry.ts");
  fs.writeFileSync(
    entry,
    `export { loadLanguage } from ${JSON.stringify(path.join(root, "grammars/index.ts"))};\n` +
      `export { Parser } from ${JSON.stringify(path.join(root, "grammars/index.ts"))};\n` +
      `export { TOP_TYPES } from ${JSON.stringify(path.join(root, "server/src/extract/common.ts"))};\n`,
  );
  const out = path.join(root, "dist", `.bench-floors-${process.pid}.cjs`); // beside dist/wasm, where the grammars are found
  await esbuild.build({ entryPoints: [entry], bundle: true, platform: "node", format: "cjs", outfile: out, logLevel: "error" });
  fs.rmSync(dir, { recursive: true, force: true });
  return out;
}

function median(xs) {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function wall(args) {
  const t = performance.now();
  const r = spawnSync(process.execPath, args, { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`node ${args.join(" ")} failed: ${r.stderr}`);
  return performance.now() - t;
}

function listFiles(dir) {
  const out = [];
  const walk = (d) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else out.push(p);
    }
  };
  walk(dir);
  return out.sort();
}

const GRAMMAR = { ".rs": "rust", ".h": "c", ".c": "c", ".hpp": "cpp", ".hh": "cpp", ".cc": "cpp", ".cpp": "cpp", ".cxx": "cpp" };

async function main() {
  const bundle = await load();
  try {
    // 1. start-up
    const nodeMs = median([0, 1, 2, 3, 4].map(() => wall(["-e", ""])));
    const startScript = `const g=require(${JSON.stringify(bundle)});` +
      `(async()=>{for(const n of ["rust","c","cpp"])await g.loadLanguage(n)})()`; // one at a time: web-tree-sitter's loader is not reentrant;
    const startupMs = median([0, 1, 2, 3, 4].map(() => wall(["--liftoff-only", "-e", startScript])));

    // 2. parse, find, read
    const g = await import(pathToFileURL(bundle).href);
    const mod = g.default ?? g;
    const langs = { rust: await mod.loadLanguage("rust"), c: await mod.loadLanguage("c"), cpp: await mod.loadLanguage("cpp") };
    const types = { rust: RUST_TYPES, c: mod.TOP_TYPES, cpp: mod.TOP_TYPES };
    for (const [n, l] of Object.entries(langs)) types[n] = types[n].filter((t) => l.idForNodeType(t, true) !== null);
    const ws = ["ws-1000000", "ws-100000", "ws-10000"].map((d) => path.join(root, "bench-out", d)).find((d) => fs.existsSync(d));
    let extraction;
    if (ws) {
      const files = listFiles(ws).filter((f) => GRAMMAR[path.extname(f)]);
      const parser = new mod.Parser();
      const passes = [];
      for (let pass = 0; pass < 2; pass++) {
        let P = 0, F = 0, R = 0, nodes = 0, lines = 0;
        for (const f of files) {
          const src = fs.readFileSync(f, "utf8");
          const lang = GRAMMAR[path.extname(f)];
          parser.setLanguage(langs[lang]);
          let t = performance.now();
          const tree = parser.parse(src);
          P += performance.now() - t;
          t = performance.now();
          const found = tree.rootNode.descendantsOfType(types[lang]);
          F += performance.now() - t;
          t = performance.now();
          let chars = 0;
          for (const d of found) for (const c of d.namedChildren) chars += src.slice(c.startIndex, c.endIndex).length;
          R += performance.now() - t;
          nodes += found.length;
          lines += src.split("\n").length;
          tree.delete();
          if (chars < 0) throw new Error("unreachable");
        }
        passes.push({ parseMs: Math.round(P), findMs: Math.round(F), readMs: Math.round(R), nodes, lines, bound: +((P + F + R) / P).toFixed(3) });
      }
      // the pass with the lower bound: the claim is the more conservative one
      const best = passes.reduce((a, b) => (b.bound < a.bound ? b : a));
      extraction = { workspace: path.relative(root, ws), files: files.length, ...best, passes };
    }
    const result = { name: "floors", nodeMs: Math.round(nodeMs), startupMs: Math.round(startupMs), extraction };
    console.log(
      `start-up floor ${result.startupMs} ms (node alone ${result.nodeMs} ms)` +
        (extraction
          ? `; ${extraction.workspace}: parse ${extraction.parseMs} ms, find ${extraction.findMs} ms, read ${extraction.readMs} ms → (b)/(a) ≥ ${extraction.bound}`
          : "; no generated workspace to measure extraction on"),
    );
    console.log(JSON.stringify(result));
  } finally {
    fs.rmSync(bundle, { force: true });
  }
}

await main();
