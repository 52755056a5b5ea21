// Macro table and macro replacement (C11 §6.10.3): object-like and function-like macros, `#`
// (§6.10.3.2), `##` (§6.10.3.3), `__VA_ARGS__` (§6.10.3.1; with the common-practice GNU
// `, ## __VA_ARGS__` comma deletion), rescanning with hide sets (§6.10.3.4: a macro's own name
// is not replaced again inside its expansion, and a name skipped that way stays skipped).
//
// ferrule reads code without its build: a macro may be defined differently in branches of a
// conditional it cannot decide (a configuration macro nobody defined, a target-dependent one).
// Such a macro keeps every candidate definition; `resolve` picks one only when the choice cannot
// change what ferrule reads (all the same, or all export/attribute/linkage spellings), and
// otherwise says the macro is ambiguous, so its uses stay unexpanded (today's reading).

import { K, spell, tokenize, type Tok } from "./lexer.js";

export interface MacroDef {
  name: string;
  /** Parameter names of a function-like macro (`__VA_ARGS__` last when variadic). */
  params?: string[];
  variadic?: boolean;
  body: Tok[];
  /** Where it was defined (for messages). */
  file?: string;
  line?: number;
}

export interface MacroEntry {
  /** Candidate definitions (more than one only from branches ferrule could not decide). */
  defs: MacroDef[];
  /** Defined only inside an undecided branch: `defined(NAME)` is not known. */
  maybeUndef: boolean;
}

export const AMBIGUOUS = Symbol("ambiguous");

/** Annotations the extractor reads as written (clang bounds-safety and nullability spellings, with
 * the empty fallbacks headers define for other compilers): never replaced. */
const READ_AS_WRITTEN = new Set([
  "__counted_by", "__sized_by", "__counted_by_or_null", "__sized_by_or_null", "__ended_by",
  "_Nullable", "_Nonnull", "_Null_unspecified", "__nullable", "__nonnull",
]);

const ATTR_WORDS = new Set([
  "__attribute__", "__attribute", "__declspec", "__cdecl", "__stdcall", "__fastcall", "__vectorcall", "__thiscall",
  "_cdecl", "_stdcall", "cdecl", "extern", "static", "inline", "__inline", "__inline__", "__forceinline", "_Noreturn",
  "__extension__", "noexcept", "throw",
]);

export class MacroTable {
  readonly map = new Map<string, MacroEntry>();
  /** Names known not to be defined (a #undef, or a predefined macro of none of the targets). */
  readonly knownUndef = new Set<string>();
  /** Names whose definedness depends on the target (defined on some configured targets only, or
   * with different values): `#if` on them is undecided in a target-neutral reading. */
  readonly targetDependent = new Set<string>();
  /** The C standard's reading (the oracle's): every definition seen counts. */
  strictRead = false;

  define(d: MacroDef, undecided: boolean): void {
    const old = this.map.get(d.name);
    this.knownUndef.delete(d.name);
    if (!undecided || !old) {
      this.map.set(d.name, { defs: [d], maybeUndef: undecided });
      return;
    }
    if (!old.defs.some((x) => sameDef(x, d))) old.defs.push(d);
  }

  undef(name: string, undecided: boolean): void {
    if (!undecided) {
      this.map.delete(name);
      this.knownUndef.add(name);
      return;
    }
    const e = this.map.get(name);
    if (e) e.maybeUndef = true;
  }

  /** The definition to expand, AMBIGUOUS when candidates disagree, undefined when not a macro. */
  private resolving = new Set<string>();

  resolve(name: string): MacroDef | typeof AMBIGUOUS | undefined {
    if (this.resolving.has(name) || this.resolving.size > 16) return AMBIGUOUS;
    this.resolving.add(name);
    try {
      return this.resolveNow(name);
    } finally {
      this.resolving.delete(name);
    }
  }

  private resolveNow(name: string): MacroDef | typeof AMBIGUOUS | undefined {
    const e = this.map.get(name);
    if (!e || READ_AS_WRITTEN.has(name)) return undefined;
    const first = e.defs[0]!;
    if (e.maybeUndef && !this.strictRead) {
      // defined only under a condition ferrule cannot decide: left as written unless every
      // candidate only spells attributes (then expanding it cannot change the declaration)
      const attr = e.defs.every((d) => !d.params === !first.params && this.attributeLike(d.body, 0));
      if (!attr) return AMBIGUOUS;
    }
    if (e.defs.length === 1) return first;
    if (e.defs.every((d) => sameDef(d, first))) return first;
    if (e.defs.every((d) => !d.params === !first.params && this.attributeLike(d.body, 0))) {
      // export / attribute / linkage spellings: prefer the GCC attribute form (what the layout
      // reading understands), then any non-empty one
      return e.defs.find((d) => d.body.some((t) => t.t === "__attribute__" || t.t === "__attribute")) ?? e.defs.find((d) => d.body.length > 0) ?? first;
    }
    return AMBIGUOUS;
  }

  /** Whether a body only spells attributes, storage/linkage words, `extern "C" {` or `}`. */
  attributeLike(body: readonly Tok[], depth: number): boolean {
    let paren = 0;
    for (let i = 0; i < body.length; i++) {
      const t = body[i]!;
      if (t.t === "(") { paren++; continue; }
      if (t.t === ")") { paren--; continue; }
      if (paren > 0) continue;
      if (t.k === K.Ident) {
        if (ATTR_WORDS.has(t.t)) continue;
        const m = depth < 8 ? this.resolve(t.t) : undefined;
        if (m && m !== AMBIGUOUS && !m.params && this.attributeLike(m.body, depth + 1)) continue;
        if (m && m !== AMBIGUOUS && m.params && body[i + 1]?.t === "(" && this.attributeLike(m.body, depth + 1)) continue;
        return false;
      }
      if (t.k === K.String && (t.t === '"C"' || t.t === '"C++"')) continue;
      if (t.t === "{" || t.t === "}") continue;
      if (t.t === "[" && (body[i + 1]?.t === "[" || body[i - 1]?.t === "[")) {
        // C2x/C++11 attribute `[[...]]`
        let depthB = 0;
        for (; i < body.length; i++) {
          if (body[i]!.t === "[") depthB++;
          else if (body[i]!.t === "]" && --depthB === 0) break;
        }
        continue;
      }
      return false;
    }
    return true;
  }

  clone(): MacroTable {
    const t = new MacroTable();
    for (const [k, v] of this.map) t.map.set(k, { defs: [...v.defs], maybeUndef: v.maybeUndef });
    for (const k of this.knownUndef) t.knownUndef.add(k);
    for (const k of this.targetDependent) t.targetDependent.add(k);
    t.strictRead = this.strictRead;
    return t;
  }
}

function sameDef(a: MacroDef, b: MacroDef): boolean {
  if (!!a.params !== !!b.params || a.variadic !== b.variadic) return false;
  if (a.params && a.params.join(",") !== b.params!.join(",")) return false;
  if (a.body.length !== b.body.length) return false;
  return a.body.every((t, i) => t.t === b.body[i]!.t);
}

/** A #define's tokens (after the `define` word) → a definition, or undefined when malformed. */
export function parseDefine(toks: readonly Tok[], file?: string, line?: number): MacroDef | undefined {
  const nameTok = toks[0];
  if (!nameTok || nameTok.k !== K.Ident) return undefined;
  const d: MacroDef = { name: nameTok.t, body: [], file, line };
  let i = 1;
  // function-like only when `(` follows the name with no white space (§6.10.3p3)
  if (toks[1] && toks[1].t === "(" && !toks[1].sp) {
    const params: string[] = [];
    i = 2;
    let ok = false;
    while (i < toks.length) {
      const t = toks[i]!;
      if (t.t === ")") { ok = true; i++; break; }
      if (t.t === ",") { i++; continue; }
      if (t.t === "...") { d.variadic = true; params.push("__VA_ARGS__"); i++; continue; }
      if (t.k === K.Ident) {
        // GNU named variadic parameter `args...`
        if (toks[i + 1]?.t === "...") { d.variadic = true; params.push(t.t); i += 2; continue; }
        params.push(t.t);
        i++;
        continue;
      }
      return undefined;
    }
    if (!ok) return undefined;
    d.params = params;
  }
  d.body = toks.slice(i).map((t, j) => ({ ...t, sp: j === 0 ? false : t.sp, bol: false }));
  return d;
}

const PLACEMARKER: Tok = { k: K.Special, t: "", s: -1, e: -1, sp: false, bol: false };

/** A source of tokens the expander pulls from: expansion output first, then `more`. */
export interface Reader {
  next(): Tok | undefined;
  peek(): Tok | undefined;
}

export class ListReader implements Reader {
  private i = 0;
  constructor(private readonly toks: readonly Tok[]) {}
  next(): Tok | undefined { return this.toks[this.i++]; }
  peek(): Tok | undefined { return this.toks[this.i]; }
}

export interface ExpandOptions {
  /** In `#if`: what an ambiguous macro expands to (an unknown value). */
  onAmbiguous?: (name: string) => Tok[] | undefined;
  /** Called for every macro expanded (name and its definition). */
  onUse?: (d: MacroDef) => void;
  maxSteps?: number;
}

export class ExpansionLimit extends Error {}

/**
 * Macro replacement over a reader. `pending` holds tokens produced by expansions, read before the
 * reader (§6.10.3.4: the result is rescanned together with the rest of the source).
 */
export class Expander {
  private pending: Tok[] = []; // a stack: the next token is the last element
  steps = 0;

  constructor(readonly table: MacroTable, private readonly opts: ExpandOptions = {}) {}

  hasPending(): boolean {
    return this.pending.length > 0;
  }

  private next(r: Reader): Tok | undefined {
    return this.pending.length ? this.pending.pop() : r.next();
  }

  private peek(r: Reader): Tok | undefined {
    return this.pending.length ? this.pending[this.pending.length - 1] : r.peek();
  }

  private pushFront(toks: Tok[]): void {
    for (let i = toks.length - 1; i >= 0; i--) this.pending.push(toks[i]!);
  }

  /** Expands one token (taken from `r`) and appends what it yields to `out`. Returns false at the end. */
  step(r: Reader, out: Tok[]): boolean {
    const t = this.next(r);
    if (!t) return false;
    if (t.k !== K.Ident || t.blue) { out.push(t); return true; }
    const m = this.table.resolve(t.t);
    if (m === undefined) { out.push(t); return true; }
    if (m === AMBIGUOUS) {
      const rep = this.opts.onAmbiguous?.(t.t);
      if (rep) this.pushFront(rep.map((x) => ({ ...x, sp: t.sp })));
      else out.push(t);
      return true;
    }
    if (t.hs?.has(t.t)) { out.push({ ...t, blue: true }); return true; }
    if (++this.steps > (this.opts.maxSteps ?? 200_000)) throw new ExpansionLimit("macro expansion too long");
    let hs: Set<string>;
    let body: Tok[];
    if (m.params) {
      const p = this.peek(r);
      if (!p || p.t !== "(") { out.push(t); return true; }
      this.next(r);
      const args = this.collectArgs(r);
      if (!args) { out.push(t); return true; }
      const { list, close } = args;
      if (!fitArgs(m, list)) { out.push(t); return true; }
      hs = new Set<string>();
      if (t.hs && close.hs) for (const h of t.hs) if (close.hs.has(h)) hs.add(h);
      hs.add(m.name);
      body = this.subst(m, list, hs);
    } else {
      hs = new Set(t.hs ?? []);
      hs.add(m.name);
      body = this.subst(m, [], hs);
    }
    this.opts.onUse?.(m);
    if (body.length) body[0] = { ...body[0]!, sp: t.sp };
    this.pushFront(body);
    return true;
  }

  /** Arguments of an invocation after its `(`: split at top-level commas; undefined if unterminated. */
  private collectArgs(r: Reader): { list: Tok[][]; close: Tok } | undefined {
    const list: Tok[][] = [[]];
    let depth = 0;
    for (let guard = 0; guard < 1_000_000; guard++) {
      const t = this.next(r);
      if (!t) return undefined;
      if (t.t === "(") depth++;
      else if (t.t === ")") {
        if (depth === 0) return { list, close: t };
        depth--;
      } else if (t.t === "," && depth === 0) {
        list.push([]);
        continue;
      }
      list[list.length - 1]!.push(t);
    }
    return undefined;
  }

  /** Fully macro-replaced copy of a token list (an argument, §6.10.3.1). */
  expandList(toks: readonly Tok[]): Tok[] {
    const sub = new Expander(this.table, this.opts);
    sub.steps = this.steps;
    const r = new ListReader(toks);
    const out: Tok[] = [];
    while (sub.step(r, out));
    this.steps = sub.steps;
    return out;
  }

  private subst(m: MacroDef, args: Tok[][], hs: Set<string>): Tok[] {
    const params = m.params ?? [];
    const body = m.body;
    const out: Tok[] = [];
    const expanded = new Map<number, Tok[]>();
    const argOf = (t: Tok): number => (t.k === K.Ident ? params.indexOf(t.t) : -1);
    const argToks = (ix: number): Tok[] => {
      if (ix === params.length - 1 && m.variadic) {
        // the variable arguments, with their commas (§6.10.3.1p2)
        const rest: Tok[] = [];
        for (let j = ix; j < args.length; j++) {
          if (j > ix) rest.push({ k: K.Punct, t: ",", s: -1, e: -1, sp: false, bol: false });
          rest.push(...(args[j] ?? []));
        }
        return rest;
      }
      return args[ix] ?? [];
    };
    for (let i = 0; i < body.length; i++) {
      const t = body[i]!;
      // `#param` → a string literal (§6.10.3.2)
      if ((t.t === "#" || t.t === "%:") && m.params) {
        const nx = body[i + 1];
        const ix = nx ? argOf(nx) : -1;
        if (ix >= 0) {
          out.push({ k: K.String, t: stringize(argToks(ix)), s: -1, e: -1, sp: t.sp, bol: false });
          i++;
          continue;
        }
      }
      if (t.t === "##" || t.t === "%:%:") {
        const nx = body[i + 1];
        if (!nx) continue;
        i++;
        let rhs: Tok[];
        const ix = argOf(nx);
        if (ix >= 0) {
          rhs = argToks(ix);
          // GNU: `, ## __VA_ARGS__` drops the comma when the variable arguments are empty
          if (rhs.length === 0 && m.variadic && ix === params.length - 1 && out.length && out[out.length - 1]!.t === ",") {
            out.pop();
            continue;
          }
          if (rhs.length === 0) rhs = [PLACEMARKER];
        } else rhs = [nx];
        const lhs = out.pop() ?? PLACEMARKER;
        out.push(paste(lhs, rhs[0]!), ...rhs.slice(1));
        continue;
      }
      const ix = argOf(t);
      if (ix >= 0) {
        if (body[i + 1]?.t === "##" || body[i + 1]?.t === "%:%:") {
          const a = argToks(ix);
          out.push(...(a.length ? a.map((x, j) => (j === 0 ? { ...x, sp: t.sp } : x)) : [PLACEMARKER]));
        } else {
          let e = expanded.get(ix);
          if (!e) { e = this.expandList(argToks(ix)); expanded.set(ix, e); }
          out.push(...e.map((x, j) => (j === 0 ? { ...x, sp: t.sp } : x)));
        }
        continue;
      }
      out.push(t);
    }
    const res: Tok[] = [];
    // tokens of one argument share their hide set: one union per distinct set
    const unions = new Map<ReadonlySet<string>, ReadonlySet<string>>();
    for (const t of out) {
      if (t.k === K.Special && t.t === "") continue;
      let h: ReadonlySet<string> = hs;
      if (t.hs && t.hs !== hs) {
        let u = unions.get(t.hs);
        if (!u) {
          let sub = true;
          for (const x of hs) if (!t.hs.has(x)) { sub = false; break; }
          if (sub) u = t.hs;
          else { const n = new Set(t.hs); for (const x of hs) n.add(x); u = n; }
          unions.set(t.hs, u);
        }
        h = u;
      }
      res.push({ k: t.k, t: t.t, s: -1, e: -1, sp: t.sp, bol: false, hs: h, blue: t.blue });
    }
    return res;
  }
}

function fitArgs(m: MacroDef, args: Tok[][]): boolean {
  const n = m.params!.length;
  if (n === 0) return args.length === 1 && args[0]!.length === 0;
  if (m.variadic) {
    if (args.length < n - 1) return false;
    if (args.length === n - 1) args.push([]); // `f(a)` for `f(x, ...)`: empty variable arguments
    return true;
  }
  return args.length === n;
}

function stringize(toks: readonly Tok[]): string {
  let s = "";
  toks.forEach((t, i) => {
    if (i > 0 && t.sp) s += " ";
    if (t.k === K.String || t.k === K.Char) s += t.t.split("\\").join("\\\\").split('"').join('\\"');
    else s += t.t;
  });
  return `"${s}"`;
}

function paste(a: Tok, b: Tok): Tok {
  if (a.k === K.Special) return b;
  if (b.k === K.Special) return a;
  const text = a.t + b.t;
  const r = tokenize(text);
  if (r.length === 1) return { ...r[0]!, sp: a.sp, s: -1, e: -1, bol: false, hs: a.hs };
  // not a valid token (undefined behaviour; compilers diagnose it): keep the spelling
  return { k: K.Other, t: text, s: -1, e: -1, sp: a.sp, bol: false, hs: a.hs };
}

export { spell };
