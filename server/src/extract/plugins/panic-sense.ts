// Value reasoning for the panic sites of one Rust function body (used by the ownership
// extractor): what the code around a site already rules out.
//
//   guards        the branch of an `if` (and the body of a `while`) knows its condition; the code
//                 after `if c { return … }` (a branch that diverges: return, break, continue,
//                 panic!) knows `!c`. Conditions are read as conjunctions of simple facts:
//                 `n >= k`, `a > b`, `i < len`, `n != 0`, `x.is_none()`, `p.is_null()`, `v.is_empty()`.
//                 An assignment to the name between the guard and the site drops the fact.
//   loops         `for i in a..b` gives `i >= a` and `i < b`; `for (i, _) in x.iter().enumerate()`
//                 gives `i < x.len()`.
//   lengths       a slice made with `from_raw_parts(p, n)`, `vec![v; n]`, `[v; n]`, a parameter
//                 `&[T; N]`, or a local `let x: [T; N]` has length `n`/`N`.
//   bounded       `e & M`, `e % K`, products and sums of those and of literals have a maximum;
//                 a local whose every assignment is `… % k` stays below `k`.
//
// The facts are what rustc's own arithmetic would give on every path; a fact the code does not
// spell in one of these shapes is simply not known (the site stays reported, at its severity).
// Integer overflow and out-of-bounds indexing panic as the Rust Reference says ("Arithmetic and
// logical binary operators", "Overflow"; "Array and slice indexing expressions").

import type { Node } from "../../parse/parser.js";
import { parseText } from "../../parse/parser.js";

/** `a` is an expression's text without spaces; `r` the local it starts from (an assignment to it
 * between the fact's place and a site drops the fact). */
export type Fact =
  | { k: "ge"; a: string; r?: string; v: number }
  | { k: "gt"; a: string; r?: string; b: string; strict: boolean }
  | { k: "lt"; a: string; r?: string; b: string; incl?: boolean }
  | { k: "some"; a: string; r?: string };

/** The local an expression starts from: `x` of `x`, `x.f`, `x.len()`, `(*x).f`, `x[i]`. */
export function rootName(n: Node | null | undefined, depth = 0): string | undefined {
  const u = uncast(n);
  if (!u || depth > 12) return undefined;
  switch (u.type) {
    case "identifier": case "self": return u.text;
    case "field_expression": return rootName(u.childForFieldName("value"), depth + 1);
    case "index_expression": return rootName(u.namedChild(0), depth + 1);
    case "unary_expression": case "reference_expression": return rootName(u.namedChildren[u.namedChildCount - 1], depth + 1);
    case "call_expression": {
      const f = u.childForFieldName("function");
      return f?.type === "field_expression" ? rootName(f.childForFieldName("value"), depth + 1) : undefined;
    }
  }
  return undefined;
}

function withRoot(fs: Fact[], r: string | undefined): Fact[] {
  return r ? fs.map((f) => ({ ...f, r })) : fs;
}

interface Placed { start: number; end: number; f: Fact }

/** Expression text without spaces (`self . n` → `self.n`). Whitespace only: never a parse. */
export function norm(n: Node | null | undefined): string {
  return (n?.text ?? "").replace(/\s+/g, "");
}

export function unparen(n: Node | null | undefined): Node | null | undefined {
  while (n?.type === "parenthesized_expression") n = n.namedChild(0);
  return n;
}

/** `x as T` and parentheses stripped (a cast keeps the value for the facts read here). */
export function uncast(n: Node | null | undefined): Node | null | undefined {
  for (let i = 0; n && i < 8; i++) {
    if (n.type === "parenthesized_expression") n = n.namedChild(0);
    else if (n.type === "type_cast_expression") n = n.childForFieldName("value");
    else break;
  }
  return n;
}

export function intLit(n: Node | null | undefined): number | undefined {
  const u = uncast(n);
  if (u?.type !== "integer_literal") return undefined;
  const t = u.text.replace(/_/g, "").replace(/(usize|isize|u\d+|i\d+)$/, "");
  const v = t.startsWith("0x") ? parseInt(t.slice(2), 16) : t.startsWith("0b") ? parseInt(t.slice(2), 2) : t.startsWith("0o") ? parseInt(t.slice(2), 8) : Number(t);
  return Number.isSafeInteger(v) ? v : undefined;
}

function opOf(n: Node): string {
  return (n.childForFieldName("operator") ?? n.child(1))?.text ?? "";
}

const NEG: Record<string, string> = { "<": ">=", "<=": ">", ">": "<=", ">=": "<", "==": "!=", "!=": "==" };
const FLIP: Record<string, string> = { "<": ">", "<=": ">=", ">": "<", ">=": "<=", "==": "==", "!=": "!=" };

/** The facts a condition gives when it is `positive` (true) or false. */
export function condFacts(c: Node | null | undefined, positive: boolean, depth = 0): Fact[] {
  const u = unparen(c);
  if (!u || depth > 12) return [];
  if (u.type === "unary_expression" && u.child(0)?.text === "!") return condFacts(u.namedChild(0), !positive, depth + 1);
  if (u.type === "call_expression") {
    const f = u.childForFieldName("function");
    if (f?.type === "field_expression") {
      const m = f.childForFieldName("field")?.text;
      const recv = norm(f.childForFieldName("value"));
      const r = rootName(f.childForFieldName("value"));
      if (!positive && (m === "is_none" || m === "is_err" || m === "is_null")) return withRoot([{ k: "some", a: recv }], r);
      if (positive && (m === "is_some" || m === "is_ok")) return withRoot([{ k: "some", a: recv }], r);
      if (!positive && m === "is_empty") return withRoot([{ k: "ge", a: `${recv}.len()`, v: 1 }], r);
      // `(lo..=hi).contains(&x)` / `(lo..hi).contains(&x)`
      const range = unparen(f.childForFieldName("value"));
      const arg = u.childForFieldName("arguments")?.namedChildren.find((c) => !c.type.endsWith("comment"));
      if (positive && m === "contains" && range?.type === "range_expression" && arg) {
        const x = arg.type === "reference_expression" ? arg.childForFieldName("value") : arg;
        const kids = range.namedChildren;
        const lo = kids.length === 2 ? intLit(kids[0]) : undefined;
        if (x && lo !== undefined) return withRoot([{ k: "ge", a: norm(uncast(x)), v: lo }], rootName(x));
      }
    }
    return [];
  }
  if (u.type !== "binary_expression") return [];
  let op = opOf(u);
  if (op === "&&") return positive ? [...condFacts(u.childForFieldName("left"), true, depth + 1), ...condFacts(u.childForFieldName("right"), true, depth + 1)] : [];
  if (op === "||") return positive ? [] : [...condFacts(u.childForFieldName("left"), false, depth + 1), ...condFacts(u.childForFieldName("right"), false, depth + 1)];
  if (!NEG[op]) return [];
  if (!positive) op = NEG[op]!;
  let l = uncast(u.childForFieldName("left"));
  let r = uncast(u.childForFieldName("right"));
  if (!l || !r) return [];
  // literal on the left: `2 <= n` is `n >= 2`
  if (intLit(l) !== undefined && intLit(r) === undefined) { [l, r] = [r, l]; op = FLIP[op]!; }
  return [...compareFacts(l, op, r)];
}

function compareFacts(l: Node, op: string, r: Node): Fact[] {
  const a = norm(l);
  const ra = rootName(l);
  const rb = rootName(r);
  const v = intLit(r);
  const out = (fs: Fact[]): Fact[] => fs.map((f) => {
    const root = f.a === a ? ra : rb;
    return root ? { ...f, r: root } : f;
  });
  if (v !== undefined) return out(litFacts(a, op, v));
  const b = norm(r);
  switch (op) {
    case ">": return out([{ k: "gt", a, b, strict: true }, { k: "lt", a: b, b: a }, { k: "ge", a, v: 1 }]);
    case ">=": return out([{ k: "gt", a, b, strict: false }, { k: "lt", a: b, b: a, incl: true }]);
    case "<": return out([{ k: "lt", a, b }, { k: "gt", a: b, b: a, strict: true }, { k: "ge", a: b, v: 1 }]);
    case "<=": return out([{ k: "lt", a, b, incl: true }, { k: "gt", a: b, b: a, strict: false }]);
  }
  return [];
}

function litFacts(a: string, op: string, v: number): Fact[] {
  {
    switch (op) {
      case ">": return [{ k: "ge", a, v: v + 1 }];
      case ">=": return [{ k: "ge", a, v }];
      case "==": return v >= 1 ? [{ k: "ge", a, v }] : [];
      case "!=": return v === 0 ? [{ k: "ge", a, v: 1 }] : [];
      case "<": return [{ k: "lt", a, b: String(v) }];
      case "<=": return [{ k: "lt", a, b: String(v), incl: true }];
    }
    return [];
  }
}

const PANIC_MACROS = new Set(["panic", "unreachable", "todo", "unimplemented"]);

/** Whether a block (or a single expression) never finishes normally: return, break, continue, a
 * panicking macro, `process::exit`/`abort`. */
export function diverges(n: Node | null | undefined, depth = 0): boolean {
  const u = unparen(n);
  if (!u || depth > 8) return false;
  switch (u.type) {
    case "return_expression": case "break_expression": case "continue_expression": return true;
    case "macro_invocation": return PANIC_MACROS.has((u.childForFieldName("macro")?.text ?? "").split("::").pop() ?? "");
    case "call_expression": {
      const f = norm(u.childForFieldName("function"));
      return /(^|::)(exit|abort)$/.test(f) && /process::|^(exit|abort)$/.test(f);
    }
    case "expression_statement": return diverges(u.namedChild(0), depth + 1);
    case "block": case "unsafe_block": {
      const b = u.type === "unsafe_block" ? u.namedChildren.find((c) => c.type === "block") : u;
      const kids = b?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
      return kids.length > 0 && diverges(kids[kids.length - 1], depth + 1);
    }
  }
  return false;
}

/** Facts placed over byte ranges of one function body, filled while its walk reaches if/while/for
 * expressions and blocks (in document order, before the sites inside them). */
export class ValueFacts {
  private placed: Placed[] = [];
  private assigns = new Map<string, number[]>();
  /** Slice/array lengths known by name (`x` → `n`). */
  readonly lens = new Scoped<string>();
  /** Locals whose every assignment is `… % k` (name → k's text). */
  readonly modBounded = new Map<string, string>();

  place(start: number, end: number, fs: Fact[]): void {
    for (const f of fs) this.placed.push({ start, end, f });
  }

  noteAssign(name: string, at: number): void {
    const a = this.assigns.get(name) ?? [];
    a.push(at);
    this.assigns.set(name, a);
  }

  /** The facts that hold at `n`. */
  at(n: Node): Fact[] {
    const s = n.startIndex;
    const e = n.endIndex;
    const out: Fact[] = [];
    for (const p of this.placed) {
      if (s < p.start || e > p.end) continue;
      const name = p.f.r;
      if (name && (this.assigns.get(name) ?? []).some((x) => x >= p.start && x < s)) continue;
      out.push(p.f);
    }
    return out;
  }

  onIf(n: Node): void {
    const cond = n.childForFieldName("condition");
    if (!cond || cond.type === "let_condition" || cond.type === "let_chain") return;
    const cons = n.childForFieldName("consequence");
    if (cons) this.place(cons.startIndex, cons.endIndex, condFacts(cond, true));
    const alt = n.childForFieldName("alternative");
    if (alt) this.place(alt.startIndex, alt.endIndex, condFacts(cond, false));
  }

  onWhile(n: Node): void {
    const cond = n.childForFieldName("condition");
    const body = n.childForFieldName("body");
    if (cond && body && cond.type !== "let_condition") this.place(body.startIndex, body.endIndex, condFacts(cond, true));
  }

  onFor(n: Node): void {
    const pat = n.childForFieldName("pattern");
    const val = unparen(n.childForFieldName("value"));
    const body = n.childForFieldName("body");
    if (!pat || !val || !body) return;
    const fs: Fact[] = [];
    if (pat.type === "identifier" && val.type === "range_expression") {
      const kids = val.namedChildren;
      const dots = val.children.find((c) => c.type === ".." || c.type === "..=" || c.text === ".." || c.text === "..=");
      const lo = kids.length === 2 ? kids[0] : dots && kids[0] && kids[0].startIndex < dots.startIndex ? kids[0] : undefined;
      const hi = kids.length === 2 ? kids[1] : dots && kids[0] && kids[0].startIndex > dots.startIndex ? kids[0] : undefined;
      const lv = lo ? intLit(lo) : undefined;
      if (lv !== undefined) fs.push({ k: "ge", a: pat.text, r: pat.text, v: lv });
      if (hi) fs.push({ k: "lt", a: pat.text, r: pat.text, b: norm(uncast(hi)), incl: dots?.text === "..=" });
    }
    // for (i, _) in x.iter().enumerate() / x.iter_mut().enumerate()
    if (pat.type === "tuple_pattern" && val.type === "call_expression") {
      const f = val.childForFieldName("function");
      const i = pat.namedChild(0);
      if (f?.type === "field_expression" && f.childForFieldName("field")?.text === "enumerate" && i?.type === "identifier") {
        const inner = unparen(f.childForFieldName("value"));
        const g = inner?.type === "call_expression" ? inner.childForFieldName("function") : undefined;
        if (g?.type === "field_expression" && ["iter", "iter_mut", "into_iter"].includes(g.childForFieldName("field")?.text ?? "")) {
          fs.push({ k: "lt", a: i.text, r: i.text, b: `${norm(g.childForFieldName("value"))}.len()` });
        }
      }
    }
    this.place(body.startIndex, body.endIndex, fs);
  }

  /** `if c { return … }` as a statement of a block: the rest of the block knows `!c`. */
  onBlock(b: Node): void {
    const kids = b.namedChildren;
    for (let i = 0; i < kids.length - 1; i++) {
      let k = kids[i]!;
      if (k.type === "expression_statement") k = k.namedChild(0) ?? k;
      if (k.type !== "if_expression" || k.childForFieldName("alternative")) continue;
      const cond = k.childForFieldName("condition");
      if (!cond || cond.type === "let_condition" || cond.type === "let_chain" || !diverges(k.childForFieldName("consequence"))) continue;
      this.place(k.endIndex, b.endIndex, condFacts(cond, false));
    }
  }

  /** Facts of `n`: does `a >= v` hold (directly, or as `a > x` / `x < a` for v = 1)? */
  atLeast(facts: Fact[], a: string, v: number): boolean {
    for (const f of facts) {
      if (f.k === "ge" && f.a === a && f.v >= v) return true;
      if (v <= 1 && f.k === "gt" && f.a === a && f.strict) return true;
      if (v <= 1 && f.k === "lt" && f.b === a && !f.incl) return true;
    }
    return false;
  }

  atLeastName(facts: Fact[], a: string, b: string): boolean {
    return facts.some((f) => (f.k === "gt" && f.a === a && f.b === b) || (f.k === "lt" && f.a === b && f.b === a));
  }

  /** `a < b` for some bound b (so `a + 1` cannot overflow). */
  below(facts: Fact[], a: string): string | undefined {
    for (const f of facts) if (f.k === "lt" && f.a === a && !f.incl) return f.b;
    return undefined;
  }

  isSome(facts: Fact[], a: string): boolean {
    return facts.some((f) => f.k === "some" && f.a === a);
  }
}

/** The largest value an index expression can take, when its shape bounds it (`e & 15` → 15,
 * `e % 8` → 7, `(y & 15) * 2` → 30); `consts` resolves names of integer consts. */
export function maxOf(n: Node | null | undefined, consts: (name: string) => number | undefined, depth = 0): number | undefined {
  const u = uncast(n);
  if (!u || depth > 10) return undefined;
  const lit = intLit(u);
  if (lit !== undefined) return lit;
  if (u.type === "identifier") return /^[A-Z][A-Z0-9_]*$/.test(u.text) ? consts(u.text) : undefined;
  if (u.type !== "binary_expression") return undefined;
  const op = opOf(u);
  const l = u.childForFieldName("left");
  const r = u.childForFieldName("right");
  const ml = maxOf(l, consts, depth + 1);
  const mr = maxOf(r, consts, depth + 1);
  switch (op) {
    case "&": {
      const m = [ml, mr].filter((x): x is number => x !== undefined);
      return m.length ? Math.min(...m) : undefined;
    }
    case "%": return mr !== undefined && mr > 0 ? mr - 1 : undefined;
    case "+": return ml !== undefined && mr !== undefined ? ml + mr : undefined;
    case "*": return ml !== undefined && mr !== undefined ? ml * mr : undefined;
    case ">>": return ml !== undefined ? ml : undefined;
  }
  return undefined;
}

/** The length of an array type node (`[T; 16]` → "16"), through references. */
export function arrayLenOfType(t: Node | null | undefined): string | undefined {
  let u = t;
  for (let i = 0; u && i < 4 && (u.type === "reference_type" || u.type === "pointer_type"); i++) u = u.childForFieldName("type");
  if (u?.type !== "array_type") return undefined;
  const len = u.childForFieldName("length");
  return len ? norm(len) : undefined;
}

/** The length a `let` value gives its slice: `from_raw_parts(p, n)`, `[v; n]`, `[a, b, c]`,
 * `vec![v; n]` (the macro's tokens after its top-level `;`). */
export function lengthOfValue(v: Node | null | undefined): string | undefined {
  let u = unparen(v);
  for (let i = 0; u && i < 4; i++) {
    if (u.type === "unsafe_block") {
      const b = u.namedChildren.find((c) => c.type === "block");
      const kids = b?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
      u = kids[kids.length - 1];
      if (u?.type === "expression_statement") u = u.namedChild(0);
    } else if (u.type === "reference_expression") u = u.childForFieldName("value");
    else break;
  }
  if (!u) return undefined;
  if (u.type === "call_expression") {
    const f = norm(u.childForFieldName("function")).replace(/::<.*>$/, "");
    if (/(^|::)(from_raw_parts|from_raw_parts_mut)$/.test(f)) {
      const args = u.childForFieldName("arguments")?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
      return args.length === 2 ? norm(uncast(args[1])) : undefined;
    }
    return undefined;
  }
  if (u.type === "array_expression") {
    const len = u.childForFieldName("length");
    if (len) return norm(len);
    return String(u.namedChildren.filter((c) => !c.type.endsWith("comment") && c.type !== "attribute_item").length);
  }
  if (u.type === "macro_invocation" && (u.childForFieldName("macro")?.text ?? "") === "vec") {
    const tt = u.namedChildren.find((c) => c.type === "token_tree");
    const toks = tt?.children ?? [];
    const semi = toks.findIndex((c) => c.text === ";");
    if (semi > 0) return toks.slice(semi + 1, toks.length - 1).map((c) => c.text).join("");
  }
  return undefined;
}

// ---------------------------------------------------------------- one function's panic sense

const CONST_FNS = new Set(["size_of", "align_of"]);
/** Calls that carry C's bytes through unchanged (a local made by them is still "C's value"). */
const KEEP_CALLS = new Set(["from_raw_parts", "from_raw_parts_mut", "from_ptr", "from_bytes_with_nul", "from_bytes_until_nul", "from_utf8", "from_utf8_unchecked",
  "Some", "Ok", "as_ref", "as_mut", "slice_from_raw_parts", "slice_from_raw_parts_mut", "new_unchecked"]);
/** Conversions that fail on some input: an unwrap of their result is an explicit panic on C's value. */
const CONVERSIONS = new Set(["to_str", "from_utf8", "parse", "try_into", "try_from", "from_ptr", "from_bytes_with_nul", "from_bytes_until_nul", "into_string", "to_string_checked"]);
const LOCKS = new Set(["lock", "read", "write"]);
/** Reading through a raw pointer C handed over. */
const FROM_C_PTR = new Set(["from_ptr", "from_raw_parts", "as_ref", "as_mut"]);

/** A site's level; with `taint`, a warning only when one of those parameters carries C's value on
 * the call path (the exported function's own parameters always do), else info. */
export interface SiteLevel { level: "warning" | "info"; taint?: number }
const WIDE = new Set(["u64", "i64", "u128", "i128"]);
/** Integer types that hold every slice length (at most isize::MAX). */
const WIDE_TARGETS = new Set(["isize", "usize", "u64", "i64", "u128", "i128"]);
const PRIM_SIZE: Record<string, number> = { u8: 1, i8: 1, bool: 1, u16: 2, i16: 2, u32: 4, i32: 4, f32: 4, char: 4, u64: 8, i64: 8, f64: 8, u128: 16, i128: 16 };

/** The type a `….try_into().unwrap()` converts to, where its place fixes it: the argument of a
 * raw pointer's `offset`/`wrapping_offset` (isize) or `add`/`sub` (usize) (core::ptr), or a
 * `let x: T` of such a type. */
function wideTarget(site: Node): boolean {
  const p = site.parent;
  if (p?.type === "arguments") {
    const call = p.parent;
    const f = call?.type === "call_expression" ? call.childForFieldName("function") : undefined;
    const m = f?.type === "field_expression" ? f.childForFieldName("field")?.text : undefined;
    return !!m && ["offset", "wrapping_offset", "byte_offset", "add", "sub"].includes(m) && p.namedChildren.filter((c) => !c.type.endsWith("comment")).length === 1;
  }
  if (p?.type === "let_declaration" && p.childForFieldName("value")?.id === site.id) return WIDE_TARGETS.has(p.childForFieldName("type")?.text ?? "");
  return false;
}
const NARROW = new Set(["u8", "i8", "u16", "i16", "u32", "i32", "c_char", "c_schar", "c_uchar", "c_short", "c_ushort", "c_int", "c_uint", "bool"]);

function isConstName(t: string): boolean {
  return /^[A-Z]/.test(t) || t === "true" || t === "false";
}

/** The named type a type node denotes through references, pointers, Box/Arc/Rc/Option-less
 * generics: `&mut Det`, `*const Det`, `Box<Det>`, `crate::det::Det`, `Det<T>` → "Det". */
export function typeName(t: Node | null | undefined, self?: string, depth = 0): string | undefined {
  const u = t;
  if (!u || depth > 6) return undefined;
  switch (u.type) {
    case "reference_type": case "pointer_type": return typeName(u.childForFieldName("type"), self, depth + 1);
    case "type_identifier": return u.text === "Self" ? self : u.text;
    case "scoped_type_identifier": return u.childForFieldName("name")?.text;
    case "generic_type": {
      const head = typeName(u.childForFieldName("type"), self, depth + 1);
      if (head === "Box" || head === "Arc" || head === "Rc" || head === "NonNull") {
        const a = u.childForFieldName("type_arguments")?.namedChildren.find((c) => !c.type.endsWith("comment"));
        return typeName(a, self, depth + 1);
      }
      return head;
    }
  }
  return undefined;
}

interface Span { start: number; end: number }
const inside = (n: Node, s: Span) => n.startIndex >= s.start && n.endIndex <= s.end;

/** Values by local name that change where a `let` ends (shadowing): `get(name, at)` is the value
 * of the last `set` made from a position at or before `at`. */
export class Scoped<T> {
  private m = new Map<string, { from: number; v: T | undefined }[]>();
  set(name: string, from: number, v: T | undefined): void {
    const a = this.m.get(name) ?? [];
    a.push({ from, v });
    this.m.set(name, a);
  }
  get(name: string, at: number): T | undefined {
    const a = this.m.get(name);
    if (!a) return undefined;
    let best: { from: number; v: T | undefined } | undefined;
    for (const e of a) if (e.from <= at && (!best || e.from >= best.from)) best = e;
    return best?.v;
  }
}

export class PanicSense {
  readonly vf = new ValueFacts();
  /** Which parameters (bit i = parameter i, `self` not counted) a local's value comes from. */
  readonly taint = new Scoped<number>();
  readonly types = new Scoped<string>();
  readonly primTypes = new Scoped<string>();
  /** Locals holding a slice of constant length (`split_at(K).0`, `&z[..K]`, `from_raw_parts(p, 16)`). */
  readonly fixed = new Scoped<boolean>();
  /** Locals holding the Result of catch_unwind. */
  readonly caughtResult = new Scoped<boolean>();
  /** Locals defined once as `x + K` (K a constant): name → { x, K }. */
  readonly sums = new Scoped<{ x: string; k: number }>();
  /** The tail of `let (head, tail) = s.split_at(K)`: tail → { of: s, k: K } (tail.len() + K == s.len()). */
  readonly tails = new Scoped<{ of: string; k: number }>();
  readonly closures: { start: number; end: number; call: import("../../model/types.js").Range; arg: number }[] = [];
  implType?: string;
  traitName?: string;

  constructor(fnNode: Node, private consts: (name: string) => number | undefined) {
    // impl block: function_item → declaration_list → impl_item
    const impl = fnNode.parent?.type === "declaration_list" ? fnNode.parent.parent : undefined;
    if (impl?.type === "impl_item") {
      this.implType = typeName(impl.childForFieldName("type"));
      const tr = impl.childForFieldName("trait");
      this.traitName = tr ? (tr.type === "generic_type" ? typeName(tr.childForFieldName("type")) : typeName(tr)) : undefined;
    }
    let i = 0;
    for (const p of fnNode.childForFieldName("parameters")?.namedChildren ?? []) {
      if (p.type !== "parameter") continue;
      const bit = i < 30 ? 1 << i : 0;
      i++;
      const pat = p.childForFieldName("pattern");
      const name = pat?.type === "identifier" ? pat.text : pat?.type === "mut_pattern" ? pat.namedChild(0)?.text : undefined;
      if (!name) continue;
      const t = p.childForFieldName("type");
      this.taint.set(name, 0, bit);
      this.types.set(name, 0, typeName(t, this.implType));
      if (t?.type === "primitive_type" || NARROW.has(t?.text ?? "")) this.primTypes.set(name, 0, t!.text);
      const len = arrayLenOfType(t);
      if (len) this.vf.lens.set(name, 0, len);
    }
  }

  // ---- walk hooks

  /** A `let`: its names take their new values where the statement ends (the value still sees the
   * names it shadows). */
  onLet(n: Node): void {
    const pat = n.childForFieldName("pattern");
    const val = n.childForFieldName("value");
    const tt = n.childForFieldName("type");
    const at = n.endIndex;
    const names: string[] = [];
    const name = pat?.type === "identifier" ? pat.text : pat?.type === "mut_pattern" ? pat.namedChild(0)?.text : undefined;
    if (name) names.push(name);
    else if (pat?.type === "tuple_pattern") for (const c of pat.namedChildren) if (c.type === "identifier") names.push(c.text);
    for (const nm of names) this.vf.noteAssign(nm, at);
    if (name) {
      this.types.set(name, at, typeName(tt, this.implType) ?? this.typeOfValue(val));
      this.primTypes.set(name, at, tt?.type === "primitive_type" || NARROW.has(tt?.text ?? "") ? tt!.text : undefined);
      this.vf.lens.set(name, at, arrayLenOfType(tt) ?? lengthOfValue(val));
      this.fixed.set(name, at, this.isFixedSlice(val));
      const cf = unparen(val)?.type === "call_expression" ? unparen(val)!.childForFieldName("function") : undefined;
      this.caughtResult.set(name, at, !!cf && /(^|::)catch_unwind$/.test(norm(cf)));
    }
    // let (head, rest) = buf.split_at(K)
    if (pat?.type === "tuple_pattern" && val?.type === "call_expression") {
      const f = val.childForFieldName("function");
      const a0 = val.childForFieldName("arguments")?.namedChildren.find((c) => !c.type.endsWith("comment"));
      const first = pat.namedChild(0);
      if (f?.type === "field_expression" && f.childForFieldName("field")?.text === "split_at" && a0 && this.isConstExpr(a0) && first?.type === "identifier") this.fixed.set(first.text, at, true);
      const second = pat.namedChild(1);
      const k = a0 ? this.constValue(a0) : undefined;
      if (f?.type === "field_expression" && f.childForFieldName("field")?.text === "split_at" && k !== undefined && second?.type === "identifier") {
        this.tails.set(second.text, at, { of: norm(f.childForFieldName("value")), k });
      }
    }
    if (name) {
      // let full = n + 8
      const u = uncast(val);
      let sum: { x: string; k: number } | undefined;
      if (u?.type === "binary_expression" && opOf(u) === "+") {
        const l = u.childForFieldName("left"), r = u.childForFieldName("right");
        const kr = this.constValue(r), kl = this.constValue(l);
        if (kr !== undefined && kl === undefined) sum = { x: norm(uncast(l)), k: kr };
        else if (kl !== undefined && kr === undefined) sum = { x: norm(uncast(r)), k: kl };
      }
      this.sums.set(name, at, sum);
    }
    const t = val && !this.isTransform(val) ? this.taintOf(val) : 0;
    for (const nm of names) this.taint.set(nm, at, t);
  }

  onAssign(n: Node): void {
    const r = rootName(n.childForFieldName("left"));
    if (r) this.vf.noteAssign(r, n.endIndex);
  }

  /** A call's closure arguments: sites inside run under the callee (`guard(|| …)`). */
  onCall(n: Node, range: import("../../model/types.js").Range): void {
    const args = n.childForFieldName("arguments")?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
    args.forEach((a, i) => {
      let c: Node | null | undefined = unparen(a);
      // AssertUnwindSafe(|| …)
      if (c?.type === "call_expression" && /AssertUnwindSafe$/.test(norm(c.childForFieldName("function")))) c = c.childForFieldName("arguments")?.namedChild(0);
      if (c?.type === "closure_expression") this.closures.push({ start: c.startIndex, end: c.endIndex, call: range, arg: i });
    });
  }

  underOf(n: Node): { call: import("../../model/types.js").Range; arg: number }[] | undefined {
    const u = this.closures.filter((c) => inside(n, c)).map((c) => ({ call: c.call, arg: c.arg }));
    return u.length ? u : undefined;
  }

  // ---- types

  typeOfValue(v: Node | null | undefined): string | undefined {
    let u = unparen(v);
    // `&mut *p`, `&*p`, `*p`: the type `p` points to
    for (let i = 0; u && i < 4; i++) {
      if (u.type === "reference_expression") u = unparen(u.childForFieldName("value"));
      else if (u.type === "unary_expression" && u.child(0)?.text === "*") u = unparen(u.namedChild(0));
      else break;
    }
    if (!u) return undefined;
    if (u.type === "identifier") return this.types.get(u.text, u.startIndex);
    if (u.type === "struct_expression") return typeName(u.childForFieldName("name"), this.implType) ?? lastPath(u.childForFieldName("name")?.text, this.implType);
    if (u.type === "call_expression") {
      const f = u.childForFieldName("function");
      const fe = f?.type === "generic_function" ? f.childForFieldName("function") : f;
      if (fe?.type === "scoped_identifier") {
        const name = fe.childForFieldName("name")?.text ?? "";
        const path = fe.childForFieldName("path");
        const head = path?.type === "generic_type" ? typeName(path, this.implType) : lastPath(path?.text, this.implType);
        if (head && /^[A-Z]/.test(head) && (name === "new" || name === "default" || name.startsWith("with_") || name.startsWith("new_"))) return head;
      }
    }
    return undefined;
  }

  /** The receiver's type of a method call, when the body shows it. */
  recvType(recv: Node | null | undefined): string | undefined {
    let u = unparen(recv);
    for (let i = 0; u && i < 4; i++) {
      if (u.type === "unary_expression" && u.child(0)?.text === "*") u = unparen(u.namedChild(0));
      else if (u.type === "reference_expression") u = unparen(u.childForFieldName("value"));
      else break;
    }
    if (!u) return undefined;
    if (u.type === "self") return this.implType;
    if (u.type === "identifier") return this.types.get(u.text, u.startIndex);
    return undefined;
  }

  headOf(fe: Node): string | undefined {
    const path = fe.childForFieldName("path");
    if (!path) return undefined;
    if (path.type === "generic_type") return typeName(path, this.implType);
    return lastPath(path.text, this.implType);
  }

  // ---- value questions

  /** An integer constant: a literal, a const of the file, `size_of::<prim>()`. */
  constValue(n: Node | null | undefined): number | undefined {
    const u = uncast(n);
    if (!u) return undefined;
    const lit = intLit(u);
    if (lit !== undefined) return lit;
    if (u.type === "identifier" && /^[A-Z][A-Z0-9_]*$/.test(u.text)) return this.consts(u.text);
    if (u.type === "call_expression") {
      // (std::)mem::size_of::<u64>(): the primitive's size (the Rust Reference, "Primitive data layout")
      const f = u.childForFieldName("function");
      if (f?.type === "generic_function" && /(^|::)size_of$/.test(norm(f.childForFieldName("function")))) {
        const t = f.childForFieldName("type_arguments")?.namedChild(0)?.text ?? "";
        return PRIM_SIZE[t];
      }
    }
    return undefined;
  }

  /** Whether `v` is at most the length of some slice: a guard `v <= s.len()` / `v < s.len()`,
   * or `v` defined as `x + K` where x is at most the tail of `s.split_at(K')` with K <= K'
   * (so v <= s.len()). A slice never holds more than isize::MAX bytes (std::slice::from_raw_parts,
   * "Safety"), so such a value fits isize, usize and every wider integer type. */
  boundedByLen(v: Node, facts: Fact[]): boolean {
    const u = uncast(v);
    if (!u) return false;
    const a = norm(u);
    const lenBound = (x: string) => facts.filter((f): f is Fact & { k: "lt" } => f.k === "lt" && f.a === x && /\.len\(\)$/.test(f.b)).map((f) => f.b.slice(0, -6));
    if (lenBound(a).length) return true;
    const sum = u.type === "identifier" ? this.sums.get(u.text, u.startIndex) : undefined;
    return !!sum && this.withinTail(sum.x, sum.k, facts, u.startIndex);
  }

  /** `x + k` stays within a slice: x is at most the tail of `s.split_at(K)` and k <= K. */
  withinTail(x: string, k: number, facts: Fact[], at: number): boolean {
    for (const f of facts) {
      if (f.k !== "lt" || f.a !== x || !/\.len\(\)$/.test(f.b)) continue;
      const s = f.b.slice(0, -6);
      const tail = /^[A-Za-z_][A-Za-z0-9_]*$/.test(s) ? this.tails.get(s, at) : undefined;
      if (tail && k <= tail.k) return true;
    }
    return false;
  }

  isConstExpr(n: Node | null | undefined): boolean {
    if (!n) return false;
    if (n.type === "self") return false;
    for (const id of n.descendantsOfType(["identifier", "self", "field_identifier"])) {
      if (id.type === "self") return false;
      if (id.type === "field_identifier") continue;
      const p = id.parent;
      if (p && (p.type === "scoped_identifier" || p.type === "scoped_type_identifier" || p.type === "generic_function")) {
        // a path segment (`DcGen::from_repr`, `mem::size_of`): the value is the arguments'
        if (p.childForFieldName("name")?.id === id.id || p.childForFieldName("path")?.id === id.id) continue;
      }
      if (CONST_FNS.has(id.text) || isConstName(id.text)) continue;
      return false;
    }
    return true;
  }

  /** A slice whose length is a constant: `&z[..K]`, `&z[a..a + K]`, `from_raw_parts(p, 16)`. */
  isFixedSlice(v: Node | null | undefined): boolean {
    let u = unparen(v);
    if (u?.type === "unsafe_block") {
      const b = u.namedChildren.find((c) => c.type === "block");
      const kids = b?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
      u = kids[kids.length - 1];
    }
    if (u?.type === "reference_expression") u = u.childForFieldName("value");
    if (!u) return false;
    if (u.type === "identifier") return !!this.fixed.get(u.text, u.startIndex);
    const len = lengthOfValue(u);
    if (len !== undefined && u.type === "call_expression") {
      const args = u.childForFieldName("arguments")?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
      return !!args[1] && this.isConstExpr(args[1]);
    }
    if (u.type === "index_expression") {
      const r = u.namedChild(1);
      if (r?.type !== "range_expression") return false;
      const k = r.namedChildren;
      const dots = r.children.find((c) => c.text === ".." || c.text === "..=");
      if (k.length === 1 && dots && k[0]!.startIndex > dots.startIndex) return this.isConstExpr(k[0]);
      if (k.length === 2) {
        if (this.isConstExpr(k[0]) && this.isConstExpr(k[1])) return true;
        // a..a + K
        const hi = unparen(k[1]);
        return hi?.type === "binary_expression" && opOf(hi) === "+" && norm(hi.childForFieldName("left")) === norm(k[0]) && this.isConstExpr(hi.childForFieldName("right"));
      }
    }
    return false;
  }

  /** The parameters (bitmask) whose values an expression reads: a parameter other than `self`, or
   * a local made from one without a transforming call; closures and `if` conditions left out. */
  taintOf(n: Node): number {
    if (n.type === "identifier") return this.taint.get(n.text, n.startIndex) ?? 0;
    const skip: Span[] = [];
    for (const c of n.descendantsOfType(["closure_expression", "if_expression"])) {
      if (c.type === "closure_expression") skip.push({ start: c.startIndex, end: c.endIndex });
      else {
        const cond = c.childForFieldName("condition");
        if (cond) skip.push({ start: cond.startIndex, end: cond.endIndex });
      }
    }
    let mask = 0;
    for (const id of n.descendantsOfType("identifier")) {
      const t = this.taint.get(id.text, id.startIndex) ?? 0;
      if (!t || skip.some((s) => inside(id, s))) continue;
      // `value.to_string()` of an integer has no NUL and no invalid UTF-8
      const p = id.parent;
      if (p?.type === "field_expression" && p.childForFieldName("field")?.text === "to_string" && this.primTypes.get(id.text, id.startIndex)) continue;
      if (p?.type === "scoped_identifier") continue;
      mask |= t;
    }
    return mask;
  }

  mentionsTaint(n: Node): boolean {
    return this.taintOf(n) !== 0;
  }

  /** A value made by a free function or associated function of the crate (`encode(key)`): its
   * bytes are that function's, not C's. */
  isTransform(v: Node): boolean {
    let u = unparen(v);
    for (let i = 0; u && i < 6; i++) {
      if (u.type === "try_expression" || u.type === "reference_expression") u = unparen(u.namedChildren[u.namedChildCount - 1]);
      else if (u.type === "unsafe_block") {
        const b = u.namedChildren.find((c) => c.type === "block");
        const kids = b?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
        u = kids[kids.length - 1];
      } else break;
    }
    if (u?.type !== "call_expression") return false;
    let f = u.childForFieldName("function");
    if (f?.type === "generic_function") f = f.childForFieldName("function");
    if (f?.type === "identifier") return !KEEP_CALLS.has(f.text);
    if (f?.type === "scoped_identifier") return !KEEP_CALLS.has(f.childForFieldName("name")?.text ?? "");
    return false;
  }

  /** The level of `recv.unwrap()` / `recv.expect(…)`, or undefined when it cannot panic. */
  unwrapLevel(site: Node, recv: Node | null | undefined): SiteLevel | undefined {
    const u = unparen(recv);
    if (!u) return { level: "warning" };
    if (this.isConstExpr(u)) return undefined;
    const facts = this.vf.at(site);
    if (this.vf.isSome(facts, norm(u))) return undefined;
    // the result of catch_unwind unwrapped: the caught panic goes on across the boundary
    if (u.type === "identifier" && this.caughtResult.get(u.text, u.startIndex)) return { level: "warning" };
    if (u.type === "call_expression") {
      const f = u.childForFieldName("function");
      const args = u.childForFieldName("arguments")?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
      const fname = f?.type === "field_expression" ? f.childForFieldName("field")?.text : f?.type === "scoped_identifier" ? f.childForFieldName("name")?.text : f?.text;
      const recv2 = f?.type === "field_expression" ? f.childForFieldName("value") : undefined;
      // p.as_ref() / p.as_mut() / NonNull::new(p) after a null check
      if ((fname === "as_ref" || fname === "as_mut") && recv2 && this.vf.isSome(facts, norm(recv2))) return undefined;
      if (fname === "new" && f?.type === "scoped_identifier" && /NonNull$/.test(norm(f.childForFieldName("path")))) {
        const a = unparen(args[0]);
        if (a && this.vf.isSome(facts, norm(a))) return undefined;
        // Box::into_raw / Box::leak never return null (std docs)
        if (a?.type === "call_expression" && /(^|::)Box::(into_raw|leak)$/.test(norm(a.childForFieldName("function")))) return undefined;
      }
      // a length a slice bounds converted to a type that holds every slice length
      if (fname === "try_into" && recv2 && wideTarget(site) && this.boundedByLen(recv2, facts)) return undefined;
      if (fname === "try_from" && f?.type === "scoped_identifier" && WIDE_TARGETS.has(norm(f.childForFieldName("path"))) && args.length === 1 && this.boundedByLen(args[0]!, facts)) return undefined;
      // a slice of constant length converted to an array of that length
      if ((fname === "try_into" && recv2 && this.isFixedSlice(recv2)) || (fname === "try_from" && args.length === 1 && this.isFixedSlice(args[0]))) return undefined;
      // Mutex/RwLock poisoning: only after a panic elsewhere while the lock was held
      if (fname && LOCKS.has(fname) && args.length === 0 && recv2 && !this.mentionsTaint(recv2)) return { level: "info" };
    }
    // a C string read through a raw pointer and converted: C decides whether it converts
    const ids = u.descendantsOfType(["field_identifier", "identifier"]);
    const named = (set: Set<string>) => ids.some((c) => set.has(c.text) && (c.type === "field_identifier" || c.parent?.type === "scoped_identifier"));
    if (named(FROM_C_PTR) && named(CONVERSIONS)) return { level: "warning" };
    // otherwise an explicit panic on whatever the receiver reads: a warning when that is a value
    // the caller handed over (decided per call path by the rule), else info
    return { level: "warning", taint: this.taintOf(u) };
  }

  /** `x[i]`: undefined when the index is in range by what the code shows, else "info". */
  indexLevel(n: Node): "info" | undefined {
    const base = n.namedChild(0);
    const idx = unparen(n.namedChild(1));
    if (!base || !idx) return "info";
    if (idx.type === "range_expression" && idx.namedChildCount === 0) return undefined; // x[..]
    if (idx.type === "range_expression") return "info";
    const b = norm(base);
    const facts = this.vf.at(n);
    const i = uncast(idx);
    const it = norm(i);
    const len = this.vf.lens.get(b, n.startIndex);
    if (facts.some((f) => f.k === "lt" && f.a === it && !f.incl && (f.b === `${b}.len()` || (len !== undefined && f.b === len)))) return undefined;
    if (len !== undefined && this.vf.modBounded.get(it) === len) return undefined;
    if (i?.type === "binary_expression" && opOf(i) === "%") {
      const k = norm(uncast(i.childForFieldName("right")));
      if (k === `${b}.len()` || (len !== undefined && k === len)) return undefined;
    }
    if (base.type === "identifier" && this.consts(`${b}[]`) !== undefined && facts.some((f) => f.k === "lt" && f.a === it && !f.incl && f.b === `${b}.len()`)) return undefined;
    const lenV = len !== undefined ? (/^\d+$/.test(len) ? Number(len) : this.consts(len)) : base.type === "identifier" ? this.consts(`${b}[]`) : undefined;
    const m = maxOf(i, this.consts);
    if (lenV !== undefined && m !== undefined && m < lenV) return undefined;
    return "info";
  }

  /** `a - b`, `a + b`, `a * b` on integers: undefined when the guards rule overflow out. */
  overflowLevel(n: Node, op: string): "info" | undefined {
    const l = uncast(n.childForFieldName("left"));
    const r = uncast(n.childForFieldName("right"));
    if (!l || !r) return "info";
    const facts = this.vf.at(n);
    const a = norm(l);
    if (op === "-") {
      const k = intLit(r);
      if (k !== undefined) return this.vf.atLeast(facts, a, k) ? undefined : "info";
      return this.vf.atLeastName(facts, a, norm(r)) ? undefined : "info";
    }
    if (op === "+") {
      const one = (x: Node, y: Node) => intLit(y) === 1 && (this.vf.below(facts, norm(x)) !== undefined || this.vf.modBounded.has(norm(x)));
      if (one(l, r) || one(r, l)) return undefined;
      // a length within the tail of `s.split_at(K)` plus at most K is within s.len() <= isize::MAX
      const kr = this.constValue(r);
      if (kr !== undefined && this.withinTail(norm(l), kr, facts, n.startIndex)) return undefined;
    }
    if (op === "+" || op === "*") {
      // two values widened from 32 bits or less into a 64-bit type cannot overflow it by one + or *
      const widened = (x: Node | null | undefined) => {
        const c = unparen(x);
        if (c?.type !== "type_cast_expression") return intLit(c) !== undefined && intLit(c)! < 2 ** 31;
        if (!WIDE.has(c.childForFieldName("type")?.text ?? "")) return false;
        const v = uncast(c.childForFieldName("value"));
        return v?.type === "identifier" && NARROW.has(this.primTypes.get(v.text, v.startIndex) ?? "");
      };
      if (widened(n.childForFieldName("left")) && widened(n.childForFieldName("right"))) return undefined;
    }
    return "info";
  }

  divisionLevel(n: Node): "info" | undefined {
    const r = uncast(n.childForFieldName("right"));
    if (!r) return "info";
    return this.vf.atLeast(this.vf.at(n), norm(r), 1) ? undefined : "info";
  }

  /** panic!/unreachable!/todo! in a match arm that cannot be taken: the scrutinee is a constant
   * (a const generic, a tuple of consts), the other arms cover every value of a masked scrutinee
   * (`match x & 3 { 0 => …, 1 => …, 2 => …, 3 => …, _ => unreachable!() }`), or `Err(_)` of a
   * constant-length slice converted to an array. */
  armUnreachable(n: Node): boolean {
    let arm: Node | null = n.parent;
    for (let i = 0; arm && i < 3 && arm.type !== "match_arm"; i++) arm = arm.parent;
    if (arm?.type !== "match_arm") return false;
    const match = arm.parent?.parent;
    if (match?.type !== "match_expression") return false;
    const scrut = unparen(match.childForFieldName("value"));
    if (!scrut) return false;
    if (this.isConstExpr(scrut)) return true;
    const pat = arm.childForFieldName("pattern");
    const p0 = pat?.type === "match_pattern" ? pat.namedChild(0) ?? pat : pat;
    const errArm = p0?.type === "tuple_struct_pattern" && p0.childForFieldName("type")?.text === "Err" &&
      p0.namedChildren.slice(1).every((c) => c.text === "_" || (c.type === "identifier" && c.text.startsWith("_")));
    if (errArm && scrut.type === "call_expression") {
      const f = scrut.childForFieldName("function");
      if (f?.type === "field_expression" && f.childForFieldName("field")?.text === "try_into" && this.isFixedSlice(f.childForFieldName("value"))) return true;
    }
    if (norm(pat) !== "_") return false;
    // the largest value of the scrutinee
    let max = maxOf(scrut, this.consts);
    if (max === undefined && scrut.type === "call_expression") {
      const args = scrut.childForFieldName("arguments")?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
      const f = scrut.childForFieldName("function");
      const k = args.length === 1 ? intLit(args[0]) : undefined;
      // `reader.bits(2)`: a bit reader's n-bit field (common practice: the call names its width)
      if (k !== undefined && k <= 8 && f?.type === "field_expression" && /bits/.test(f.childForFieldName("field")?.text ?? "")) max = 2 ** k - 1;
    }
    if (max === undefined || max > 256) return false;
    const seen = new Set<number>();
    for (const a of arm.parent?.namedChildren ?? []) {
      if (a.type !== "match_arm" || a.id === arm.id) continue;
      const p = a.childForFieldName("pattern");
      if (a.childForFieldName("condition")) continue;
      for (const lit of p?.descendantsOfType("integer_literal") ?? []) {
        const v = intLit(lit);
        if (v !== undefined) seen.add(v);
      }
      if (p?.type === "integer_literal") { const v = intLit(p); if (v !== undefined) seen.add(v); }
    }
    for (let v = 0; v <= max; v++) if (!seen.has(v)) return false;
    return true;
  }

  /** panic!/unreachable!/todo! under a branch: the parameters its `match` scrutinee or `if`
   * condition reads (undefined when no branch guards it: it always runs). */
  branchTaint(n: Node): number | undefined {
    let c: Node = n;
    let p = n.parent;
    for (let i = 0; p && i < 8; i++, c = p, p = p.parent) {
      if (p.type === "function_item" || p.type === "closure_expression") return undefined;
      if (p.type === "match_arm") {
        const m = p.parent?.parent;
        const v = m?.type === "match_expression" ? m.childForFieldName("value") : undefined;
        return v ? this.taintOf(v) : undefined;
      }
      if (p.type === "if_expression" && p.childForFieldName("condition")?.id !== c.id) {
        const cond = p.childForFieldName("condition");
        return cond ? this.taintOfCond(cond) : undefined;
      }
    }
    return undefined;
  }

  /** taintOf for a condition (taintOf leaves `if` conditions out of the values it reads). */
  taintOfCond(cond: Node): number {
    let mask = 0;
    for (const id of [cond, ...cond.descendantsOfType("identifier")]) {
      if (id.type === "identifier") mask |= this.taint.get(id.text, id.startIndex) ?? 0;
    }
    return mask;
  }

  taintOfNames(names: string[], at: number): number {
    let mask = 0;
    for (const nm of names) mask |= this.taint.get(nm.replace(/\(\)$/, ""), at) ?? 0;
    return mask;
  }

  /** assert!(cond): the lower bounds on parameters the condition needs (`rate > 0` → rate >= 1),
   * when that is all it says; a caller whose guards give those bounds cannot make it fail. The
   * condition's tokens are parsed as a Rust expression by the grammar. */
  assertNeeds(n: Node, params: string[], mac = "assert"): { param: number; ge: number }[] | undefined {
    const tt = n.namedChildren.find((c) => c.type === "token_tree");
    if (!tt) return undefined;
    const toks = tt.children.slice(1, -1);
    const comma = toks.findIndex((t) => t.text === ",");
    if (mac === "assert_ne") {
      // assert_ne!(n, 0) / assert_ne!(0, n): n >= 1 for the unsigned counts it guards
      const parts: string[][] = [[]];
      for (const t of toks) {
        if (t.text === ",") parts.push([]);
        else parts[parts.length - 1]!.push(t.text);
      }
      const [a, b] = [parts[0]?.join("") ?? "", parts[1]?.join("") ?? ""];
      const x = b === "0" ? a : a === "0" ? b : undefined;
      return x !== undefined && params.includes(x) ? [{ param: params.indexOf(x), ge: 1 }] : undefined;
    }
    const cond = (comma < 0 ? toks : toks.slice(0, comma)).map((t) => t.text).join(" ");
    if (!cond || cond.length > 200) return undefined;
    let tree: ReturnType<typeof parseText> | undefined;
    try {
      tree = parseText("rust", `fn f() { let _ = ${cond}; }`);
      const let_ = tree.rootNode.descendantsOfType("let_declaration")[0];
      const v = let_?.childForFieldName("value");
      if (!v || tree.rootNode.hasError) return undefined;
      // every conjunct must turn into a bound on a parameter
      const conj: Node[] = [];
      const split = (x: Node | null | undefined, d: number): boolean => {
        const u = unparen(x);
        if (!u || d > 8) return false;
        if (u.type === "binary_expression" && opOf(u) === "&&") return split(u.childForFieldName("left"), d + 1) && split(u.childForFieldName("right"), d + 1);
        conj.push(u);
        return true;
      };
      if (!split(v, 0)) return undefined;
      const out: { param: number; ge: number }[] = [];
      for (const c of conj) {
        const fs = condFacts(c, true).filter((f) => f.k === "ge");
        const f = fs.find((x) => x.k === "ge" && params.includes(x.a));
        if (!f || f.k !== "ge") return undefined;
        out.push({ param: params.indexOf(f.a), ge: f.v });
      }
      return out.length ? out : undefined;
    } catch {
      return undefined;
    } finally {
      tree?.delete();
    }
  }

  /** Per argument of a call: the lower bound the guards at the call give it, if any. */
  argLowerBounds(call: Node, args: Node[]): (number | null)[] | undefined {
    const facts = this.vf.at(call);
    let any = false;
    const out = args.map((a) => {
      const best = this.lowerOf(a, facts, 0);
      if (best !== null) any = true;
      return best;
    });
    return any ? out : undefined;
  }

  /** The least value an integer expression can take by what the code shows: a literal, a guard's
   * bound, 0 for an unsigned value (a length, `strlen`, a local of an unsigned type), and the sum
   * of those for `a + b` (an unsigned `+` that does not overflow never makes a value smaller). */
  lowerOf(a: Node | null | undefined, facts: Fact[], depth: number): number | null {
    const u = uncast(a);
    if (!u || depth > 6) return null;
    const lit = intLit(u);
    let best: number | null = lit !== undefined ? lit : null;
    const t = norm(u);
    for (const f of facts) if (f.k === "ge" && f.a === t && (best === null || f.v > best)) best = f.v;
    if (best !== null) return best;
    if (u.type === "binary_expression" && opOf(u) === "+") {
      const l = this.lowerOf(u.childForFieldName("left"), facts, depth + 1);
      const r = this.lowerOf(u.childForFieldName("right"), facts, depth + 1);
      return l !== null && r !== null ? l + r : null;
    }
    if (u.type === "call_expression") {
      // `x.len()`, `libc::strlen(s)`: usize / size_t, never negative
      const f = norm(u.childForFieldName("function"));
      if (/(^|::|\.)(len|strlen|wcslen|count_ones|leading_zeros|trailing_zeros)$/.test(f)) return 0;
    }
    if (u.type === "identifier" && /^(u8|u16|u32|u64|u128|usize|c_uint|c_uchar|c_ushort|c_ulong|size_t)$/.test(this.primTypes.get(u.text, u.startIndex) ?? "")) return 0;
    return null;
  }

  /** assert!/assert_eq!/assert_ne!: undefined when its condition reads constants only (or a
   * layout's alignment, fixed by its type); else the plain names it reads. */
  assertDeps(n: Node, mac: string): string[] | undefined | "const" {
    const tt = n.namedChildren.find((c) => c.type === "token_tree");
    if (!tt) return undefined;
    const toks = tt.children.slice(1, -1);
    const parts: Node[][] = [[]];
    for (const t of toks) {
      if (t.text === ",") parts.push([]);
      else parts[parts.length - 1]!.push(t);
    }
    const cond = mac === "assert" ? parts.slice(0, 1) : parts.slice(0, 2);
    const deps = new Set<string>();
    let runtime = false;
    const visit = (list: Node[], depth: number) => {
      for (let i = 0; i < list.length; i++) {
        const t = list[i]!;
        if (t.type === "token_tree") { if (depth < 8) visit(t.children, depth + 1); continue; }
        if (t.type !== "identifier" && t.type !== "self") continue;
        const prev = list[i - 1]?.text;
        const next = list[i + 1]?.text;
        if (prev === "::" || next === "::" || prev === ".") continue;
        if (next === "." && list[i + 2]?.text === "align" && list[i + 3]?.type === "token_tree") continue;
        if (t.type === "self") { runtime = true; continue; }
        if (CONST_FNS.has(t.text) || isConstName(t.text)) continue;
        if (next === "!" ) continue; // a nested macro's name
        runtime = true;
        if (list[i + 1]?.type !== "token_tree") deps.add(t.text);
        else deps.add(`${t.text}()`);
      }
    };
    for (const c of cond) visit(c, 0);
    if (!runtime) return "const";
    return [...deps];
  }
}

function lastPath(t: string | undefined, self?: string): string | undefined {
  if (!t) return undefined;
  const segs = t.replace(/\s+/g, "").split("::");
  const last = segs[segs.length - 1]!.replace(/<.*$/, "");
  return last === "Self" ? self : last || undefined;
}

/** Locals whose every assignment in the body is `… % k` (or a literal 0): they stay below `k`. */
export function modBoundedLocals(body: Node): Map<string, string> {
  const verdict = new Map<string, string | null>();
  const see = (name: string | undefined, v: Node | null | undefined) => {
    if (!name) return;
    const u = uncast(v);
    let k: string | null = null;
    if (u?.type === "binary_expression" && opOf(u) === "%") k = norm(uncast(u.childForFieldName("right")));
    else if (intLit(u) === 0 && verdict.get(name) !== null) { if (!verdict.has(name)) verdict.set(name, ""); return; }
    const prev = verdict.get(name);
    if (k === null || (prev !== undefined && prev !== "" && prev !== k)) verdict.set(name, null);
    else verdict.set(name, k);
  };
  for (const n of body.descendantsOfType(["let_declaration", "assignment_expression", "compound_assignment_expr"])) {
    if (n.type === "let_declaration") {
      const pat = n.childForFieldName("pattern");
      const name = pat?.type === "identifier" ? pat.text : pat?.type === "mut_pattern" ? pat.namedChild(0)?.text : undefined;
      see(name, n.childForFieldName("value"));
    } else if (n.type === "assignment_expression") {
      const l = n.childForFieldName("left");
      see(l?.type === "identifier" ? l.text : undefined, n.childForFieldName("right"));
    } else {
      const l = n.childForFieldName("left");
      if (l?.type !== "identifier") continue;
      if (opOf(n) === "%=") {
        // `x %= k` keeps x below k
        const k = norm(uncast(n.childForFieldName("right")));
        const prev = verdict.get(l.text);
        verdict.set(l.text, prev === undefined || prev === "" || prev === k ? k : null);
      } else verdict.set(l.text, null);
    }
  }
  const out = new Map<string, string>();
  for (const [k, v] of verdict) if (v) out.set(k, v);
  return out;
}
