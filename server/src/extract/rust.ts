// Rust syntax → boundary model facts: exported `extern "C"` functions, `extern` import blocks
// (also the 2024 `unsafe extern` form), #[repr] structs/unions/enums, type aliases, consts and
// layout assertions.

import type { Node, Tree } from "../parse/parser.js";
import { parseText } from "../parse/parser.js";
import type { AbiType, CachedItem, Field, ItemCache, FileFacts, FnDecl, MacroItem, ModDecl, Param, SourceAssert, TypeDecl } from "../model/types.js";
import type { ScalarKind } from "../model/targets.js";
import { docAbove, emptyFacts, evalConst, rangeOf, walk } from "./common.js";
import { rustExtractors } from "./hooks.js";
import { allOf, canHoldIn, parseCfg, parseCfgAttr, type Cond } from "../model/conditions.js";

const RUST_PRIMS: Record<string, ScalarKind> = {
  i8: "i8", u8: "u8", i16: "i16", u16: "u16", i32: "i32", u32: "u32", i64: "i64", u64: "u64",
  i128: "i128", u128: "u128", isize: "isize", usize: "usize", f32: "f32", f64: "f64", bool: "bool",
};

/** core::ffi / std::os::raw / std::ffi / libc names (common practice: these names always mean the C types). */
const FFI_NAMES: Record<string, ScalarKind> = {
  c_char: "char", c_schar: "schar", c_uchar: "uchar", c_short: "short", c_ushort: "ushort",
  c_int: "int", c_uint: "uint", c_long: "long", c_ulong: "ulong", c_longlong: "llong",
  c_ulonglong: "ullong", c_float: "float", c_double: "double", size_t: "size_t", c_size_t: "size_t",
  ssize_t: "ssize_t", c_ssize_t: "ssize_t", ptrdiff_t: "ptrdiff_t", c_ptrdiff_t: "ptrdiff_t",
  intptr_t: "intptr_t", uintptr_t: "uintptr_t", wchar_t: "wchar_t",
  int8_t: "i8", uint8_t: "u8", int16_t: "i16", uint16_t: "u16", int32_t: "i32", uint32_t: "u32",
  int64_t: "i64", uint64_t: "u64",
};

const NOT_FFI: Record<string, string> = {
  String: "String is a Rust heap string (pointer, capacity, length); C sees no such layout",
  Vec: "Vec<T> is three words with unspecified field order",
  str: "&str is a fat pointer (address + length)",
  Rc: "Rc<T> has no C representation",
  Arc: "Arc<T> has no C representation (pass Arc::into_raw's pointer instead)",
  RefCell: "RefCell<T> has no C representation",
  Cell: "Cell<T> has no stable C representation",
  HashMap: "HashMap has no C representation",
  Result: "Result<T, E> has no C representation",
  CString: "CString is an owning Rust type; pass CString::into_raw()/as_ptr() instead",
  CStr: "&CStr is a fat pointer; pass as_ptr() instead",
  OsString: "OsString has no C representation",
  PathBuf: "PathBuf has no C representation",
  Box: "Box<T> of an unsized type is a fat pointer",
};

export interface RustCtx {
  file: string;
  consts: Map<string, number>;
}

export function rustType(n: Node | null, ctx: RustCtx): AbiType {
  if (!n) return { k: "void" };
  switch (n.type) {
    case "primitive_type": {
      const s = RUST_PRIMS[n.text];
      if (s) return { k: "scalar", s };
      if (n.text === "char") return { k: "unsafe", text: "char", why: "Rust `char` is a Unicode scalar value (any u32 bit pattern that is not one is undefined behaviour); use u32 or c_char" };
      if (n.text === "str") return { k: "unsafe", text: "str", why: NOT_FFI.str! };
      return { k: "unknown", text: n.text };
    }
    case "unit_type":
    case "never_type":
      return { k: "void" };
    case "pointer_type": {
      const mut = n.children.some((c) => c.type === "mutable_specifier");
      const inner = rustType(n.childForFieldName("type"), ctx);
      return { k: "ptr", to: inner, mut, via: "raw", nullable: true };
    }
    case "reference_type": {
      const mut = n.children.some((c) => c.type === "mutable_specifier");
      const innerNode = n.childForFieldName("type");
      if (innerNode?.type === "slice_type") return { k: "unsafe", text: n.text, why: "a slice reference is a fat pointer (address + length); pass a pointer and a length" };
      if (innerNode?.type === "dynamic_type") return { k: "unsafe", text: n.text, why: "a trait-object reference is a fat pointer (data + vtable)" };
      const inner = rustType(innerNode, ctx);
      if (inner.k === "unsafe" && inner.text === "str") return { k: "unsafe", text: n.text, why: NOT_FFI.str! };
      return { k: "ptr", to: inner, mut, via: "ref", nullable: false };
    }
    case "array_type": {
      const el = rustType(n.childForFieldName("element"), ctx);
      const lenNode = n.childForFieldName("length");
      if (!lenNode) return { k: "unsafe", text: n.text, why: "a slice has no fixed size" };
      return { k: "array", of: el, len: evalConst(lenNode, ctx.consts), lenText: lenNode.text };
    }
    case "function_type": {
      const mods = n.namedChildren.find((c) => c.type === "function_modifiers");
      const ext = mods?.namedChildren.find((c) => c.type === "extern_modifier");
      const abi = ext ? (ext.namedChildren.find((c) => c.type === "string_literal")?.text.replace(/"/g, "") ?? "C") : "Rust";
      const params: AbiType[] = [];
      let variadic = false;
      for (const p of n.childForFieldName("parameters")?.namedChildren ?? []) {
        if (p.type === "variadic_parameter") { variadic = true; continue; }
        if (p.type === "parameter") params.push(rustType(p.childForFieldName("type"), ctx));
        else if (p.type !== "attribute_item" && p.type !== "line_comment" && p.type !== "block_comment") params.push(rustType(p, ctx));
      }
      const ret = rustType(n.childForFieldName("return_type"), ctx);
      if (abi === "Rust") return { k: "unsafe", text: n.text, why: "a Rust-ABI function pointer; C calls it with the C calling convention" };
      return { k: "fn", params, ret, variadic, abi, nullable: false };
    }
    case "generic_type": {
      const base = n.childForFieldName("type")?.text ?? "";
      const last = base.split("::").pop()!;
      const args = n.childForFieldName("type_arguments")?.namedChildren.filter((c) => c.type !== "lifetime") ?? [];
      const a0 = args[0] ?? null;
      if (last === "Option" && a0) {
        const inner = rustType(a0, ctx);
        if (inner.k === "ptr" && inner.via !== "raw") return { ...inner, nullable: true };
        if (inner.k === "fn") return { ...inner, nullable: true };
        const why = "Option<T> has a C layout only around a reference, Box, NonNull or function pointer (or a #[repr(transparent)] struct around one)";
        return inner.k === "named" || (inner.k === "unsafe" && inner.generic) ? { k: "unsafe", text: n.text, why, optionOf: inner } : { k: "unsafe", text: n.text, why };
      }
      if (last === "NonNull" && a0) return { k: "ptr", to: rustType(a0, ctx), mut: true, via: "nonnull", nullable: false };
      if (last === "Box" && a0) {
        if (a0.type === "slice_type" || a0.type === "dynamic_type" || a0.text === "str") return { k: "unsafe", text: n.text, why: NOT_FFI.Box! };
        return { k: "ptr", to: rustType(a0, ctx), mut: true, via: "box", nullable: false };
      }
      if ((last === "ManuallyDrop" || last === "MaybeUninit" || last === "UnsafeCell" || last === "Wrapping") && a0) return rustType(a0, ctx);
      if (last === "PhantomData") return { k: "array", of: { k: "scalar", s: "u8" }, len: 0, lenText: "0" };
      if (NOT_FFI[last]) return { k: "unsafe", text: n.text, why: NOT_FFI[last]! };
      // `Image<'a>`: lifetimes do not change a layout (Rust Reference, "Type layout")
      if (args.length === 0) return { k: "named", name: last };
      return { k: "unsafe", text: n.text, why: "a generic type instance; its layout depends on the type arguments and is not known to C", generic: { name: last, args: args.map((a) => rustType(a, ctx)) } };
    }
    case "scoped_type_identifier":
    case "type_identifier": {
      const last = n.text.split("::").pop()!;
      if (FFI_NAMES[last]) return { k: "scalar", s: FFI_NAMES[last]! };
      if (last === "c_void") return { k: "void" };
      if (NOT_FFI[last]) return { k: "unsafe", text: n.text, why: NOT_FFI[last]! };
      return { k: "named", name: last };
    }
    case "tuple_type":
      return { k: "unsafe", text: n.text, why: "tuples have no guaranteed layout (Rust Reference, type layout: tuple layout is unspecified)" };
    case "dynamic_type":
    case "abstract_type":
    case "bounded_type":
      return { k: "unsafe", text: n.text, why: "trait objects and impl Trait have no C representation" };
    case "slice_type":
      return { k: "unsafe", text: n.text, why: "a slice has no fixed size" };
  }
  return { k: "unknown", text: n.text };
}

interface AttrInfo {
  texts: string[];
  noMangle: boolean;
  exportName?: string;
  linkName?: string;
  repr: string[];
  derives: string[];
  cfgTest: boolean;
  /** The `#[cfg(…)]` predicates read. */
  cfgs: Cond[];
  /** `#[cfg_attr(PRED, no_mangle / export_name = …)]`. */
  cfgExport: { cond: Cond; name?: string }[];
  /** `#[link(name = "…")]`. */
  link?: string;
  /** `#[path = "…"]`. */
  path?: string;
  /** `#[cfg_attr(PRED, path = "…")]`. */
  cfgPaths: { cond: Cond; path: string }[];
  /** A binding attribute of another runtime (`#[wasm_bindgen]`): an extern block under it is not a C import. */
  foreignBinding?: string;
}

/** Attributes that bind an extern block to another runtime than C (common practice: the
 * WebAssembly/JavaScript binding generator's attribute). */
const FOREIGN_BINDINGS = new Set(["wasm_bindgen", "wasm_bindgen::prelude::wasm_bindgen"]);

/** Whether a cfg predicate can only hold when compiling tests (`test` is never set in the shipped
 * build; every other option is left open here, the model decides them per target). */
function onlyInTests(c: Cond): boolean {
  const names = new Set<string>();
  const visit = (x: Cond, d: number): void => {
    if (d > 64) return;
    if (x.k === "is") names.add(x.name);
    else if (x.k === "not") visit(x.of, d + 1);
    else x.of.forEach((y) => visit(y, d + 1));
  };
  visit(c, 0);
  if (!names.has("test")) return false;
  names.delete("test");
  return !canHoldIn([c], { set: new Map(), free: names });
}

function attrsBefore(n: Node): AttrInfo {
  const info: AttrInfo = { texts: [], noMangle: false, repr: [], derives: [], cfgTest: false, cfgs: [], cfgExport: [], cfgPaths: [] };
  let p = n.previousNamedSibling;
  while (p && (p.type === "attribute_item" || p.type === "line_comment" || p.type === "block_comment")) {
    if (p.type === "attribute_item") {
      const a = p.namedChildren.find((c) => c.type === "attribute");
      if (a) readAttr(a, info);
    }
    p = p.previousNamedSibling;
  }
  return info;
}

function readAttr(a: Node, info: AttrInfo): void {
  info.texts.push(a.text);
  const head = a.namedChild(0);
  const name = head?.text ?? "";
  const args = a.childForFieldName("arguments");
  const value = a.childForFieldName("value");
  const strVal = value?.type === "string_literal" ? value.text.slice(1, -1) : undefined;
  if (name === "no_mangle") info.noMangle = true;
  else if (name === "unsafe" && args) {
    // 2024 edition: #[unsafe(no_mangle)], #[unsafe(export_name = "…")]
    const inner = args.namedChildren;
    for (let i = 0; i < inner.length; i++) {
      const t = inner[i]!.text;
      if (t === "no_mangle") info.noMangle = true;
      if (t === "export_name") {
        const s = inner.slice(i + 1).find((c) => c.type === "string_literal");
        if (s) info.exportName = s.text.slice(1, -1);
      }
    }
  } else if (name === "export_name" && strVal) info.exportName = strVal;
  else if (name === "link_name" && strVal) info.linkName = strVal;
  else if (name === "repr" && args) {
    for (const c of args.namedChildren) {
      if (c.type === "identifier" || c.type === "primitive_type") info.repr.push(c.text);
      else if (c.type === "token_tree" && info.repr.length) {
        info.repr[info.repr.length - 1] += `(${c.text.slice(1, -1).trim()})`;
      }
    }
  } else if (name === "derive" && args) {
    for (const c of args.namedChildren) if (c.type === "identifier") info.derives.push(c.text);
  } else if (name === "cfg" && args) {
    const c = parseCfg(args.text.slice(1, -1));
    if (c) {
      info.cfgs.push(c);
      if (onlyInTests(c)) info.cfgTest = true;
    }
  } else if (name === "cfg_attr" && args) {
    const ca = parseCfgAttr(args.text.slice(1, -1));
    if (ca) {
      for (const at of ca.attrs) {
        const t = at.replace(/^unsafe\s*\(\s*([\s\S]*)\)$/, "$1").trim();
        if (t === "no_mangle") info.cfgExport.push({ cond: ca.cond });
        else if (/^path\s*=/.test(t)) {
          const m = /^path\s*=\s*"([^"]*)"$/.exec(t);
          if (m) info.cfgPaths.push({ cond: ca.cond, path: m[1]! });
        }
        else if (/^export_name\s*=/.test(t)) {
          const m = /^export_name\s*=\s*"([^"]*)"$/.exec(t);
          info.cfgExport.push({ cond: ca.cond, name: m?.[1] });
        }
      }
    }
  } else if (name === "link" && args) {
    // #[link(name = "m", kind = "…")]: the argument text is opaque to the grammar
    const m = /\bname\s*=\s*"([^"]*)"/.exec(args.text);
    if (m) info.link = m[1];
  } else if (name === "path" && strVal) info.path = strVal;
  else if (name === "export_name" && value?.type === "macro_invocation") {
    // #[export_name = prefix!(name)]: exported under a name a macro builds; the function's own
    // name stands in for it (ferrule expands no macro)
    info.noMangle = true;
  }
  if (FOREIGN_BINDINGS.has(name)) info.foreignBinding = name;
}

function reprOf(list: string[]): TypeDecl["repr"] {
  const r: TypeDecl["repr"] = {};
  for (const x of list) {
    const m = /^(\w+)(?:\((\d+)\))?$/.exec(x.replace(/\s+/g, ""));
    if (!m) continue;
    const [, k, v] = m;
    if (k === "C") r.c = true;
    else if (k === "transparent") r.transparent = true;
    else if (k === "packed") r.packed = v ? Number(v) : 1;
    else if (k === "align" && v) r.align = Number(v);
    else if (k && RUST_PRIMS[k] && k !== "bool" && k !== "f32" && k !== "f64") r.int = RUST_PRIMS[k];
  }
  return r;
}

function abiOf(mods: Node | null | undefined): string | undefined {
  const ext = mods?.namedChildren.find((c) => c.type === "extern_modifier");
  if (!ext) return undefined;
  const s = ext.namedChildren.find((c) => c.type === "string_literal");
  return s ? s.text.replace(/"/g, "") : "C";
}

function readRustParams(list: Node | null, ctx: RustCtx): { params: Param[]; variadic: boolean; hasSelf: boolean } {
  const params: Param[] = [];
  let variadic = false;
  let hasSelf = false;
  for (const p of list?.namedChildren ?? []) {
    if (p.type === "variadic_parameter") { variadic = true; continue; }
    if (p.type === "self_parameter") { hasSelf = true; continue; }
    if (p.type !== "parameter") continue;
    const tn = p.childForFieldName("type");
    const pat = p.childForFieldName("pattern");
    params.push({
      name: (pat?.text ?? "_").replace(/^mut\s+/, ""),
      type: rustType(tn, ctx),
      text: tn?.text ?? "",
      range: rangeOf(ctx.file, p),
      typeRange: rangeOf(ctx.file, tn ?? p),
    });
  }
  return { params, variadic, hasSelf };
}

/** Adds `delta` to the line numbers of every range inside a (cloned) body-facts object. A range
 * object may be shared by two facts (structuredClone keeps the sharing): shift each once. */
function shiftLines(v: unknown, delta: number, seen = new Set<object>(), depth = 0): void {
  if (!v || typeof v !== "object" || depth > 40 || seen.has(v)) return;
  seen.add(v);
  if (Array.isArray(v)) {
    for (const x of v) shiftLines(x, delta, seen, depth + 1);
    return;
  }
  const o = v as Record<string, unknown>;
  if (typeof o.line === "number" && typeof o.endLine === "number" && typeof o.file === "string") {
    o.line += delta;
    o.endLine = (o.endLine as number) + delta;
  }
  for (const k in o) if (typeof o[k] === "object") shiftLines(o[k], delta, seen, depth + 1);
}

/** Item kinds whose facts depend only on their own text (see ItemCache). */
const CACHED_ITEMS = new Set(["function_item", "struct_item", "union_item", "enum_item", "type_item", "const_item", "foreign_mod_item"]);
const LEAD = new Set(["attribute_item", "line_comment", "block_comment"]);

/** A copy of a cached item's facts moved by `delta` lines (ranges and the row in each id). */
function movedItem(item: CachedItem, row: number): CachedItem {
  const delta = row - item.row;
  const c = structuredClone(item);
  c.row = row;
  c.first += delta;
  c.last += delta;
  shiftLines(c, delta);
  const reId = (d: { id: string }) => {
    const i = d.id.lastIndexOf("#");
    d.id = d.id.slice(0, i + 1) + String(Number(d.id.slice(i + 1)) + delta);
  };
  c.fns.forEach(reId);
  c.types.forEach(reId);
  return c;
}

/**
 * Rust file facts. With an item cache (the language server, for open documents) and the file's
 * text, items whose text did not change since the previous extraction reuse its facts.
 */
/** An item-level macro invocation (`m!(…);`, `m! { … }`) and the names in its arguments: the
 * grammar leaves the arguments as a token tree, so its identifier tokens are read, and string
 * literal tokens whose whole text is an identifier (a symbol passed as a string). */
function macroItemOf(file: string, n: Node): MacroItem | undefined {
  const inv = n.type === "macro_invocation" ? n : n.type === "expression_statement" && n.namedChildCount === 1 ? n.namedChild(0) : null;
  if (!inv || inv.type !== "macro_invocation") return undefined;
  const mac = inv.childForFieldName("macro")?.text ?? "";
  if (mac === "macro_rules") return undefined;
  const names = new Set<string>();
  const visit = (t: Node, depth: number) => {
    if (depth > 32) return;
    for (const c of t.namedChildren) {
      if (c.type === "identifier") names.add(c.text);
      else if (c.type === "string_literal") {
        const s = c.text.slice(1, -1);
        if (/^[A-Za-z_][A-Za-z0-9_]*$/.test(s)) names.add(s);
      } else if (c.type === "token_tree") visit(c, depth + 1);
    }
  };
  for (const c of inv.namedChildren) if (c.type === "token_tree") visit(c, 0);
  if (!names.size) return undefined;
  return { macro: mac, names: [...names], range: rangeOf(file, inv) };
}

export function extractRust(file: string, tree: Tree, itemCache?: ItemCache, text?: string): FileFacts {
  const facts = emptyFacts(file, "rust");
  const root = tree.rootNode;
  facts.hasErrors = root.hasError;
  const ctx: RustCtx = { file, consts: new Map() };

  // Pass 1: integer consts (array lengths), anywhere at item level (modules, impl and trait
  // blocks; not inside functions or other consts' values).
  const rootKids = root.namedChildren; // (read once: both passes walk the top level)
  const readConsts = (container: Node, depth: number, kids = container.namedChildren) => {
    for (const n of kids) {
      switch (n.type) {
        case "const_item":
        case "static_item": {
          const name = n.childForFieldName("name")?.text;
          const v = evalConst(n.childForFieldName("value"), ctx.consts);
          if (name && name !== "_" && v !== null) ctx.consts.set(name, v);
          // the length of a const/static array (`[f32; 8]`): body facts read it (panic-across-c-abi
          // bounds an index by it), so it is part of the item cache key with the integer consts
          const at = n.childForFieldName("type");
          const len = at?.type === "array_type" ? evalConst(at.childForFieldName("length"), ctx.consts) : null;
          if (name && name !== "_" && len !== null) ctx.consts.set(`${name}[]`, len);
          break;
        }
        case "mod_item":
        case "impl_item":
        case "trait_item": {
          const body = n.childForFieldName("body");
          if (body && depth < 64) readConsts(body, depth + 1);
          break;
        }
        case "declaration_list":
        case "ERROR":
          if (depth < 64) readConsts(n, depth + 1);
          break;
      }
    }
  };
  readConsts(root, 0, rootKids);

  const cache = text === undefined ? undefined : itemCache;
  if (cache) {
    const consts = [...ctx.consts].join(";");
    if (cache.consts !== consts) cache.prev.clear();
    cache.consts = consts;
    cache.order = [];
  }

  // the inline modules being read (for `mod x;` inside `mod a { … }`) and their conditions
  const modStack: string[] = [];
  const condStack: (Cond | undefined)[] = [];
  // `#![cfg(…)]` at the top of the file: the whole file is conditional
  for (const n of rootKids) {
    if (n.type !== "inner_attribute_item") continue;
    const a = n.namedChildren.find((c) => c.type === "attribute");
    if (a?.namedChild(0)?.text !== "cfg") continue;
    const args = a.childForFieldName("arguments");
    const c = args ? parseCfg(args.text.slice(1, -1)) : undefined;
    if (c) (facts.cfgScopes ??= []).push({ line: 0, endLine: root.endPosition.row, cond: c });
  }

  const visitItems = (container: Node, kids = container.namedChildren) => {
    for (let i = 0; i < kids.length; i++) {
      const n = kids[i]!;
      let key: string | undefined;
      let span: [number, number] | undefined;
      let mark: [number, number, number, number] | undefined;
      let lead = n;
      if (cache && CACHED_ITEMS.has(n.type)) {
        // The item's text with the attributes and comments right before it.
        let j = i - 1;
        while (j >= 0 && LEAD.has(kids[j]!.type)) j--;
        if (j + 1 < i) lead = kids[j + 1]!;
        const from = j >= 0 ? kids[j]!.endIndex : container.startIndex;
        // (a slice, not a concatenation: a slice shares the text's memory; the column is
        // compared on a hit)
        span = [from, n.endIndex];
        key = cache.spansOnly ? "" : text!.slice(from, n.endIndex);
        const pos = n.startPosition;
        let hit = cache.spansOnly ? undefined : cache.prev.get(key) ?? cache.next.get(key);
        if (hit && hit.col !== pos.column) hit = undefined;
        if (hit) {
          const row = pos.row;
          const item = hit.row === row ? hit : movedItem(hit, row);
          for (const f of item.fns) facts.fns.push(f);
          for (const t of item.types) facts.types.push(t);
          for (const a of item.asserts) facts.asserts.push(a);
          cache.next.set(key, item);
          cache.order!.push({ item, from: hit });
          continue;
        }
        mark = [facts.fns.length, facts.types.length, facts.asserts.length, facts.notices.length];
      }
      switch (n.type) {
        case "mod_item": {
          const a = attrsBefore(n);
          const body = n.childForFieldName("body");
          const name = n.childForFieldName("name")?.text;
          if (a.cfgTest || !name) break;
          const cond = allOf(a.cfgs);
          if (body) {
            if (cond) (facts.cfgScopes ??= []).push({ line: n.startPosition.row, endLine: n.endPosition.row, cond });
            modStack.push(name);
            condStack.push(cond);
            visitItems(body);
            modStack.pop();
            condStack.pop();
          } else {
            const decl: ModDecl = { name, inline: [...modStack], line: n.startPosition.row };
            if (a.path) decl.path = a.path;
            if (a.cfgPaths.length) decl.cfgPaths = a.cfgPaths;
            const c = allOf([...condStack, cond]);
            if (c) decl.cond = c;
            (facts.mods ??= []).push(decl);
          }
          break;
        }
        case "impl_item": {
          const body = n.childForFieldName("body");
          if (body) visitItems(body);
          break;
        }
        case "function_item":
          readFn(n);
          break;
        case "foreign_mod_item": {
          // `#[wasm_bindgen] extern "C" { … }` declares JavaScript imports of a wasm module: the
          // bindings generator writes their glue, no C declaration stands behind them.
          if (attrsBefore(n).texts.some((t) => /^wasm_bindgen\b/.test(t))) break;
          const abi = abiOf(n) ?? "C";
          const body = n.childForFieldName("body");
          if (body) readForeign(body, abi, attrsBefore(n), n.startPosition.row);
          break;
        }
        case "ERROR": {
          // `unsafe extern "C" { … }` (Rust 2024) is not in this grammar version: the modifier
          // lands in an ERROR node and the block follows as an expression statement.
          const ext = n.namedChildren.find((c) => c.type === "extern_modifier");
          const next = kids[i + 1];
          const block = next?.type === "expression_statement" ? next.namedChild(0) : next?.type === "block" ? next : null;
          if (ext && block?.type === "block") {
            if (attrsBefore(n).texts.some((t) => /^wasm_bindgen\b/.test(t))) { i++; break; } // JavaScript imports (see above)
            const s = ext.namedChildren.find((c) => c.type === "string_literal");
            readForeign(block, s ? s.text.replace(/"/g, "") : "C", attrsBefore(n), n.startPosition.row);
            i++;
          } else {
            visitItems(n);
          }
          break;
        }
        case "struct_item":
        case "union_item":
        case "enum_item":
          readAggregate(n);
          break;
        case "type_item": {
          const name = n.childForFieldName("name");
          if (name) {
            const generic = !!n.childForFieldName("type_parameters");
            const ta = attrsBefore(n);
            if (ta.cfgTest) break;
            const tc = allOf(ta.cfgs);
            facts.types.push({
              ...(tc ? { cfg: tc } : {}),
              id: `${file}#${name.text}#${n.startPosition.row}`, lang: "rust", kind: "alias", name: name.text,
              fields: [], enumerators: [], aliasOf: rustType(n.childForFieldName("type"), ctx), repr: {},
              range: rangeOf(file, n), nameRange: rangeOf(file, name), file, doc: docAbove(n), attrs: [], generic,
            });
          }
          break;
        }
        case "const_item":
          readConstAssert(n);
          break;
        case "macro_invocation":
        case "expression_statement": {
          // (not an item of the cache: read again on every extraction, see fromItems in
          // lsp/engine.ts, which then takes the file-level scope)
          const m = macroItemOf(file, n);
          if (m) (facts.macroItems ??= []).push(m);
          break;
        }
      }
      if (key !== undefined && mark) {
        const pos = n.startPosition;
        const item: CachedItem = {
          row: pos.row, col: pos.column, first: lead === n ? pos.row : lead.startPosition.row, last: n.endPosition.row,
          fns: facts.fns.slice(mark[0]), types: facts.types.slice(mark[1]), asserts: facts.asserts.slice(mark[2]),
        };
        // (an item whose reading left a notice is read again next time)
        if (facts.notices.length === mark[3]) {
          if (cache!.spansOnly) item.span = span;
          else cache!.next.set(key, item);
        }
        cache!.order!.push({ item });
      }
    }
  };

  /** The signature part of a function item or an extern-block item. */
  const signature = (n: Node, nameNode: Node, role: FnDecl["role"], symbol: string, abi: string, a: AttrInfo): FnDecl & { hasSelf: boolean } => {
    const { params, variadic, hasSelf } = readRustParams(n.childForFieldName("parameters"), ctx);
    const retNode = n.childForFieldName("return_type");
    return {
      id: `${file}#${nameNode.text}#${n.startPosition.row}`,
      lang: "rust",
      role,
      name: nameNode.text,
      symbol,
      abi,
      params,
      ret: rustType(retNode, ctx),
      retText: retNode?.text ?? "()",
      retRange: retNode ? rangeOf(file, retNode) : undefined,
      variadic,
      range: rangeOf(file, n),
      nameRange: rangeOf(file, nameNode),
      file,
      doc: docAbove(n),
      attrs: a.texts,
      hasSelf,
    };
  };

  const readFn = (n: Node) => {
    const a = attrsBefore(n);
    if (a.cfgTest) return;
    const nameNode = n.childForFieldName("name");
    if (!nameNode) return;
    const mods = n.namedChildren.find((c) => c.type === "function_modifiers");
    const abi = abiOf(mods);
    const exported = a.noMangle || !!a.exportName;
    const { hasSelf, ...fn } = signature(n, nameNode, "export", a.exportName ?? nameNode.text, abi ?? "Rust", a) as FnDecl & { hasSelf: boolean };
    fn.noMangle = exported;
    fn.isExtern = abi !== undefined;
    const cond = allOf(a.cfgs);
    if (cond) fn.cfg = cond;
    if (a.cfgExport.length && !exported) fn.cfgExport = a.cfgExport;
    fn.isPub = n.namedChildren.some((c) => c.type === "visibility_modifier");
    fn.generic = !!n.childForFieldName("type_parameters") || hasSelf;
    // Only functions that take part in the C ABI are boundary items; others are kept (not
    // exported) so body rules can follow helper calls inside the crate. (Known before the body is
    // read: body extractors may read less of a helper.)
    if (!exported && abi === undefined && !a.cfgExport.length) (fn as FnDecl & { internal?: boolean }).internal = true;
    if (n.childForFieldName("body")) {
      fn.body = {};
      for (const x of rustExtractors.fnBody) x(n, fn, facts);
    }
    facts.fns.push(fn);
  };

  const readForeign = (body: Node, abi: string, blockAttrs: AttrInfo, row: number) => {
    // an extern block under another runtime's binding attribute imports from that runtime, not C
    if (blockAttrs.cfgTest || blockAttrs.foreignBinding) return;
    for (const item of body.namedChildren) {
      if (item.type !== "function_signature_item") continue;
      const a = attrsBefore(item);
      if (a.cfgTest || a.foreignBinding) continue;
      const nameNode = item.childForFieldName("name");
      if (!nameNode) continue;
      const { hasSelf: _self, ...fn } = signature(item, nameNode, "import", a.linkName ?? nameNode.text, abi, a);
      fn.isExtern = true;
      fn.block = `${file}#${row}`;
      if (blockAttrs.link) fn.linkLib = blockAttrs.link;
      const cond = allOf([...blockAttrs.cfgs, ...a.cfgs]);
      if (cond) fn.cfg = cond;
      facts.fns.push(fn);
    }
  };

  const readAggregate = (n: Node) => {
    const a = attrsBefore(n);
    if (a.cfgTest) return;
    const nameNode = n.childForFieldName("name");
    if (!nameNode) return;
    const kind = n.type === "struct_item" ? "struct" : n.type === "union_item" ? "union" : "enum";
    const body = n.childForFieldName("body");
    const decl: TypeDecl = {
      id: `${file}#${nameNode.text}#${n.startPosition.row}`,
      lang: "rust",
      kind,
      name: nameNode.text,
      fields: [],
      enumerators: [],
      repr: reprOf(a.repr),
      range: rangeOf(file, n),
      nameRange: rangeOf(file, nameNode),
      file,
      doc: docAbove(n),
      attrs: a.texts,
      generic: !!n.childForFieldName("type_parameters"),
      derives: a.derives,
    };
    const tcond = allOf(a.cfgs);
    if (tcond) decl.cfg = tcond;
    if (kind === "enum") {
      let next = 0;
      let dataCarrying = false;
      for (const v of body?.namedChildren ?? []) {
        if (v.type !== "enum_variant") continue;
        const vn = v.childForFieldName("name")?.text ?? "";
        if (v.childForFieldName("body")) dataCarrying = true;
        const valNode = v.childForFieldName("value");
        const val = valNode ? evalConst(valNode, ctx.consts) : next;
        decl.enumerators.push({ name: vn, value: val, text: v.text, range: rangeOf(file, v) });
        if (val !== null) next = val + 1;
      }
      if (dataCarrying) (decl as TypeDecl & { dataCarrying?: boolean }).dataCarrying = true;
      if (decl.enumerators.length === 0) decl.opaqueMarker = true;
    } else if (body) {
      const fields: Field[] = [];
      if (body.type === "field_declaration_list") {
        for (const f of body.namedChildren) {
          if (f.type !== "field_declaration") continue;
          const fname = f.childForFieldName("name")?.text ?? "";
          const ft = f.childForFieldName("type");
          const fa = attrsBefore(f);
          if (fa.cfgTest) continue;
          const field: Field = { name: fname, type: rustType(ft, ctx), text: ft?.text ?? "", range: rangeOf(file, f) };
          const fc = allOf(fa.cfgs);
          if (fc) field.cfg = fc;
          fields.push(field);
        }
      } else if (body.type === "ordered_field_declaration_list") {
        let i = 0;
        for (const f of body.namedChildren) {
          if (f.type === "visibility_modifier" || f.type === "attribute_item" || f.type.endsWith("comment")) continue;
          fields.push({ name: String(i++), type: rustType(f, ctx), text: f.text, range: rangeOf(file, f) });
        }
      }
      decl.fields = fields;
      // `pub struct Handle { _private: [u8; 0] }` and `struct Handle(c_void)`: opaque markers.
      if (fields.length === 0 || fields.every((f) => (f.type.k === "array" && f.type.len === 0) || f.name.startsWith("_") && f.type.k === "array" && f.type.len === 0)) {
        decl.opaqueMarker = true;
      }
    } else {
      decl.opaqueMarker = true; // `struct Foo;`
    }
    facts.types.push(decl);
  };

  const readConstAssert = (n: Node) => {
    // const _: () = assert!(size_of::<T>() == N);  (also core::mem::offset_of!(T, f) == N)
    const value = n.childForFieldName("value");
    if (!value) return;
    walk(value, (m) => {
      if (m.type !== "macro_invocation") return;
      const mac = m.childForFieldName("macro")?.text ?? "";
      if (!/(^|::)(assert|assert_eq|debug_assert)$/.test(mac)) return;
      const tt = m.namedChildren.find((c) => c.type === "token_tree");
      if (!tt) return false;
      const a = readAssertTokens(tt.text.slice(1, -1), mac.endsWith("assert_eq"), n);
      if (a) facts.asserts.push(a);
      return false;
    });
  };

  const readAssertTokens = (inner: string, isEq: boolean, whole: Node): SourceAssert | undefined => {
    // Macro arguments are unparsed tokens in the tree; re-parse them as an expression with the
    // Rust grammar itself.
    const src = isEq ? `fn _f() { (${inner}); }` : `fn _f() { ${inner.split(/,(?![^(<]*[)>])/)[0]}; }`;
    const t = parseText("rust", src);
    try {
      let found: SourceAssert | undefined;
      walk(t.rootNode, (m) => {
        if (found) return false;
        if (isEq && m.type === "tuple_expression" && m.namedChildCount >= 2) {
          found = assertFrom(m.namedChild(0)!, "==", m.namedChild(1)!, whole);
          return false;
        }
        if (m.type === "binary_expression") {
          const op = m.child(1)?.text ?? "";
          found = assertFrom(m.childForFieldName("left")!, op, m.childForFieldName("right")!, whole);
          return false;
        }
        return;
      });
      return found;
    } finally {
      t.delete();
    }
  };

  const assertFrom = (l: Node, op: string, r: Node, whole: Node): SourceAssert | undefined => {
    if (!["==", "!=", "<=", ">=", "<", ">"].includes(op)) return undefined;
    const value = evalConst(r, ctx.consts);
    if (value === null) return undefined;
    const base = { lang: "rust" as const, op: op as SourceAssert["op"], value, range: rangeOf(file, whole), file, text: whole.text };
    if (l.type === "call_expression") {
      const f = l.childForFieldName("function");
      const ft = f?.text ?? "";
      const gm = /(?:^|::)(size_of|align_of)::<\s*([\w:]+)\s*>$/.exec(ft.replace(/\s+/g, ""));
      if (gm) return { ...base, kind: gm[1] === "size_of" ? "sizeof" : "alignof", typeName: gm[2]!.split("::").pop()! };
    }
    if (l.type === "macro_invocation") {
      const mac = l.childForFieldName("macro")?.text ?? "";
      if (/(^|::)offset_of$/.test(mac)) {
        const tt = l.namedChildren.find((c) => c.type === "token_tree");
        const parts = tt?.namedChildren.filter((c) => c.type === "identifier" || c.type === "type_identifier") ?? [];
        if (parts.length >= 2) return { ...base, kind: "offsetof", typeName: parts[parts.length - 2]!.text, field: parts[parts.length - 1]!.text };
      }
    }
    return undefined;
  };

  visitItems(root, rootKids);
  for (const x of rustExtractors.file) x(root, facts);
  return facts;
}
