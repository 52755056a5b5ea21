// A tokenizer of the C lexical grammar for the preprocessor (C11 §6.4 preprocessing tokens,
// with §5.1.1.2 translation phases 1–3: line splices removed, comments become white space).
// Hand-written: one pass over the characters, no regular expressions over code.
//
// Tokens keep their offsets in the original text, so the preprocessor can say which source span
// a macro use covered and map the expansion back onto it.

export const enum K {
  Ident = 1,
  Number = 2, // pp-number (§6.4.8)
  Char = 3, // character constant (§6.4.4.4)
  String = 4, // string literal (§6.4.5), C++ raw strings included
  Punct = 5, // punctuator (§6.4.6)
  Other = 6, // any other non-white-space character
  /** Only made by the preprocessor: the placemarker of §6.10.3.3 and an "unknown value" in #if. */
  Special = 7,
}

export interface Tok {
  k: K;
  /** Spelling, with line splices removed. */
  t: string;
  /** Offsets in the original text ([s, e)); -1 for tokens the preprocessor made. */
  s: number;
  e: number;
  /** White space (or a comment) before the token on its logical line. */
  sp: boolean;
  /** First token of a line (after a newline that is not inside a comment or a splice). */
  bol: boolean;
  /** Hide set (§6.10.3.4: names of macros whose expansion produced this token). */
  hs?: ReadonlySet<string>;
  /** An identifier that must never be replaced again ("painted blue", §6.10.3.4p2). */
  blue?: boolean;
}

// Longest first within each leading character (§6.4.6; `::`, `.*`, `->*` are C++ and C23).
const PUNCTS = [
  "%:%:", "...", "<<=", ">>=", "->*", "->", "++", "--", "<<", ">>", "<=", ">=", "==", "!=", "&&", "||",
  "*=", "/=", "%=", "+=", "-=", "&=", "^=", "|=", "##", "<:", ":>", "<%", "%>", "%:", "::", ".*",
];
const SINGLE = "[](){}.&*+-~!/%<>^|?:;=,#";
/** Every proper prefix-extension of a punctuator (and the comment openers): two punctuators
 * printed side by side need a space when the first and the second's first character start one. */
const JOINS = new Set<string>(["//", "/*", ".."]);
for (const p of PUNCTS) for (let i = 2; i <= p.length; i++) JOINS.add(p.slice(0, i));

function isIdStart(c: number): boolean {
  return (c >= 97 && c <= 122) || (c >= 65 && c <= 90) || c === 95 || c === 36 || c >= 128;
}
function isIdChar(c: number): boolean {
  return isIdStart(c) || (c >= 48 && c <= 57);
}
function isDigit(c: number): boolean {
  return c >= 48 && c <= 57;
}

/** Tokens of `text`. Never throws; unterminated literals and comments end at the end of the line
 * (literals) or of the text (comments), as a compiler's skipped groups tolerate them. */
export function tokenize(text: string): Tok[] {
  const out: Tok[] = [];
  const n = text.length;
  let i = 0;
  let sp = false;
  let bol = true;

  // The character at i after any line splices (backslash-newline); returns [code, index after].
  const splice = (j: number): number => {
    while (j < n && text.charCodeAt(j) === 92) {
      if (text.charCodeAt(j + 1) === 10) j += 2;
      else if (text.charCodeAt(j + 1) === 13 && text.charCodeAt(j + 2) === 10) j += 3;
      else break;
    }
    return j;
  };
  const at = (j: number): number => (j < n ? text.charCodeAt(j) : -1);

  while (i < n) {
    i = splice(i);
    if (i >= n) break;
    const c = text.charCodeAt(i);
    if (c === 10) { bol = true; sp = false; i++; continue; }
    if (c === 32 || c === 9 || c === 13 || c === 11 || c === 12) { sp = true; i++; continue; }
    if (c === 47) { // '/'
      const j = splice(i + 1);
      if (at(j) === 47) { // line comment: to the newline (a splice continues it)
        let k = j + 1;
        while (k < n) {
          const ch = text.charCodeAt(k);
          if (ch === 92) { const k2 = splice(k); if (k2 !== k) { k = k2; continue; } }
          if (ch === 10) break;
          k++;
        }
        i = k; sp = true; continue;
      }
      if (at(j) === 42) { // block comment
        const end = text.indexOf("*/", j + 1);
        // `*\<newline>/` also ends a comment; rare enough to read it as the plain form
        i = end < 0 ? n : end + 2; sp = true; continue;
      }
    }
    const start = i;
    let k: K;
    let j: number;
    if (isIdStart(c)) {
      j = i + 1;
      for (;;) { j = splice(j); if (j < n && isIdChar(text.charCodeAt(j))) j++; else break; }
      k = K.Ident;
      // string/char prefixes: L u U u8 (and R for C++ raw strings)
      const word = text.slice(start, j);
      const q = at(j);
      if ((q === 34 || q === 39) && (word === "L" || word === "u" || word === "U" || word === "u8")) {
        j = quoted(text, j, q);
        k = q === 34 ? K.String : K.Char;
      } else if (q === 34 && (word === "R" || word === "LR" || word === "uR" || word === "UR" || word === "u8R")) {
        j = rawString(text, j);
        k = K.String;
      }
    } else if (isDigit(c) || (c === 46 && isDigit(at(splice(i + 1))))) {
      j = i + 1;
      for (;;) {
        j = splice(j);
        const d = at(j);
        const pc = text.charCodeAt(j - 1);
        if ((d === 43 || d === 45) && (pc === 101 || pc === 69 || pc === 112 || pc === 80)) { j++; continue; }
        if (d === 39 && isIdChar(at(j + 1))) { j += 2; continue; } // digit separator
        if (d >= 0 && (isIdChar(d) || d === 46)) { j++; continue; }
        break;
      }
      k = K.Number;
    } else if (c === 34 || c === 39) {
      j = quoted(text, i, c);
      k = c === 34 ? K.String : K.Char;
    } else {
      j = i + 1;
      k = SINGLE.includes(text[i]!) ? K.Punct : K.Other;
      if (k === K.Punct) {
        for (const p of PUNCTS) {
          if (p.charCodeAt(0) === c && text.startsWith(p, i)) { j = i + p.length; break; }
        }
      }
    }
    let t = text.slice(start, j);
    if (t.includes("\\\n") || t.includes("\\\r\n")) t = t.split("\\\r\n").join("").split("\\\n").join("");
    out.push({ k, t, s: start, e: j, sp, bol });
    sp = false;
    bol = false;
    i = j;
  }
  return out;
}

/** End of a quoted literal starting at `i` (the quote); stops at an unescaped newline. */
function quoted(text: string, i: number, q: number): number {
  let j = i + 1;
  const n = text.length;
  while (j < n) {
    const ch = text.charCodeAt(j);
    if (ch === 92) { j += 2; continue; }
    if (ch === q) return j + 1;
    if (ch === 10) return j;
    j++;
  }
  return n;
}

/** End of a C++ raw string `R"delim( ... )delim"` starting at the quote. */
function rawString(text: string, i: number): number {
  const open = text.indexOf("(", i + 1);
  if (open < 0 || open - i - 1 > 16) return quoted(text, i, 34);
  const delim = text.slice(i + 1, open);
  const close = text.indexOf(")" + delim + "\"", open + 1);
  return close < 0 ? text.length : close + delim.length + 2;
}

/** Spelling of a token sequence as the preprocessor prints it: a space where the source had one,
 * and where two tokens would otherwise run together into a different token. */
export function spell(toks: readonly Tok[]): string {
  let out = "";
  let prev: Tok | undefined;
  for (const t of toks) {
    if (t.k === K.Special) continue;
    if (prev && (t.sp || needsSpace(prev, t))) out += " ";
    out += t.t;
    prev = t;
  }
  return out;
}

function needsSpace(a: Tok, b: Tok): boolean {
  const wordA = a.k === K.Ident || a.k === K.Number;
  const wordB = b.k === K.Ident || b.k === K.Number;
  if (wordA && (wordB || b.k === K.String || b.k === K.Char)) return true;
  if (a.k === K.Number && b.t.startsWith(".")) return true;
  if (a.k === K.Punct && b.k === K.Punct) return JOINS.has(a.t + b.t.charAt(0));
  if (a.k === K.Punct && a.t === "." && b.k === K.Number) return true;
  return false;
}
