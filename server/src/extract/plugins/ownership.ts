// Extractor plugin of the "ownership" family.
//
// Rust (every function item with a body, exported or helper): what the body turns into a raw
// pointer (Box::into_raw, Box::leak, Arc::into_raw, CString::into_raw, mem::forget,
// ManuallyDrop::new), what it takes back (Box::from_raw, Arc::from_raw, CString::from_raw,
// Arc/Rc::decrement_strong_count, Vec::from_raw_parts, ptr::drop_in_place, a Box<T> parameter),
// what it borrows (&*p, &mut *p, p.as_ref(), p.as_mut(), Arc::from_raw(p) after
// Arc::increment_strong_count(p)), null checks, panic sites, catch_unwind regions and calls to other
// functions (so rules can follow helpers inside the crate). Stored in `fn.body.ownership`.
//
// C/C++ (once per file): every function definition becomes a flow of events in source order
// (calls with their arguments, assignments, delete expressions, uses of names, returns) and every
// C++ class its fields (raw handle pointers, std::unique_ptr with its deleter) and special
// members (constructor, destructor, copy/move constructor and assignment, and whether each is
// deleted, defaulted or user-written). Stored in `facts.classes` and `facts.extra.ownership`.
//
// Only plain data is stored; syntax nodes never outlive the call.

import type { Node } from "../../parse/parser.js";
import type { FileFacts, FnDecl, Range } from "../../model/types.js";
import type {
  CArg, CClass, CEvent, CField, CFlow, COwnFacts, CRef, DeleterArg, MemberKind, OwnHow, RustArg, RustOwnFacts, UniquePtrDecl,
} from "../../model/ownership.js";
import { indexSubtree, rangeOf, walk, walkFile, walkTypes } from "../common.js";
import { bodyWalkTypes, cFileExtractors, rustExtractors } from "../hooks.js";
import { evalConst } from "../common.js";
import { PanicSense, modBoundedLocals } from "./panic-sense.js";

// ---------------------------------------------------------------- Rust

const INT_PRIMS = new Set(["i8", "u8", "i16", "u16", "i32", "u32", "i64", "u64", "i128", "u128", "isize", "usize",
  "c_int", "c_uint", "c_long", "c_ulong", "c_short", "c_ushort", "c_longlong", "c_ulonglong", "size_t", "c_char", "c_uchar", "c_schar"]);

/** The node types extractRustFn's body walk acts on (the others are found inside wasm). */
const RUST_VISITED = ["function_item", "impl_item", "mod_item", "let_declaration", "let_condition", "reference_expression", "macro_invocation", "index_expression", "binary_expression", "compound_assignment_expr", "call_expression",
  "const_item", "static_item", "block", "if_expression", "while_expression", "for_expression", "assignment_expression"];
for (const t of RUST_VISITED) bodyWalkTypes.rust.add(t);
const PANIC_MACROS: Record<string, RustOwnFacts["panics"][number]["kind"]> = {
  panic: "panic", unreachable: "unreachable", todo: "todo", unimplemented: "todo",
  assert: "assert", assert_eq: "assert", assert_ne: "assert",
};

function lastSeg(t: string): string {
  const s = t.replace(/\s+/g, "").replace(/::<.*>$/, "").split("::");
  return s[s.length - 1] ?? t;
}

/** `Box::<T>::from_raw` → { head: "Box", name: "from_raw", turbofish: "T" } */
function pathParts(fnNode: Node): { head: string; name: string; turbofish?: string } | undefined {
  if (fnNode.type === "generic_function") {
    const inner = fnNode.childForFieldName("function");
    const ta = fnNode.childForFieldName("type_arguments")?.namedChild(0)?.text;
    const p = inner ? pathParts(inner) : undefined;
    return p ? { ...p, turbofish: p.turbofish ?? ta } : undefined;
  }
  if (fnNode.type !== "scoped_identifier") return undefined;
  const name = fnNode.childForFieldName("name")?.text ?? "";
  const path = fnNode.childForFieldName("path");
  if (!path) return { head: "", name };
  if (path.type === "generic_type") {
    const head = lastSeg(path.childForFieldName("type")?.text ?? "");
    const ta = path.childForFieldName("type_arguments")?.namedChild(0)?.text;
    return { head, name, turbofish: ta };
  }
  return { head: lastSeg(path.text), name };
}

/** Integer literal value (`1`, `2usize`, `0x10`), or undefined. */
function intLit(n: Node | null | undefined): number | undefined {
  if (n?.type !== "integer_literal") return undefined;
  const v = Number(n.text.replace(/_/g, "").replace(/(usize|isize|u\d+|i\d+)$/, ""));
  return Number.isSafeInteger(v) ? v : undefined;
}

function unparen(n: Node | null | undefined): Node | null | undefined {
  while (n?.type === "parenthesized_expression") n = n.namedChild(0);
  return n;
}

/**
 * `2 * n`, `n * nchan` (a product of names and integer literals) as the length argument of
 * `slice::from_raw_parts(_mut)`: cannot overflow for a caller that meets the pointer's contract.
 * from_raw_parts requires `len * size_of::<T>() <= isize::MAX` (core::slice::from_raw_parts,
 * Safety), so a buffer that really holds that many items bounds the product well below
 * usize::MAX; only a caller that already broke the contract (undefined behaviour anyway) can
 * reach the overflow.
 */
function isSliceLengthProduct(n: Node): boolean {
  const operand = (x: Node | null | undefined): boolean => {
    const u = unparen(x);
    if (!u) return false;
    if (u.type === "identifier" || u.type === "integer_literal") return true;
    return u.type === "binary_expression" && (u.childForFieldName("operator") ?? u.child(1))?.text === "*" &&
      operand(u.childForFieldName("left")) && operand(u.childForFieldName("right"));
  };
  if (!operand(n)) return false;
  let top: Node = n;
  while (top.parent && (top.parent.type === "parenthesized_expression" || (top.parent.type === "binary_expression" && operand(top.parent)))) top = top.parent;
  const args = top.parent;
  if (args?.type !== "arguments") return false;
  const list = args.namedChildren.filter((c) => !c.type.endsWith("comment"));
  if (list.length !== 2 || list[1].id !== top.id) return false;
  let f = args.parent?.childForFieldName("function");
  if (f?.type === "generic_function") f = f.childForFieldName("function");
  const name = f?.type === "scoped_identifier" ? f.childForFieldName("name")?.text : f?.type === "identifier" ? f.text : undefined;
  return name === "from_raw_parts" || name === "from_raw_parts_mut";
}

/** The file's integer consts (`const N: usize = 16;`), once per tree. The item cache keys every
 * item by these too, so facts read from them stay valid when the item is reused. */
const fileConsts = new WeakMap<object, Map<string, number>>();
function constsOf(n: Node): Map<string, number> {
  const tree = (n as unknown as { tree: object }).tree;
  let m = fileConsts.get(tree);
  if (!m) {
    m = new Map();
    const root = (tree as { rootNode: Node }).rootNode;
    for (const c of root.descendantsOfType(["const_item", "static_item"])) {
      const name = c.childForFieldName("name")?.text;
      const v = evalConst(c.childForFieldName("value"), m);
      if (name && v !== null && !m.has(name)) m.set(name, v);
      // `NAME[]`: the length of a const/static array (also in the item cache key, see extractRust)
      const at = c.childForFieldName("type");
      const len = at?.type === "array_type" ? evalConst(at.childForFieldName("length"), m) : null;
      if (name && len !== null && !m.has(`${name}[]`)) m.set(`${name}[]`, len);
    }
    fileConsts.set(tree, m);
  }
  return m;
}

/** The type a `Box<T>` / `Option<Box<T>>` type node holds, by its name without generic
 * arguments (`Option<Box<Image<'a>>>` → "Image"): the model keeps a generic instance only as text. */
function boxedName(t: Node | null | undefined, depth = 0): string | undefined {
  if (!t || depth > 4 || t.type !== "generic_type") return undefined;
  const head = lastSeg(t.childForFieldName("type")?.text ?? "");
  const arg = t.childForFieldName("type_arguments")?.namedChildren.find((c) => !c.type.endsWith("comment") && c.type !== "lifetime");
  if (head === "Option") return boxedName(arg, depth + 1);
  if (head !== "Box" || !arg) return undefined;
  if (arg.type === "generic_type") return lastSeg(arg.childForFieldName("type")?.text ?? "");
  return arg.type === "type_identifier" || arg.type === "scoped_type_identifier" ? lastSeg(arg.text) : undefined;
}

/** Through unsafe blocks, blocks and parentheses to the value an expression yields. */
function yielded(n: Node | null | undefined): Node | null | undefined {
  let u = n;
  for (let i = 0; u && i < 6; i++) {
    if (u.type === "parenthesized_expression") u = u.namedChild(0);
    else if (u.type === "unsafe_block" || u.type === "block") {
      const b = u.type === "unsafe_block" ? u.namedChildren.find((c) => c.type === "block") : u;
      const kids = b?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
      u = kids[kids.length - 1];
      if (u?.type === "expression_statement") u = u.namedChild(0);
    } else break;
  }
  return u;
}

/** `Box::from_raw(…)` / `Arc::from_raw` / `Rc::from_raw` as the value of an expression. */
function fromRawIn(n: Node | null | undefined): boolean {
  const u = yielded(n);
  if (u?.type !== "call_expression") return false;
  const pp = pathParts(u.childForFieldName("function")!);
  return !!pp && ["Box", "Arc", "Rc"].includes(pp.head) && pp.name === "from_raw";
}

/** Whether a call is the argument of `ManuallyDrop::new(…)` (through unsafe blocks and parentheses). */
function inManuallyDrop(n: Node): boolean {
  let c: Node = n;
  let p = n.parent;
  for (let i = 0; p && i < 6; i++, c = p, p = p.parent) {
    if (p.type === "arguments") {
      const call = p.parent;
      const pp = call?.type === "call_expression" ? pathParts(call.childForFieldName("function")!) : undefined;
      return !!pp && pp.head === "ManuallyDrop" && pp.name === "new" && fromRawIn(c);
    }
    if (!["unsafe_block", "block", "parenthesized_expression", "expression_statement"].includes(p.type)) return false;
  }
  return false;
}

function pointeeName(typeText: string | undefined): string | undefined {
  if (!typeText) return undefined;
  // `*mut Det`, `*const Det`, `Det` — the type's own text, taken from the tree by the caller.
  const t = typeText.replace(/^\*\s*(mut|const)\s+/, "").trim();
  return lastSeg(t);
}

function extractRustFn(fnNode: Node, fn: FnDecl, facts: FileFacts): void {
  const body = fnNode.childForFieldName("body");
  if (!body || !fn.body) return;
  const file = facts.file;
  const own: RustOwnFacts = {
    hasSelf: !!fnNode.childForFieldName("parameters")?.namedChildren.some((c) => c.type === "self_parameter"),
    bodyRange: rangeOf(file, body),
    produces: [], releases: [], borrows: [], nullChecks: [], reLeaks: [], panics: [], calls: [], catchUnwind: false,
  };
  const consts = constsOf(fnNode);
  const sense = new PanicSense(fnNode, (name) => consts.get(name));
  for (const [k, v] of modBoundedLocals(body)) sense.vf.modBounded.set(k, v);
  if (sense.implType) own.implType = sense.implType;
  if (sense.traitName) own.traitName = sense.traitName;
  const paramNames = fn.params.map((p) => p.name);
  /** Records a panic site unless it cannot panic; `level` from the sense's reasoning. */
  const site = (kind: RustOwnFacts["panics"][number]["kind"], text: string, n: Node, level: "warning" | "info", taint?: number) => {
    const p: RustOwnFacts["panics"][number] = { kind, text, range: rangeOf(file, n), protected: isProtected(n), level };
    if (taint !== undefined) p.taint = taint;
    const u = sense.underOf(n);
    if (u) p.under = u;
    own.panics.push(p);
  };
  // `-> Box<T>` / `-> Option<Box<T>>` from an extern "C" function: C receives the Box as a
  // pointer it owns (the Rust Reference: Box<T> and Option<Box<T>> have a pointer's ABI)
  if (fn.ret.k === "ptr" && fn.ret.via === "box" && fn.abi !== "Rust") {
    own.produces.push({ how: "box", inner: fn.ret.to.k === "named" ? fn.ret.to.name : boxedName(fnNode.childForFieldName("return_type")), range: fn.retRange ?? fn.nameRange, protected: false });
  }
  const intNames = new Set<string>();
  const paramTypeNodes = (fnNode.childForFieldName("parameters")?.namedChildren ?? []).filter((c) => c.type === "parameter").map((c) => c.childForFieldName("type"));
  for (const p of fn.params) {
    if (p.type.k === "scalar" && !["f32", "f64", "float", "double", "bool"].includes(p.type.s)) intNames.add(p.name);
    // A Box<T> parameter owns its pointee: it is released when the function returns.
    if (p.type.k === "ptr" && p.type.via === "box") {
      const inner = p.type.to.k === "named" ? p.type.to.name : boxedName(paramTypeNodes[fn.params.indexOf(p)]);
      own.releases.push({ how: "box", arg: { ident: p.name, text: p.name }, inner, range: p.range, byParam: true, nullableParam: !!p.type.nullable });
    }
  }
  const aliases = new Map<string, RustArg>();
  const protectedRanges: Range[] = [];
  /** Pointers this body has passed to `Arc/Rc::increment_strong_count` so far (source order). */
  const retained = new Set<string>();
  const isProtected = (n: Node) => protectedRanges.some((r) =>
    (n.startPosition.row > r.line || (n.startPosition.row === r.line && n.startPosition.column >= r.col)) &&
    (n.startPosition.row < r.endLine || (n.startPosition.row === r.endLine && n.startPosition.column < r.endCol)));

  const argRef = (n: Node | null | undefined, depth = 0): RustArg => {
    if (!n || depth > 20) return { text: n?.text ?? "" };
    switch (n.type) {
      case "identifier": {
        const a = aliases.get(n.text);
        return a ? { ...a, text: n.text } : { ident: n.text, text: n.text };
      }
      case "parenthesized_expression":
        return argRef(n.namedChild(0), depth + 1);
      case "unary_expression": {
        // `*out` with `out: *mut *mut T` (a release through an out-parameter that it then clears)
        const inner = n.child(0)?.text === "*" ? n.namedChild(0) : undefined;
        if (inner?.type !== "identifier" || aliases.has(inner.text)) return { text: n.text };
        return { ident: inner.text, deref: true, text: n.text };
      }
      case "unsafe_block":
      case "block": {
        const last = n.namedChildren.filter((c) => !c.type.endsWith("comment")).pop();
        if (n.type === "unsafe_block") return argRef(n.namedChildren.find((c) => c.type === "block"), depth + 1);
        return argRef(last, depth + 1);
      }
      case "type_cast_expression": {
        const inner = argRef(n.childForFieldName("value"), depth + 1);
        const tt = n.childForFieldName("type");
        const ptn = tt?.type === "pointer_type" ? tt.childForFieldName("type") : undefined;
        const pt = ptn?.text;
        return { ...inner, cast: pt ? lastSeg(pt) : inner.cast, castRange: ptn ? rangeOf(file, ptn) : inner.castRange, text: n.text };
      }
      case "call_expression": {
        // p.cast::<T>() / p.cast()
        const f = n.childForFieldName("function");
        let fe = f;
        let ta: string | undefined;
        let taRange: Range | undefined;
        if (f?.type === "generic_function") {
          fe = f.childForFieldName("function");
          const tn = f.childForFieldName("type_arguments")?.namedChild(0);
          ta = tn?.text;
          if (tn) taRange = rangeOf(file, tn);
        }
        if (fe?.type === "field_expression" && ["cast", "cast_mut", "cast_const", "as_ptr"].includes(fe.childForFieldName("field")?.text ?? "")) {
          const inner = argRef(fe.childForFieldName("value"), depth + 1);
          return { ...inner, cast: ta ? lastSeg(ta) : inner.cast, castRange: taRange ?? inner.castRange, text: n.text };
        }
        // A boxed slice handed to C as its data pointer is taken back as
        // `Box::from_raw(ptr::slice_from_raw_parts_mut(p, len))` (or `slice::from_raw_parts_mut`):
        // the slice pointer is `p` with a length (std docs, `ptr::slice_from_raw_parts_mut`).
        const pp = f ? pathParts(f) : undefined;
        const bare = fe?.type === "identifier" ? fe.text : undefined;
        const fname = pp?.name ?? bare;
        if (fname && ["slice_from_raw_parts_mut", "slice_from_raw_parts", "from_raw_parts_mut", "from_raw_parts"].includes(fname)
          && (bare !== undefined || pp!.head === "ptr" || pp!.head === "slice")) {
          const inner = argRef(n.childForFieldName("arguments")?.namedChildren[0], depth + 1);
          return { ...inner, text: n.text };
        }
        return { text: n.text };
      }
    }
    return { text: n.text };
  };

  /** The `let` binding a value flows into (through unsafe blocks and parentheses). */
  const bindingOf = (n: Node): { name?: string; typeText?: string } => {
    let p: Node | null = n.parent;
    let child: Node = n;
    for (let i = 0; p && i < 6; i++) {
      if (p.type === "let_declaration") {
        if (p.childForFieldName("value")?.id !== child.id) return {};
        const pat = p.childForFieldName("pattern");
        const name = pat?.type === "identifier" ? pat.text : pat?.type === "mut_pattern" ? pat.namedChild(0)?.text : undefined;
        return { name, typeText: p.childForFieldName("type")?.text };
      }
      if (!["unsafe_block", "block", "parenthesized_expression"].includes(p.type)) return {};
      child = p;
      p = p.parent;
    }
    return {};
  };

  const innerOfNew = (arg: Node | null | undefined): string | undefined => {
    // Box::new(Det { … }) / Box::new(Det::new(…)) / Box::<Det>::new(…)
    if (!arg || arg.type !== "call_expression") return undefined;
    const pp = pathParts(arg.childForFieldName("function")!);
    if (!pp || pp.name !== "new") return undefined;
    if (pp.turbofish) return lastSeg(pp.turbofish);
    const a0 = arg.childForFieldName("arguments")?.namedChildren[0];
    if (a0?.type === "struct_expression") return lastSeg(a0.childForFieldName("name")?.text ?? "");
    if (a0?.type === "call_expression") {
      const p2 = pathParts(a0.childForFieldName("function")!);
      if (p2 && /^[A-Z]/.test(p2.head)) return p2.head;
    }
    return undefined;
  };

  /** `Some(nn)` bound to `NonNull::new(p)` (in `if let`, `let … else`, `while let`): `nn` is `p`
   * checked for NULL, and `nn.as_ptr()` is `p` again (core::ptr::NonNull::new returns None for a
   * null pointer, else Some of the same pointer). */
  const aliasNonNull = (pat: Node | null, val: Node | null): void => {
    if (pat?.type !== "tuple_struct_pattern" || val?.type !== "call_expression") return;
    if (lastSeg(pat.childForFieldName("type")?.text ?? "") !== "Some") return;
    const binds = pat.namedChildren.filter((c) => c.id !== pat.childForFieldName("type")?.id);
    const name = binds.length === 1 ? (binds[0].type === "identifier" ? binds[0].text : binds[0].type === "mut_pattern" ? binds[0].namedChild(0)?.text : undefined) : undefined;
    const fnNode = val.childForFieldName("function");
    const pp = fnNode ? pathParts(fnNode) : undefined;
    if (!name || !pp || pp.head !== "NonNull" || (pp.name !== "new" && pp.name !== "new_unchecked")) return;
    const r = argRef(val.childForFieldName("arguments")?.namedChildren.find((c) => !c.type.endsWith("comment")));
    if (r.ident && r.ident !== name) aliases.set(name, { ident: r.ident, cast: r.cast, text: val.text });
  };

  indexSubtree(body, [...bodyWalkTypes.rust]);
  walkTypes(body, RUST_VISITED, (n) => {
    if (n.type === "function_item" || n.type === "impl_item" || n.type === "mod_item") return false;
    switch (n.type) {
      case "const_item":
      case "static_item":
        return false; // evaluated at compile time: a panic there is a build error
      case "block":
        sense.vf.onBlock(n);
        return;
      case "if_expression":
        sense.vf.onIf(n);
        return;
      case "while_expression":
        sense.vf.onWhile(n);
        return;
      case "for_expression":
        sense.vf.onFor(n);
        return;
      case "assignment_expression":
        sense.onAssign(n);
        return;
      case "let_condition":
        aliasNonNull(n.childForFieldName("pattern"), n.childForFieldName("value"));
        return;
      case "let_declaration": {
        const pat = n.childForFieldName("pattern");
        const val = n.childForFieldName("value");
        aliasNonNull(pat, val);
        sense.onLet(n);
        const tt = n.childForFieldName("type");
        const name = pat?.type === "identifier" ? pat.text : pat?.type === "mut_pattern" ? pat.namedChild(0)?.text : undefined;
        if (name && tt?.type === "primitive_type" && INT_PRIMS.has(tt.text)) intNames.add(name);
        if (name && tt && INT_PRIMS.has(lastSeg(tt.text))) intNames.add(name);
        if (name && val && (val.type === "identifier" || val.type === "type_cast_expression" || val.type === "call_expression" || val.type === "parenthesized_expression")) {
          const r = argRef(val);
          if (r.ident && r.ident !== name) aliases.set(name, { ident: r.ident, cast: r.cast ?? (tt?.type === "pointer_type" ? lastSeg(tt.childForFieldName("type")?.text ?? "") : undefined), text: val.text });
          if (val.type === "type_cast_expression" && INT_PRIMS.has(lastSeg(val.childForFieldName("type")?.text ?? ""))) intNames.add(name);
        }
        return;
      }
      case "reference_expression": {
        const v = n.childForFieldName("value");
        if (v?.type === "unary_expression" && v.child(0)?.text === "*") {
          const r = argRef(v.namedChild(0));
          if (r.ident) own.borrows.push({ ident: r.ident, mut: n.children.some((c) => c.type === "mutable_specifier"), range: rangeOf(file, n) });
        }
        return;
      }
      case "macro_invocation": {
        const mac = lastSeg(n.childForFieldName("macro")?.text ?? "");
        const kind = PANIC_MACROS[mac];
        if (kind === "assert") {
          const d = sense.assertDeps(n, mac);
          if (d !== "const") {
            site(kind, `${mac}!`, n, "warning", d ? sense.taintOfNames(d, n.startIndex) : undefined);
            const needs = mac === "assert" || mac === "assert_ne" ? sense.assertNeeds(n, paramNames, mac) : undefined;
            if (needs) own.panics[own.panics.length - 1]!.needs = needs;
          }
        } else if (kind && !sense.armUnreachable(n)) site(kind, `${mac}!`, n, "warning", sense.branchTaint(n));
        return false; // token trees are not parsed
      }
      case "index_expression": {
        if (sense.indexLevel(n)) site("index", n.text.length > 40 ? n.text.slice(0, 37) + "…" : n.text, n, "info");
        return;
      }
      case "binary_expression":
      case "compound_assignment_expr": {
        const op = (n.childForFieldName("operator") ?? n.child(1))?.text ?? "";
        const l = n.childForFieldName("left");
        const r = n.childForFieldName("right");
        const isInt = (x: Node | null) => !!x && ((x.type === "identifier" && intNames.has(x.text)) ||
          (x.type === "type_cast_expression" && INT_PRIMS.has(lastSeg(x.childForFieldName("type")?.text ?? ""))));
        const isFloatLit = (x: Node | null) => x?.type === "float_literal";
        const base = op.replace(/=$/, "");
        if (n.type === "compound_assignment_expr") sense.onAssign(n);
        if (["+", "-", "*"].includes(base) && (isInt(l) || isInt(r)) && !isFloatLit(l) && !isFloatLit(r) &&
          !(op === "*" && isSliceLengthProduct(n))) {
          if (sense.overflowLevel(n, base)) site("overflow", n.text.length > 40 ? n.text.slice(0, 37) + "…" : n.text, n, "info");
        } else if (["/", "%"].includes(base) && isInt(r)) {
          if (sense.divisionLevel(n)) site("division", n.text.length > 40 ? n.text.slice(0, 37) + "…" : n.text, n, "info");
        }
        if ((op === "==" || op === "!=") && l && r) {
          const nullish = (x: Node) => x.type === "call_expression" && /(^|::)null(_mut)?$/.test(x.childForFieldName("function")?.text.replace(/\s+/g, "").replace(/::<.*>$/, "") ?? "");
          const side = nullish(r) ? l : nullish(l) ? r : null;
          if (side) {
            const a = argRef(side);
            if (a.ident) own.nullChecks.push({ ident: a.ident, range: rangeOf(file, n) });
          }
        }
        return;
      }
      case "call_expression": {
        readRustCall(n);
        return;
      }
    }
    return;
  });

  function readRustCall(n: Node): void {
    const f = n.childForFieldName("function");
    const args = n.childForFieldName("arguments")?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
    if (!f) return;
    const range = rangeOf(file, n);
    const prot = isProtected(n);
    sense.onCall(n, range);
    const under = sense.underOf(n);
    // an argument made by a crate function (`Frames::new(buf, n)?`) carries that function's
    // value, as a `let` of it does (PanicSense.isTransform)
    const argTaint = args.map((a) => (sense.isConstExpr(a) || sense.isTransform(a) ? 0 : sense.taintOf(a)));
    const argGe = sense.argLowerBounds(n, args);
    let fe = f;
    if (f.type === "generic_function") fe = f.childForFieldName("function") ?? f;
    if (fe.type === "field_expression") {
      const method = fe.childForFieldName("field")?.text ?? "";
      const recv = fe.childForFieldName("value");
      const r = argRef(recv);
      switch (method) {
        case "unwrap": case "expect": {
          const lv = sense.unwrapLevel(n, recv);
          if (lv) site(method, `.${method}()`, n, lv.level, lv.taint);
          return;
        }
        case "borrow_mut":
          site(method, `.${method}()`, n, "info");
          return;
        case "is_null":
          if (r.ident) own.nullChecks.push({ ident: r.ident, range });
          return;
        case "as_ref": case "as_mut":
          if (r.ident) {
            own.borrows.push({ ident: r.ident, mut: method === "as_mut", range });
            own.nullChecks.push({ ident: r.ident, range });
          }
          return;
        case "into_raw": {
          // CString::new(…)?.into_raw() — the method form exists on CString only.
          own.produces.push({ how: "cstring", inner: "CString", range, protected: prot });
          if (r.ident) own.reLeaks.push({ ident: r.ident, range });
          return;
        }
        case "into_raw_parts":
          own.produces.push({ how: "vec", range, protected: prot });
          if (r.ident) own.reLeaks.push({ ident: r.ident, range });
          return;
        case "drop_in_place":
          own.releases.push({ how: "drop_in_place", arg: r, range, calleeRange: rangeOf(file, fe) });
          return;
      }
      const call: RustOwnFacts["calls"][number] = { callee: method, method: true, args: [r, ...args.map((a) => argRef(a))], range, protected: prot };
      const rt = sense.recvType(recv);
      if (rt) call.recv = rt;
      if (argTaint.some((t) => t)) call.argTaint = argTaint;
      if (argGe) call.argGe = argGe;
      if (under) call.under = under;
      own.calls.push(call);
      return;
    }
    const ftext = f.text.replace(/\s+/g, "");
    if (/(^|::)catch_unwind$/.test(ftext)) {
      own.catchUnwind = true;
      const a = n.childForFieldName("arguments");
      if (a) protectedRanges.push(rangeOf(file, a));
      // a helper that runs its closure parameter under catch_unwind: `catch_unwind(f)`,
      // `catch_unwind(AssertUnwindSafe(f))`, `catch_unwind(|| f())`
      let x: Node | null | undefined = args[0];
      for (let i = 0; x && i < 4; i++) {
        if (x.type === "call_expression" && /AssertUnwindSafe$/.test(x.childForFieldName("function")?.text ?? "")) x = x.childForFieldName("arguments")?.namedChildren.find((c) => !c.type.endsWith("comment"));
        else if (x.type === "parenthesized_expression") x = x.namedChild(0);
        else break;
      }
      const called: string[] = [];
      if (x?.type === "identifier") called.push(x.text);
      else if (x?.type === "closure_expression") {
        for (const c of x.descendantsOfType("call_expression")) {
          const cf = c.childForFieldName("function");
          if (cf?.type === "identifier") called.push(cf.text);
        }
      }
      for (const nm of called) {
        const i = paramNames.indexOf(nm);
        if (i >= 0) (own.catchParams ??= []).includes(i) || own.catchParams.push(i);
      }
      return;
    }
    const pp = pathParts(f);
    if (pp) {
      const { head, name, turbofish } = pp;
      const a0 = args[0];
      const b = bindingOf(n);
      const bindInner = b.typeText && /^(Box|Arc|Rc)\s*</.test(b.typeText) ? lastSeg(b.typeText.replace(/^\w+\s*<\s*/, "").replace(/>\s*$/, "")) : undefined;
      if (["Box", "Arc", "Rc"].includes(head) && (name === "into_raw" || name === "leak")) {
        const how = head.toLowerCase() as OwnHow;
        own.produces.push({ how, inner: turbofish ? lastSeg(turbofish) : innerOfNew(a0), range, protected: prot });
        const r = argRef(a0);
        if (r.ident) own.reLeaks.push({ ident: r.ident, range });
        return;
      }
      if (head === "CString" && name === "into_raw") {
        own.produces.push({ how: "cstring", inner: "CString", range, protected: prot });
        const r = argRef(a0);
        if (r.ident) own.reLeaks.push({ ident: r.ident, range });
        return;
      }
      if (head === "ManuallyDrop" && name === "new") {
        // a field of a struct being built (`Image { inner: ManuallyDrop::new(x) }`) is how that
        // struct manages its field's drop, not a value handed to C
        if (n.parent?.type === "field_initializer") return;
        // `ManuallyDrop::new(Box::from_raw(p))`: a look at the object behind p that never drops
        // it (std docs, `ManuallyDrop`): neither made nor released here
        if (fromRawIn(a0)) return;
        own.produces.push({ how: "manuallydrop", range, protected: prot });
        const r = argRef(a0);
        if (r.ident) own.reLeaks.push({ ident: r.ident, range });
        return;
      }
      if (head === "mem" && name === "forget") {
        const r = argRef(a0);
        if (r.ident) own.reLeaks.push({ ident: r.ident, range });
        own.produces.push({ how: "forget", range, protected: prot });
        return;
      }
      if (head === "Vec" && name === "into_raw_parts") {
        own.produces.push({ how: "vec", range, protected: prot });
        return;
      }
      if ((head === "Arc" || head === "Rc") && name === "increment_strong_count") {
        const r = argRef(a0);
        if (r.ident) retained.add(r.ident);
        return;
      }
      if ((head === "Arc" || head === "Rc") && name === "from_raw" && argRef(a0).ident && retained.has(argRef(a0).ident!)) {
        // `increment_strong_count(p)` then `from_raw(p)`: the new Arc owns the count just added and
        // the caller keeps its own (std docs, `Arc::increment_strong_count`): a borrow.
        const r = argRef(a0);
        own.borrows.push({ ident: r.ident!, mut: false, range });
        return;
      }
      if ((head === "Arc" || head === "Rc") && name === "decrement_strong_count") {
        // drops one strong count, freeing the value with the last one: `drop(Arc::from_raw(p))`
        // (std docs, `Arc::decrement_strong_count`). No calleeRange: a fix that rewrote the path to
        // another `from_raw` would leave the value undropped.
        own.releases.push({ how: head.toLowerCase() as OwnHow, arg: argRef(a0), inner: turbofish ? lastSeg(turbofish) : undefined, range });
        return;
      }
      if (["Box", "Arc", "Rc", "CString"].includes(head) && name === "from_raw") {
        if (inManuallyDrop(n)) {
          const r = argRef(a0);
          if (r.ident) own.borrows.push({ ident: r.ident, mut: true, range });
          return;
        }
        own.releases.push({
          how: head === "CString" ? "cstring" : (head.toLowerCase() as OwnHow),
          arg: argRef(a0), inner: turbofish ? lastSeg(turbofish) : bindInner ?? (head === "CString" ? "CString" : undefined),
          range, calleeRange: rangeOf(file, f), binding: b.name,
        });
        return;
      }
      if (head === "Vec" && name === "from_raw_parts") {
        own.releases.push({ how: "vec", arg: argRef(a0), inner: turbofish, range, calleeRange: rangeOf(file, f), binding: b.name });
        return;
      }
      if (head === "ptr" && name === "drop_in_place") {
        own.releases.push({ how: "drop_in_place", arg: argRef(a0), range, calleeRange: rangeOf(file, f) });
        return;
      }
      if (head === "NonNull" && name === "new") {
        const r = argRef(a0);
        if (r.ident) own.nullChecks.push({ ident: r.ident, range });
        return;
      }
      if (["forget", "leak"].includes(name) && (head === "mem" || head === "Box")) return;
    }
    if (f.type === "identifier" && f.text === "forget") {
      const r = argRef(args[0]);
      if (r.ident) own.reLeaks.push({ ident: r.ident, range });
      own.produces.push({ how: "forget", range, protected: prot });
      return;
    }
    if (f.type === "identifier" && f.text === "drop_in_place") {
      own.releases.push({ how: "drop_in_place", arg: argRef(args[0]), range, calleeRange: rangeOf(file, f) });
      return;
    }
    if (f.type === "identifier" || f.type === "scoped_identifier" || f.type === "generic_function") {
      const call: RustOwnFacts["calls"][number] = { callee: lastSeg(pp?.name ?? f.text), method: false, args: args.map((a) => argRef(a)), range, protected: prot };
      const inner = f.type === "generic_function" ? f.childForFieldName("function") : f;
      if (inner?.type === "scoped_identifier") {
        const h = sense.headOf(inner);
        if (h) call.head = h;
      }
      if (argTaint.some((t) => t)) call.argTaint = argTaint;
      if (argGe) call.argGe = argGe;
      if (under) call.under = under;
      own.calls.push(call);
    }
  }

  fn.body.ownership = own;
}

// ---------------------------------------------------------------- C / C++

const NULL_TEXT = new Set(["nullptr", "NULL", "0", "nullptr_t{}"]);

function declName(d: Node | null | undefined, depth = 0): { name?: string; node?: Node; isPtr: boolean; isRef: boolean; isRvalue: boolean } {
  let isPtr = false;
  let isRef = false;
  let isRvalue = false;
  let n: Node | null | undefined = d;
  for (let i = 0; n && i < 20 + depth; i++) {
    switch (n.type) {
      case "identifier": case "field_identifier": case "operator_name": case "destructor_name": case "qualified_identifier":
        return { name: n.text, node: n, isPtr, isRef, isRvalue };
      case "pointer_declarator": case "abstract_pointer_declarator": isPtr = true; break;
      case "reference_declarator": case "abstract_reference_declarator":
        isRef = true;
        if (n.children.some((c) => c.type === "&&")) isRvalue = true;
        break;
    }
    const next: Node | null | undefined = n.childForFieldName("declarator") ?? n.namedChildren.find((c) => /declarator$|identifier$|^operator_name$|^destructor_name$/.test(c.type));
    if (!next) return { isPtr, isRef, isRvalue };
    n = next;
  }
  return { isPtr, isRef, isRvalue };
}

function typeHead(t: Node | null | undefined): string {
  if (!t) return "";
  if (t.type === "qualified_identifier") return typeHead(t.childForFieldName("name"));
  if (t.type === "template_type") return t.childForFieldName("name")?.text ?? "";
  return t.text.replace(/^(struct|class|const)\s+/, "");
}

/** std::unique_ptr<T, D> or std::shared_ptr<T> from a type node (or the template_function of an
 * expression `std::shared_ptr<T>(p)`); undefined for other types. */
function uniquePtrOf(t: Node | null | undefined, file: string, name: string, range: Range): UniquePtrDecl | undefined {
  let tt = t;
  if (tt?.type === "qualified_identifier") tt = tt.childForFieldName("name");
  if (tt?.type !== "template_type" && tt?.type !== "template_function") return undefined;
  const head = tt.childForFieldName("name")?.text;
  if (head !== "unique_ptr" && head !== "shared_ptr") return undefined;
  const args = tt.childForFieldName("arguments")?.namedChildren ?? [];
  const pointee = typeHead(args[0]?.childForFieldName("type") ?? args[0]);
  // std::shared_ptr's deleter is never part of its type: it is the constructor's (or reset's)
  // second argument, and without one the pointer is destroyed with `delete`
  // (C++ [util.smartptr.shared.const], [util.smartptr.shared.dest]).
  if (head === "shared_ptr") return { name, smart: "shared", pointee, deleter: { k: "default" }, range };
  let deleter: UniquePtrDecl["deleter"] = { k: "default" };
  const d = args[1];
  if (d) {
    const dt = d.childForFieldName("type") ?? d;
    if (dt.type === "decltype") {
      let e = dt.namedChild(0);
      while (e && (e.type === "pointer_expression" || e.type === "parenthesized_expression")) e = e.namedChild(e.namedChildCount - 1);
      deleter = e ? { k: "fn", name: e.text.replace(/^::/, "") } : { k: "unknown", text: dt.text };
    } else if (d.type === "type_descriptor" && d.childForFieldName("declarator")) {
      deleter = { k: "unknown", text: d.text }; // a function-pointer type: the function comes with the initializer
    } else {
      deleter = { k: "functor", cls: typeHead(dt) };
    }
  }
  return { name, pointee, deleter, range };
}

/** A deleter argument: a function by name (`&sonar_fir_free`, `sonar_fir_free`), or anything else
 * (a lambda, a functor object) with the calls and `delete`s of its body. */
function deleterArgOf(n: Node, file: string): DeleterArg {
  const a = argOf(n, file);
  if (a.ref && !a.ref.of && !a.ref.this) return { name: a.ref.name, text: n.text, calls: [], deletes: false };
  const calls: string[] = [];
  let deletes = false;
  if (n.type === "lambda_expression") {
    const body = n.childForFieldName("body");
    for (const c of body?.descendantsOfType(["call_expression", "delete_expression"]) ?? []) {
      if (c.type === "delete_expression") deletes = true;
      else calls.push(calleeName(c.childForFieldName("function")));
    }
  }
  return { text: n.text, calls, deletes };
}

/** The constructor arguments of a smart pointer: the pointer it takes over and the deleter. */
function fillInit(up: UniquePtrDecl, first: Node | null | undefined, second: Node | null | undefined, file: string): void {
  if (first) {
    const a = argOf(first, file);
    if (a.call) up.initCall = a.call;
    up.initArgRange = rangeOf(file, first);
  }
  if (second) {
    const d = deleterArgOf(second, file);
    if (d.name) up.initDeleter = d.name;
    else up.initDeleterOther = d;
  }
}

function stripCasts(n: Node | null | undefined): { node: Node | null | undefined; castTo?: string } {
  let castTo: string | undefined;
  let cur = n;
  for (let i = 0; cur && i < 10; i++) {
    if (cur.type === "parenthesized_expression") { cur = cur.namedChild(0); continue; }
    if (cur.type === "cast_expression") {
      castTo ??= typeHead(cur.childForFieldName("type")?.childForFieldName("type"));
      cur = cur.childForFieldName("value");
      continue;
    }
    if (cur.type === "call_expression") {
      const f = cur.childForFieldName("function");
      if (f?.type === "template_function" && /^(static_cast|reinterpret_cast|const_cast)$/.test(f.childForFieldName("name")?.text ?? "")) {
        castTo ??= typeHead(f.childForFieldName("arguments")?.namedChild(0)?.childForFieldName("type"));
        cur = cur.childForFieldName("arguments")?.namedChild(0);
        continue;
      }
    }
    break;
  }
  return { node: cur, castTo };
}

function refOf(n: Node | null | undefined): CRef | undefined {
  if (!n) return undefined;
  if (n.type === "identifier") return { name: n.text };
  if (n.type === "field_expression") {
    const obj = n.childForFieldName("argument");
    const field = n.childForFieldName("field")?.text ?? "";
    if (obj?.type === "this") return { name: field, this: true };
    if (obj?.type === "identifier") return { name: field, of: obj.text };
    if (obj?.type === "pointer_expression" && obj.namedChild(0)?.type === "this") return { name: field, this: true };
  }
  return undefined;
}

function calleeName(f: Node | null | undefined): string {
  if (!f) return "";
  if (f.type === "qualified_identifier") {
    const nm = f.childForFieldName("name");
    const scope = f.childForFieldName("scope")?.text ?? "";
    if (scope === "std" || scope === "") return nm?.text ?? f.text;
    return f.text;
  }
  if (f.type === "template_function") return f.childForFieldName("name")?.text ?? f.text;
  return f.text.replace(/^::/, "");
}

function argOf(n: Node, file: string): CArg {
  const { node, castTo } = stripCasts(n);
  const a: CArg = { text: n.text, range: rangeOf(file, n) };
  if (castTo) a.castTo = castTo;
  if (!node) return a;
  const r = refOf(node);
  if (r) a.ref = r;
  else if (node.type === "call_expression") {
    const f = node.childForFieldName("function");
    if (f?.type === "field_expression" && f.childForFieldName("field")?.text === "get") {
      const rr = refOf(f.childForFieldName("argument"));
      if (rr) { a.ref = rr; a.viaGet = true; }
    } else a.call = calleeName(f);
  } else if (node.type === "pointer_expression" && node.child(0)?.text === "&") {
    // &sonar_fir_free
    const inner = node.namedChild(0);
    if (inner?.type === "identifier") a.call = undefined, a.ref = { name: inner.text };
  }
  return a;
}

function isNullNode(n: Node | null | undefined): boolean {
  const s = stripCasts(n).node;
  return !!s && (s.type === "null" || NULL_TEXT.has(s.text));
}

function memberKind(nameNode: Node | undefined, className: string | undefined, paramList: Node | null | undefined): { kind: MemberKind; param?: string } {
  if (!className || !nameNode) return { kind: "method" };
  const last = nameNode.type === "qualified_identifier" ? nameNode.childForFieldName("name") : nameNode;
  if (!last) return { kind: "method" };
  const params = paramList?.namedChildren.filter((c) => c.type === "parameter_declaration" || c.type === "optional_parameter_declaration") ?? [];
  const p0 = params[0];
  const p0type = typeHead(p0?.childForFieldName("type"));
  const p0d = declName(p0?.childForFieldName("declarator"));
  const selfParam = params.length === 1 && p0?.type === "parameter_declaration" && p0type === className;
  if (last.type === "destructor_name") return { kind: "dtor" };
  if (last.text === "operator=") {
    if (selfParam && p0d.isRvalue) return { kind: "moveAssign", param: p0d.name };
    if (selfParam) return { kind: "copyAssign", param: p0d.name };
    return { kind: "method" };
  }
  if (last.text === className) {
    if (selfParam && p0d.isRvalue) return { kind: "moveCtor", param: p0d.name };
    if (selfParam && p0d.isRef) return { kind: "copyCtor", param: p0d.name };
    return { kind: "ctor" };
  }
  return { kind: "method" };
}

function functionDeclarator(d: Node | null | undefined): Node | undefined {
  let n = d;
  for (let i = 0; n && i < 20; i++) {
    if (n.type === "function_declarator") return n;
    n = n.childForFieldName("declarator") ?? n.namedChildren.find((c) => c.type.endsWith("declarator"));
  }
  return undefined;
}

const EXIT_STMTS = new Set(["return_statement", "throw_statement", "break_statement", "continue_statement"]);

/**
 * Whether the statement being walked sits in a nested block (an if/else branch, a loop body)
 * whose later statements return, throw, break or continue: a release there does not reach the
 * code after the block. Computed top-down while walking (Node.parent is a search from the root
 * in tree-sitter, which would make long functions quadratic): when a block is entered, each of
 * its statements is recorded with its answer; visiting that statement makes it current.
 */
let stmtExits = new Map<number, boolean>();
let curExits = false;
/** Node types visitExpr visits in the current file: the ones its switch handles, plus every type
 * that occurs as a statement of a block in the file (those carry stmtExits entries), so walking
 * only these types visits every node the full walk would act on. */
let exprTypes: string[] = [];
const EXPR_TYPES = ["compound_statement", "lambda_expression", "declaration", "assignment_expression", "delete_expression", "return_statement", "call_expression", "field_expression", "identifier"];
// Statement types of C/C++ blocks: visiting a type that is not a block statement in the file does
// nothing (see exprTypes), so listing the usual ones lets every family share one index.
const STATEMENT_TYPES = ["expression_statement", "if_statement", "for_statement", "for_range_loop", "while_statement", "do_statement",
  "switch_statement", "case_statement", "break_statement", "continue_statement", "goto_statement", "labeled_statement", "throw_statement",
  "try_statement", "comment", "ERROR", "function_definition", "type_definition"];
for (const t of [...EXPR_TYPES, ...STATEMENT_TYPES]) bodyWalkTypes.c.add(t);

function enterBlock(block: Node, isFunctionBody: boolean): void {
  const kids = block.namedChildren;
  let lastExit = -1;
  if (!isFunctionBody) {
    for (let i = 0; i < kids.length; i++) {
      const k = kids[i]!;
      if (EXIT_STMTS.has(k.type) || (k.type === "expression_statement" && k.namedChild(0)?.type === "throw_expression")) lastExit = i;
    }
  }
  for (let i = 0; i < kids.length; i++) stmtExits.set(kids[i]!.id, i < lastExit);
}

function exitsAfter(_n: Node): boolean {
  return curExits;
}

function extractFlow(def: Node, file: string, className: string | undefined, out: CFlow[]): CFlow | undefined {
  indexSubtree(def, [...bodyWalkTypes.c, ...exprTypes]);
  const decl = def.childForFieldName("declarator");
  const fd = functionDeclarator(decl);
  if (!fd) return undefined;
  const nameNode = fd.childForFieldName("declarator") ?? undefined;
  let cls = className;
  if (!cls && nameNode?.type === "qualified_identifier") {
    cls = nameNode.childForFieldName("scope")?.text.split("::").pop();
  }
  const paramList = fd.childForFieldName("parameters");
  const mk = memberKind(nameNode, cls, paramList);
  const params: string[] = [];
  for (const p of paramList?.namedChildren ?? []) {
    const nm = declName(p.childForFieldName("declarator")).name;
    params.push(nm ?? "");
  }
  const body = def.childForFieldName("body");
  let state: CFlow["state"] = "user";
  if (def.namedChildren.some((c) => c.type === "delete_method_clause")) state = "deleted";
  else if (def.namedChildren.some((c) => c.type === "default_method_clause")) state = "defaulted";
  const lastName = nameNode?.type === "qualified_identifier" ? nameNode.childForFieldName("name")?.text ?? nameNode.text : nameNode?.text ?? "";
  const flow: CFlow = {
    name: lastName, className: cls, member: cls ? mk.kind : undefined, state, params, locals: [...params],
    range: rangeOf(file, def), nameRange: rangeOf(file, nameNode ?? def), bodyRange: body ? rangeOf(file, body) : undefined,
    events: [], uptrs: [],
  };
  const ev: CEvent[] = flow.events;
  // constructor member initializers: fir_(sonar_fir_new(…)) / fir_{…}
  const inits = def.namedChildren.find((c) => c.type === "field_initializer_list");
  for (const fi of inits?.namedChildren ?? []) {
    if (fi.type !== "field_initializer") continue;
    const fname = fi.namedChild(0)?.text ?? "";
    const argsN = fi.namedChildren[1];
    const a0 = argsN?.namedChildren.filter((c) => !c.type.endsWith("comment"))[0];
    const lhs: CRef = { name: fname, this: true };
    if (a0) visitExpr(a0, file, flow);
    ev.push({ k: "assign", lhs, rhs: a0 ? argOf(a0, file) : null, isNull: !a0 || isNullNode(a0), range: rangeOf(file, fi) });
    const a1 = argsN?.namedChildren.filter((c) => !c.type.endsWith("comment"))[1];
    if (a1) {
      // smart pointer member initialised with (ptr, deleter): remember the deleter
      const d = deleterArgOf(a1, file);
      if (d.name) (ev[ev.length - 1] as { deleterArg?: string }).deleterArg = d.name;
      else (ev[ev.length - 1] as { deleterOther?: DeleterArg }).deleterOther = d;
    }
  }
  if (body) {
    (flow as CFlow & { bodyId?: number }).bodyId = body.id;
    curExits = false;
    visitExpr(body, file, flow);
    delete (flow as CFlow & { bodyId?: number }).bodyId;
  }
  if (cls && mk.param) (flow as CFlow & { param?: string }).param = mk.param;
  out.push(flow);
  return flow;
}

/** Walks statements/expressions in source order, appending events to the flow. */
function visitExpr(root: Node, file: string, flow: CFlow & { bodyId?: number }): void {
  const ev = flow.events;
  walkTypes(root, exprTypes, (n) => {
    const se = stmtExits.get(n.id);
    if (se !== undefined) curExits = se;
    switch (n.type) {
      case "compound_statement":
        enterBlock(n, n.id === flow.bodyId);
        return;
      case "lambda_expression":
        return false;
      case "declaration": {
        const t = n.childForFieldName("type");
        for (const d of n.childrenForFieldName("declarator")) {
          if (d.type === "function_declarator") {
            // `std::unique_ptr<T> p(make());` parses as a function declaration (most vexing parse)
            const nm = declName(d.childForFieldName("declarator")).name;
            const up = nm ? uniquePtrOf(t, file, nm, rangeOf(file, n)) : undefined;
            if (up && nm) {
              const ps = d.childForFieldName("parameters")?.namedChildren ?? [];
              const p0 = ps[0];
              if (p0?.childForFieldName("declarator")?.type === "abstract_function_declarator") up.initCall = typeHead(p0.childForFieldName("type"));
              const t0 = p0?.childForFieldName("type");
              if (p0 && ps.length === 1 && !p0.childForFieldName("declarator") && t0?.type === "type_identifier" && flow.locals.includes(t0.text)) {
                // `std::shared_ptr<T> sp(raw);` with `raw` a local: the "type" is the local it takes over
                up.byEvent = true;
                up.initArgRange = rangeOf(file, t0);
                ev.push({ k: "smart", up, arg: { text: t0.text, ref: { name: t0.text }, range: rangeOf(file, t0) }, range: up.range });
              }
              flow.uptrs.push(up);
              flow.locals.push(nm);
            }
            continue;
          }
          const dn = declName(d.type === "init_declarator" ? d.childForFieldName("declarator") : d);
          if (!dn.name) continue;
          flow.locals.push(dn.name);
          const val = d.type === "init_declarator" ? d.childForFieldName("value") : null;
          const up = uniquePtrOf(t, file, dn.name, rangeOf(file, n));
          const list = val?.type === "argument_list" || val?.type === "initializer_list";
          const first = list ? val!.namedChildren[0] : val;
          if (up) {
            fillInit(up, first, list ? val!.namedChildren[1] : undefined, file);
            flow.uptrs.push(up);
          }
          if (val) {
            const v0 = first;
            if (v0) {
              visitExpr(v0, file, flow);
              ev.push({ k: "assign", lhs: { name: dn.name }, rhs: argOf(v0, file), isNull: isNullNode(v0), range: rangeOf(file, d), decl: true, declType: typeHead(t) });
              // the smart pointer takes over what its argument holds at this point of the flow
              if (up && !isNullNode(v0)) {
                up.byEvent = true;
                ev.push({ k: "smart", up, arg: argOf(v0, file), range: up.range });
              }
            }
          }
        }
        return false;
      }
      case "assignment_expression": {
        const l = n.childForFieldName("left");
        const r = n.childForFieldName("right");
        const op = n.childForFieldName("operator")?.text ?? n.child(1)?.text;
        if (r) visitExpr(r, file, flow);
        const lr = refOf(l);
        if (lr && op === "=") {
          // std::exchange(o.h_, nullptr) on the right nulls its first argument
          ev.push({ k: "assign", lhs: lr, rhs: r ? argOf(r, file) : null, isNull: isNullNode(r), range: rangeOf(file, n) });
        } else if (l) visitExpr(l, file, flow);
        return false;
      }
      case "delete_expression": {
        const arg = n.namedChildren[n.namedChildCount - 1];
        if (arg) {
          visitExpr(arg, file, flow);
          ev.push({ k: "delete", arg: argOf(arg, file), array: n.children.some((c) => c.type === "["), range: rangeOf(file, n), exitsAfter: exitsAfter(n) });
        }
        return false;
      }
      case "return_statement": {
        const e = n.namedChild(0);
        if (e) visitExpr(e, file, flow);
        ev.push({ k: "return", arg: e ? argOf(e, file) : null, range: rangeOf(file, n) });
        return false;
      }
      case "call_expression": {
        const f = n.childForFieldName("function");
        const argsN = n.childForFieldName("arguments")?.namedChildren.filter((c) => !c.type.endsWith("comment")) ?? [];
        for (const a of argsN) visitExpr(a, file, flow);
        if (f?.type === "field_expression") visitExpr(f, file, flow);
        const callee = calleeName(f);
        // `std::shared_ptr<T>(p)` / `std::unique_ptr<T>(p, d)` built in an expression
        const upx = f?.type === "qualified_identifier" || f?.type === "template_function" ? uniquePtrOf(f, file, "", rangeOf(file, n)) : undefined;
        if (upx && argsN[0] && !isNullNode(argsN[0])) {
          fillInit(upx, argsN[0], argsN[1], file);
          ev.push({ k: "smart", up: upx, arg: argOf(argsN[0], file), range: rangeOf(file, n) });
        }
        // `sp.reset(p)` / `sp.reset(p, d)`: whether `sp` is a smart pointer is the rule's question
        if (f?.type === "field_expression" && f.childForFieldName("field")?.text === "reset" && argsN[0] && !isNullNode(argsN[0])) {
          const obj = refOf(f.childForFieldName("argument"));
          if (obj) ev.push({ k: "reset", obj, arg: argOf(argsN[0], file), deleter: argsN[1] ? deleterArgOf(argsN[1], file) : undefined, range: rangeOf(file, n) });
        }
        if (callee === "swap" && argsN.length === 2) {
          const a = refOf(stripCasts(argsN[0]).node);
          const b = refOf(stripCasts(argsN[1]).node);
          if (a && b) ev.push({ k: "swap", a, b, range: rangeOf(file, n) });
          return false;
        }
        if (callee === "exchange" && argsN.length === 2) {
          const a = refOf(argsN[0]);
          if (a) ev.push({ k: "assign", lhs: a, rhs: argOf(argsN[1]!, file), isNull: isNullNode(argsN[1]), range: rangeOf(file, n) });
        }
        if (f?.type !== "field_expression" && !/^(static_cast|reinterpret_cast|const_cast)$/.test(callee)) {
          ev.push({ k: "call", callee, args: argsN.map((a) => argOf(a, file)), range: rangeOf(file, n), calleeRange: rangeOf(file, f!), exitsAfter: exitsAfter(n) });
        }
        return false;
      }
      case "field_expression": {
        const r = refOf(n);
        if (r) {
          ev.push({ k: "use", ref: r, range: rangeOf(file, n) });
          return false;
        }
        return;
      }
      case "identifier":
        ev.push({ k: "use", ref: { name: n.text }, range: rangeOf(file, n) });
        return;
    }
    return;
  });
}

function extractClass(spec: Node, file: string, flows: CFlow[]): CClass | undefined {
  const nameNode = spec.childForFieldName("name");
  const body = spec.childForFieldName("body");
  if (!nameNode || !body) return undefined;
  const name = nameNode.type === "qualified_identifier" ? nameNode.childForFieldName("name")?.text ?? nameNode.text : nameNode.text;
  const cls: CClass = {
    name, file, range: rangeOf(file, spec), nameRange: rangeOf(file, nameNode), bodyRange: rangeOf(file, body),
    bases: [], fields: [], members: [],
  };
  const bc = spec.namedChildren.find((c) => c.type === "base_class_clause");
  for (const b of bc?.namedChildren ?? []) if (b.type !== "access_specifier" && b.type !== "virtual") cls.bases.push(typeHead(b));
  for (const m of body.namedChildren) {
    if (m.type === "function_definition") {
      const f = extractFlow(m, file, name, flows);
      if (f?.member) {
        cls.members.push({ kind: f.member, state: f.state, name: f.name, range: f.range, nameRange: f.nameRange, param: (f as CFlow & { param?: string }).param });
      }
      continue;
    }
    if (m.type === "template_declaration") continue;
    if (m.type !== "field_declaration" && m.type !== "declaration") continue;
    const t = m.childForFieldName("type");
    const decls = m.childrenForFieldName("declarator");
    for (const d of decls) {
      const fd = functionDeclarator(d);
      if (fd) {
        const nn = fd.childForFieldName("declarator") ?? undefined;
        const mk = memberKind(nn, name, fd.childForFieldName("parameters"));
        cls.members.push({ kind: mk.kind, state: "declared", name: nn?.text ?? "", range: rangeOf(file, m), nameRange: rangeOf(file, nn ?? m), param: mk.param });
        continue;
      }
      const dn = declName(d);
      if (!dn.name) continue;
      const f: CField = { name: dn.name, typeText: t?.text ?? "", range: rangeOf(file, m) };
      if (dn.isPtr) f.ptrTo = typeHead(t);
      const up = uniquePtrOf(t, file, dn.name, rangeOf(file, m));
      const dv = m.childForFieldName("default_value");
      if (up) {
        const first = dv?.type === "initializer_list" || dv?.type === "argument_list" ? dv.namedChildren[0] : dv;
        const second = dv?.type === "initializer_list" || dv?.type === "argument_list" ? dv.namedChildren[1] : undefined;
        fillInit(up, first, second, file);
        f.uptr = up;
      } else if (dv) {
        const v0 = dv.type === "initializer_list" ? dv.namedChildren[0] : dv;
        f.initNull = !v0 || isNullNode(v0);
        f.init = v0 ? argOf(v0, file) : null;
      }
      cls.fields.push(f);
    }
  }
  return cls;
}

function extractCFile(root: Node, facts: FileFacts): void {
  stmtExits = new Map();
  curExits = false;
  const file = facts.file;
  const flows: CFlow[] = [];
  const classes: CClass[] = [];
  const types = new Set(EXPR_TYPES);
  for (const b of root.descendantsOfType("compound_statement")) for (const k of b.namedChildren) types.add(k.type);
  exprTypes = [...types];
  walkFile(root, ["class_specifier", "struct_specifier", "function_definition"], (n) => {
    if ((n.type === "class_specifier" || n.type === "struct_specifier") && n.childForFieldName("body") && facts.lang === "cpp") {
      const c = extractClass(n, file, flows);
      if (c) classes.push(c);
      return false;
    }
    if (n.type === "function_definition") {
      extractFlow(n, file, undefined, flows);
      return false;
    }
    return;
  });
  // Out-of-class member definitions (`det::~det() { … }`) also describe members of their class.
  for (const f of flows) {
    if (!f.className || !f.member) continue;
    const c = classes.find((x) => x.name === f.className);
    if (c && !c.members.some((m) => m.range.line === f.range.line && m.range.file === f.range.file)) {
      c.members.push({ kind: f.member, state: f.state, name: f.name, range: f.range, nameRange: f.nameRange, param: (f as CFlow & { param?: string }).param });
    }
  }
  facts.classes.push(...classes);
  const own: COwnFacts = { flows };
  facts.extra.ownership = own;
  stmtExits = new Map();
}

function safely<A extends unknown[]>(f: (...a: A) => void): (...a: A) => void {
  return (...a: A) => {
    try {
      f(...a);
    } catch {
      // Extraction never throws: partial facts are better than none (the rules treat missing
      // facts as "nothing known").
    }
  };
}

rustExtractors.fnBody.push(safely((node: Node, fn: FnDecl, facts: FileFacts) => extractRustFn(node, fn, facts)));
cFileExtractors.file.push(safely((root: Node, facts: FileFacts) => extractCFile(root, facts)));
