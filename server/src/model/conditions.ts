// Build conditions: Rust `#[cfg(…)]` predicates (and, for the C preprocessor, the same per-target
// facts), evaluated per target. One evaluator for the whole model: a condition is plain data
// (extract writes it into the facts), an environment is one configured target plus the build
// settings ferrule cannot see (Cargo features, `debug_assertions`).
//
// Sources: the Rust Reference, "Conditional compilation" (cfg predicates: `all`, `any`, `not`,
// configuration options with and without a value; an option that is not set is false; `test` is
// set only when compiling tests; `debug_assertions` is set by the dev profile) and "Set
// configuration options" (`target_arch`, `target_os`, `target_family`, `unix`, `windows`,
// `target_env`, `target_endian`, `target_pointer_width`, `target_vendor`, `target_has_atomic`,
// `panic`). The values per target are those `rustc --print cfg --target=TRIPLE` prints (checked
// by tests/conditions.test.ts against rustc when it is installed).

import type { Triple } from "./targets.js";

/** A cfg predicate. `true` is `all()`, `false` is `any()`. */
export type Cond =
  | { k: "all"; of: Cond[] }
  | { k: "any"; of: Cond[] }
  | { k: "not"; of: Cond }
  | { k: "is"; name: string; value?: string };

export const TRUE: Cond = { k: "all", of: [] };
export const FALSE: Cond = { k: "any", of: [] };

export function allOf(cs: (Cond | undefined)[]): Cond | undefined {
  const of = cs.filter((c): c is Cond => !!c);
  if (of.length === 0) return undefined;
  if (of.length === 1) return of[0];
  return { k: "all", of };
}

export function anyOf(cs: Cond[]): Cond {
  return cs.length === 1 ? cs[0]! : { k: "any", of: cs };
}

// ---- parsing the token text of an attribute argument (left opaque by the grammar) ----

type Tok = { t: "id" | "str" | "punct"; v: string };

function tokens(text: string): Tok[] {
  const out: Tok[] = [];
  let i = 0;
  while (i < text.length) {
    const c = text[i]!;
    if (/\s/.test(c)) { i++; continue; }
    if (c === '"') {
      let j = i + 1;
      let s = "";
      while (j < text.length && text[j] !== '"') {
        if (text[j] === "\\" && j + 1 < text.length) { s += text[j + 1]; j += 2; continue; }
        s += text[j++];
      }
      out.push({ t: "str", v: s });
      i = j + 1;
      continue;
    }
    if (c === "r" && text[i + 1] === '"') { i++; continue; } // raw string r"…": read as a plain one
    if (/[A-Za-z_0-9]/.test(c)) {
      let j = i;
      while (j < text.length && /[A-Za-z_0-9:]/.test(text[j]!)) j++;
      out.push({ t: "id", v: text.slice(i, j) });
      i = j;
      continue;
    }
    out.push({ t: "punct", v: c });
    i++;
  }
  return out;
}

/** Reads predicates from a token list starting at `pos`; returns the predicate and the next position. */
function readPred(ts: Tok[], pos: number, depth = 0): [Cond | undefined, number] {
  const t = ts[pos];
  if (!t || t.t !== "id" || depth > 40) return [undefined, pos + 1];
  const next = ts[pos + 1];
  if ((t.v === "all" || t.v === "any" || t.v === "not") && next?.v === "(") {
    const of: Cond[] = [];
    let p = pos + 2;
    while (p < ts.length && ts[p]!.v !== ")") {
      const [c, np] = readPred(ts, p, depth + 1);
      if (c) of.push(c);
      p = np;
      if (ts[p]?.v === ",") p++;
      else if (ts[p]?.v !== ")") return [undefined, skipTo(ts, p)];
    }
    if (ts[p]?.v !== ")") return [undefined, ts.length]; // unclosed
    p++;
    if (t.v === "not") return [of.length === 1 ? { k: "not", of: of[0]! } : undefined, p];
    return [{ k: t.v, of }, p];
  }
  if (next?.v === "=" && ts[pos + 2]?.t === "str") return [{ k: "is", name: t.v, value: ts[pos + 2]!.v }, pos + 3];
  if (next?.v === "(") return [undefined, skipTo(ts, pos + 1)];
  return [{ k: "is", name: t.v }, pos + 1];
}

function skipTo(ts: Tok[], p: number): number {
  // skip a balanced group or to the next top-level comma
  let d = 0;
  for (; p < ts.length; p++) {
    const v = ts[p]!.v;
    if (v === "(") d++;
    else if (v === ")") { if (d === 0) return p; d--; }
    else if (v === "," && d === 0) return p;
  }
  return p;
}

/** The predicate of `cfg(PRED)` from the text inside the parentheses (`feature = "x"`,
 * `all(unix, not(test))`); undefined when it cannot be read (then nothing is decided by it). */
export function parseCfg(text: string): Cond | undefined {
  const ts = tokens(text);
  const [c, p] = readPred(ts, 0);
  if (!c || p < ts.length) return undefined;
  return c;
}

/** `cfg_attr(PRED, attr, attr…)`: the predicate and the attribute texts it applies. */
export function parseCfgAttr(text: string): { cond: Cond; attrs: string[] } | undefined {
  const ts = tokens(text);
  const [c, p] = readPred(ts, 0);
  if (!c || ts[p]?.v !== ",") return undefined;
  // the attributes: split the remaining text at top-level commas (on the source text itself)
  const rest = splitTopLevel(text.slice(cfgEnd(text)));
  return { cond: c, attrs: rest };
}

/** Offset just after the first top-level comma (the end of the predicate). */
function cfgEnd(text: string): number {
  let d = 0;
  let inStr = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (inStr) { if (c === "\\") i++; else if (c === '"') inStr = false; continue; }
    if (c === '"') inStr = true;
    else if (c === "(" || c === "[") d++;
    else if (c === ")" || c === "]") d--;
    else if (c === "," && d === 0) return i + 1;
  }
  return text.length;
}

function splitTopLevel(text: string): string[] {
  const out: string[] = [];
  let d = 0;
  let inStr = false;
  let cur = "";
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (inStr) { cur += c; if (c === "\\") { cur += text[++i] ?? ""; } else if (c === '"') inStr = false; continue; }
    if (c === '"') inStr = true;
    if (c === "(" || c === "[") d++;
    else if (c === ")" || c === "]") d--;
    if (c === "," && d === 0) { if (cur.trim()) out.push(cur.trim()); cur = ""; continue; }
    cur += c;
  }
  if (cur.trim()) out.push(cur.trim());
  return out;
}

// ---- environments ----

/** One build configuration: configuration options set (name → values; a name without a value
 * maps to an empty set). `free` names are undecided (a crate whose features ferrule does not know):
 * any value may hold. */
export interface CondEnv {
  set: Map<string, Set<string>>;
  /** Option names left open (e.g. "feature" for a file outside any Cargo package). */
  free?: Set<string>;
  /** A short label for messages (the target's short name). */
  label?: string;
  triple?: Triple;
}

interface TargetCfg { arch: string; os: string; family: string; env: string; width: string; endian: string; vendor: string; abi?: string; features: string[]; atomics: string[] }

/** What `rustc --print cfg --target=TRIPLE` sets for each configured target (baseline target
 * features only). */
export const TARGET_CFG: Record<Triple, TargetCfg> = {
  "x86_64-unknown-linux-gnu": { arch: "x86_64", os: "linux", family: "unix", env: "gnu", width: "64", endian: "little", vendor: "unknown", abi: "", features: ["fxsr", "sse", "sse2"], atomics: ["8", "16", "32", "64", "ptr"] },
  "aarch64-unknown-linux-gnu": { arch: "aarch64", os: "linux", family: "unix", env: "gnu", width: "64", endian: "little", vendor: "unknown", abi: "", features: ["neon", "fp-armv8"], atomics: ["8", "16", "32", "64", "128", "ptr"] },
  "armv7-unknown-linux-gnueabihf": { arch: "arm", os: "linux", family: "unix", env: "gnu", width: "32", endian: "little", vendor: "unknown", abi: "eabihf", features: ["v7", "vfp3", "d32", "neon", "thumb2", "dsp"], atomics: ["8", "16", "32", "64", "ptr"] },
  "i686-unknown-linux-gnu": { arch: "x86", os: "linux", family: "unix", env: "gnu", width: "32", endian: "little", vendor: "unknown", abi: "", features: ["fxsr", "sse", "sse2"], atomics: ["8", "16", "32", "64", "ptr"] },
  "x86_64-pc-windows-msvc": { arch: "x86_64", os: "windows", family: "windows", env: "msvc", width: "64", endian: "little", vendor: "pc", abi: "", features: ["fxsr", "sse", "sse2"], atomics: ["8", "16", "32", "64", "128", "ptr"] },
};

export interface BuildSettings {
  /** Enabled Cargo features; undefined when unknown (then any feature may be on). */
  features?: readonly string[];
  /** Features the package declares but its build does not enable by default: whoever builds it
   * may (a C build that links it asks for its C API feature), so they are left open. */
  optional?: readonly string[];
  /** Extra configuration options set (`--cfg name`), as `name` or `name="value"` texts. */
  cfgs?: readonly string[];
}

/** The environments of one file: each configured target, with and without `debug_assertions`
 * (the dev and release profiles); `test` is never set (the shipped build). */
export function envsFor(targets: readonly Triple[], b: BuildSettings = {}): CondEnv[] {
  const out: CondEnv[] = [];
  for (const t of targets) {
    const c = TARGET_CFG[t];
    for (const debug of [false, true]) {
      const set = new Map<string, Set<string>>();
      const put = (k: string, v?: string) => {
        let s = set.get(k);
        if (!s) set.set(k, (s = new Set()));
        if (v !== undefined) s.add(v);
      };
      put("target_arch", c.arch);
      put("target_os", c.os);
      put("target_family", c.family);
      put(c.family); // `unix` / `windows`
      put("target_env", c.env);
      put("target_pointer_width", c.width);
      put("target_endian", c.endian);
      put("target_vendor", c.vendor);
      if (c.abi !== undefined) put("target_abi", c.abi);
      for (const f of c.features) put("target_feature", f);
      for (const a of c.atomics) put("target_has_atomic", a);
      put("panic", "unwind");
      if (debug) put("debug_assertions");
      if (b.features) {
        put("feature");
        for (const f of b.features) put("feature", f);
      }
      for (const x of b.cfgs ?? []) {
        const m = /^(\w+)\s*=\s*"(.*)"$/.exec(x);
        if (m) put(m[1]!, m[2]!);
        else put(x.trim());
      }
      const free = b.features ? new Set((b.optional ?? []).map((f) => `feature=${f}`)) : new Set(["feature"]);
      out.push({ set, free: free.size ? free : undefined, label: t, triple: t });
    }
  }
  return out;
}

function holdsIn(c: Cond, env: CondEnv, assign: Map<string, boolean>, depth = 0): boolean {
  if (depth > 64) return true;
  switch (c.k) {
    case "all": return c.of.every((x) => holdsIn(x, env, assign, depth + 1));
    case "any": return c.of.some((x) => holdsIn(x, env, assign, depth + 1));
    case "not": return !holdsIn(c.of, env, assign, depth + 1);
    case "is": {
      if (env.free?.has(c.name) || env.free?.has(atomKey(c))) return assign.get(atomKey(c)) ?? true;
      const s = env.set.get(c.name);
      if (!s) return false;
      return c.value === undefined ? true : s.has(c.value);
    }
  }
}

function atomKey(c: { name: string; value?: string }): string {
  return c.value === undefined ? c.name : `${c.name}=${c.value}`;
}

function freeAtoms(c: Cond, env: CondEnv, out: Set<string>, depth = 0): void {
  if (depth > 64) return;
  if (c.k === "is") { if (env.free?.has(c.name) || env.free?.has(atomKey(c))) out.add(atomKey(c)); return; }
  if (c.k === "not") freeAtoms(c.of, env, out, depth + 1);
  else for (const x of c.of) freeAtoms(x, env, out, depth + 1);
}

/** Whether all the conditions can hold together in this environment (its free options taking any
 * values; a free option is a name, any of whose values may be set, or one `name=value`; at most
 * 10 free atoms are tried, beyond that the answer is "yes"). */
export function canHoldIn(conds: readonly (Cond | undefined)[], env: CondEnv): boolean {
  const cs = conds.filter((c): c is Cond => !!c);
  if (cs.length === 0) return true;
  const atoms = new Set<string>();
  for (const c of cs) freeAtoms(c, env, atoms);
  const list = [...atoms];
  if (list.length > 10) return true;
  for (let m = 0; m < 1 << list.length; m++) {
    const assign = new Map<string, boolean>();
    list.forEach((a, i) => assign.set(a, !!(m & (1 << i))));
    if (cs.every((c) => holdsIn(c, env, assign))) return true;
  }
  return false;
}

/** The environments (of `envs`) in which all the conditions can hold together. */
export function envsWhere(conds: readonly (Cond | undefined)[], envs: readonly CondEnv[]): CondEnv[] {
  return envs.filter((e) => canHoldIn(conds, e));
}

/** Whether the conditions can hold together in some environment. */
export function canHold(conds: readonly (Cond | undefined)[], envs: readonly CondEnv[]): boolean {
  if (conds.every((c) => !c)) return true;
  return envs.some((e) => canHoldIn(conds, e));
}

/** The condition as Rust writes it (for messages). */
export function condText(c: Cond): string {
  switch (c.k) {
    case "is": return c.value === undefined ? c.name : `${c.name} = "${c.value}"`;
    case "not": return `not(${condText(c.of)})`;
    default: return `${c.k}(${c.of.map(condText).join(", ")})`;
  }
}

/**
 * Decides a C preprocessor condition (a member's `ppCond`) on one target: true, false, or
 * undefined when it cannot be decided. Registered by the analysis layer (which owns the
 * preprocessor); without it every such member is kept.
 */
export type PpCondEvaluator = (cond: string, triple: string, defines: Readonly<Record<string, string>>) => boolean | undefined;
let ppEval: PpCondEvaluator | undefined;
export function setPpCondEvaluator(f: PpCondEvaluator | undefined): void {
  ppEval = f;
}
export function ppCondOn(cond: string, triple: string, defines: Readonly<Record<string, string>>): boolean | undefined {
  return ppEval?.(cond, triple, defines);
}
