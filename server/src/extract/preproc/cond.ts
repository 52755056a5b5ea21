// `#if` / `#elif` conditions (C11 §6.10.1): `defined`, macro replacement, then an integer
// constant expression evaluated in intmax_t / uintmax_t (§6.10.1p4: every signed type acts as
// intmax_t, every unsigned one as uintmax_t; remaining identifiers are 0).
//
// Three-valued: ferrule reads code without its build, so a condition on a macro it does not know
// (a configuration macro, a target-dependent one in a target-neutral reading) is `undefined`
// ("cannot decide") unless `strict` asks for the standard's answer (unknown names are 0). `&&`,
// `||` and `?:` still decide when the known operand is enough (`0 && X` is 0).
//
// A separate function of a macro table, so the project model can evaluate the same conditions.

import { K, type Tok } from "./lexer.js";
import { Expander, ListReader, type MacroTable } from "./expand.js";

export interface CondOptions {
  /** The C standard's reading: unknown names are not defined and evaluate to 0. */
  strict?: boolean;
  /** C++ translation unit: `true` and `false` are 1 and 0 (C++17 [cpp.cond]p12). */
  cplusplus?: boolean;
}

const UNKNOWN: Tok = { k: K.Special, t: "?", s: -1, e: -1, sp: true, bol: false };
const HAS = new Set(["__has_include", "__has_include_next", "__has_attribute", "__has_cpp_attribute", "__has_c_attribute", "__has_builtin", "__has_feature", "__has_extension", "__has_declspec_attribute", "__has_warning"]);

function num(v: number | bigint): Tok {
  return { k: K.Number, t: String(v), s: -1, e: -1, sp: true, bol: false };
}

/** Whether NAME is defined: true, false, or undefined when it cannot be decided. */
export function definedness(table: MacroTable, name: string, strict: boolean): boolean | undefined {
  const e = table.map.get(name);
  if (e) return e.maybeUndef && !strict ? undefined : true;
  if (table.knownUndef.has(name)) return false;
  if (table.targetDependent.has(name)) return strict ? false : undefined;
  return strict ? false : undefined;
}

/** The value of a condition: true/false, or undefined when ferrule cannot decide it. */
export function evalCondition(toks: readonly Tok[], table: MacroTable, opts: CondOptions = {}): boolean | undefined {
  const strict = !!opts.strict;
  // 1. `defined X`, `defined(X)` and the `__has_*` queries, before macro replacement
  const pre: Tok[] = [];
  for (let i = 0; i < toks.length; i++) {
    const t = toks[i]!;
    if (t.k === K.Ident && t.t === "defined") {
      let name: string | undefined;
      if (toks[i + 1]?.t === "(") {
        name = toks[i + 2]?.k === K.Ident ? toks[i + 2]!.t : undefined;
        if (toks[i + 3]?.t !== ")") return undefined;
        i += 3;
      } else {
        name = toks[i + 1]?.k === K.Ident ? toks[i + 1]!.t : undefined;
        i += 1;
      }
      if (name === undefined) return undefined;
      const d = definedness(table, name, strict);
      pre.push(d === undefined ? UNKNOWN : num(d ? 1 : 0));
      continue;
    }
    if (t.k === K.Ident && HAS.has(t.t) && toks[i + 1]?.t === "(") {
      let depth = 0;
      let j = i + 1;
      for (; j < toks.length; j++) {
        if (toks[j]!.t === "(") depth++;
        else if (toks[j]!.t === ")" && --depth === 0) break;
      }
      i = j;
      pre.push(strict ? num(0) : UNKNOWN);
      continue;
    }
    pre.push(t);
  }
  // 2. macro replacement; an ambiguous macro is an unknown value
  let expanded: Tok[];
  try {
    const ex = new Expander(table, { onAmbiguous: () => [UNKNOWN], maxSteps: 20_000 });
    expanded = ex.expandList(pre);
  } catch {
    return undefined;
  }
  // 3. remaining identifiers
  const fin = expanded.map((t) => {
    if (t.k !== K.Ident) return t;
    if (opts.cplusplus && (t.t === "true" || t.t === "false")) return num(t.t === "true" ? 1 : 0);
    if (table.knownUndef.has(t.t)) return num(0);
    return strict ? num(0) : UNKNOWN;
  });
  const p = new Parser(fin);
  try {
    const v = p.cond();
    if (p.i !== fin.length) return undefined;
    return v === null ? undefined : v.v !== 0n;
  } catch {
    return undefined;
  }
}

/** A value: intmax_t or uintmax_t; null is "unknown". */
type V = { v: bigint; u: boolean } | null;

const M64 = (1n << 64n) - 1n;
function norm(v: bigint, u: boolean): { v: bigint; u: boolean } {
  return u ? { v: v & M64, u } : { v: BigInt.asIntN(64, v), u };
}

function literal(t: Tok): V {
  if (t.k === K.Char) {
    // 'a', '\n', '\x41', L'a' (the value of a plain character constant is an int)
    const body = t.t.slice(t.t.indexOf("'") + 1, -1);
    if (!body.startsWith("\\")) return { v: BigInt(body.codePointAt(0) ?? 0), u: false };
    const esc: Record<string, number> = { n: 10, t: 9, r: 13, "0": 0, a: 7, b: 8, f: 12, v: 11, "\\": 92, "'": 39, '"': 34, "?": 63 };
    if (body[1] === "x") return { v: BigInt(parseInt(body.slice(2), 16) || 0), u: false };
    if (body[1]! >= "0" && body[1]! <= "7") return { v: BigInt(parseInt(body.slice(1), 8) || 0), u: false };
    return { v: BigInt(esc[body[1]!] ?? 0), u: false };
  }
  if (t.k !== K.Number) return null;
  let s = t.t.split("'").join("");
  let u = false;
  // integer suffixes (§6.4.4.1): u, l, ll in any order and case
  for (;;) {
    const last = s[s.length - 1];
    if (last === "u" || last === "U") { u = true; s = s.slice(0, -1); continue; }
    if (last === "l" || last === "L") { s = s.slice(0, -1); continue; }
    break;
  }
  let v: bigint;
  try {
    if (s.startsWith("0x") || s.startsWith("0X") || s.startsWith("0b") || s.startsWith("0B")) v = BigInt(s);
    else if (s.length > 1 && s.startsWith("0")) v = BigInt("0o" + s.slice(1));
    else v = BigInt(s);
  } catch {
    return null; // a floating constant is not allowed here (§6.10.1p1)
  }
  if (v > (1n << 63n) - 1n) u = true;
  return norm(v, u);
}

class Parser {
  i = 0;
  constructor(private readonly t: readonly Tok[]) {}

  private peek(): string | undefined {
    return this.t[this.i]?.t;
  }

  cond(): V {
    const c = this.lor();
    if (this.peek() !== "?") return c;
    this.i++;
    const a = this.cond();
    if (this.peek() !== ":") throw new Error("expected :");
    this.i++;
    const b = this.cond();
    if (c === null) return null;
    const r = c.v !== 0n ? a : b;
    if (r === null) return null;
    return norm(r.v, !!(a?.u || b?.u)); // usual arithmetic conversions of the two arms
  }

  private lor(): V {
    let l = this.land();
    while (this.peek() === "||") {
      this.i++;
      const r = this.land();
      if (l !== null && l.v !== 0n) l = { v: 1n, u: false };
      else if (r !== null && r.v !== 0n) l = { v: 1n, u: false };
      else if (l === null || r === null) l = null;
      else l = { v: 0n, u: false };
    }
    return l;
  }

  private land(): V {
    let l = this.bin(0);
    while (this.peek() === "&&") {
      this.i++;
      const r = this.bin(0);
      if (l !== null && l.v === 0n) l = { v: 0n, u: false };
      else if (r !== null && r.v === 0n) l = { v: 0n, u: false };
      else if (l === null || r === null) l = null;
      else l = { v: 1n, u: false };
    }
    return l;
  }

  private static LEVELS: string[][] = [["|"], ["^"], ["&"], ["==", "!="], ["<", ">", "<=", ">="], ["<<", ">>"], ["+", "-"], ["*", "/", "%"]];

  private bin(level: number): V {
    if (level >= Parser.LEVELS.length) return this.unary();
    let l = this.bin(level + 1);
    for (;;) {
      const op = this.peek();
      if (!op || !Parser.LEVELS[level]!.includes(op)) return l;
      this.i++;
      const r = this.bin(level + 1);
      l = l === null || r === null ? null : arith(op, l, r);
    }
  }

  private unary(): V {
    const op = this.peek();
    if (op === "+" || op === "-" || op === "~" || op === "!") {
      this.i++;
      const v = this.unary();
      if (v === null) return null;
      if (op === "+") return v;
      if (op === "-") return norm(-v.v, v.u);
      if (op === "~") return norm(~v.v, v.u);
      return { v: v.v === 0n ? 1n : 0n, u: false };
    }
    if (op === "(") {
      this.i++;
      const v = this.cond();
      if (this.peek() !== ")") throw new Error("expected )");
      this.i++;
      return v;
    }
    const t = this.t[this.i++];
    if (!t) throw new Error("unexpected end");
    if (t.k === K.Special) return null;
    const v = literal(t);
    if (v === null && t.k !== K.Number && t.k !== K.Char) throw new Error("not an operand");
    return v;
  }
}

function arith(op: string, a: { v: bigint; u: boolean }, b: { v: bigint; u: boolean }): V {
  const u = a.u || b.u;
  const x = u ? BigInt.asUintN(64, a.v) : a.v;
  const y = u ? BigInt.asUintN(64, b.v) : b.v;
  switch (op) {
    case "*": return norm(x * y, u);
    case "/": return y === 0n ? null : norm(x / y, u);
    case "%": return y === 0n ? null : norm(x % y, u);
    case "+": return norm(x + y, u);
    case "-": return norm(x - y, u);
    case "<<": return norm(x << BigInt.asUintN(6, b.v), a.u);
    case ">>": return norm(x >> BigInt.asUintN(6, b.v), a.u);
    case "<": return { v: x < y ? 1n : 0n, u: false };
    case ">": return { v: x > y ? 1n : 0n, u: false };
    case "<=": return { v: x <= y ? 1n : 0n, u: false };
    case ">=": return { v: x >= y ? 1n : 0n, u: false };
    case "==": return { v: x === y ? 1n : 0n, u: false };
    case "!=": return { v: x !== y ? 1n : 0n, u: false };
    case "&": return norm(x & y, u);
    case "^": return norm(x ^ y, u);
    case "|": return norm(x | y, u);
  }
  return null;
}
