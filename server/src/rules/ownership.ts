// Rule family "ownership": handles that Rust boxes up and C/C++ holds.
//
// The ownership model (`ownershipModel`) is computed from the facts of the ownership extractor:
//   constructors  exported functions that return a pointer made by Box::into_raw, Box::leak,
//                 Arc/Rc::into_raw, CString::into_raw, mem::forget / ManuallyDrop / into_raw_parts
//                 (directly or through helper functions of the crate);
//   releasers     exported functions that take a pointer parameter back with Box/Arc/Rc/CString::
//                 from_raw, Vec::from_raw_parts, ptr::drop_in_place, or a Box<T> parameter
//                 (directly or through helpers);
//   pairing       a releaser belongs to a constructor when their declared handle types are the
//                 same named type, or (for `*mut c_void` handles) their names share a stem
//                 (`det_new` / `det_free`).
// Rules on the Rust side check constructors, releasers and panics; rules on the C/C++ side follow
// handles through function bodies and C++ classes.
//
// ferrule is an aid, not a proof of memory safety: these are checks of common slips, not a
// borrow checker for C++.

import type { Model } from "../model/boundary.js";
import { normName } from "../model/boundary.js";
import type { AbiType, FnDecl, Range } from "../model/types.js";
import type { CArg, CClass, CEvent, CFlow, COwnFacts, CRef, DeleterArg, OwnHow, RustArg, RustCall, RustOwnFacts, RustPanic, UniquePtrDecl } from "../model/ownership.js";
import { finding, type Finding, type GatheredItem, type Related, type RuleFamily, type RuleMeta } from "./api.js";

// ------------------------------------------------------------------ rule metadata

export const NO_RELEASER: RuleMeta = {
  id: "handle-no-release",
  severity: "warning",
  summary: "A Rust function hands C a boxed handle (Box::into_raw, CString::into_raw, …) but no exported function ever takes that handle back.",
  why: "C and C++ cannot free Rust-allocated memory themselves: every handle created leaks (filter state, sockets, DMA mappings stay alive until the process exits).",
};
export const RELEASE_NO_NULL_CHECK: RuleMeta = {
  id: "release-without-null-check",
  severity: "warning",
  summary: "An exported release function calls Box::from_raw (or another from_raw) on its parameter without checking it for NULL first.",
  why: "C++ destructors and error paths routinely pass NULL to release functions (as free(NULL) allows); Box::from_raw(NULL) is undefined behaviour.",
};
export const BORROWER_RELEASES: RuleMeta = {
  id: "borrower-takes-ownership",
  severity: "error",
  summary: "An exported function that is named or used like a method on a handle takes ownership of it (Box::from_raw, a Box<T> parameter) and so frees it when it returns.",
  why: "The C++ block still holds the handle: the next call reads freed memory and its destructor frees it a second time.",
};
export const RELEASE_KIND: RuleMeta = {
  id: "release-kind-mismatch",
  severity: "error",
  summary: "A release function takes the handle back as a different type or allocation kind than its constructor made it (Box<A> freed as Box<B>, a CString released with Box::from_raw, an Arc with Box).",
  why: "Dropping the wrong type runs the wrong destructor and passes the wrong size and alignment to the allocator: heap corruption.",
};
export const PANIC_ACROSS: RuleMeta = {
  id: "panic-across-c-abi",
  severity: "warning",
  summary: "An extern \"C\" function can panic (unwrap, expect, panic!, indexing, integer overflow in debug builds, RefCell::borrow_mut), directly or in a helper it calls, and does not catch it.",
  why: "Since Rust 1.81 a panic that reaches an extern \"C\" boundary aborts the whole process: the host application dies mid-stream. Catch it with std::panic::catch_unwind and return an error code, or declare the function extern \"C-unwind\" if unwinding into C++ is intended.",
};
export const INDISTINCT: RuleMeta = {
  id: "handle-types-indistinct",
  severity: "warning",
  summary: "Two different opaque C handle types reach Rust as the same `*mut c_void`.",
  why: "Neither rustc nor ferrule can then tell one handle from the other: a filter handle passed where a detector handle is expected compiles and corrupts memory. Give each handle its own Rust type.",
};
export const WRAPPER_LEAKS: RuleMeta = {
  id: "wrapper-leaks-handle",
  severity: "warning",
  summary: "A C++ class stores a handle from a Rust constructor and no member ever passes it to the release function.",
  why: "Every block instance leaks its Rust state.",
};
export const COPYABLE_WRAPPER: RuleMeta = {
  id: "copyable-owning-wrapper",
  severity: "error",
  summary: "A C++ class releases a Rust handle in its destructor but a copy shares the handle: an implicit or defaulted copy constructor / copy assignment (the rule of three/five), or a user-written one that copies the pointer.",
  why: "The copy duplicates the raw pointer: both objects' destructors call the release function on the same handle (double free), and the first one leaves the other dangling.",
};
export const MOVE_KEEPS: RuleMeta = {
  id: "move-keeps-source-handle",
  severity: "error",
  summary: "A move constructor or move assignment of a handle-owning class does not leave the source without the handle (set it to nullptr, std::exchange or swap it).",
  why: "The moved-from object's destructor still releases the handle the new object now uses: use after free, then double free.",
};
export const USE_AFTER_RELEASE: RuleMeta = {
  id: "handle-used-after-release",
  severity: "error",
  summary: "A handle is used (or released again) after it was passed to its release function in the same function.",
  why: "The release function freed the Rust state: any later call reads freed memory, and a second release frees it twice.",
};
export const FOREIGN_FREE: RuleMeta = {
  id: "foreign-allocator-free",
  severity: "error",
  summary: "free(), delete, delete[], a std::unique_ptr with the default deleter or a std::shared_ptr without a deleter is applied to a pointer that a Rust function allocated.",
  why: "Rust's allocator is not necessarily malloc, and even when it is, Box/CString memory must be taken back by Rust so the destructor runs and the size matches; freeing it from C++ corrupts the heap or skips the destructor.",
};
export const KIND_MISMATCH: RuleMeta = {
  id: "handle-kind-mismatch",
  severity: "error",
  summary: "A handle made by one constructor is passed to a release function or method of another handle type.",
  why: "Rust reinterprets the memory as the other type: wrong destructor, wrong size, heap corruption.",
};

// ------------------------------------------------------------------ the ownership model

export interface CtorInfo {
  fn: FnDecl;
  how: OwnHow;
  inner?: string;
  key: string;
  stem?: string;
  chain: string[];
  site: Range;
}
export interface RelInfo {
  fn: FnDecl;
  param: number;
  how: OwnHow;
  inner?: string;
  key: string;
  stem?: string;
  nullChecked: boolean;
  byParam: boolean;
  site: Range;
  calleeRange?: Range;
  chain: string[];
}
export interface OwnershipModel {
  ctors: Map<string, CtorInfo>; // by symbol
  releasers: Map<string, RelInfo[]>; // by symbol
  pairs(rel: RelInfo, ctor: CtorInfo): boolean;
  releasersFor(ctor: CtorInfo): RelInfo[];
}

const CTOR_SUFFIX = /_?(new|create|open|alloc|allocate|init|make|build|plan|start|dup|clone|from_\w+|with_\w+)$/i;
const REL_SUFFIX = /_?(free|destroy|release|delete|drop|close|dispose|dealloc|deallocate|finish|fini|destruct|unref|decref|delete)$/i;
const OWNER_NAME = /(free|destroy|release|delete|drop|close|dispose|dealloc|final|destruct|unref|decref|consume|into|take|finish|shutdown|fini|reclaim|recycle)/i;

function stemOf(name: string, re: RegExp): string | undefined {
  const s = name.replace(re, "");
  return s && s !== name ? s.toLowerCase() : undefined;
}

/** The name stems by which this family pairs a constructor with its releaser when the handle's
 * type does not tell (`sonar_det_new` ↔ `sonar_det_free`): the language server's scopes treat
 * functions sharing one as related. */
export function pairingStems(symbol: string): string[] {
  const a = stemOf(symbol, CTOR_SUFFIX);
  const b = stemOf(symbol, REL_SUFFIX);
  return a && b && a !== b ? [a, b] : a ? [a] : b ? [b] : [];
}

const own = (fn: FnDecl): RustOwnFacts | undefined => fn.body?.ownership as RustOwnFacts | undefined;

function isBoundaryExport(fn: FnDecl): boolean {
  return fn.lang === "rust" && fn.role === "export" && !(fn as FnDecl & { internal?: boolean }).internal && !!fn.isExtern && fn.abi !== "Rust";
}

/** The pairing key of a pointer to a scalar (`*mut u8` and `char *` alike: "t:char"); the
 * analysis keys (analysis/keys.ts) relate files by it too. */
export function scalarPointeeKey(t: AbiType): string | undefined {
  if (t.k !== "ptr" || t.to.k !== "scalar") return undefined;
  return ["char", "schar", "uchar", "i8", "u8"].includes(t.to.s) ? "t:char" : `t:${t.to.s}`;
}

function pointeeKey(t: AbiType, model: Model): string | undefined {
  if (t.k !== "ptr") return undefined;
  const to = t.to;
  if (to.k === "void") return undefined;
  if (to.k === "scalar") return scalarPointeeKey(t);
  if (to.k === "named") {
    const r = model.resolve(to, "rust");
    if (r.k === "void") return undefined;
    if (r.k === "scalar") return pointeeKey({ ...t, to: r }, model);
    return `t:${normName(to.name)}`;
  }
  return undefined;
}

/** A pointer to a generic instance (`*mut Mutex<Tunn>`), which the model keeps as its text: the
 * same text on both sides is the same handle type. */
function instanceKey(t: AbiType): string | undefined {
  return t.k === "ptr" && t.to.k === "unsafe" && t.to.text ? `t:${t.to.text.replace(/\s+/g, "")}` : undefined;
}

function pointeeName(t: AbiType): string | undefined {
  return t.k === "ptr" && t.to.k === "named" ? t.to.name : undefined;
}

/** The Rust type a Box/Arc holds, through `type` aliases (`type Shared = Mutex<Tally>`):
 * its name, or undefined when the alias stands for a generic instance whose arguments the
 * constructor's `Mutex::new(…)` does not show (nothing to compare). */
function innerName(model: Model, name: string): string | undefined {
  const r = model.resolve({ k: "named", name }, "rust");
  return r.k === "named" ? r.name : undefined;
}

function differentInner(model: Model, a: string | undefined, b: string | undefined): boolean {
  const ra = a && innerName(model, a);
  const rb = b && innerName(model, b);
  return !!ra && !!rb && normName(ra) !== normName(rb);
}

function sameHow(a: OwnHow, b: OwnHow): boolean {
  const g = (h: OwnHow) => (h === "forget" || h === "manuallydrop" ? "vec" : h);
  return g(a) === g(b);
}

function before(a: Range, b: Range): boolean {
  return a.line < b.line || (a.line === b.line && a.col < b.col);
}

/** Methods of the standard library's common types and traits (Iterator, Option/Result, Vec,
 * slices, str/String, maps, io::Read/Write, From/Into, Default, Clone…): a call of one of these on
 * a receiver whose type the body does not show is taken to be the standard library's, not a
 * crate function that happens to share the name. */
const STD_METHODS = new Set([
  "iter", "iter_mut", "into_iter", "map", "filter", "filter_map", "flat_map", "fold", "collect", "enumerate", "zip", "chain", "rev", "take", "skip",
  "step_by", "next", "nth", "last", "count", "sum", "product", "min", "max", "min_by", "max_by", "min_by_key", "max_by_key", "any", "all", "find",
  "position", "for_each", "peekable", "cloned", "copied", "chunks", "chunks_exact", "windows", "split", "split_at", "split_at_mut", "first", "last_mut",
  "get", "get_mut", "insert", "remove", "contains", "contains_key", "push", "pop", "push_back", "push_front", "pop_back", "pop_front", "front", "back",
  "len", "is_empty", "clear", "extend", "extend_from_slice", "truncate", "resize", "reserve", "drain", "retain", "sort", "sort_by", "sort_unstable",
  "dedup", "swap", "fill", "copy_from_slice", "clone_from_slice", "as_slice", "as_mut_slice", "as_ptr", "as_mut_ptr", "to_vec", "into_boxed_slice",
  "unwrap", "expect", "unwrap_or", "unwrap_or_else", "unwrap_or_default", "ok", "err", "ok_or", "ok_or_else", "and_then", "or_else", "map_err",
  "as_ref", "as_mut", "as_deref", "take", "replace", "is_some", "is_none", "is_ok", "is_err",
  "into", "from", "try_into", "try_from", "default", "clone", "to_owned", "to_string", "fmt", "eq", "ne", "cmp", "partial_cmp", "hash", "borrow",
  "read", "write", "read_exact", "write_all", "flush", "seek", "read_to_end", "read_to_string", "lock", "try_lock", "send", "recv", "join", "spawn",
  "to_str", "as_str", "as_bytes", "to_bytes", "trim", "parse", "starts_with", "ends_with", "chars", "bytes", "lines", "deref", "deref_mut", "drop",
  "load", "store", "fetch_add", "fetch_sub", "swap", "compare_exchange", "set", "with", "call", "apply", "add", "sub", "mul", "div", "index", "index_mut",
]);
/** Standard traits: an impl of one of these is reached through a value of its type (or the trait
 * path), never by a method name alone on a receiver of unknown type. */
const STD_TRAITS = new Set(["Write", "Read", "BufRead", "Seek", "Iterator", "IntoIterator", "DoubleEndedIterator", "ExactSizeIterator", "Extend",
  "FromIterator", "From", "Into", "TryFrom", "TryInto", "FromStr", "Default", "Clone", "Display", "Debug", "Drop", "Deref", "DerefMut", "AsRef",
  "AsMut", "Borrow", "BorrowMut", "Index", "IndexMut", "PartialEq", "Eq", "PartialOrd", "Ord", "Hash", "Hasher", "Add", "Sub", "Mul", "Div", "Rem",
  "AddAssign", "SubAssign", "MulAssign", "Neg", "Not", "BitAnd", "BitOr", "Shl", "Shr", "Future", "Error", "ToString", "Fn", "FnMut", "FnOnce", "Sum"]);

/**
 * Functions of the crate by name, and the call → function resolution the body rules follow: a
 * method call goes to a method of the receiver's type when the body shows that type (`self`, a
 * typed parameter or local), else to the one method of that name unless the name is a common
 * standard-library method or the only candidate implements a standard trait; a path call
 * `Type::f(…)` goes to `f` of that type's impl blocks; a bare or module-path call to a free function
 * (same file first).
 */
class CrateIndex {
  byName = new Map<string, FnDecl[]>();
  constructor(model: Model) {
    for (const f of model.allFns()) {
      if (f.lang !== "rust" || !own(f)) continue;
      const a = this.byName.get(f.name) ?? [];
      a.push(f);
      this.byName.set(f.name, a);
    }
  }
  resolve(from: FnDecl, c: Pick<RustCall, "callee" | "method" | "recv" | "head">): FnDecl | undefined {
    const callee = c.callee;
    const all = this.byName.get(callee) ?? [];
    if (!all.length) return undefined;
    const pick = (xs: FnDecl[]) => xs.find((f) => f.file === from.file) ?? (xs.length === 1 ? xs[0] : undefined);
    if (c.method) {
      const cands = all.filter((f) => own(f)!.hasSelf);
      if (c.recv) return pick(cands.filter((f) => own(f)!.implType === c.recv));
      if (STD_METHODS.has(callee)) return undefined;
      const plain = cands.filter((f) => !STD_TRAITS.has(own(f)!.traitName ?? ""));
      return plain.length === 1 ? plain[0] : undefined;
    }
    const cands = all.filter((f) => !own(f)!.hasSelf);
    const head = c.head;
    if (head && /^[A-Z]/.test(head)) {
      // `Type::f(…)`: an associated function of that type; a standard trait's path (`Default::default`)
      // names no type
      if (STD_TRAITS.has(head)) return undefined;
      return pick(cands.filter((f) => own(f)!.implType === head || own(f)!.traitName === head));
    }
    return pick(cands.filter((f) => !own(f)!.implType));
  }
}

interface RelRaw { deref?: boolean; param: number; how: OwnHow; inner?: string; nullChecked: boolean; byParam: boolean; site: Range; calleeRange?: Range; chain: string[] }

function paramIndex(fn: FnDecl, a: RustArg): number {
  return a.ident ? fn.params.findIndex((p) => p.name === a.ident) : -1;
}

function releasesOf(fn: FnDecl, idx: CrateIndex, depth = 0, seen = new Set<string>()): RelRaw[] {
  const o = own(fn);
  if (!o || depth > 6 || seen.has(fn.id)) return [];
  seen.add(fn.id);
  const out: RelRaw[] = [];
  const checkedBefore = (ident: string, at: Range) => o.nullChecks.some((c) => c.ident === ident && before(c.range, at));
  for (const r of o.releases) {
    const pi = paramIndex(fn, r.arg);
    if (pi < 0) continue;
    if (r.binding && o.reLeaks.some((l) => l.ident === r.binding && before(r.range, l.range))) continue;
    const p = fn.params[pi]!;
    // `*out` of `out: *mut *mut T`: the handle is the pointer `out` points to
    if (r.arg.deref && !(p.type.k === "ptr" && p.type.to.k === "ptr")) continue;
    const pt = r.arg.deref && p.type.k === "ptr" ? p.type.to : p.type;
    out.push({
      deref: r.arg.deref, param: pi, how: r.how, inner: r.inner ?? r.arg.cast ?? pointeeName(pt), byParam: !!r.byParam,
      nullChecked: r.byParam ? !!r.nullableParam : checkedBefore(r.arg.ident!, r.range),
      site: r.range, calleeRange: r.calleeRange, chain: [],
    });
  }
  for (const c of o.calls) {
    const h = idx.resolve(fn, c);
    if (!h || h === fn) continue;
    for (const r of releasesOf(h, idx, depth + 1, seen)) {
      const a = c.args[c.method && own(h)!.hasSelf ? r.param + 1 : r.param];
      if (!a) continue;
      const pi = paramIndex(fn, a);
      if (pi < 0) continue;
      out.push({
        param: pi, how: r.how, inner: r.inner ?? a.cast ?? pointeeName(fn.params[pi]!.type), byParam: false,
        nullChecked: r.nullChecked || checkedBefore(a.ident!, c.range), site: c.range, chain: [h.name, ...r.chain],
      });
    }
  }
  seen.delete(fn.id);
  return out;
}

interface ProdRaw { how: OwnHow; inner?: string; site: Range; chain: string[] }

function producesOf(fn: FnDecl, idx: CrateIndex, depth = 0, seen = new Set<string>()): ProdRaw[] {
  const o = own(fn);
  if (!o || depth > 6 || seen.has(fn.id) || fn.ret.k !== "ptr") return [];
  seen.add(fn.id);
  const out: ProdRaw[] = o.produces.map((p) => ({ how: p.how, inner: p.inner, site: p.range, chain: [] }));
  if (!out.length) {
    for (const c of o.calls) {
      const h = idx.resolve(fn, c);
      if (!h || h === fn) continue;
      for (const p of producesOf(h, idx, depth + 1, seen)) out.push({ ...p, site: c.range, chain: [h.name, ...p.chain] });
    }
  }
  seen.delete(fn.id);
  return out;
}

const modelCache = new WeakMap<Model, OwnershipModel>();

export function ownershipModel(model: Model): OwnershipModel {
  const hit = modelCache.get(model);
  if (hit) return hit;
  const idx = new CrateIndex(model);
  const ctors = new Map<string, CtorInfo>();
  const releasers = new Map<string, RelInfo[]>();
  for (const fn of model.allFns()) {
    if (!isBoundaryExport(fn) || !own(fn)) continue;
    const prods = producesOf(fn, idx);
    const rels = releasesOf(fn, idx);
    // a function that takes a handle and returns a new one (rebuild/resize) is a constructor only
    if (prods.length && fn.ret.k === "ptr") {
      const p = prods.find((x) => x.how !== "forget") ?? prods[0]!;
      const how: OwnHow = p.how === "forget" || p.how === "manuallydrop" ? "vec" : p.how;
      const key = how === "cstring" ? "t:char" : pointeeKey(fn.ret, model) ?? (p.inner ? `t:${normName(p.inner)}` : instanceKey(fn.ret) ?? `v:${stemOf(fn.symbol, CTOR_SUFFIX) ?? fn.symbol}`);
      ctors.set(fn.symbol, {
        fn, how, inner: how === "cstring" ? "CString" : p.inner ?? pointeeName(fn.ret), key,
        stem: stemOf(fn.symbol, CTOR_SUFFIX), chain: p.chain, site: p.site,
      });
    }
    if (rels.length) {
      releasers.set(fn.symbol, rels.map((r) => {
        const pt0 = fn.params[r.param]!.type;
        const pt = r.deref && pt0.k === "ptr" ? pt0.to : pt0;
        const key = pointeeKey(pt, model) ?? (r.how === "cstring" ? "t:char" : r.inner ? `t:${normName(r.inner)}` : instanceKey(pt) ?? `v:${stemOf(fn.symbol, REL_SUFFIX) ?? fn.symbol}`);
        return { fn, ...r, key, stem: stemOf(fn.symbol, REL_SUFFIX) };
      }));
    }
  }
  const pairs = (rel: RelInfo, ctor: CtorInfo): boolean => {
    if (rel.stem && ctor.stem && rel.stem === ctor.stem) return true;
    // A `char`/byte pointer is data, not a handle type: two functions passing one pair by the
    // type alone only when they agree on the allocation kind (a CString constructor with a
    // CString release, a boxed byte slice with a Box release); otherwise only by name stem.
    if (rel.key.startsWith("t:") && rel.key === ctor.key) return rel.key !== "t:char" || rel.how === "drop_in_place" || sameHow(rel.how, ctor.how);
    // `*mut c_void` releaser whose cast names the constructor's type
    if (!pointeeKey(rel.fn.params[rel.param]!.type, model) && rel.inner && ctor.inner && normName(rel.inner) === normName(ctor.inner)) return true;
    return false;
  };
  // releasersFor(c) = every releaser r with pairs(r, c), in releaser order, found through three
  // indexes (one per way pairs() can hold) instead of a scan of all releasers per constructor,
  // which is quadratic on a large workspace (measured: 5 s of the 1M-line bench).
  const allRels = [...releasers.values()].flat();
  const byStem = new Map<string, number[]>();
  const byKey = new Map<string, number[]>();
  const byInner = new Map<string, number[]>();
  const add = (m: Map<string, number[]>, k: string, i: number) => {
    const a = m.get(k);
    if (a) a.push(i);
    else m.set(k, [i]);
  };
  allRels.forEach((r, i) => {
    if (r.stem) add(byStem, r.stem, i);
    if (r.key.startsWith("t:")) add(byKey, r.key, i);
    if (r.inner && !pointeeKey(r.fn.params[r.param]!.type, model)) add(byInner, normName(r.inner), i);
  });
  const releasersFor = (c: CtorInfo): RelInfo[] => {
    const at = new Set<number>();
    for (const i of (c.stem && byStem.get(c.stem)) || []) at.add(i);
    for (const i of byKey.get(c.key) ?? []) at.add(i);
    for (const i of (c.inner && byInner.get(normName(c.inner))) || []) at.add(i);
    return [...at].sort((x, y) => x - y).map((i) => allRels[i]!).filter((r) => pairs(r, c));
  };
  const om: OwnershipModel = { ctors, releasers, pairs, releasersFor };
  modelCache.set(model, om);
  return om;
}

// ------------------------------------------------------------------ Rust-side rules

function fnRel(fn: FnDecl): Related {
  return { range: fn.nameRange, message: `\`${fn.name}\`` };
}

/** Comment text that documents a transfer of ownership to the callee (common practice in C API
 * comments): "takes ownership", "owned by", "will be freed together with", "must not be freed". */
const TRANSFER_DOC = /\b(takes?\s+(full\s+|over\s+)?ownership|ownership\s+(is\s+)?(passes|passed|transferred|moves|moved)|owned\s+by|(will\s+be|is|gets)\s+freed\s+(automatically|together|with|by|when|along)|(must|should|do|does)\s+not\s+(be\s+)?free(d)?|consumes\s+(the|its|this))\b/i;

function cProtoOf(model: Model, symbol: string): FnDecl | undefined {
  const g = model.symbols.get(symbol);
  return g?.c.find((f) => f.role === "proto" && f.inHeader) ?? g?.c.find((f) => f.role === "proto") ?? g?.c[0];
}

function checkRust(model: Model, om: OwnershipModel, out: Finding[]): void {
  for (const c of om.ctors.values()) {
    const rels = om.releasersFor(c);
    if (!rels.length) {
      const via = c.chain.length ? ` (through ${c.chain.map((x) => `\`${x}\``).join(" → ")})` : "";
      const proto = cProtoOf(model, c.fn.symbol);
      out.push(finding(NO_RELEASER, c.fn.nameRange,
        `\`${c.fn.symbol}\` returns a handle made by ${howText(c.how)}${via}, but no exported function takes it back: every handle leaks`,
        proto ? [{ range: proto.nameRange, message: "C declaration of the constructor" }] : [],
        { data: { fn: c.fn.id, how: c.how, proto: proto?.id } }));
    }
    for (const r of rels) {
      if (r.how === "drop_in_place") continue;
      if (!sameHow(r.how, c.how)) {
        out.push(finding(RELEASE_KIND, r.site,
          `\`${r.fn.symbol}\` takes the handle back with ${relText(r.how)}, but \`${c.fn.symbol}\` made it with ${howText(c.how)}`,
          [fnRel(c.fn), { range: c.site, message: `allocated here with ${howText(c.how)}` }],
          { data: { rel: r.fn.id, ctor: c.fn.id, how: c.how, calleeRange: r.calleeRange } }));
      } else if (differentInner(model, r.inner, c.inner)) {
        out.push(finding(RELEASE_KIND, r.site,
          `\`${r.fn.symbol}\` frees the handle as \`${boxOf(r.how)}<${r.inner}>\`, but \`${c.fn.symbol}\` allocated a \`${boxOf(c.how)}<${c.inner}>\``,
          [fnRel(c.fn), { range: c.site, message: `allocated here as ${c.inner}` }],
          { data: { rel: r.fn.id, ctor: c.fn.id, inner: c.inner, direct: !r.chain.length } }));
      }
    }
  }
  for (const rs of om.releasers.values()) {
    for (const r of rs) {
      const pname = r.fn.params[r.param]!.name;
      if (!r.nullChecked) {
        const msg = r.byParam
          ? `\`${r.fn.symbol}\` takes \`${pname}\` as a non-nullable \`Box\`: a NULL from C is undefined behaviour; take \`Option<Box<…>>\` or a raw pointer checked with \`is_null()\``
          : `\`${r.fn.symbol}\` releases \`${pname}\`${r.chain.length ? ` (in \`${r.chain.join("` → `")}\`)` : ""} without checking it for NULL: a release of NULL, which C++ destructors and error paths do, is undefined behaviour`;
        out.push(finding(RELEASE_NO_NULL_CHECK, r.site, msg, [fnRel(r.fn)], { data: { fn: r.fn.id, param: r.param, byParam: r.byParam } }));
      }
      const o = own(r.fn)!;
      const makesNew = om.ctors.has(r.fn.symbol);
      // a Box parameter put in ManuallyDrop / mem::forget / Box::into_raw is not freed on return;
      // a comment on either side that says the call takes the object over is a documented transfer
      const kept = r.byParam && o.reLeaks.some((l) => l.ident === pname);
      const documented = TRANSFER_DOC.test(`${r.fn.doc ?? ""}\n${cProtoOf(model, r.fn.symbol)?.doc ?? ""}`);
      if (!OWNER_NAME.test(r.fn.name) && !makesNew && !kept && !documented) {
        const borrowsToo = o.borrows.length > 0;
        out.push(finding(BORROWER_RELEASES, r.site,
          `\`${r.fn.symbol}\` looks like a method on the handle${borrowsToo ? " (it also borrows)" : ""} but takes ownership of \`${pname}\`${r.chain.length ? ` (in \`${r.chain.join("` → `")}\`)` : ""}: the handle is freed when it returns while the caller still holds it`,
          [fnRel(r.fn)], { data: { fn: r.fn.id, param: r.param, calleeRange: r.calleeRange, byParam: r.byParam, direct: !r.chain.length } }));
      }
    }
  }
}

function howText(h: OwnHow): string {
  switch (h) {
    case "box": return "`Box::into_raw`";
    case "arc": return "`Arc::into_raw`";
    case "rc": return "`Rc::into_raw`";
    case "cstring": return "`CString::into_raw`";
    default: return "a leaked `Vec`/`ManuallyDrop` buffer";
  }
}
function relText(h: OwnHow): string {
  switch (h) {
    case "box": return "`Box::from_raw`";
    case "arc": return "`Arc::from_raw`";
    case "rc": return "`Rc::from_raw`";
    case "cstring": return "`CString::from_raw`";
    case "drop_in_place": return "`ptr::drop_in_place`";
    default: return "`Vec::from_raw_parts`";
  }
}
function boxOf(h: OwnHow): string {
  return h === "arc" ? "Arc" : h === "rc" ? "Rc" : h === "vec" ? "Vec" : "Box";
}

/** One Rust place where a C handle type arrives as `*mut c_void` (plain data: gathered per chunk). */
interface VoidHandlePlace { ctype: string; range: Range; c: Range; label: string; fnName: string; fnId: string }

function voidHandlePlaces(model: Model): VoidHandlePlace[] {
  const out: VoidHandlePlace[] = [];
  for (const g of model.symbols.values()) {
    const proto = g.c.find((f) => f.role === "proto" && f.inHeader) ?? g.c.find((f) => f.role === "proto");
    if (!proto) continue;
    for (const r of g.rust) {
      if (r.role !== "export" || !isBoundaryExport(r)) continue;
      const pairsList: { rt: AbiType; ct: AbiType; range: Range; c: Range; label: string }[] = [];
      r.params.forEach((p, i) => {
        const cp = proto.params[i];
        if (cp) pairsList.push({ rt: p.type, ct: cp.type, range: p.typeRange, c: cp.range, label: `parameter \`${p.name}\`` });
      });
      pairsList.push({ rt: r.ret, ct: proto.ret, range: r.retRange ?? r.nameRange, c: proto.retRange ?? proto.nameRange, label: "return type" });
      for (const x of pairsList) {
        if (x.rt.k !== "ptr" || x.ct.k !== "ptr" || x.ct.to.k !== "named") continue;
        const rto = x.rt.to.k === "named" ? model.resolve(x.rt.to, "rust") : x.rt.to;
        if (rto.k !== "void") continue;
        const agg = model.aggregate(x.ct.to, "c");
        if (!agg || (agg.kind !== "opaque" && agg.kind !== "struct")) continue;
        out.push({ ctype: agg.name, range: x.range, c: x.c, label: x.label, fnName: r.name, fnId: r.id });
      }
    }
  }
  return out;
}

/** Every C handle type that reaches Rust as `*mut c_void`, anywhere in the workspace: a workspace
 * check (rules/api.ts WorkspaceCheck), since the places share no names. */
function indistinctFindings(items: GatheredItem[]): Finding[] {
  const byType = new Map<string, VoidHandlePlace[]>();
  for (const p of items as VoidHandlePlace[]) {
    const a = byType.get(p.ctype) ?? [];
    a.push(p);
    byType.set(p.ctype, a);
  }
  if (byType.size < 2) return [];
  const names = [...byType.keys()].sort();
  const out: Finding[] = [];
  for (const [t, places] of byType) {
    const others = names.filter((n) => n !== t);
    for (const p of places) {
      out.push(finding(INDISTINCT, p.range,
        `\`${p.fnName}\` ${p.label} is \`*mut c_void\` for the C handle type \`${t}\`; ${others.map((o) => `\`${o}\``).join(", ")} also reach${others.length === 1 ? "es" : ""} Rust as \`*mut c_void\`, so ferrule cannot tell these handles apart and rustc will not either`,
        [{ range: p.c, message: `C side: \`${t} *\`` }], { data: { fn: p.fnId, ctype: t } }));
    }
  }
  return out;
}

// ---- panics

const PANIC_ABIS_UNWIND = /-unwind$/;

type Site = RustPanic & { eff: "warning" | "info" };

/** `#[cfg(debug_assertions)]` (attribute text, which the grammar leaves opaque): the function
 * exists in debug builds only. */
function debugOnly(fn: FnDecl): boolean {
  return fn.attrs.some((a) => /cfg\s*\(\s*debug_assertions\s*\)/.test(a));
}

/** A site's level on a call path where the parameters in `active` carry C's values. */
function effLevel(fn: FnDecl, p: RustPanic, active: number): "warning" | "info" {
  const base = p.level ?? (["index", "overflow", "division", "borrow_mut"].includes(p.kind) ? "info" : "warning");
  if (base === "info" || debugOnly(fn)) return "info";
  if (p.taint !== undefined && (p.taint & active) === 0) return "info";
  return "warning";
}

/** Bits of the parameters of an exported Rust function that are handles to objects the crate
 * made: the Rust parameter points to a named Rust struct, and every C declaration of the
 * function takes there a pointer to a struct C leaves incomplete (declared, never defined). */
export function opaqueHandleParams(model: Model, fn: FnDecl): number {
  const cs = model.symbols.get(fn.symbol)?.c ?? [];
  if (!cs.length) return 0;
  let mask = 0;
  fn.params.forEach((p, i) => {
    if (i >= 30 || p.type.k !== "ptr" || p.type.to.k !== "named") return;
    const rt = model.aggregate(p.type.to, "rust", fn.file);
    if (!rt || rt.kind !== "struct") return;
    const opaque = cs.every((c) => {
      const ct = c.params[i] ? model.resolve(c.params[i]!.type, "c") : undefined;
      if (ct?.k !== "ptr") return false;
      const to = model.resolve(ct.to, "c");
      if (to.k !== "named") return false;
      const agg = model.aggregate(to, "c", c.file);
      return !agg || agg.kind === "opaque";
    });
    if (opaque) mask |= 1 << i;
  });
  return mask;
}

function levelOf(p: Site): "warning" | "info" {
  return p.eff;
}

function panicKindText(k: string): string {
  switch (k) {
    case "index": return "indexing (out of bounds panics)";
    case "overflow": return "integer arithmetic (overflow panics where overflow checks are on: debug builds, or `overflow-checks = true`)";
    case "division": return "integer division (division by zero panics)";
    case "borrow_mut": return "`RefCell::borrow_mut` (panics when already borrowed)";
    case "unwrap": return "`unwrap()`";
    case "expect": return "`expect()`";
    default: return `\`${k}!\``;
  }
}

/**
 * panic-across-c-abi. A site counts unless it is inside catch_unwind (directly, or inside a
 * closure handed to a crate helper that runs that parameter under catch_unwind), and helpers are
 * followed through calls the CrateIndex resolves by the receiver's type. The finding is a warning
 * when some site is an explicit panic on a value C controls (the extractor's level), else `info`:
 * an overflow, index or division no guard rules out, which panics only on inputs the code
 * otherwise handles.
 */
function checkPanics(model: Model, out: Finding[]): void {
  const idx = new CrateIndex(model);
  const callsByRange = new Map<FnDecl, Map<string, RustCall>>();
  const key = (r: Range) => `${r.line}:${r.col}`;
  /** Whether a site or call of `fn` runs inside a closure a catching helper takes. */
  const caught = (fn: FnDecl, x: { under?: RustOwnFacts["panics"][number]["under"] }): boolean => {
    if (!x.under) return false;
    let m = callsByRange.get(fn);
    if (!m) {
      m = new Map(own(fn)!.calls.map((c) => [key(c.range), c]));
      callsByRange.set(fn, m);
    }
    for (const u of x.under) {
      const c = m.get(key(u.call));
      const h = c ? idx.resolve(fn, c) : undefined;
      if (h && own(h)?.catchParams?.includes(u.arg)) return true;
    }
    return false;
  };
  const live = (fn: FnDecl, o: RustOwnFacts, active: number, given?: (number | null)[]): Site[] =>
    o.panics.filter((p) => !p.protected && !caught(fn, p) &&
      // an assert whose bounds on the parameters the caller's guards already give
      !(p.needs && given && p.needs.every((nd) => (given[nd.param] ?? -Infinity) >= nd.ge)))
      .map((p) => ({ ...p, eff: effLevel(fn, p, active) }));
  /** The callee's parameters that carry C's values: those whose argument reads an active one.
   * A pointer cast to a Rust struct no C file declares (`file.cast::<GzState>()`) carries none:
   * C cannot know that struct's members, so what they hold is what the crate put there. */
  const passOn = (c: RustCall, active: number): number => {
    let m = 0;
    const off = c.method ? 1 : 0;
    (c.argTaint ?? []).forEach((t, j) => {
      const cast = c.args[j + off]?.cast;
      if (cast && crateOnly(cast)) return;
      if (j < 30 && (t & active)) m |= 1 << j;
    });
    return m;
  };
  const crateOnlyMemo = new Map<string, boolean>();
  const crateOnly = (name: string): boolean => {
    let v = crateOnlyMemo.get(name);
    if (v === undefined) {
      v = model.typeDecls(name, "rust").some((d) => d.kind === "struct") && model.typeDecls(name, "c").length === 0;
      crateOnlyMemo.set(name, v);
    }
    return v;
  };
  type Hit = { chain: FnDecl[]; site: Site };
  const memo = new Map<string, Hit | null>();
  const helperPanics = (fn: FnDecl, depth: number, seen: Set<string>, active: number, given?: (number | null)[]): Hit | undefined => {
    const o = own(fn);
    if (!o || depth > 6 || seen.has(fn.id)) return undefined;
    const mk = `${fn.id}|${active}|${given?.join(",") ?? ""}`;
    if (memo.has(mk)) return memo.get(mk) ?? undefined;
    seen.add(fn.id);
    const sites = live(fn, o, active, given);
    let best: Hit | undefined;
    const w = sites.find((p) => levelOf(p) === "warning");
    if (w) best = { chain: [fn], site: w };
    else {
      if (sites[0]) best = { chain: [fn], site: sites[0] };
      for (const c of o.calls) {
        if (c.protected || caught(fn, c)) continue;
        const h = idx.resolve(fn, c);
        if (!h || h === fn || (h.isExtern && h.abi !== "Rust")) continue;
        const r = helperPanics(h, depth + 1, seen, passOn(c, active), c.argGe);
        if (r && (!best || (levelOf(r.site) === "warning" && levelOf(best.site) !== "warning"))) best = { chain: [fn, ...r.chain], site: r.site };
        if (best && levelOf(best.site) === "warning") break;
      }
    }
    seen.delete(fn.id);
    memo.set(mk, best ?? null);
    return best;
  };
  for (const fn of model.allFns()) {
    if (fn.lang !== "rust" || fn.role !== "export" || !fn.isExtern || fn.abi === "Rust" || PANIC_ABIS_UNWIND.test(fn.abi)) continue;
    const o = own(fn);
    if (!o) continue;
    // every parameter of the exported function is C's, except a handle C holds only as a
    // pointer to an incomplete type: the object behind it is the crate's (made by its own
    // constructor), C cannot write its fields (C11 6.2.5p1, 6.5.2.3: no member access through
    // a pointer to an incomplete struct type)
    const all = -1 & ~opaqueHandleParams(model, fn);
    const direct = live(fn, o, all);
    const viaHelpers: { call: Range; chain: FnDecl[]; site: Site }[] = [];
    for (const c of o.calls) {
      if (c.protected || caught(fn, c)) continue;
      const h = idx.resolve(fn, c);
      if (!h || h === fn || (h.isExtern && h.abi !== "Rust")) continue;
      const r = helperPanics(h, 1, new Set([fn.id]), passOn(c, all), c.argGe);
      if (r) viaHelpers.push({ call: c.range, chain: r.chain, site: r.site });
    }
    if (!direct.length && !viaHelpers.length) continue;
    const warn = direct.some((d) => levelOf(d) === "warning") || viaHelpers.some((v) => levelOf(v.site) === "warning");
    // warnings first: the message and the related places lead with the explicit panics
    const rank = (x: Site) => (levelOf(x) === "warning" ? 0 : 1);
    const dSorted = [...direct].sort((a, b) => rank(a) - rank(b));
    const vSorted = [...viaHelpers].sort((a, b) => rank(a.site) - rank(b.site));
    const firstOf = warn ? [...direct.filter((d) => levelOf(d) === "warning").map((d) => d.range), ...viaHelpers.filter((v) => levelOf(v.site) === "warning").map((v) => v.call)]
      : [...direct.map((d) => d.range), ...viaHelpers.map((v) => v.call)];
    const first = firstOf.sort((a, b) => (before(a, b) ? -1 : 1))[0]!;
    const kinds = [...new Set(dSorted.map((d) => d.kind))].map(panicKindText);
    const parts: string[] = [];
    if (kinds.length) parts.push(kinds.join(", "));
    for (const v of vSorted.slice(0, 3)) {
      parts.push(`${panicKindText(v.site.kind)} in ${[fn.name, ...v.chain.map((c) => c.name)].map((n) => `\`${n}\``).join(" → ")} (line ${v.site.range.line + 1})`);
    }
    const related: Related[] = [
      ...dSorted.slice(0, 8).map((d) => ({ range: d.range, message: `can panic: ${d.text}` })),
      ...vSorted.slice(0, 4).flatMap((v) => [
        ...v.chain.map((h) => ({ range: h.nameRange, message: `called: \`${h.name}\`` })),
        { range: v.site.range, message: `can panic: ${v.site.text}` },
      ]),
    ];
    const tail = warn ? "" : " (no guard seen in the code; these panic only on inputs outside the range the code otherwise handles)";
    out.push(finding(PANIC_ACROSS, first,
      `\`${fn.name}\` is \`extern "${fn.abi}"\` and can panic without \`catch_unwind\`: ${parts.join("; ")}${tail}; since Rust 1.81 such a panic aborts the whole process`,
      related, { data: { fn: fn.id, chain: vSorted[0]?.chain.map((c) => c.name) ?? [] }, ...(warn ? {} : { severity: "info" as const }) }));
  }
}

// ------------------------------------------------------------------ C/C++-side rules

interface CIndex {
  flows: CFlow[];
  byClass: Map<string, CFlow[]>;
  sources: Map<string, Map<string, FieldSource>>;
  fieldNames: Map<string, Set<string>>;
  classes: Map<string, CClass[]>;
  /** C/C++ helper functions that pass parameter i to a Rust releaser. */
  helperRel: Map<string, { param: number; rel: RelInfo }[]>;
  /** C/C++ helper functions that return a Rust constructor's result. */
  helperCtor: Map<string, CtorInfo>;
}

function cIndex(model: Model, om: OwnershipModel): CIndex {
  const flows: CFlow[] = [];
  const classes = new Map<string, CClass[]>();
  for (const f of model.files.values()) {
    if (f.lang === "rust") continue;
    const o = f.extra.ownership as COwnFacts | undefined;
    if (o?.flows) flows.push(...o.flows);
    for (const c of f.classes as CClass[]) {
      const a = classes.get(c.name) ?? [];
      a.push(c);
      classes.set(c.name, a);
    }
  }
  const helperRel = new Map<string, { param: number; rel: RelInfo }[]>();
  const helperCtor = new Map<string, CtorInfo>();
  for (const fl of flows) {
    if (fl.className && fl.name !== "operator()") continue;
    if (om.releasers.has(fl.name) || om.ctors.has(fl.name)) continue;
    for (const e of fl.events) {
      if (e.k === "call") {
        for (const r of om.releasers.get(e.callee) ?? []) {
          const a = e.args[r.param];
          const pi = a?.ref && !a.ref.this && !a.ref.of ? fl.params.indexOf(a.ref.name) : -1;
          if (pi >= 0) {
            const key = fl.className ? `${fl.className}::operator()` : fl.name;
            const arr = helperRel.get(key) ?? [];
            arr.push({ param: pi, rel: r });
            helperRel.set(key, arr);
          }
        }
      }
      if (e.k === "return" && e.arg?.call && om.ctors.has(e.arg.call) && !fl.className) helperCtor.set(fl.name, om.ctors.get(e.arg.call)!);
    }
  }
  const byClass = new Map<string, CFlow[]>();
  for (const fl of flows) if (fl.className) byClass.set(fl.className, [...(byClass.get(fl.className) ?? []), fl]);
  return { flows, byClass, sources: new Map(), fieldNames: new Map(), classes, helperRel, helperCtor };
}

const FREE_FNS = new Set(["free", "std::free", "::free", "g_free", "cfree"]);

function ctorFor(om: OwnershipModel, ci: CIndex, callee: string | undefined): CtorInfo | undefined {
  if (!callee) return undefined;
  const c = callee.replace(/^::/, "");
  return om.ctors.get(c) ?? ci.helperCtor.get(c);
}

function releasersAt(om: OwnershipModel, ci: CIndex, callee: string): { param: number; rel: RelInfo }[] {
  const c = callee.replace(/^::/, "");
  const direct = (om.releasers.get(c) ?? []).map((r) => ({ param: r.param, rel: r }));
  return direct.length ? direct : ci.helperRel.get(c) ?? [];
}

function keyOf(r: CRef, fl: CFlow, fieldNames: Set<string>): string {
  if (r.of) return `${r.of}.${r.name}`;
  if (r.this) return `this.${r.name}`;
  if (fl.locals.includes(r.name)) return r.name;
  if (fieldNames.has(r.name)) return `this.${r.name}`;
  return r.name;
}

interface SlotState {
  src?: CtorInfo;
  srcRange?: Range;
  released?: { range: Range; by: string; reported?: boolean; reportedAgain?: boolean };
}

function deleterOf(up: UniquePtrDecl, ci: CIndex, om: OwnershipModel): string | undefined {
  if (up.initDeleter) return up.initDeleter;
  if (up.initDeleterOther) {
    // a lambda deleter: the release function (or free / delete) its body calls
    const o = up.initDeleterOther;
    const rel = o.calls.find((c) => releasersAt(om, ci, c).length);
    if (rel) return rel;
    if (o.calls.some((c) => FREE_FNS.has(c))) return "free";
    if (o.deletes) return "delete";
    return undefined;
  }
  if (up.deleter.k === "fn") return up.deleter.name;
  if (up.deleter.k === "functor") {
    const key = `${up.deleter.cls}::operator()`;
    const h = ci.helperRel.get(key);
    if (h?.length) return key;
    const fl = ci.flows.find((f) => f.className === (up.deleter as { cls: string }).cls && f.name === "operator()");
    const call = fl?.events.find((e): e is Extract<CEvent, { k: "call" }> => e.k === "call");
    if (call && FREE_FNS.has(call.callee)) return "free";
    if (fl?.events.some((e) => e.k === "delete")) return "delete";
    return undefined;
  }
  return undefined;
}

/** A smart pointer `up` that takes over a handle made by `src`. `argRange` is where the pointer
 * argument is written (a fix adds the release function as deleter after it). */
function checkUniquePtr(up: UniquePtrDecl, src: CtorInfo | undefined, srcRange: Range | undefined, om: OwnershipModel, ci: CIndex, out: Finding[], argRange?: Range, subject?: string): void {
  if (!src) return;
  const rel: Related[] = [{ range: srcRange ?? up.range, message: `\`${src.fn.symbol}\` allocates it in Rust` }];
  if (up.smart === "shared" && !up.initDeleter && !up.initDeleterOther) {
    // std::shared_ptr<T>(p) with no deleter destroys p with `delete p` (C++ [util.smartptr.shared.dest]/1;
    // reset(p) is shared_ptr(p).swap(*this), [util.smartptr.shared.mod]/3)
    const fixRel = om.releasersFor(src)[0];
    const what = subject ?? (up.name ? `\`std::shared_ptr<${up.pointee}>\` \`${up.name}\` is given no deleter` : `this \`std::shared_ptr<${up.pointee}>\` is given no deleter`);
    out.push(finding(FOREIGN_FREE, up.range,
      `${what}, so it destroys the handle made by Rust \`${src.fn.symbol}\` with \`delete\`${fixRel ? `; pass \`&${fixRel.fn.symbol}\` as its deleter` : ""}`,
      rel, { data: { releaser: fixRel?.fn.symbol, deleterAfter: argRange ?? null } }));
    return;
  }
  if (up.smart !== "shared" && up.deleter.k === "default") {
    const fixRel = om.releasersFor(src)[0];
    out.push(finding(FOREIGN_FREE, up.range,
      `\`std::unique_ptr<${up.pointee}>\`${up.name ? ` \`${up.name}\`` : ""} uses the default deleter (\`delete\`) on a handle made by Rust \`${src.fn.symbol}\`${fixRel ? `; give it \`${fixRel.fn.symbol}\` as deleter` : ""}`,
      rel, { data: { releaser: fixRel?.fn.symbol } }));
    return;
  }
  const d = deleterOf(up, ci, om);
  if (!d) return;
  if (d === "delete" || FREE_FNS.has(d)) {
    out.push(finding(FOREIGN_FREE, up.range, `${up.name ? `\`${up.name}\`'s` : "the"} deleter calls \`${d}\` on a handle made by Rust \`${src.fn.symbol}\``, rel));
    return;
  }
  const rels = releasersAt(om, ci, d);
  if (rels.length && !rels.some((r) => om.pairs(r.rel, src))) {
    out.push(finding(KIND_MISMATCH, up.range, `${up.name ? `\`${up.name}\`` : `this \`std::${up.smart === "shared" ? "shared" : "unique"}_ptr\``} holds a handle from \`${src.fn.symbol}\` but its deleter \`${d}\` releases another handle type`, rel));
  }
}

/** The smart pointer declaration of field `field` of class `cls`, if it is one. */
function fieldUptr(ci: CIndex, cls: string | undefined, field: string): UniquePtrDecl | undefined {
  if (!cls) return undefined;
  for (const c of ci.classes.get(cls) ?? []) for (const f of c.fields) if (f.name === field && f.uptr) return f.uptr;
  return undefined;
}

function classFields(ci: CIndex, name: string | undefined): Set<string> {
  if (!name) return new Set();
  let s = ci.fieldNames.get(name);
  if (!s) {
    s = new Set<string>();
    for (const c of ci.classes.get(name) ?? []) for (const f of c.fields) s.add(f.name);
    ci.fieldNames.set(name, s);
  }
  return s;
}

/** Class-level sources of each field: `this.f` → constructor that fills it. */
interface FieldSource { src: CtorInfo; range: Range; deleterArg?: string; deleterOther?: DeleterArg; argRange?: Range }

function fieldSources(ci: CIndex, om: OwnershipModel, cls: string): Map<string, FieldSource> {
  const hit = ci.sources.get(cls);
  if (hit) return hit;
  const m = new Map<string, FieldSource>();
  ci.sources.set(cls, m);
  const fields = classFields(ci, cls);
  for (const c of ci.classes.get(cls) ?? []) {
    for (const f of c.fields) {
      const s = ctorFor(om, ci, f.init?.call ?? f.uptr?.initCall);
      if (s) m.set(f.name, { src: s, range: f.range });
    }
  }
  for (const fl of ci.byClass.get(cls) ?? []) {
    for (const e of fl.events) {
      if (e.k !== "assign" || !e.rhs) continue;
      const s = ctorFor(om, ci, e.rhs.call);
      if (!s) continue;
      const k = keyOf(e.lhs, fl, fields);
      const x = e as { deleterArg?: string; deleterOther?: DeleterArg };
      if (k.startsWith("this.")) m.set(k.slice(5), { src: s, range: e.range, deleterArg: x.deleterArg, deleterOther: x.deleterOther, argRange: e.rhs.range });
    }
  }
  return m;
}

function checkFlow(fl: CFlow, om: OwnershipModel, ci: CIndex, model: Model, out: Finding[]): void {
  const fields = classFields(ci, fl.className);
  const state = new Map<string, SlotState>();
  if (fl.className) {
    for (const [f, s] of fieldSources(ci, om, fl.className)) state.set(`this.${f}`, { src: s.src, srcRange: s.range });
  }
  const slotOf = (a: CArg | null | undefined): { key?: string; st?: SlotState; src?: CtorInfo; srcRange?: Range } => {
    if (!a) return {};
    if (a.call) {
      const s = ctorFor(om, ci, a.call);
      return { src: s, srcRange: a.range };
    }
    if (!a.ref) return {};
    const key = keyOf(a.ref, fl, fields);
    const st = state.get(key);
    return { key, st, src: st?.src, srcRange: st?.srcRange };
  };
  const useAfter = (key: string, st: SlotState, at: Range, what: string, again = false) => {
    if (!st.released) return;
    if (again ? st.released.reportedAgain : st.released.reported) return;
    if (again) st.released.reportedAgain = true;
    else st.released.reported = true;
    out.push(finding(USE_AFTER_RELEASE, at,
      `\`${key.replace(/^this\./, "")}\` is ${what} after \`${st.released.by}\` released it`,
      [{ range: st.released.range, message: `released here by \`${st.released.by}\`` }], { data: { key } }));
  };
  for (const e of fl.events) {
    switch (e.k) {
      case "assign": {
        const k = keyOf(e.lhs, fl, fields);
        const r = slotOf(e.rhs);
        state.set(k, { src: r.src, srcRange: r.srcRange });
        // unique_ptr locals/fields are handled from their declarations
        break;
      }
      case "swap": {
        const ka = keyOf(e.a, fl, fields), kb = keyOf(e.b, fl, fields);
        const sa = state.get(ka), sb = state.get(kb);
        state.set(ka, sb ?? {});
        state.set(kb, sa ?? {});
        break;
      }
      case "smart": {
        const s = slotOf(e.arg);
        if (s.src) checkUniquePtr(e.up, s.src, s.srcRange, om, ci, out, e.up.initArgRange,
          e.up.name ? undefined : `the \`std::shared_ptr<${e.up.pointee}>\` built from \`${e.arg.text}\` is given no deleter`);
        break;
      }
      case "reset": {
        // the smart pointer `obj` names: a local declared earlier in this flow, or a field
        const k = keyOf(e.obj, fl, fields);
        const decl = k.startsWith("this.") ? fieldUptr(ci, fl.className, k.slice(5)) : fl.uptrs.find((u) => u.name === k);
        const s = slotOf(e.arg);
        if (!decl || !s.src) break;
        // shared_ptr::reset(p) takes no deleter from the old value; unique_ptr::reset(p) keeps its deleter type
        const up: UniquePtrDecl = decl.smart === "shared"
          ? { ...decl, initCall: undefined, initDeleter: e.deleter?.name, initDeleterOther: e.deleter && !e.deleter.name ? e.deleter : undefined }
          : { ...decl, initDeleterOther: undefined };
        checkUniquePtr({ ...up, name: "", range: e.range }, s.src, s.srcRange, om, ci, out, e.arg.range,
          `\`${k.replace(/^this\./, "")}.reset(${e.arg.text})\` gives the \`std::shared_ptr<${decl.pointee}>\` no deleter`);
        break;
      }
      case "use": {
        const k = keyOf(e.ref, fl, fields);
        const st = state.get(k);
        if (st) useAfter(k, st, e.range, "used");
        break;
      }
      case "delete": {
        const s = slotOf(e.arg);
        if (s.src) foreignFree(e.range, e.array ? "delete[]" : "delete", s.src, s.srcRange, e.arg, om, out);
        break;
      }
      case "call": {
        const callee = e.callee.replace(/^::/, "");
        if (FREE_FNS.has(callee) || FREE_FNS.has(e.callee)) {
          const s = slotOf(e.args[0]);
          if (s.src) foreignFree(e.range, "free()", s.src, s.srcRange, e.args[0]!, om, out, e.range);
          break;
        }
        const rels = releasersAt(om, ci, callee);
        for (const r of rels) {
          const a = e.args[r.param];
          const s = slotOf(a);
          if (s.key && s.st?.released) {
            useAfter(s.key, s.st, e.range, `released again by \`${callee}\``, true);
          }
          if (s.src && !om.pairs(r.rel, s.src)) {
            out.push(finding(KIND_MISMATCH, a!.range,
              `\`${callee}\` releases a handle made by \`${s.src.fn.symbol}\`, which belongs to ${om.releasersFor(s.src).map((x) => `\`${x.fn.symbol}\``).join(", ") || "no release function"}`,
              [{ range: s.srcRange ?? e.range, message: `made here by \`${s.src.fn.symbol}\`` }, fnRel(r.rel.fn)]));
          }
          if (s.key && !e.exitsAfter) {
            const st = state.get(s.key) ?? {};
            st.released = { range: e.range, by: callee };
            state.set(s.key, st);
          }
        }
        if (!rels.length) {
          // a typed handle passed where another handle type is expected (the C++ compiler only
          // catches this when both are typed; handles kept in void* slip through)
          const proto = cProtoOf(model, callee);
          if (proto) {
            e.args.forEach((a, i) => {
              const s = slotOf(a);
              const pt = proto.params[i]?.type;
              if (!s.src || !pt || pt.k !== "ptr" || pt.to.k !== "named") return;
              const srcProto = cProtoOf(model, s.src.fn.symbol);
              const rt = srcProto?.ret;
              if (rt?.k === "ptr" && rt.to.k === "named" && normName(rt.to.name) !== normName(pt.to.name)) {
                out.push(finding(KIND_MISMATCH, a.range,
                  `\`${callee}\` expects a \`${pt.to.name} *\` but gets the \`${rt.to.name} *\` made by \`${s.src.fn.symbol}\``,
                  [{ range: s.srcRange ?? e.range, message: `made here by \`${s.src.fn.symbol}\`` }, { range: proto.params[i]!.range, message: "parameter declared here" }]));
              }
            });
          }
        }
        break;
      }
    }
  }
  for (const up of fl.uptrs) if (!up.byEvent) checkUniquePtr(up, ctorFor(om, ci, up.initCall), up.range, om, ci, out, up.initArgRange);
}

function foreignFree(at: Range, how: string, src: CtorInfo, srcRange: Range | undefined, arg: CArg, om: OwnershipModel, out: Finding[], callRange?: Range): void {
  const fix = om.releasersFor(src)[0];
  out.push(finding(FOREIGN_FREE, at,
    `\`${how}\` on \`${arg.text}\`, which Rust allocated in \`${src.fn.symbol}\` with ${howText(src.how)}${fix ? `; release it with \`${fix.fn.symbol}\`` : ""}`,
    [{ range: srcRange ?? at, message: `allocated here by \`${src.fn.symbol}\`` }, ...(fix ? [fnRel(fix.fn)] : [])],
    { data: { releaser: fix?.fn.symbol, arg: arg.text, callRange: callRange ?? at } }));
}

/** Releases of each field in each flow of a class (following calls to the class's own methods). */
function releasedFields(ci: CIndex, om: OwnershipModel, cls: string, fl: CFlow, fields: Set<string>, depth = 0): Map<string, { range: Range; by: string }> {
  const m = new Map<string, { range: Range; by: string }>();
  if (depth > 4) return m;
  for (const e of fl.events) {
    if (e.k !== "call") continue;
    for (const r of releasersAt(om, ci, e.callee)) {
      const a = e.args[r.param];
      if (!a?.ref) continue;
      const k = keyOf(a.ref, fl, fields);
      if (k.startsWith("this.")) m.set(k.slice(5), { range: e.range, by: e.callee });
    }
    const own2 = (ci.byClass.get(cls) ?? []).find((f) => f.name === e.callee && f !== fl);
    if (own2) for (const [k, v] of releasedFields(ci, om, cls, own2, fields, depth + 1)) if (!m.has(k)) m.set(k, v);
  }
  return m;
}

/**
 * Where a user-written copy constructor or copy assignment leaves this object holding the
 * source's handle: the last store into `field` copies `param.field` (`acc_(o.acc_)`,
 * `acc_ = o.acc_;`) and the handle is not afterwards passed to a function (which may take a new
 * reference to it, as a retain/add-ref function of a reference-counted handle does). A store of a
 * new handle (a constructor or clone call) is not a copy of the pointer.
 */
function copiesHandle(fl: CFlow, field: string, fields: Set<string>, om: OwnershipModel, ci: CIndex): CArg | undefined {
  const param = (fl as CFlow & { param?: string }).param ?? fl.params[0];
  if (!param) return undefined;
  const self = `this.${field}`;
  const isHandle = (a: CArg | undefined) => !!a?.ref && (keyOf(a.ref, fl, fields) === self || (a.ref.of === param && a.ref.name === field));
  let copied: CArg | undefined;
  for (const e of fl.events) {
    if (e.k === "assign" && keyOf(e.lhs, fl, fields) === self) {
      copied = e.rhs?.ref && !e.rhs.viaGet && e.rhs.ref.of === param && e.rhs.ref.name === field ? { ...e.rhs, range: e.range } : undefined;
    } else if (e.k === "swap" && [e.a, e.b].some((r) => keyOf(r, fl, fields) === self)) {
      copied = undefined;
    } else if (copied && e.k === "call" && !FREE_FNS.has(e.callee) && !releasersAt(om, ci, e.callee).length && e.args.some(isHandle)) {
      copied = undefined;
    }
  }
  return copied;
}

const NONCOPYABLE_TYPES = /\b(unique_ptr|mutex|thread|atomic|condition_variable|ofstream|ifstream|fstream|promise|future)\b/;

function checkClasses(model: Model, om: OwnershipModel, ci: CIndex, out: Finding[]): void {
  for (const [name, decls] of ci.classes) {
    const cls = decls.find((c) => c.members.length || c.fields.length) ?? decls[0]!;
    const fields = classFields(ci, name);
    const srcs = fieldSources(ci, om, name);
    const flows = ci.byClass.get(name) ?? [];
    const members = decls.flatMap((d) => d.members);
    for (const f of flows) if (f.member && !members.some((m) => m.range.file === f.range.file && m.range.line === f.range.line)) members.push({ kind: f.member, state: f.state, name: f.name, range: f.range, nameRange: f.nameRange });

    // unique_ptr fields
    for (const f of decls.flatMap((d) => d.fields)) {
      if (!f.uptr) continue;
      const s = srcs.get(f.name);
      const up = s?.deleterArg ? { ...f.uptr, initDeleter: s.deleterArg } : s?.deleterOther ? { ...f.uptr, initDeleterOther: s.deleterOther } : f.uptr;
      checkUniquePtr(up, s?.src, s?.range, om, ci, out, s?.argRange ?? f.uptr.initArgRange);
    }

    const handleFields = decls.flatMap((d) => d.fields).filter((f) => !f.uptr && srcs.has(f.name));
    if (!handleFields.length) continue;
    const dtor = flows.find((f) => f.member === "dtor" && f.state === "user");
    const releasedBy = new Map<string, { range: Range; by: string; inDtor: boolean }>();
    for (const fl of flows) {
      for (const [k, v] of releasedFields(ci, om, name, fl, fields)) {
        const prev = releasedBy.get(k);
        if (!prev || fl === dtor) releasedBy.set(k, { ...v, inDtor: fl === dtor || !!prev?.inDtor });
      }
    }
    // a handle handed to something else (returned, stored elsewhere, passed to a non-Rust function) may be owned there
    const escapes = new Set<string>();
    for (const fl of flows) {
      for (const e of fl.events) {
        const mark = (a: CArg | null | undefined) => {
          if (a?.ref && !a.viaGet) {
            const k = keyOf(a.ref, fl, fields);
            if (k.startsWith("this.")) escapes.add(k.slice(5));
          }
        };
        if (e.k === "return") mark(e.arg);
        if (e.k === "assign" && e.rhs?.ref && !e.lhs.of) mark(e.rhs);
        if (e.k === "call" && !model.symbols.get(e.callee)?.rust.length && !FREE_FNS.has(e.callee) && !ci.helperRel.has(e.callee) && e.callee !== "swap" && e.callee !== "exchange" && !flows.some((f) => f.name === e.callee)) {
          for (const a of e.args) mark(a);
        }
      }
    }
    for (const f of handleFields) {
      const s = srcs.get(f.name)!;
      const rel = releasedBy.get(f.name);
      if (!rel) {
        if (escapes.has(f.name)) continue;
        const fix = om.releasersFor(s.src)[0];
        out.push(finding(WRAPPER_LEAKS, f.range,
          `\`${name}\` stores the handle \`${f.name}\` from \`${s.src.fn.symbol}\` but no member passes it to ${fix ? `\`${fix.fn.symbol}\`` : "a release function"}: every \`${name}\` leaks its Rust state`,
          [{ range: s.range, message: `filled here by \`${s.src.fn.symbol}\`` }],
          { data: { cls: name, field: f.name, releaser: fix?.fn.symbol, dtor: dtor ? { body: dtor.bodyRange } : undefined, anchor: members.find((m) => m.kind === "ctor")?.range ?? null, classBody: cls.bodyRange } }));
        continue;
      }
      if (!rel.inDtor) continue;
      // A member function that releases the handle and leaves the field holding it: the
      // destructor releases it again when that function ran first (double release on two paths).
      if (dtor) {
        const inDtor = releasedFields(ci, om, name, dtor, fields).get(f.name);
        for (const fl of flows) {
          if (fl === dtor || fl.state !== "user" || (fl.member && fl.member !== "method")) continue;
          const r = releasedFields(ci, om, name, fl, fields).get(f.name);
          if (!inDtor || !r) continue;
          const cleared = fl.events.some((e) => (e.k === "assign" && keyOf(e.lhs, fl, fields) === `this.${f.name}` && !before(e.range, r.range)) ||
            (e.k === "swap" && [e.a, e.b].some((x) => keyOf(x, fl, fields) === `this.${f.name}`)) ||
            (e.k === "reset" && keyOf(e.obj, fl, fields) === `this.${f.name}`));
          if (cleared) continue;
          out.push(finding(USE_AFTER_RELEASE, r.range,
            `\`${name}::${fl.name}\` releases \`${f.name}\` (\`${r.by}\`) but leaves the field holding it: the destructor releases it again when \`${fl.name}\` ran first (double release); set \`${f.name}\` to nullptr after the release`,
            [{ range: inDtor.range, message: `the destructor releases \`${f.name}\` here` }],
            { data: { cls: name, field: f.name, member: fl.name } }));
        }
      }
      // Copyability (C++ [class.copy.ctor]/6, [class.copy.assign]/2): an implicit copy member is
      // deleted when the class declares a move constructor or move assignment.
      const has = (k: string) => members.filter((m) => m.kind === k);
      const declaresMove = has("moveCtor").length > 0 || has("moveAssign").length > 0;
      const copyable = (k: "copyCtor" | "copyAssign") => {
        const ms = has(k);
        if (ms.length) return ms.some((m) => m.state === "defaulted") ? "defaulted" : null;
        return declaresMove ? null : "implicit";
      };
      const basesKnownCopyable = cls.bases.every((b) => {
        const bd = ci.classes.get(b);
        if (!bd) return false; // unknown base (may be a non-copyable mixin): say nothing
        return !bd.flatMap((d) => d.members).some((m) => (m.kind === "copyCtor" || m.kind === "copyAssign") && m.state === "deleted");
      });
      const memberBlocks = decls.flatMap((d) => d.fields).some((x) => (x.uptr && x.uptr.smart !== "shared") || NONCOPYABLE_TYPES.test(x.typeText));
      // implicit and defaulted copies are copyable only when every base and member is
      const implicitOk = basesKnownCopyable && !memberBlocks;
      const cc = implicitOk ? copyable("copyCtor") : null, ca = implicitOk ? copyable("copyAssign") : null;
      // a user-written copy member that copies the pointer shares the handle just the same
      const userCopy = (k: "copyCtor" | "copyAssign") => {
        for (const fl of flows) {
          if (fl.member !== k || fl.state !== "user") continue;
          const at = copiesHandle(fl, f.name, fields, om, ci);
          if (at) return { fl, at };
        }
        return undefined;
      };
      const ucc = userCopy("copyCtor"), uca = userCopy("copyAssign");
      if (cc || ca || ucc || uca) {
        const which = [
          cc && `copy constructor (${cc})`, ucc && `user-written copy constructor that copies the pointer (\`${f.name}\` from \`${ucc.at.text}\`)`,
          ca && `copy assignment (${ca})`, uca && `user-written copy assignment that copies the pointer (\`${f.name}\` from \`${uca.at.text}\`)`,
        ].filter(Boolean).join(" and ");
        const dtorMember = members.find((m) => m.kind === "dtor" && m.range.file === cls.file) ?? null;
        const copies: Related[] = [ucc, uca].filter((u): u is NonNullable<typeof ucc> => !!u).map((u) => ({ range: u.at.range, message: `the ${u.fl.member === "copyCtor" ? "copy constructor" : "copy assignment"} copies the handle here` }));
        // what a fix replaces with a deleted declaration: an in-class definition, or the in-class
        // declaration of an out-of-class definition (which is then removed)
        const replace = [ucc, uca].filter((u): u is NonNullable<typeof ucc> => !!u).map((u) => {
          const inClass = u.fl.range.file === cls.file && u.fl.range.line > cls.bodyRange.line && u.fl.range.endLine <= cls.bodyRange.endLine;
          const decl = inClass ? undefined : members.find((m) => m.kind === u.fl.member && m.state === "declared" && m.range.file === cls.file);
          return { kind: u.fl.member, def: u.fl.range, decl: decl?.range ?? null, inClass };
        });
        out.push(finding(COPYABLE_WRAPPER, cls.nameRange,
          `\`${name}\` releases \`${f.name}\` in its destructor (\`${rel.by}\`) but has a ${which}: a copy shares the handle and both destructors release it (double free)`,
          [{ range: rel.range, message: `released here by \`${rel.by}\`` }, { range: s.range, message: `filled here by \`${s.src.fn.symbol}\`` }, ...copies],
          { data: { cls: name, dtor: dtorMember?.range ?? null, classBody: cls.bodyRange, copyCtor: !!cc, copyAssign: !!ca, replace } }));
      }
      for (const mv of flows.filter((x) => (x.member === "moveCtor" || x.member === "moveAssign") && x.state === "user")) {
        const param = (mv as CFlow & { param?: string }).param ?? mv.params[0];
        if (!param) continue;
        const nulls = mv.events.some((e) =>
          (e.k === "assign" && e.lhs.of === param && e.lhs.name === f.name && e.isNull) ||
          (e.k === "swap" && [e.a, e.b].some((r) => r.of === param && r.name === f.name)));
        if (!nulls) {
          const lastRet = [...mv.events].reverse().find((e) => e.k === "return");
          out.push(finding(MOVE_KEEPS, mv.nameRange,
            `the ${mv.member === "moveCtor" ? "move constructor" : "move assignment"} of \`${name}\` leaves \`${param}.${f.name}\` holding the handle: \`${param}\`'s destructor will release it while this object uses it`,
            [{ range: rel.range, message: `the destructor releases \`${f.name}\` here` }],
            { data: { param, field: f.name, body: mv.bodyRange, before: lastRet?.range ?? null } }));
        }
      }
    }
  }
}

export const ownershipFamily: RuleFamily = {
  name: "ownership",
  rules: [NO_RELEASER, RELEASE_NO_NULL_CHECK, BORROWER_RELEASES, RELEASE_KIND, PANIC_ACROSS, INDISTINCT,
    WRAPPER_LEAKS, COPYABLE_WRAPPER, MOVE_KEEPS, USE_AFTER_RELEASE, FOREIGN_FREE, KIND_MISMATCH],
  workspace: [{ id: INDISTINCT.id, gather: voidHandlePlaces, conclude: indistinctFindings }],
  check(model: Model): Finding[] {
    const out: Finding[] = [];
    const om = ownershipModel(model);
    checkRust(model, om, out);
    checkPanics(model, out);
    const ci = cIndex(model, om);
    for (const fl of ci.flows) checkFlow(fl, om, ci, model, out);
    checkClasses(model, om, ci, out);
    return out;
  },
};
