// The project as its build sees it, discovered from the files a build reads: Cargo.toml (packages,
// targets, features, build scripts, path dependencies), each target's Rust module tree (the `mod`
// declarations extract records), compile_commands.json (compiled C/C++ files, -D and -I), and the
// C build files of the tree (CMakeLists.txt, meson.build, Makefile). The result is plain data
// (model/project.ts): every source file gets its link units, its package's features and the
// condition its module path puts on it. Reads build files only under the project root.
//
// Cargo facts used (The Cargo Book: "Cargo Targets" — target auto-discovery of src/lib.rs,
// src/main.rs, src/bin/, examples/, tests/, benches/, and build.rs; "Features" — `default`,
// features enabling features, `dep:`, `crate/feature`, features asked for by dependents;
// "Specifying Dependencies" — path dependencies, `default-features = false`, `workspace = true`).
// Module files: the Rust Reference, "Modules" (module source filenames, the `path` attribute).

import * as fs from "node:fs";
import * as path from "node:path";
import { parse as parseToml } from "smol-toml";
import { allOf, anyOf, type Cond } from "../model/conditions.js";
import type { ModDecl } from "../model/types.js";
import { tokenize } from "../extract/preproc/lexer.js";
import { readSmallRegularFile } from "./textio.js";
import type { CrateInfo, FileUnit, ProjectInfo } from "../model/project.js";

const SKIP = new Set(["target", "node_modules", ".git", "out", "dist", ".cache", ".svn", ".hg", "__pycache__"]);
const C_BUILD_FILES: Record<string, string> = { "CMakeLists.txt": "cmake", "meson.build": "meson", Makefile: "make", GNUmakefile: "make", "configure.ac": "make", "configure": "make", SConstruct: "scons" };
/** Build-script crates that drive each C build system (the build-dependency names). */
const DRIVERS: Record<string, string[]> = { cmake: ["cmake"], meson: ["meson", "meson-next"], make: ["autotools", "make-cmd"], scons: [] };
const ASM_EXT = /\.(S|s|asm|nasm)$/;
const HEADER_EXT = /\.(h|hh|hpp|hxx|h\+\+)$/i;
const C_EXT = /\.(c|cc|cpp|cxx|c\+\+|m|mm|h|hh|hpp|hxx)$/i;

export interface ProjectSettings {
  /** Configured features: `name` (every package that has it) or `package/name`. */
  features?: string[];
  defines?: Record<string, string>;
}

interface Dep { key: string; pkgName?: string; dir?: string; features: string[]; defaultFeatures: boolean; build: boolean }

interface Pkg {
  name: string;
  dir: string;
  manifest: Record<string, unknown>;
  features: Record<string, string[]>;
  deps: Dep[];
  targets: { kind: NonNullable<FileUnit["kind"]>; name: string; root: string }[];
  buildScript?: string;
  libName?: string;
  links?: string;
}

/** The project root for the given paths: the nearest folder above (or at) the first path with a
 * .ferrule.toml, else the Cargo workspace root, the topmost Cargo package, or a folder with
 * compile_commands.json, not above the version-control root. Without any, the path itself. */
export function findProjectRoot(start: string): string {
  let dir = start;
  try {
    if (!fs.statSync(dir).isDirectory()) dir = path.dirname(dir);
  } catch {
    return start;
  }
  let best: string | undefined;
  for (let i = 0; i < 24; i++) {
    const has = (n: string) => fs.existsSync(path.join(dir, n));
    if (has(".ferrule.toml")) return dir;
    if (has("Cargo.toml")) {
      best = dir;
      try {
        if (/^\s*\[workspace\]/m.test(fs.readFileSync(path.join(dir, "Cargo.toml"), "utf8"))) return dir;
      } catch { /* unreadable: not a root */ }
    } else if (has("compile_commands.json")) best ??= dir;
    if (has(".git")) break;
    const up = path.dirname(dir);
    if (up === dir) break;
    dir = up;
  }
  return best ?? (fs.statSync(start).isDirectory() ? start : path.dirname(start));
}

interface Scan { cargo: string[]; ccdb: string[]; cbuild: Map<string, string>; asm: boolean; asmFiles: string[] }

function scanTree(root: string): Scan {
  const out: Scan = { cargo: [], ccdb: [], cbuild: new Map(), asm: false, asmFiles: [] };
  let budget = 200_000; // entries visited at most (a huge tree is read partly rather than hang)
  const visit = (dir: string, depth: number) => {
    if (depth > 32 || budget <= 0) return;
    let names: fs.Dirent[];
    try { names = fs.readdirSync(dir, { withFileTypes: true }); } catch { return; }
    for (const d of names) {
      if (--budget <= 0) return;
      const p = path.join(dir, d.name);
      if (d.isDirectory()) {
        if (SKIP.has(d.name) || d.name.startsWith(".") || d.name.startsWith("cmake-build-")) continue;
        // compile_commands.json is written into the build folder: look there, not deeper
        if (d.name === "build") {
          if (fs.existsSync(path.join(p, "compile_commands.json"))) out.ccdb.push(path.join(p, "compile_commands.json"));
          continue;
        }
        visit(p, depth + 1);
      } else if (d.isFile()) {
        if (d.name === "Cargo.toml") out.cargo.push(p);
        else if (d.name === "compile_commands.json") out.ccdb.push(p);
        else if (C_BUILD_FILES[d.name]) out.cbuild.set(dir, C_BUILD_FILES[d.name]!);
        else if (ASM_EXT.test(d.name)) {
          out.asm = true;
          if (out.asmFiles.length < MAX_ASM_FILES) out.asmFiles.push(p);
        }
      }
    }
  };
  visit(root, 0);
  return out;
}

const MAX_ASM_FILES = 4000;

/**
 * The identifiers of the tree's assembly sources (read with the C tokenizer: names, labels and the
 * arguments of `global`/`.globl`/export macros are identifiers there too). A C prototype whose name
 * appears in them may be defined in assembly, which ferrule does not read. Bounded: at most
 * MAX_ASM_FILES files of up to 2 MB each, regular files inside the root only.
 */
function asmIdentifiers(root: string, files: string[]): Set<string> {
  const out = new Set<string>();
  for (const f of files) {
    let text: string;
    try { text = readSmallRegularFile(f, { root, limit: 2 * 1024 * 1024 }); } catch { continue; }
    for (const t of tokenize(text)) if (t.k === 1 /* K.Ident */) out.add(t.t.replace(/^_/, ""));
  }
  return out;
}

function strs(v: unknown): string[] {
  return Array.isArray(v) ? v.filter((x): x is string => typeof x === "string") : [];
}

function tbl(v: unknown): Record<string, unknown> {
  return v && typeof v === "object" && !Array.isArray(v) ? (v as Record<string, unknown>) : {};
}

function readManifest(file: string, wsDeps: Map<string, Record<string, unknown>>): Pkg | undefined {
  let m: Record<string, unknown>;
  try {
    m = parseToml(fs.readFileSync(file, "utf8")) as Record<string, unknown>;
  } catch {
    return undefined; // not valid TOML: the package is read as having no build facts
  }
  const dir = path.dirname(file);
  const ws = tbl(m.workspace);
  for (const [k, v] of Object.entries(tbl(ws.dependencies))) {
    const t = typeof v === "string" ? {} : tbl(v);
    if (typeof t.path === "string") wsDeps.set(k, { ...t, path: path.resolve(dir, t.path) });
  }
  const pkg = tbl(m.package);
  if (typeof pkg.name !== "string") return undefined;
  const features: Record<string, string[]> = {};
  for (const [k, v] of Object.entries(tbl(m.features))) features[k] = strs(v);
  const p: Pkg = { name: pkg.name, dir, manifest: m, features, deps: [], targets: [] };
  if (typeof pkg.links === "string") p.links = pkg.links;
  const depTables: [Record<string, unknown>, boolean][] = [[tbl(m.dependencies), false], [tbl(m["dev-dependencies"]), false], [tbl(m["build-dependencies"]), true]];
  for (const t of Object.values(tbl(m.target))) {
    depTables.push([tbl(tbl(t).dependencies), false], [tbl(tbl(t)["build-dependencies"]), true]);
  }
  for (const [table, build] of depTables) {
    for (const [key, v] of Object.entries(table)) {
      const t = typeof v === "string" ? {} : tbl(v);
      p.deps.push({
        key,
        pkgName: typeof t.package === "string" ? t.package : undefined,
        dir: typeof t.path === "string" ? path.resolve(dir, t.path) : t.workspace === true ? "\u0000ws" : undefined,
        features: strs(t.features),
        defaultFeatures: t["default-features"] !== false && t.default_features !== false,
        build,
      });
    }
  }
  // targets (explicit, then auto-discovered)
  const exists = (f: string) => { try { return fs.statSync(f).isFile(); } catch { return false; } };
  const lib = tbl(m.lib);
  const libRoot = typeof lib.path === "string" ? path.resolve(dir, lib.path) : path.join(dir, "src", "lib.rs");
  if (exists(libRoot)) {
    p.libName = typeof lib.name === "string" ? lib.name : p.name.replace(/-/g, "_");
    p.targets.push({ kind: "lib", name: p.libName, root: libRoot });
  }
  const explicit = (key: string, kind: NonNullable<FileUnit["kind"]>, defDir: string) => {
    const list = Array.isArray(m[key]) ? (m[key] as unknown[]) : [];
    const seen = new Set<string>();
    for (const e of list) {
      const t = tbl(e);
      const name = typeof t.name === "string" ? t.name : "";
      const root = typeof t.path === "string" ? path.resolve(dir, t.path) : path.join(dir, defDir, `${name}.rs`);
      if (name) seen.add(name);
      if (exists(root)) p.targets.push({ kind, name: name || path.basename(root, ".rs"), root });
      else if (exists(path.join(dir, defDir, name, "main.rs"))) p.targets.push({ kind, name, root: path.join(dir, defDir, name, "main.rs") });
    }
    return seen;
  };
  const auto = (folder: string, kind: NonNullable<FileUnit["kind"]>, seen: Set<string>) => {
    const d = path.join(dir, folder);
    let names: fs.Dirent[];
    try { names = fs.readdirSync(d, { withFileTypes: true }); } catch { return; }
    for (const n of names) {
      if (n.isFile() && n.name.endsWith(".rs")) {
        const name = n.name.slice(0, -3);
        if (!seen.has(name)) p.targets.push({ kind, name, root: path.join(d, n.name) });
      } else if (n.isDirectory() && exists(path.join(d, n.name, "main.rs")) && !seen.has(n.name)) {
        p.targets.push({ kind, name: n.name, root: path.join(d, n.name, "main.rs") });
      }
    }
  };
  const bins = explicit("bin", "bin", "src/bin");
  if (exists(path.join(dir, "src", "main.rs")) && !p.targets.some((t) => t.root === path.join(dir, "src", "main.rs"))) p.targets.push({ kind: "bin", name: p.name, root: path.join(dir, "src", "main.rs") });
  auto("src/bin", "bin", bins);
  auto("examples", "example", explicit("example", "example", "examples"));
  auto("tests", "test", explicit("test", "test", "tests"));
  auto("benches", "bench", explicit("bench", "bench", "benches"));
  const build = pkg.build;
  const buildRoot = typeof build === "string" ? path.resolve(dir, build) : build === false ? undefined : path.join(dir, "build.rs");
  if (buildRoot && exists(buildRoot)) {
    p.buildScript = buildRoot;
    p.targets.push({ kind: "build", name: "build-script", root: buildRoot });
  }
  return p;
}

/** The enabled features of every package: Cargo defaults, what path dependents ask for, the
 * configured ones, closed over features that enable features (also across `dep/feature`). */
function resolveFeatures(pkgs: Pkg[], byDir: Map<string, Pkg>, wsDeps: Map<string, Record<string, unknown>>, configured: string[]): Map<Pkg, Set<string>> {
  const on = new Map<Pkg, Set<string>>();
  for (const p of pkgs) {
    const s = new Set<string>();
    if (p.features.default) s.add("default");
    for (const f of configured) {
      const i = f.indexOf("/");
      if (i < 0) { if (f in p.features) s.add(f); }
      else if (f.slice(0, i) === p.name) s.add(f.slice(i + 1));
    }
    on.set(p, s);
  }
  const target = (p: Pkg, d: Dep): Pkg | undefined => {
    let dir = d.dir;
    if (dir === "\u0000ws") {
      const w = wsDeps.get(d.key);
      dir = typeof w?.path === "string" ? w.path : undefined;
    }
    return dir ? byDir.get(path.resolve(dir)) : undefined;
  };
  const depOf = (p: Pkg, key: string): Pkg | undefined => {
    const d = p.deps.find((x) => x.key === key || x.pkgName === key);
    return d ? target(p, d) : undefined;
  };
  for (let round = 0; round < 50; round++) {
    let changed = false;
    const add = (p: Pkg, f: string) => {
      const s = on.get(p)!;
      if (!s.has(f)) { s.add(f); changed = true; }
    };
    for (const p of pkgs) {
      for (const d of p.deps) {
        const t = target(p, d);
        if (!t) continue;
        if (d.defaultFeatures && t.features.default) add(t, "default");
        for (const f of d.features) add(t, f);
      }
      for (const f of [...on.get(p)!]) {
        for (const x of p.features[f] ?? []) {
          if (x.startsWith("dep:")) continue;
          const i = x.indexOf("/");
          if (i < 0) add(p, x);
          else {
            const t = depOf(p, x.slice(0, i).replace(/\?$/, ""));
            if (t) add(t, x.slice(i + 1));
          }
        }
      }
    }
    if (!changed) break;
  }
  return on;
}

interface CompileEntry { file: string; defines: Record<string, string>; includes: string[] }

function readCompileCommands(file: string): CompileEntry[] {
  let j: unknown;
  try {
    j = JSON.parse(fs.readFileSync(file, "utf8"));
  } catch {
    return [];
  }
  if (!Array.isArray(j)) return [];
  const out: CompileEntry[] = [];
  for (const e of j.slice(0, 100_000)) {
    const t = tbl(e);
    if (typeof t.file !== "string") continue;
    // (a relative `directory` is read against the database's folder, never the process's)
    const dir = typeof t.directory === "string" ? path.resolve(path.dirname(file), t.directory) : path.dirname(file);
    const args = Array.isArray(t.arguments) ? strs(t.arguments) : typeof t.command === "string" ? splitCommand(t.command) : [];
    const defines: Record<string, string> = {};
    const includes: string[] = [];
    for (let i = 0; i < args.length; i++) {
      const a = args[i]!;
      const val = (flag: string) => (a.length > flag.length ? a.slice(flag.length) : args[++i] ?? "");
      if (a.startsWith("-D")) {
        const d = val("-D");
        const eq = d.indexOf("=");
        if (d) defines[eq < 0 ? d : d.slice(0, eq)] = eq < 0 ? "1" : d.slice(eq + 1);
      } else if (a.startsWith("-I")) includes.push(path.resolve(dir, val("-I")));
      else if (a === "-isystem" || a === "-iquote") includes.push(path.resolve(dir, args[++i] ?? "."));
    }
    out.push({ file: path.resolve(dir, t.file), defines, includes });
  }
  return out;
}

/** A compiler command line split as a POSIX shell would (quotes and backslashes). */
function splitCommand(cmd: string): string[] {
  const out: string[] = [];
  let cur = "";
  let q: string | undefined;
  let any = false;
  for (let i = 0; i < cmd.length; i++) {
    const c = cmd[i]!;
    if (q) {
      if (c === q) q = undefined;
      else if (c === "\\" && q === '"' && i + 1 < cmd.length) cur += cmd[++i];
      else cur += c;
    } else if (c === '"' || c === "'") { q = c; any = true; }
    else if (c === "\\" && i + 1 < cmd.length) { cur += cmd[++i]; any = true; }
    else if (/\s/.test(c)) { if (cur || any) out.push(cur); cur = ""; any = false; }
    else cur += c;
  }
  if (cur || any) out.push(cur);
  return out;
}

function within(dir: string, file: string): boolean {
  return file === dir || file.startsWith(dir.endsWith(path.sep) ? dir : dir + path.sep);
}

/** The module files of a module declaration (Rust Reference, "Modules": `name.rs` or
 * `name/mod.rs` beside a mod-rs file, in the folder named after a non-mod-rs file; `#[path]`
 * relative to the declaring file's folder, or to the inline module's folder). */
function modCandidates(file: string, isRoot: boolean, d: ModDecl): string[] {
  const base = path.basename(file);
  const modRs = isRoot || base === "mod.rs";
  const ownDir = modRs ? path.dirname(file) : path.join(path.dirname(file), path.basename(file, ".rs"));
  if (d.path) {
    const from = d.inline.length ? path.join(ownDir, ...d.inline) : path.dirname(file);
    return [path.resolve(from, d.path)];
  }
  const dir = path.join(ownDir, ...d.inline);
  return [path.join(dir, `${d.name}.rs`), path.join(dir, d.name, "mod.rs")];
}

/**
 * Discovers the project under `root` for these source files (absolute paths); `modsOf` gives a
 * Rust file's module declarations (from its facts). Returns undefined when the tree has no build
 * file ferrule reads (then every file is in one unit, as before).
 */
export function discoverProject(root: string, sources: readonly string[], modsOf: (file: string) => readonly ModDecl[] | undefined, settings: ProjectSettings = {}): ProjectInfo | undefined {
  const scan = scanTree(root);
  if (!scan.cargo.length && !scan.ccdb.length && !settings.features?.length && !settings.defines) return undefined;
  const wsDeps = new Map<string, Record<string, unknown>>();
  const pkgs = scan.cargo.map((f) => readManifest(f, wsDeps)).filter((p): p is Pkg => !!p);
  const byDir = new Map(pkgs.map((p) => [path.resolve(p.dir), p]));
  const features = resolveFeatures(pkgs, byDir, wsDeps, settings.features ?? []);
  const files = new Map<string, FileUnit>();
  const sourceSet = new Set(sources);
  const pkgOf = (file: string): Pkg | undefined => {
    let best: Pkg | undefined;
    for (const p of pkgs) if (within(p.dir, file) && (!best || p.dir.length > best.dir.length)) best = p;
    return best;
  };
  const crates = new Map<string, CrateInfo>();
  for (const p of pkgs) {
    crates.set(p.name, {
      name: p.name, dir: p.dir, buildScript: !!p.buildScript,
      hasHeader: sources.some((s) => HEADER_EXT.test(s) && pkgOf(s) === p),
      libs: [p.links, p.libName].filter((x): x is string => !!x),
    });
  }
  // Rust: each target's module tree
  const conds = new Map<string, (Cond | undefined)[]>();
  for (const p of pkgs) {
    const feats = [...features.get(p)!];
    const optional = Object.keys(p.features).filter((f) => !features.get(p)!.has(f));
    for (const t of p.targets) {
      const unit = t.kind === "lib" ? "lib" : `${t.kind}:${p.name}:${t.name}`;
      const seen = new Set<string>();
      const visit = (file: string, isRoot: boolean, cond: Cond | undefined, depth: number) => {
        if (seen.has(file) || depth > 64 || !sourceSet.has(file)) return;
        seen.add(file);
        let u = files.get(file);
        if (!u) files.set(file, (u = { units: [], crate: p.name, features: feats, optional, kind: t.kind }));
        if (!u.units.includes(unit)) u.units.push(unit);
        if (u.kind === "unreached") u.kind = t.kind;
        const cs = conds.get(file) ?? [];
        cs.push(cond);
        conds.set(file, cs);
        for (const d of modsOf(file) ?? []) {
          const c = allOf([cond, d.cond]);
          // `#[cfg_attr(PRED, path = "…")]`: each file where its PRED holds
          for (const cp of d.cfgPaths ?? []) {
            const [cand] = modCandidates(file, isRoot, { ...d, path: cp.path });
            if (cand && sourceSet.has(cand)) visit(cand, false, allOf([c, cp.cond]), depth + 1);
          }
          for (const cand of modCandidates(file, isRoot, d)) {
            if (sourceSet.has(cand)) {
              // (the plain file is used only where no cfg_attr path applies)
              const other = d.cfgPaths?.length && !d.path ? allOf([c, { k: "not", of: anyOf(d.cfgPaths.map((x) => x.cond)) }]) : c;
              visit(cand, false, other, depth + 1);
              break;
            }
          }
        }
      };
      visit(t.root, true, undefined, 0);
    }
  }
  for (const [file, cs] of conds) {
    const u = files.get(file)!;
    if (cs.some((c) => !c)) continue;
    u.cond = anyOf(cs as Cond[]);
  }
  // C/C++: compile_commands.json, then the folder heuristics
  const compiled = new Map<string, CompileEntry>();
  for (const db of scan.ccdb) for (const e of readCompileCommands(db)) compiled.set(e.file, e);
  const cbuildOf = (file: string): [string, string] | undefined => {
    let best: [string, string] | undefined;
    for (const [d, kind] of scan.cbuild) if (within(d, file) && within(root, d) && (!best || d.length > best[0].length)) best = [d, kind];
    return best;
  };
  /** The outermost folder of one C build (of that kind) enclosing the file: its product. */
  const outerBuild = (file: string, kind: string): string => {
    let best = "";
    for (const [d, k] of scan.cbuild) if (k === kind && within(d, file) && within(root, d) && (!best || d.length < best.length)) best = d;
    return best;
  };
  for (const f of sources) {
    if (f.endsWith(".rs")) {
      if (files.has(f)) continue;
      const p = pkgOf(f);
      // a Rust file no target's module tree reaches (included by a macro, generated, or dead):
      // a unit of its own
      if (p) files.set(f, { units: [`unreached:${f}`], crate: p.name, features: [...features.get(p)!], optional: Object.keys(p.features).filter((x) => !features.get(p)!.has(x)), kind: "unreached" });
      continue;
    }
    if (!C_EXT.test(f)) continue;
    const p = pkgOf(f);
    const b = cbuildOf(f);
    let unit: string;
    // compiled by the package's build script: C sources of the package's folder, unless a C build
    // of their own (inside the package) builds them and the build script does not drive it
    const driven = !!b && (DRIVERS[b[1]] ?? []).some((d) => p?.deps.some((x) => x.build && (x.key === d || x.pkgName === d)));
    if (p?.buildScript && (!b || !within(p.dir, b[0]) || driven)) unit = "lib";
    else if (b) unit = `c:${outerBuild(f, b[1])}`;
    else if (p) unit = `c:${p.dir}`;
    else unit = "lib";
    const e = compiled.get(f);
    const u: FileUnit = { units: [unit], kind: "c" };
    if (e) u.compiled = true;
    if (p) u.crate = p.name;
    const defines = { ...(settings.defines ?? {}), ...(e?.defines ?? {}) };
    if (Object.keys(defines).length) u.defines = defines;
    files.set(f, u);
  }
  const builtLibs = new Set<string>();
  for (const c of crates.values()) for (const l of c.libs) builtLibs.add(l);
  const hasAsm = scan.asm || pkgs.some((p) => p.deps.some((d) => d.build && /^nasm/.test(d.pkgName ?? d.key)));
  const includeDirs = [...new Set([...compiled.values()].flatMap((e) => e.includes))];
  const info: ProjectInfo = { root: root.endsWith(path.sep) ? root : root + path.sep, files, crates, hasAsm, asmNames: asmIdentifiers(root, scan.asmFiles), builtLibs, defines: settings.defines ?? {}, includeDirs };
  return info;
}
