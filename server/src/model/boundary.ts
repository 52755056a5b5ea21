// The boundary model: every file's facts linked into one view of the seam. Built from FileFacts
// only (no file reads), so it is cheap to rebuild after a one-file change.

import type { AbiType, Field, FileFacts, FnDecl, IncludeRef, MacroItem, TypeDecl } from "./types.js";
import { ALL_TRIPLES, type Triple } from "./targets.js";
import { IncludeIndex } from "./includes.js";
import { allOf, canHold, envsFor, ppCondOn, type Cond, type CondEnv } from "./conditions.js";
import type { Layout } from "./layout.js";
import { archVariant, type FileUnit, type ProjectInfo } from "./project.js";

export type Side = "rust" | "c";

export interface ModelConfig {
  targets: Triple[];
  /** Include directories, workspace-relative (or absolute). */
  includePaths: string[];
  /** Extra settings for rule families (port patterns etc.), by family name. */
  families: Record<string, unknown>;
  /** For a model of part of a workspace (the language server's scoped re-checks): which sides
   * the whole workspace has, so rules that ask "is there any C at all" answer for the workspace. */
  workspaceSides?: Record<Side, boolean>;
  /** For a model of part of a workspace: resolve includes against the whole workspace. */
  includeIndex?: IncludeIndex;
  /** The project as its build sees it (analysis/project.ts): link units, features, file
   * conditions. Without it every file is in one link unit and features are unknown. */
  project?: ProjectInfo;
  /** Layouts of system structs (kernel UAPI / C library) read from each target's own headers by
   * the analysis layer (analysis/system.ts): name → target → layout. Facts, not a reader. */
  system?: SystemFacts;
}

/** One system struct's layout on one target, with the header it came from. */
export interface SystemLayout {
  header: string;
  file: string;
  layout: Layout;
}

/** name → target → layout (a target is absent when its headers are not installed). */
export type SystemFacts = Map<string, Partial<Record<Triple, SystemLayout>>>;

export const DEFAULT_CONFIG: ModelConfig = { targets: [...ALL_TRIPLES], includePaths: [], families: {} };

export interface SymbolGroup {
  symbol: string;
  rust: FnDecl[]; // exports and imports
  c: FnDecl[]; // prototypes and definitions (C and C++)
}

export class Model {
  readonly files: Map<string, FileFacts>;
  readonly config: ModelConfig;
  readonly symbols = new Map<string, SymbolGroup>();
  private readonly typesBy: Record<Side, Map<string, TypeDecl[]>> = { rust: new Map(), c: new Map() };
  private readonly definesBy = new Map<string, AbiType>();
  /** Names mentioned by item-level Rust macro invocations → those invocations. */
  private readonly macroNames = new Map<string, MacroItem[]>();
  private readonly includers = new Map<string, string[]>();
  private readonly fnIds = new Map<string, FnDecl>();
  private includeIndex: IncludeIndex | undefined;
  /** Where each `#include "…"` of the workspace resolved (the facts themselves stay untouched). */
  private readonly includeTargets = new Map<IncludeRef, string>();

  /** Each item's condition (its own `#[cfg]`, its inline modules' and the module tree's). */
  private readonly conds = new Map<object, Cond>();
  private readonly envCache = new Map<string, CondEnv[]>();
  private readonly programs = new Set<string>();
  /** Folders holding exactly one program file (see the constructor). */
  private readonly programFolders = new Set<string>();

  constructor(facts: Iterable<FileFacts>, config: ModelConfig = DEFAULT_CONFIG) {
    this.files = new Map();
    this.config = config;
    for (const f of facts) this.files.set(f.file, f.lang === "rust" ? this.built(f) : f);
    const entriesByFolder = new Map<string, string[]>();
    for (const f of this.files.values()) {
      // a C/C++ file that defines a program's entry point is a program of its own (its own link unit)
      if (f.lang !== "rust" && f.fns.some((fn) => fn.role === "def" && PROGRAM_ENTRIES.has(fn.name) && !fn.isStatic)) {
        this.programs.add(f.file);
        const dir = folderOf(f.file);
        entriesByFolder.set(dir, [...(entriesByFolder.get(dir) ?? []), f.file]);
      }
    }
    // a folder with exactly one program: its other C/C++ files are that program's own sources
    // (a tool or a reference decoder beside the library), unless the build files say otherwise
    for (const [dir, progs] of entriesByFolder) if (progs.length === 1) this.programFolders.add(dir);
    for (const f of this.files.values()) {
      const side: Side = f.lang === "rust" ? "rust" : "c";
      for (const fn of f.fns) {
        this.fnIds.set(fn.id, fn);
        if ((fn as FnDecl & { internal?: boolean }).internal || fn.isStatic) continue;
        if (fn.lang === "rust" && fn.role === "export" && !fn.noMangle && !fn.isExtern) continue;
        let g = this.symbols.get(fn.symbol);
        if (!g) this.symbols.set(fn.symbol, (g = { symbol: fn.symbol, rust: [], c: [] }));
        (side === "rust" ? g.rust : g.c).push(fn);
      }
      for (const t of f.types) {
        const m = this.typesBy[side];
        const arr = m.get(t.name) ?? [];
        arr.push(t);
        m.set(t.name, arr);
        if (t.tag && t.tag !== t.name && t.kind !== "alias") {
          const a2 = m.get(t.tag) ?? [];
          a2.push(t);
          m.set(t.tag, a2);
        }
      }
      for (const d of f.defines) this.definesBy.set(d.name, d.type);
      for (const m of f.macroItems ?? []) {
        for (const x of m.names) {
          const arr = this.macroNames.get(x) ?? [];
          arr.push(m);
          this.macroNames.set(x, arr);
        }
      }
      for (const inc of f.includes) {
        if (inc.system) continue;
        const r = this.resolveInclude(f.file, inc.path);
        if (r) {
          this.includeTargets.set(inc, r);
          const arr = this.includers.get(r) ?? [];
          arr.push(f.file);
          this.includers.set(r, arr);
        }
      }
    }
  }

  /**
   * A Rust file's facts as the build compiles them: items whose condition holds on no configured
   * target (with the package's features) are left out, and `#[cfg_attr(PRED, no_mangle)]` /
   * `export_name` applies where PRED can hold. The facts themselves stay untouched (copies).
   */
  private built(f: FileFacts): FileFacts {
    const unit = this.config.project?.files.get(f.file);
    const scopes = f.cfgScopes ?? [];
    const needs = unit?.cond || scopes.length || f.fns.some((x) => x.cfg || x.cfgExport) || f.types.some((t) => t.cfg || t.fields.some((x) => x.cfg));
    if (!needs) return f;
    const envs = this.envsOf(f.file);
    const condAt = (line: number, own: Cond | undefined): Cond | undefined =>
      allOf([unit?.cond, ...scopes.filter((s) => s.line <= line && line <= s.endLine).map((s) => s.cond), own]);
    const fns: FnDecl[] = [];
    for (const fn of f.fns) {
      const c = condAt(fn.range.line, fn.cfg);
      if (c && !canHold([c], envs)) continue;
      let out = fn;
      if (fn.cfgExport && !fn.noMangle) {
        const e = fn.cfgExport.find((x) => canHold([c, x.cond], envs));
        if (e) out = { ...fn, noMangle: true, symbol: e.name ?? fn.name };
      }
      if (c) this.conds.set(out, c);
      fns.push(out);
    }
    const types: TypeDecl[] = [];
    for (const t of f.types) {
      const c = condAt(t.range.line, t.cfg);
      if (c && !canHold([c], envs)) continue;
      let out = t;
      if (t.fields.some((x) => x.cfg)) {
        const fields = t.fields.filter((x) => !x.cfg || canHold([c, x.cfg], envs));
        if (fields.length !== t.fields.length) out = { ...t, fields };
      }
      if (c) this.conds.set(out, c);
      types.push(out);
    }
    return { ...f, fns, types };
  }

  /** The build environments a file is compiled in: each configured target, with its package's
   * features (unknown features: any). */
  envsOf(file: string): CondEnv[] {
    let e = this.envCache.get(file);
    if (!e) {
      const unit = this.config.project?.files.get(file);
      e = envsFor(this.config.targets, { features: unit?.features, optional: unit?.optional });
      this.envCache.set(file, e);
    }
    return e;
  }

  /** An item's build condition (undefined: always compiled). */
  condOf(item: FnDecl | TypeDecl): Cond | undefined {
    return this.conds.get(item);
  }

  /** What the project knows of a file (undefined without build files). */
  fileUnit(file: string): FileUnit | undefined {
    return this.config.project?.files.get(file);
  }

  /**
   * Whether a member of an aggregate exists on one target: a Rust field's `#[cfg]` (with the
   * package's features, on that target) and a C member's undecided `#if` branch (decided with
   * that target's predefined macros and the configured defines). Undecidable: kept.
   */
  memberOn(d: TypeDecl, f: Field, triple: Triple): boolean {
    if (f.cfg) {
      const env = this.envsOf(d.file).find((e) => e.triple === triple);
      if (env && !canHold([this.condOf(d), f.cfg], [env])) return false;
    }
    if (f.ppCond) {
      const defs = { ...(this.config.project?.defines ?? {}), ...(this.config.project?.files.get(d.file)?.defines ?? {}) };
      if (ppCondOn(f.ppCond, triple, defs) === false) return false;
    }
    return true;
  }

  /** The link units a file is compiled into (see model/project.ts). */
  unitsOf(file: string): string[] {
    if (this.programs.has(file)) return [`program:${file}`];
    return this.config.project?.files.get(file)?.units ?? ["default"];
  }

  /** The architecture variant a file's folder names (`src/arm/cpu.c`), relative to the project root. */
  variantOf(file: string): string | undefined {
    const root = this.config.project?.root;
    const rel = root && file.startsWith(root) ? file.slice(root.length) : file.split(/[\\/]/).slice(-4).join("/");
    return archVariant(rel);
  }

  /** The configured targets on which both items' conditions can hold. */
  targetsWhereBoth(a: FnDecl, b: FnDecl): Triple[] {
    const ca = this.condOf(a);
    const cb = this.condOf(b);
    if (!ca && !cb) return [...this.targets];
    const joint = this.config.project?.files.get(a.file)?.crate === this.config.project?.files.get(b.file)?.crate;
    const ea = this.envsOf(a.file);
    const eb = this.envsOf(b.file);
    const out = new Set<Triple>();
    ea.forEach((e, i) => {
      const ok = joint ? canHold([ca, cb], [e]) : canHold([ca], [e]) && !!eb[i] && canHold([cb], [eb[i]!]);
      if (ok && e.triple) out.add(e.triple);
    });
    return this.targets.filter((t) => out.has(t));
  }

  /** One of two C/C++ files lies in a program's folder (see programFolders) and the other does
   * not: without build files saying so, they are taken as sources of two different programs. */
  private inOtherProgram(a: string, b: string): boolean {
    const pj = this.config.project?.files;
    if (pj?.get(a)?.compiled || pj?.get(b)?.compiled) return false;
    const da = folderOf(a);
    const db = folderOf(b);
    return da !== db && (this.programFolders.has(da) || this.programFolders.has(db));
  }

  /** Whether two items' files share a link unit. */
  shareUnit(a: string, b: string): boolean {
    const ub = this.unitsOf(b);
    return this.unitsOf(a).some((u) => ub.includes(u));
  }

  /**
   * Whether two definitions can end up in one linked program: they share a link unit, are not
   * variants for two architectures, their conditions can hold together, and they are not two
   * definitions in one C/C++ file (which a compiler accepts only in exclusive `#if` branches).
   */
  mayLinkTogether(a: FnDecl, b: FnDecl): boolean {
    const ua = this.unitsOf(a.file);
    const ub = this.unitsOf(b.file);
    if (!ua.some((u) => ub.includes(u))) return false;
    const va = this.variantOf(a.file);
    const vb = this.variantOf(b.file);
    if (va && vb && va !== vb) return false;
    if (a.file === b.file && a.lang !== "rust" && b.lang !== "rust") return false;
    if (a.lang !== "rust" && b.lang !== "rust" && this.inOtherProgram(a.file, b.file)) return false;
    const ca = this.condOf(a);
    const cb = this.condOf(b);
    if (ca || cb) {
      const pa = this.config.project?.files.get(a.file);
      const pb = this.config.project?.files.get(b.file);
      const ea = this.envsOf(a.file);
      const eb = this.envsOf(b.file);
      // one package (or both of unknown packages): one set of features decides both conditions;
      // else each side with its own features, on the same target
      const joint = pa?.crate === pb?.crate;
      const together = ea.some((e, i) => joint ? canHold([ca, cb], [e]) : canHold([ca], [e]) && !!eb[i] && canHold([cb], [eb[i]!]));
      if (!together) return false;
    }
    return true;
  }

  /** The item-level Rust macro invocations whose arguments name this symbol: ferrule expands no
   * macro, so any of them may define it (keys.ts relates their files by the name). */
  macrosNaming(symbol: string): MacroItem[] {
    return this.macroNames.get(symbol) ?? [];
  }

  /** Whether the workspace has any file of this side (see ModelConfig.workspaceSides). */
  hasSide(side: Side): boolean {
    const w = this.config.workspaceSides?.[side];
    if (w !== undefined) return w;
    for (const f of this.files.values()) if ((f.lang === "rust") === (side === "rust")) return true;
    return false;
  }

  /** The workspace file an include of this model's facts resolved to. */
  includeTarget(inc: IncludeRef): string | undefined {
    return this.includeTargets.get(inc);
  }

  fnById(id: unknown): FnDecl | undefined {
    return typeof id === "string" ? this.fnIds.get(id) : undefined;
  }

  get targets(): Triple[] {
    return this.config.targets;
  }

  /** Every function of the workspace that is not a boundary item (helpers in Rust, C++ code). */
  allFns(): FnDecl[] {
    const out: FnDecl[] = [];
    for (const f of this.files.values()) out.push(...f.fns);
    return out;
  }

  /** Resolves `#include "x"` against the including file's folder, then the include paths, then a
   * unique file of that name (see model/includes.ts); against the whole workspace when
   * `config.includeIndex` is given. */
  resolveInclude(from: string, inc: string): string | undefined {
    this.includeIndex ??= this.config.includeIndex ?? new IncludeIndex((f) => this.files.has(f), () => this.files.keys(), this.config.includePaths);
    return this.includeIndex.resolve(from, inc);
  }

  /** Files that include `file`, directly or through other headers. */
  includersOf(file: string, seen = new Set<string>()): string[] {
    const out: string[] = [];
    for (const f of this.includers.get(file) ?? []) {
      if (seen.has(f)) continue;
      seen.add(f);
      out.push(f, ...this.includersOf(f, seen));
    }
    return out;
  }

  typeDecls(name: string, side: Side): TypeDecl[] {
    return this.typesBy[side].get(name) ?? [];
  }

  /** Follows aliases, typedefs and #define aliases until a non-alias type. */
  resolve(t: AbiType, side: Side, depth = 0): AbiType {
    if (depth > 32) return { k: "unknown", text: "alias cycle" };
    if (t.k === "unsafe" && t.optionOf) {
      const inner = this.nonNullCore(t.optionOf, depth + 1);
      if (inner && (inner.k === "fn" || inner.k === "ptr")) return { ...inner, nullable: true };
      return t;
    }
    if (t.k === "named") {
      if (side === "c" && this.definesBy.has(t.name)) return this.resolve(this.definesBy.get(t.name)!, side, depth + 1);
      const all = this.typeDecls(t.name, side);
      // a type declared in a header is what the files including it see; one declared in a
      // .c/.cpp file is local to that translation unit (C 6.2.1 scopes), so on the C side the
      // header's declarations win when there are any
      const inHeaders = side === "c" && all.length > 1 ? all.filter((d) => HEADER_FILE.test(d.file)) : [];
      const decls = inHeaders.length ? inHeaders : all;
      const alias = decls.find((d) => d.kind === "alias" && d.aliasOf);
      const agg = decls.find((d) => d.kind !== "alias");
      if (!agg && alias) {
        const r = this.resolve(alias.aliasOf!, side, depth + 1);
        // A C typedef of a function pointer is the function type itself for comparison purposes.
        return r;
      }
      return t;
    }
    return t;
  }

  /**
   * The never-null pointer an `Option<T>` may wrap with C's layout: a reference, Box, NonNull or
   * function pointer, or a #[repr(transparent)] struct around one (std::option, "Representation":
   * `Option<T>` has the same size, alignment and ABI as `T` for those, None being the null
   * pointer). Undefined for any other T.
   */
  private nonNullCore(t: AbiType, depth: number): (AbiType & { k: "fn" | "ptr" }) | undefined {
    if (depth > 32) return undefined;
    const r = this.resolve(t, "rust", depth + 1);
    if (r.k === "fn" || (r.k === "ptr" && r.via !== "raw")) return r;
    const name = r.k === "named" ? r.name : r.k === "unsafe" && r.generic ? r.generic.name : undefined;
    if (!name) return undefined;
    const d = this.typeDecls(name, "rust").find((x) => x.kind === "struct");
    if (!d || !d.repr.transparent) return undefined;
    const sized = d.fields.filter((f) => !(f.type.k === "array" && f.type.len === 0));
    return sized.length === 1 ? this.nonNullCore(sized[0]!.type, depth + 1) : undefined;
  }

  /**
   * The struct/union/enum/opaque declaration a type names, after resolving aliases. With `from`
   * (the file that names the type), a name declared more than once on that side is taken from the
   * nearest declaration: the same file, then the same folder, then the longest shared folder path
   * (Rust modules follow the folder tree; two `Stats` in two modules are two types).
   */
  aggregate(t: AbiType, side: Side, from?: string): TypeDecl | undefined {
    const r = this.resolve(t, side);
    if (r.k !== "named") return undefined;
    const decls = this.typeDecls(r.name, side).filter((d) => d.kind !== "alias");
    if (from && decls.length > 1) {
      const bodies = decls.filter((d) => d.kind !== "opaque");
      const pool = bodies.length ? bodies : decls;
      let best = pool[0]!, bestScore = -1;
      for (const d of pool) {
        const sc = nearness(from, d.file);
        if (sc > bestScore) { best = d; bestScore = sc; }
      }
      return best;
    }
    return decls.find((d) => d.kind !== "opaque") ?? decls[0];
  }
}

/** How near a declaring file is to the file that names the type: the same file scores highest,
 * then the number of leading folders the two paths share. */
export function nearness(from: string, file: string): number {
  if (from === file) return 10_000;
  const a = from.split("/"), b = file.split("/");
  let i = 0;
  while (i < a.length - 1 && i < b.length - 1 && a[i] === b[i]) i++;
  return i;
}

/** Normalises a type name for cross-language matching: `SonarFir`, `sonar_fir`, `struct sonar_fir`. */
export function normName(n: string): string {
  return n.replace(/^(struct|union|enum)\s+/, "").replace(/_t$/, "").replace(/_/g, "").toLowerCase();
}

/**
 * Whether a Rust type name and a C type name name the same type by common practice: equal once
 * normalised (normName), or once the C name also drops its library prefix, since Rust code keeps
 * the prefix in the crate or module path instead (`lfe_strike` / `Strike`, `lfe_station_cal` /
 * `StationCal`, `LFE_CONFIG` / `Config`).
 */
export function mirrorNames(rust: string, c: string): boolean {
  const rn = normName(rust);
  if (normName(c) === rn) return true;
  const parts = c.replace(/^(struct|union|enum)\s+/, "").replace(/_t$/, "").split("_").filter(Boolean);
  for (let i = 1; i < parts.length; i++) if (parts.slice(i).join("").toLowerCase() === rn) return true;
  return false;
}

/** Names of a program's entry point: `main`, the Windows entry points, and libFuzzer's entry
 * (`LLVMFuzzerTestOneInput`; each fuzz target is its own program — common practice). */
const PROGRAM_ENTRIES = new Set(["main", "wmain", "WinMain", "wWinMain", "LLVMFuzzerTestOneInput"]);

function folderOf(file: string): string {
  const i = Math.max(file.lastIndexOf("/"), file.lastIndexOf("\\"));
  return i < 0 ? "" : file.slice(0, i);
}

/** A C/C++ header by its name (what includers see; a .c/.cpp file's own declarations are its own). */
export const HEADER_FILE = /\.(h|hh|hpp|hxx|inl)$/i;

/** A function both a C file defines and Rust exports: two implementations of one API (a C
 * original beside its Rust port, one chosen by the build), not a call across the seam. */
export function twoImplementations(g: SymbolGroup): boolean {
  return g.c.some((f) => f.role === "def") && g.rust.some((f) => f.role === "export" && f.noMangle && f.isExtern);
}
