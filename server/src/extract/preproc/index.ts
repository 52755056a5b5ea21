// The C preprocessor of the files ferrule reads (C11 §6.10), producing text for tree-sitter that
// keeps the source's line structure, so every finding still points into the source:
//  - a macro use on line L is replaced by its expansion on line L (an invocation spanning lines
//    L..M is joined onto L; lines L+1..M keep only what follows the invocation, at its column);
//  - lines of groups the conditions rule out are blank, as are the directive lines of decided
//    conditionals; `#define`, `#include`, `#pragma` and the lines of undecided conditionals stay
//    as written (the extractor reads `#define T float` aliases and `#pragma pack` from them);
//  - `mapCol` maps a column of the expanded text back to the source: a position inside an
//    expansion maps to the macro use.
//
// What ferrule cannot decide (a condition on a macro it does not know, a macro defined
// differently in such branches) keeps today's reading: both branches stay, the use stays
// unexpanded. `strict` gives the C standard's reading instead (unknown names are 0), which is what
// the oracle test compares with `gcc -E`.

import type { Triple } from "../../model/targets.js";
import { K, spell, tokenize, type Tok } from "./lexer.js";
import { AMBIGUOUS, Expander, ExpansionLimit, MacroTable, parseDefine, type MacroDef, type Reader } from "./expand.js";
import { evalCondition } from "./cond.js";
import { ExtractTimeout, extractDeadlinePassed } from "../common.js";
import { PREDEFINED, PREDEFINED_NAMES } from "./predefined.js";

export { evalCondition, MacroTable, tokenize, spell };
export type { Tok, MacroDef };

export interface IncludeSource {
  file: string;
  text: string;
}

export interface PreprocEnv {
  /** Targets whose predefined macros apply: a macro with one value on all of them is defined;
   * one that differs is undecided (target-neutral reading). */
  targets: readonly Triple[];
  /** Project macros (`.ferrule.toml` `defines`): NAME or NAME(params) → replacement text. */
  defines?: Readonly<Record<string, string>>;
  /** Names to define as empty (setting `strip_macros`). */
  strip?: readonly string[];
  /** Text of an included file, or undefined when it is not a workspace file. */
  readInclude?: (from: string, path: string, system: boolean) => IncludeSource | undefined;
  /** The C standard's reading of conditions (unknown names are 0), as a compiler would. */
  strict?: boolean;
  /** Read a header as a C++ translation unit includes it (`__cplusplus` defined). */
  asCxx?: boolean;
}

export interface PreprocResult {
  /** Expanded text with the source's lines; equal to the source when nothing changed. */
  text: string;
  changed: boolean;
  /** Column in the source of a column of the expanded text on `line` (lines are the same). */
  mapCol: (line: number, col: number, end?: boolean) => number;
  /** Files read through #include (for cache keys). */
  reads: string[];
  /** A key of the macro environment that came from outside the file (included files' texts,
   * settings, targets): the same text with the same key preprocesses the same. */
  envKey: string;
  /** Names of macros ferrule could not expand because their definitions disagree. */
  ambiguous: string[];
  /** Unexpanded uses of such macros: the identifiers each candidate definition would make. */
  undecided: { macro: string; names: string[]; s: number; e: number; keepsName: boolean }[];
  expansions: number;
  /** Lines of the file inside undecided conditional branches, with each branch's condition as
   * a C expression (`defined(__LP64__)`, `!(defined(__LP64__))`): 0-based, inclusive. */
  regions: { line: number; endLine: number; cond: string }[];
}

type LangKind = "c" | "cpp" | "header";

export function langKindOf(file: string): LangKind {
  const dot = file.lastIndexOf(".");
  const ext = dot < 0 ? "" : file.slice(dot + 1).toLowerCase();
  if (ext === "c") return "c";
  if (ext === "h") return "header";
  return "cpp";
}

const baseCache = new Map<string, MacroTable>();

/** The macro table a translation unit starts with: predefined macros, settings, __cplusplus. */
export function baseTable(env: PreprocEnv, kind: LangKind): MacroTable {
  const key = JSON.stringify([env.targets, env.defines ?? {}, env.strip ?? [], kind, !!env.strict]);
  const hit = baseCache.get(key);
  if (hit) return hit.clone();
  const t = new MacroTable();
  t.strictRead = !!env.strict;
  const tables = env.targets.map((tr) => PREDEFINED[tr]).filter(Boolean);
  for (const name of PREDEFINED_NAMES) {
    const vals = tables.map((x) => x[name]);
    if (vals.every((v) => v === undefined)) { t.knownUndef.add(name); continue; }
    if (vals.every((v) => v === vals[0])) {
      const d = parseDefine(tokenize(`${name} ${vals[0]}`));
      if (d) t.define(d, false);
      continue;
    }
    t.targetDependent.add(name);
  }
  if (kind === "cpp") {
    const d = parseDefine(tokenize("__cplusplus 201703L"));
    if (d) t.define(d, false);
  } else if (kind === "c") t.knownUndef.add("__cplusplus");
  else t.targetDependent.add("__cplusplus"); // a header is read as C and as C++
  for (const s of env.strip ?? []) {
    if (!s) continue;
    const d = parseDefine(tokenize(s));
    if (d) t.define({ ...d, body: [] }, false);
  }
  for (const [k, v] of Object.entries(env.defines ?? {})) {
    const d = parseDefine(tokenize(`${k} ${v}`));
    if (d) t.define(d, false);
  }
  if (baseCache.size > 32) baseCache.clear();
  baseCache.set(key, t);
  return t.clone();
}

/** A directive: its tokens after `#`, the span of its logical line(s). */
interface Directive {
  /** Index of the `#` token. */
  at: number;
  /** Tokens after `#`. */
  toks: Tok[];
  /** [line start, end of its last line (the newline, exclusive)) in the text. */
  s: number;
  e: number;
}

interface Scanned {
  toks: Tok[];
  /** Directives in order, with the index of their `#` token. */
  dirs: Directive[];
}

const scanCache = new Map<string, Scanned>();

function scan(text: string): Scanned {
  const toks = tokenize(text);
  const dirs: Directive[] = [];
  for (let i = 0; i < toks.length; i++) {
    const t = toks[i]!;
    if (!t.bol || (t.t !== "#" && t.t !== "%:")) continue;
    let j = i + 1;
    while (j < toks.length && !toks[j]!.bol) j++;
    const last = toks[j - 1]!;
    dirs.push({ at: i, toks: toks.slice(i + 1, j), s: lineStart(text, t.s), e: lineEnd(text, last.e) });
    i = j - 1;
  }
  return { toks, dirs };
}

let scanCacheChars = 0;

/** Tokens of a text, cached (a header is read as an include by many files and as a file of its
 * own): at most ~8 M characters of text are held. */
function scanCached(text: string): Scanned {
  const hit = scanCache.get(text);
  if (hit) return hit;
  const s = scan(text);
  if (text.length > 2_000_000) return s;
  if (scanCacheChars + text.length > 8_000_000) { scanCache.clear(); scanCacheChars = 0; }
  scanCache.set(text, s);
  scanCacheChars += text.length;
  return s;
}

/** Whether some line's first non-blank character is `#` (a cheap over-approximation of "has a
 * directive": a `#` at the start of a line inside a comment also counts). */
function hasDirective(text: string): boolean {
  for (let i = text.indexOf("#"); i >= 0; i = text.indexOf("#", i + 1)) {
    let j = i - 1;
    while (j >= 0 && (text.charCodeAt(j) === 32 || text.charCodeAt(j) === 9)) j--;
    if (j < 0 || text.charCodeAt(j) === 10 || text.charCodeAt(j) === 13) return true;
  }
  return false;
}

function lineStart(text: string, at: number): number {
  const i = text.lastIndexOf("\n", at - 1);
  return i + 1;
}

/** The newline ending the logical line that `at` is on (block comments and splices continue it). */
function lineEnd(text: string, at: number): number {
  let i = at;
  const n = text.length;
  while (i < n) {
    const c = text.charCodeAt(i);
    if (c === 10) return i;
    if (c === 92 && text.charCodeAt(i + 1) === 10) { i += 2; continue; }
    if (c === 47 && text.charCodeAt(i + 1) === 42) {
      const e = text.indexOf("*/", i + 2);
      i = e < 0 ? n : e + 2;
      continue;
    }
    if (c === 47 && text.charCodeAt(i + 1) === 47) {
      while (i < n && text.charCodeAt(i) !== 10) i += text.charCodeAt(i) === 92 && text.charCodeAt(i + 1) === 10 ? 2 : 1;
      return i;
    }
    i++;
  }
  return n;
}

/**
 * `#ifdef __cplusplus` (or `#if defined(__cplusplus)`, `#if __cplusplus`) whose whole body, up
 * to an `#endif`, is `extern "C" {` or `}`: one half of the extern "C" guard of a C header.
 */
/** A directive's condition as text (tokens joined by spaces; re-tokenizes to the same tokens). */
function spellCond(args: Tok[]): string {
  return args.map((t) => t.t).join(" ") || "0";
}

function isCxxGuard(name: string, args: Tok[], body: Tok[], next: Directive | undefined): boolean {
  if (next?.toks[0]?.t !== "endif") return false;
  const cond = args.map((t) => t.t).join(" ");
  const aboutCxx = name === "ifdef" ? cond === "__cplusplus" : name === "if" && /^(?:defined \( __cplusplus \)|defined __cplusplus|__cplusplus)$/.test(cond);
  if (!aboutCxx) return false;
  const b = body.map((t) => t.t).join(" ");
  return b === 'extern "C" {' || b === "}";
}

interface Frame {
  /** The enclosing region is live. */
  outer: boolean;
  /** Current branch: taken, not taken, or undecided. */
  mode: "on" | "off" | "maybe";
  /** A branch before was taken for sure (the rest are off). */
  done: boolean;
  /** Some branch was undecided: the group's directive lines stay in the text. */
  kept: boolean;
  /** Directive spans of the group so far. */
  lines: [number, number][];
  /** Where the current branch's body starts (end of its directive line). */
  bodyStart: number;
  /** Conditions of the group's branches so far, as C expressions (for undecided regions). */
  conds?: string[];
  /** The current branch's own condition when it is undecided. */
  cur?: string;
}

interface Edit {
  s: number;
  e: number;
  text: string;
  /** An expansion (columns recorded for mapping) or a blanking. */
  expand: boolean;
}

const MAX_INCLUDE_DEPTH = 40;

class Run {
  readonly table: MacroTable;
  readonly edits: Edit[] = [];
  readonly reads: string[] = [];
  readonly readKeys: string[] = [];
  readonly included = new Set<string>();
  readonly ambiguous = new Set<string>();
  /** Uses of a macro ferrule could not decide, with the names each candidate definition makes. */
  readonly undecided: { macro: string; names: string[]; s: number; e: number; keepsName: boolean }[] = [];
  expansions = 0;
  readonly regions: { line: number; endLine: number; cond: string }[] = [];
  private startsOf: { text: string; arr: number[] } | undefined;
  private depth = 0;

  constructor(readonly env: PreprocEnv, readonly kind: LangKind) {
    this.table = baseTable(env, kind);
  }

  private undecidedContext(stack: Frame[]): boolean {
    return stack.some((f) => f.mode === "maybe");
  }

  private live(stack: Frame[]): boolean {
    const top = stack[stack.length - 1];
    return !top || (top.outer && top.mode !== "off");
  }

  /** Processes a file's directives (and, when `emit`, expands its text into edits). */
  file(file: string, text: string, sc: Scanned, emit: boolean): void {
    const { toks, dirs } = sc;
    const stack: Frame[] = [];
    let di = 0;
    let i = 0;
    const cond = (ts: Tok[]) => evalCondition(ts, this.table, { strict: this.env.strict, cplusplus: this.kind === "cpp" });
    const blank = (s: number, e: number) => {
      if (!emit || e <= s) return;
      let nl = "";
      for (let k = text.indexOf("\n", s); k >= 0 && k < e; k = text.indexOf("\n", k + 1)) nl += "\n";
      this.edits.push({ s, e, text: nl, expand: false });
    };
    const closeBranch = (f: Frame, nextStart: number) => {
      if (f.outer && f.mode === "off") blank(f.bodyStart, nextStart);
    };
    let steps = 0;
    while (i < toks.length) {
      // the file's time budget covers preprocessing too (checked every 4096 steps)
      if ((++steps & 4095) === 0 && extractDeadlinePassed()) throw new ExtractTimeout("preprocessing took longer than the file's time budget");
      const d = dirs[di];
      if (d && d.at === i) {
        di++;
        i = d.at + 1 + d.toks.length;
        this.directive(file, text, d, dirs[di], stack, emit, cond, blank, closeBranch, toks);
        continue;
      }
      if (!emit || !this.live(stack)) {
        // skip to the next directive
        i = d ? d.at : toks.length;
        continue;
      }
      const t = toks[i]!;
      if (t.k !== K.Ident || !this.table.map.has(t.t)) { i++; continue; }
      i = this.expandAt(text, toks, i, d ? d.at : toks.length);
    }
    // unterminated groups: whatever is open ends with the file
    for (let f = stack.pop(); f; f = stack.pop()) {
      closeBranch(f, text.length);
      if (!f.kept) for (const [s, e] of f.lines) blank(s, e);
    }
  }

  /** Records the lines of an undecided branch (the main file only), ending where `end` starts. */
  private region(_file: string, text: string, f: Frame, end: number, emit: boolean): void {
    if (!emit || !f.outer || f.mode !== "maybe" || !f.cur || this.regions.length > 10_000) return;
    if (this.startsOf?.text !== text) {
      const arr = [0];
      for (let k = text.indexOf("\n"); k >= 0; k = text.indexOf("\n", k + 1)) arr.push(k + 1);
      this.startsOf = { text, arr };
    }
    const arr = this.startsOf.arr;
    const lineAt = (o: number) => {
      let lo = 0, hi = arr.length - 1;
      while (lo < hi) { const mid = (lo + hi + 1) >> 1; if (arr[mid]! <= o) lo = mid; else hi = mid - 1; }
      return lo;
    };
    const a = lineAt(f.bodyStart) + 1;
    const b = lineAt(end) - 1;
    if (b >= a) this.regions.push({ line: a, endLine: b, cond: f.cur });
  }

  private directive(
    file: string, text: string, d: Directive, nextDir: Directive | undefined, stack: Frame[], emit: boolean,
    cond: (ts: Tok[]) => boolean | undefined, blank: (s: number, e: number) => void, closeBranch: (f: Frame, next: number) => void,
    toks: Tok[],
  ): void {
    const name = d.toks[0]?.t ?? "";
    const args = d.toks.slice(1);
    const live = this.live(stack);
    switch (name) {
      case "if":
      case "ifdef":
      case "ifndef": {
        const f: Frame = { outer: live, mode: "off", done: false, kept: false, lines: [[d.s, d.e]], bodyStart: d.e };
        if (live) {
          let v: boolean | undefined;
          if (name === "if") v = cond(args);
          else {
            const id = args[0]?.k === K.Ident ? args[0].t : undefined;
            if (id === undefined) v = undefined;
            else {
              v = this.definedness(id);
              if (name === "ifndef" && v !== undefined) v = !v;
              // an include guard: `#ifndef X` + `#define X` as the next directive, X never seen
              if (name === "ifndef" && v === undefined && !this.table.targetDependent.has(id) && nextDir?.toks[0]?.t === "define" && nextDir.toks[1]?.t === id) v = true;
            }
          }
          // the extern "C" guard idiom (common practice): `#ifdef __cplusplus` / `extern "C" {` /
          // `#endif` and its closing `}` twin. A header is read for C and C++ includers alike;
          // the guard's body only matters to C++, so it is read as a C++ compiler sees it.
          if (v === undefined && this.kind === "header" && isCxxGuard(name, args, toks.slice(d.at + 1 + d.toks.length, nextDir?.at ?? d.at), nextDir)) v = true;
          f.mode = v === undefined ? "maybe" : v ? "on" : "off";
          if (v === undefined) f.kept = true;
          if (v === true) f.done = true;
        }
        const own = name === "if" ? spellCond(args) : `${name === "ifndef" ? "!" : ""}defined(${args[0]?.t ?? "_"})`;
        f.conds = [own];
        if (f.mode === "maybe") f.cur = own;
        stack.push(f);
        return;
      }
      case "elif":
      case "else":
      case "elifdef":
      case "elifndef": {
        const f = stack[stack.length - 1];
        if (!f) return;
        closeBranch(f, d.s);
        this.region(file, text, f, d.s, emit);
        f.lines.push([d.s, d.e]);
        f.bodyStart = d.e;
        if (!f.outer) return;
        if (f.done) { f.mode = "off"; return; }
        let v: boolean | undefined;
        if (name === "else") v = true;
        else if (name === "elif") v = cond(args);
        else {
          const id = args[0]?.k === K.Ident ? args[0].t : undefined;
          v = id === undefined ? undefined : this.definedness(id);
          if (name === "elifndef" && v !== undefined) v = !v;
        }
        // after an undecided branch, a branch that would be taken is only "maybe"
        if (v === true && f.kept) v = undefined;
        f.mode = v === undefined ? "maybe" : v ? "on" : "off";
        if (v === undefined) f.kept = true;
        if (v === true) f.done = true;
        {
          const own = name === "else" ? "1" : name === "elif" ? spellCond(args) : `${name === "elifndef" ? "!" : ""}defined(${args[0]?.t ?? "_"})`;
          const prior = (f.conds ?? []).map((c) => `!(${c})`);
          f.cur = f.mode === "maybe" ? [...prior, `(${own})`].join(" && ") : undefined;
          (f.conds ??= []).push(own);
        }
        return;
      }
      case "endif": {
        const f = stack.pop();
        if (!f) return;
        closeBranch(f, d.s);
        this.region(file, text, f, d.s, emit);
        f.lines.push([d.s, d.e]);
        if (f.outer && !f.kept && emit) for (const [s, e] of f.lines) blank(s, e);
        return;
      }
    }
    if (!live) return;
    const undecided = this.undecidedContext(stack);
    switch (name) {
      case "define": {
        const def = parseDefine(args, file, lineOf(text, d.s));
        if (def) this.table.define(def, undecided);
        return;
      }
      case "undef": {
        const id = args[0]?.k === K.Ident ? args[0].t : undefined;
        if (id) this.table.undef(id, undecided);
        return;
      }
      case "include":
      case "include_next":
      case "import": {
        this.include(file, args);
        return;
      }
    }
  }

  private definedness(name: string): boolean | undefined {
    const e = this.table.map.get(name);
    if (e) return e.maybeUndef && !this.env.strict ? undefined : true;
    if (this.table.knownUndef.has(name)) return false;
    return this.env.strict ? false : undefined;
  }

  private include(from: string, args: Tok[]): void {
    if (!this.env.readInclude || this.depth >= MAX_INCLUDE_DEPTH) return;
    let path: string | undefined;
    let system = false;
    let a = args;
    if (a[0] && a[0].k !== K.String && a[0].t !== "<") {
      // `#include MACRO` (§6.10.2p4)
      try {
        a = new Expander(this.table, { maxSteps: 10_000 }).expandList(a);
      } catch { return; }
    }
    if (a[0]?.k === K.String && a[0].t.startsWith('"')) path = a[0].t.slice(1, -1);
    else if (a[0]?.t === "<") {
      system = true;
      path = a.slice(1, a.findIndex((x) => x.t === ">")).map((x) => x.t).join("");
    }
    if (!path) return;
    const src = this.env.readInclude(from, path, system);
    if (!src || this.included.has(src.file)) return;
    this.included.add(src.file);
    this.reads.push(src.file);
    this.readKeys.push(`${src.file}:${src.text.length}:${quickHash(src.text)}`);
    this.depth++;
    try {
      this.file(src.file, src.text, scanCached(src.text), false);
    } finally {
      this.depth--;
    }
  }

  /**
   * A use ferrule leaves unexpanded because a macro's definition depends on an undecided
   * condition (`bitfn(dav1d_cdef_dsp_init)` with `x##_8bpc` or `x##_16bpc` by BITDEPTH): the
   * identifiers each candidate reading would make, so a declaration of one of them is "may be
   * defined here", not "defined nowhere". At most 4 candidates per macro.
   */
  private noteUndecided(toks: Tok[], i: number, limit: number): void {
    const first = toks[i]!;
    const names = new Set<string>();
    let keepsName = false;
    let end = i;
    const variants = (name: string): MacroTable[] => {
      const e = this.table.map.get(name);
      if (!e) return [];
      return e.defs.slice(0, 4).map((d) => {
        const t = this.table.clone();
        t.map.set(name, { defs: [d], maybeUndef: false });
        return t;
      });
    };
    // the macro itself, or the first undecided macro its expansion meets
    // a macro that may be undefined keeps its name in that reading
    // (one candidate under an undecided condition; several are taken as the branches of one
    // #if/#else, which define it either way)
    const entry = this.table.map.get(first.t);
    // (an object-like renaming macro — zlib's `#define gzopen gzopen64` under one option, `#define
    // gzopen z_gzopen` under another — may be undefined under a third: the name itself stays one
    // of the readings; a function-like macro's name is no declarator name when it is undefined)
    if (entry?.maybeUndef && (entry.defs.length === 1 || entry.defs.every((d) => !d.params))) keepsName = true;
    let tables = variants(first.t);
    if (this.table.map.get(first.t)?.defs.length === 1 && !this.table.map.get(first.t)!.maybeUndef) {
      let inner: string | undefined;
      const probe = new Expander(this.table, { maxSteps: 5_000, onAmbiguous: (n) => { inner ??= n; return undefined; } });
      let at = i;
      try {
        const out: Tok[] = [];
        const r: Reader = { next: () => (at < limit ? toks[at++] : undefined), peek: () => (at < limit ? toks[at] : undefined) };
        probe.step(r, out);
        while (probe.hasPending()) probe.step(r, out);
      } catch { return; }
      if (!inner) return;
      tables = variants(inner);
    }
    for (const t of tables) {
      let at = i;
      const r: Reader = { next: () => (at < limit ? toks[at++] : undefined), peek: () => (at < limit ? toks[at] : undefined) };
      const ex = new Expander(t, { maxSteps: 5_000, onAmbiguous: () => undefined });
      const out: Tok[] = [];
      try {
        ex.step(r, out);
        while (ex.hasPending()) ex.step(r, out);
      } catch { continue; }
      end = Math.max(end, at - 1);
      for (const o of out) {
        if (o.k !== K.Ident) continue;
        if (o.t === first.t) keepsName = true;
        else names.add(o.t);
      }
    }
    if (names.size && names.size <= 64) this.undecided.push({ macro: first.t, names: [...names], s: first.s, e: toks[end]!.e, keepsName });
  }

  /** Expands the macro use starting at toks[i]; returns the index after what it consumed. */
  private expandAt(text: string, toks: Tok[], i: number, limit: number): number {
    const first = toks[i]!;
    const m = this.table.resolve(first.t);
    if (m === undefined) return i + 1;
    if (m === AMBIGUOUS) {
      if ((this.table.map.get(first.t)?.defs.length ?? 0) > 1) this.ambiguous.add(first.t);
      this.noteUndecided(toks, i, limit);
      return i + 1;
    }
    if (m.params && toks[i + 1]?.t !== "(") return i + 1;
    let at = i;
    const reader: Reader = {
      next: () => (at < limit ? toks[at++] : undefined),
      peek: () => (at < limit ? toks[at] : undefined),
    };
    // an expansion that runs into a macro ferrule cannot decide is not applied at all: half an
    // expansion would read as code nobody wrote
    let unsure: string | undefined;
    const ex = new Expander(this.table, { maxSteps: 50_000, onAmbiguous: (name) => { unsure ??= name; return undefined; } });
    const out: Tok[] = [];
    try {
      ex.step(reader, out);
      while (ex.hasPending()) ex.step(reader, out);
    } catch (e) {
      if (e instanceof ExpansionLimit) return i + 1;
      throw e;
    }
    if (unsure !== undefined) {
      if ((this.table.map.get(unsure)?.defs.length ?? 0) > 1) this.ambiguous.add(unsure);
      this.noteUndecided(toks, i, limit);
      return i + 1;
    }
    if (out.length === 1 && out[0] === first) return i + 1;
    const last = toks[at - 1]!;
    const spelled = spell(out.map((t, j) => (j === 0 ? { ...t, sp: false } : t)));
    let rep = spelled;
    const span = text.slice(first.s, last.e);
    if (span.includes("\n")) {
      for (let k = span.indexOf("\n"); k >= 0; k = span.indexOf("\n", k + 1)) rep += "\n";
      rep += " ".repeat(last.e - lineStart(text, last.e));
    }
    this.edits.push({ s: first.s, e: last.e, text: rep, expand: true });
    this.expansions++;
    return at;
  }
}

function lineOf(text: string, at: number): number {
  let n = 0;
  for (let k = text.indexOf("\n"); k >= 0 && k < at; k = text.indexOf("\n", k + 1)) n++;
  return n;
}

function quickHash(s: string): string {
  let h = 2166136261;
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 16777619);
  return (h >>> 0).toString(36);
}

interface Seg {
  outStart: number;
  outEnd: number;
  srcStart: number;
  srcEnd: number;
}

/** Preprocesses one file (never throws on bad input; an internal limit leaves the text as is). */
export function preprocess(file: string, text: string, env: PreprocEnv): PreprocResult {
  const run = new Run(env, env.asCxx ? "cpp" : langKindOf(file));
  if (!hasDirective(text) && ![...run.table.map.keys()].some((k) => text.includes(k))) {
    // no directive (so no include and no #define) and no predefined or configured macro named:
    // nothing to expand, and no token stream to build
    return { text, changed: false, mapCol: (_l, c) => c, reads: [], envKey: quickHash(JSON.stringify([env.targets, env.defines ?? {}, env.strip ?? [], !!env.strict, !!env.asCxx, []])), ambiguous: [], undecided: [], expansions: 0, regions: [] };
  }
  run.included.add(file);
  run.file(file, text, scanCached(text), true);
  const envKey = quickHash(JSON.stringify([env.targets, env.defines ?? {}, env.strip ?? [], !!env.strict, !!env.asCxx, run.readKeys]));
  const edits = run.edits.sort((a, b) => a.s - b.s);
  const base = { reads: run.reads, envKey, ambiguous: [...run.ambiguous], undecided: run.undecided, expansions: run.expansions, regions: run.regions };
  if (edits.length === 0) return { text, changed: false, mapCol: (_l, c) => c, ...base };
  const parts: string[] = [];
  const segs = new Map<number, Seg[]>();
  let pos = 0;
  let line = 0;
  let outCol = 0;
  const advance = (chunk: string) => {
    parts.push(chunk);
    const nl = chunk.lastIndexOf("\n");
    if (nl < 0) { outCol += chunk.length; return; }
    for (let k = chunk.indexOf("\n"); k >= 0; k = chunk.indexOf("\n", k + 1)) line++;
    outCol = chunk.length - nl - 1;
  };
  for (const ed of edits) {
    if (ed.s < pos) continue; // overlapping (should not happen): keep the first
    advance(text.slice(pos, ed.s));
    if (ed.expand) {
      const ls = lineStart(text, ed.s);
      const firstLineEnd = text.indexOf("\n", ed.s);
      const sameLine = firstLineEnd < 0 || firstLineEnd >= ed.e;
      const spelledLen = ed.text.indexOf("\n") < 0 ? ed.text.length : ed.text.indexOf("\n");
      const seg: Seg = { outStart: outCol, outEnd: outCol + spelledLen, srcStart: ed.s - ls, srcEnd: sameLine ? ed.e - ls : firstLineEnd - ls };
      const arr = segs.get(line);
      if (arr) arr.push(seg);
      else segs.set(line, [seg]);
    }
    advance(ed.text);
    pos = ed.e;
  }
  parts.push(text.slice(pos));
  const out = parts.join("");
  const mapCol = (l: number, c: number, end = false): number => {
    const arr = segs.get(l);
    if (!arr) return c;
    let shift = 0;
    for (const s of arr) {
      if (c < s.outStart) return c - shift;
      // a start inside an expansion is the macro use's start; an end inside it, the use's end
      if (!end) {
        if (c < s.outEnd) return s.srcStart;
        if (c === s.outEnd) return s.srcEnd;
      } else {
        if (c === s.outStart) return s.srcStart;
        if (c <= s.outEnd) return s.srcEnd;
      }
      shift = s.outEnd - s.srcEnd;
    }
    return c - shift;
  };
  return { text: out, changed: out !== text, mapCol, ...base };
}
