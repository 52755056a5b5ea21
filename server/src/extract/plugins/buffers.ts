// Extractor plugin for the "buffers" rule family.
//
// C/C++ files: every call expression inside a function (free functions, methods defined in a
// class or out of line, constructors' member-initialiser lists) becomes a `CallSite` in
// `FileFacts.calls`, with each argument as a small `Expr` and the ABI type inferred from the
// function's parameters, local declarations, class fields, casts, `.data()` and array decay.
// The per-function scopes (parameters, locals, fields) are kept in `FileFacts.extra.buffers`
// (`CBufferFacts`) for other families to reuse. This plugin is the only one that fills
// `facts.calls` for C/C++ (the ownership family reads it).
//
// Rust files: for every function with a body, `FnDecl.body.buffers` (`RustBufferFacts`) records
// slice creations from raw parts, writes through pointers, copies, null checks and `let` aliases.
//
// Plain data only: nothing here keeps a syntax node.

import type { Node } from "../../parse/parser.js";
import type { AbiType, CallSite, Expr, FileFacts, FnDecl, Range } from "../../model/types.js";
import type { BufferHint, CBufferFacts, CFnScope, CVar, RustBufferFacts } from "../../model/buffer-facts.js";
import { parseText } from "../../parse/parser.js";
import { bodyWalkTypes, cFileExtractors, rustExtractors } from "../hooks.js";
import { ExtractTimeout, evalConst, indexSubtree, parseIntLit, rangeOf, walk, walkFile, walkTypes } from "../common.js";
import { applyDeclarator, cScalar, readParams, typeFromSpecifier, type DeclCtx } from "../ctypes.js";
import { rustType } from "../rust.js";

const MAX_CALLS_PER_FILE = 20_000;

// ---------------------------------------------------------------------------------------------
// Shared: expression → Expr

function hasConstQual(n: Node): boolean {
  for (const c of n.children) {
    if (c.type === "type_qualifier" && /\bconst\b/.test(c.text)) return true;
  }
  return false;
}

/** The type a C/C++ type name written as plain text denotes (sizeof(std::complex<float>) parses as an expression). */
export function cTypeFromText(text: string): AbiType | undefined {
  const t = text.replace(/\s+/g, " ").replace(/\s*([<>:,*])\s*/g, "$1").trim();
  const cm = /^(?:std::)?complex<(float|double)>$/.exec(t);
  if (cm) return { k: "complex", of: cm[1] as "float" | "double" };
  if (/^(float|double) _Complex$|^_Complex (float|double)$/.test(t)) return { k: "complex", of: /double/.test(t) ? "double" : "float" };
  const s = cScalar(t);
  if (s) return { k: "scalar", s };
  if (/^(struct |union |enum )?[A-Za-z_]\w*(::[A-Za-z_]\w*)*$/.test(t)) return { k: "named", name: t.replace(/^(struct|union|enum) /, "").split("::").pop()! };
  return undefined;
}

/** A C/C++ type_descriptor (casts, sizeof, template arguments) → ABI type. */
function typeOfDescriptor(td: Node, ctx: DeclCtx): AbiType {
  const spec = td.childForFieldName("type");
  const base = specType(spec, ctx);
  const d = applyDeclarator(td.childForFieldName("declarator"), base, hasConstQual(td), ctx);
  return d.type;
}

/** typeFromSpecifier plus std::complex/std::vector awareness for template types. */
function specType(spec: Node | null, ctx: DeclCtx): AbiType {
  if (spec && (spec.type === "qualified_identifier" || spec.type === "template_type")) {
    const t = cTypeFromText(spec.text);
    if (t && t.k !== "named") return t;
  }
  return typeFromSpecifier(spec, ctx);
}

function cExpr(n: Node | null, ctx: DeclCtx, depth = 0): Expr {
  if (!n) return { k: "other", text: "" };
  if (depth > 60) return { k: "other", text: n.text };
  switch (n.type) {
    case "identifier":
    case "field_identifier":
      return { k: "ident", name: n.text };
    case "qualified_identifier":
      return { k: "ident", name: n.text.replace(/^::/, "") };
    case "this":
      return { k: "ident", name: "this" };
    case "number_literal": {
      const v = parseIntLit(n.text);
      return v === null ? { k: "num", value: Number.parseFloat(n.text) || 0, text: n.text } : { k: "num", value: v, text: n.text };
    }
    case "null":
    case "nullptr":
      return { k: "num", value: 0, text: n.text };
    case "parenthesized_expression":
      return cExpr(n.namedChild(0), ctx, depth + 1);
    case "binary_expression": {
      const op = n.childForFieldName("operator")?.text ?? n.child(1)?.text ?? "?";
      return { k: "bin", op, l: cExpr(n.childForFieldName("left"), ctx, depth + 1), r: cExpr(n.childForFieldName("right"), ctx, depth + 1) };
    }
    case "unary_expression":
    case "pointer_expression": {
      const op = n.childForFieldName("operator")?.text ?? n.child(0)?.text ?? "?";
      return { k: "un", op, e: cExpr(n.childForFieldName("argument") ?? n.namedChild(0), ctx, depth + 1) };
    }
    case "cast_expression": {
      const td = n.childForFieldName("type");
      return { k: "cast", e: cExpr(n.childForFieldName("value"), ctx, depth + 1), to: td ? typeOfDescriptor(td, ctx) : { k: "unknown", text: "" }, toText: td?.text ?? "", style: "c" };
    }
    case "sizeof_expression": {
      const td = n.childForFieldName("type");
      if (td) return { k: "sizeof", type: typeOfDescriptor(td, ctx), typeText: td.text };
      const v = n.childForFieldName("value");
      const inner = v?.type === "parenthesized_expression" ? v.namedChild(0) : v;
      if (inner && (inner.type === "qualified_identifier" || inner.type === "template_function")) {
        const t = cTypeFromText(inner.text);
        if (t) return { k: "sizeof", type: t, typeText: inner.text };
      }
      if (inner && inner.type === "identifier") {
        // sizeof(x): a type name or a variable; the rule decides with the scope.
        const t = cScalar(inner.text);
        if (t) return { k: "sizeof", type: { k: "scalar", s: t }, typeText: inner.text };
      }
      return { k: "sizeof", expr: cExpr(inner ?? null, ctx, depth + 1) };
    }
    case "call_expression": {
      const f = n.childForFieldName("function");
      const args = (n.childForFieldName("arguments")?.namedChildren ?? []).filter((a) => !a.type.includes("comment")).map((a) => cExpr(a, ctx, depth + 1));
      if (f?.type === "template_function") {
        const name = f.childForFieldName("name")?.text ?? "";
        if (/^(static_cast|reinterpret_cast|const_cast)$/.test(name)) {
          const td = f.childForFieldName("arguments")?.namedChildren.find((c) => c.type === "type_descriptor");
          return { k: "cast", e: args[0] ?? { k: "other", text: "" }, to: td ? typeOfDescriptor(td, ctx) : { k: "unknown", text: "" }, toText: td?.text ?? "", style: name };
        }
        return { k: "call", callee: name, args };
      }
      if (f?.type === "field_expression") {
        return { k: "call", callee: f.childForFieldName("field")?.text ?? "", args, recv: cExpr(f.childForFieldName("argument"), ctx, depth + 1) };
      }
      return { k: "call", callee: (f?.text ?? "").replace(/^::/, ""), args };
    }
    case "field_expression":
      return { k: "field", e: cExpr(n.childForFieldName("argument"), ctx, depth + 1), name: n.childForFieldName("field")?.text ?? "" };
    case "subscript_expression": {
      const idxList = n.childForFieldName("indices") ?? n.childForFieldName("index");
      const idx = idxList?.type === "subscript_argument_list" ? idxList.namedChild(0) : idxList;
      return { k: "index", e: cExpr(n.childForFieldName("argument"), ctx, depth + 1), idx: cExpr(idx ?? null, ctx, depth + 1) };
    }
  }
  return { k: "other", text: n.text.length > 200 ? n.text.slice(0, 200) : n.text };
}

// ---------------------------------------------------------------------------------------------
// C / C++: scopes and type inference

const CONTAINERS: Record<string, CVar["container"]> = { vector: "vector", array: "array", span: "span", valarray: "vector" };

/** std::vector<T> / std::array<T, N> / std::span<T>: the element type, when `spec` names one. */
function containerOf(spec: Node | null, ctx: DeclCtx): { container: CVar["container"]; elem: AbiType; constElems: boolean } | undefined {
  if (!spec) return undefined;
  let tt: Node | null = spec;
  if (tt.type === "qualified_identifier") tt = tt.childForFieldName("name");
  if (!tt || tt.type !== "template_type") return undefined;
  const name = tt.childForFieldName("name")?.text ?? "";
  const kind = CONTAINERS[name];
  if (!kind) return undefined;
  const td = tt.childForFieldName("arguments")?.namedChildren.find((c) => c.type === "type_descriptor");
  if (!td) return undefined;
  return { container: kind, elem: typeOfDescriptor(td, ctx), constElems: hasConstQual(td) };
}

const KIND_RANK: Record<CVar["kind"], number> = { global: 0, field: 1, param: 2, local: 3 };

class Scope {
  constructor(readonly vars: CVar[]) {}
  /** The declaration of `name` in force at `line` (latest declared at or before it; else any). */
  get(name: string, line = Infinity): CVar | undefined {
    let best: CVar | undefined;
    for (const v of this.vars) {
      if (v.name !== name) continue;
      if (v.kind !== "local" || v.line <= line) {
        if (!best || KIND_RANK[v.kind] > KIND_RANK[best.kind] || (v.kind === "local" && best.kind === "local" && v.line >= best.line)) best = v;
      }
    }
    if (!best) best = this.vars.find((v) => v.name === name);
    return best;
  }
}

function varsFromDeclaration(d: Node, kind: CVar["kind"], file: string, ctx: DeclCtx, scope: Scope): CVar[] {
  const out: CVar[] = [];
  const spec = d.childForFieldName("type");
  const isAuto = spec?.type === "placeholder_type_specifier" || spec?.text === "auto";
  const base = specType(spec, ctx);
  const cont = containerOf(spec, ctx);
  const constBase = hasConstQual(d);
  for (const dn of d.childrenForFieldName("declarator")) {
    let decl = applyDeclarator(dn, base, constBase, ctx);
    if (decl.fn && kind === "local" && dn.type === "function_declarator" && cont) {
      // `std::vector<T> v(n);` reads as a function declaration to the grammar (the "most vexing
      // parse"); inside a function body with a container type it is a variable.
      decl = { name: decl.name, nameNode: decl.nameNode, type: base };
    }
    if (!decl.name || decl.fn) continue;
    const initNode = dn.type === "init_declarator" ? dn.childForFieldName("value") : null;
    const v: CVar = { name: decl.name, kind, type: decl.type, text: d.text.length > 200 ? d.text.slice(0, 200) : d.text, line: d.startPosition.row, range: rangeOf(file, dn) };
    if (initNode && initNode.type !== "argument_list" && initNode.type !== "initializer_list") {
      v.init = cExpr(initNode, ctx);
      const ci = castOperand(initNode);
      const ft = ci ? inferCType(ci, scope, ctx) : undefined;
      if (ft) v.castFrom = ft;
    }
    if (decl.type.k === "array") {
      v.container = "carray";
      v.elem = decl.type.of;
      v.arrayLen = decl.type.len;
      v.constElems = constBase;
    } else if (cont && decl.type.k !== "ptr") {
      v.container = cont.container;
      v.elem = cont.elem;
      v.constElems = cont.constElems || constBase;
    }
    if (isAuto && initNode) {
      // `auto *p = static_cast<T *>(x)` / `auto p = …`: the initialiser's type.
      const t = inferCType(initNode, scope, ctx);
      if (t) v.type = t;
    }
    out.push(v);
  }
  return out;
}

/** Best-effort ABI type of a C/C++ expression; undefined when unknown. */
export function inferCType(n: Node | null, scope: Scope, ctx: DeclCtx, depth = 0): AbiType | undefined {
  if (!n || depth > 40) return undefined;
  const line = n.startPosition.row;
  switch (n.type) {
    case "parenthesized_expression":
      return inferCType(n.namedChild(0), scope, ctx, depth + 1);
    case "identifier":
    case "field_identifier": {
      const v = scope.get(n.text, line);
      if (!v) return undefined;
      if (v.container === "carray" && v.elem) return { k: "ptr", to: v.elem, mut: !v.constElems, via: "raw" }; // array decay (C11 §6.3.2.1p3)
      if (v.type.k === "ptr" && v.type.via === "ref") return v.type.to; // C++ reference: the referee
      return v.type;
    }
    case "field_expression": {
      const obj = n.childForFieldName("argument");
      const field = n.childForFieldName("field");
      if (obj?.type === "this" && field) return inferCType(field, scope, ctx, depth + 1);
      if (field) {
        const v = scope.get(field.text);
        if (v && v.kind === "field") return inferCType(field, scope, ctx, depth + 1);
      }
      return undefined;
    }
    case "cast_expression": {
      const td = n.childForFieldName("type");
      return td ? typeOfDescriptor(td, ctx) : undefined;
    }
    case "pointer_expression": {
      const op = n.childForFieldName("operator")?.text ?? n.child(0)?.text;
      const arg = n.childForFieldName("argument");
      if (op === "&") {
        if (arg?.type === "subscript_expression") {
          const base = arg.childForFieldName("argument");
          const bt = elemOf(base, scope, ctx, depth);
          return bt ? { k: "ptr", to: bt.elem, mut: bt.mut, via: "raw" } : undefined;
        }
        const t = inferCType(arg, scope, ctx, depth + 1);
        if (arg?.type === "identifier") {
          const v = scope.get(arg.text, line);
          if (v?.container === "carray") return { k: "ptr", to: v.type, mut: !v.constElems, via: "raw" };
        }
        return t ? { k: "ptr", to: t, mut: true, via: "raw" } : undefined;
      }
      if (op === "*") {
        const t = inferCType(arg, scope, ctx, depth + 1);
        return t?.k === "ptr" ? t.to : undefined;
      }
      return undefined;
    }
    case "subscript_expression": {
      const bt = elemOf(n.childForFieldName("argument"), scope, ctx, depth);
      return bt?.elem;
    }
    case "binary_expression": {
      const op = n.childForFieldName("operator")?.text ?? "";
      const l = inferCType(n.childForFieldName("left"), scope, ctx, depth + 1);
      const r = inferCType(n.childForFieldName("right"), scope, ctx, depth + 1);
      if (op === "+" || op === "-") {
        if (l?.k === "ptr") return l;
        if (r?.k === "ptr" && op === "+") return r;
      }
      if (["==", "!=", "<", ">", "<=", ">=", "&&", "||"].includes(op)) return { k: "scalar", s: "bool" };
      if (l?.k === "scalar" && r?.k === "scalar") {
        if (l.s === "double" || r.s === "double") return { k: "scalar", s: "double" };
        if (r.s === "size_t") return r; // usual arithmetic conversions: the wider unsigned operand wins (common case)
        return l;
      }
      return l ?? r;
    }
    case "sizeof_expression":
    case "alignof_expression":
      return { k: "scalar", s: "size_t" };
    case "number_literal":
      return /[.eE]/.test(n.text) && !/^0[xX]/.test(n.text) ? { k: "scalar", s: /[fF]$/.test(n.text) ? "float" : "double" } : { k: "scalar", s: "int" };
    case "call_expression": {
      const f = n.childForFieldName("function");
      if (f?.type === "template_function") {
        const name = f.childForFieldName("name")?.text ?? "";
        if (/^(static_cast|reinterpret_cast|const_cast)$/.test(name)) {
          const td = f.childForFieldName("arguments")?.namedChildren.find((c) => c.type === "type_descriptor");
          return td ? typeOfDescriptor(td, ctx) : undefined;
        }
      }
      if (f?.type === "field_expression") {
        const m = f.childForFieldName("field")?.text;
        const obj = f.childForFieldName("argument");
        if (m === "data" || m === "begin") {
          const bt = elemOf(obj, scope, ctx, depth);
          if (bt) return { k: "ptr", to: bt.elem, mut: bt.mut, via: "raw" };
        }
        if (m === "size" || m === "length") return { k: "scalar", s: "size_t" };
      }
      return undefined;
    }
    case "null":
    case "nullptr":
      return { k: "ptr", to: { k: "void" }, mut: true, via: "raw", nullable: true };
  }
  return undefined;
}

/** Element type of an indexable expression (pointer, C array, vector/array/span). */
function elemOf(n: Node | null, scope: Scope, ctx: DeclCtx, depth: number): { elem: AbiType; mut: boolean } | undefined {
  if (!n) return undefined;
  if (n.type === "identifier" || n.type === "field_identifier" || (n.type === "field_expression" && n.childForFieldName("argument")?.type === "this")) {
    const name = n.type === "field_expression" ? n.childForFieldName("field")?.text ?? "" : n.text;
    const v = scope.get(name, n.startPosition.row);
    if (v?.elem) return { elem: v.elem, mut: !v.constElems };
    if (v?.type.k === "ptr") {
      const t = v.type.via === "ref" ? v.type.to : v.type;
      if (t.k === "ptr") return { elem: t.to, mut: t.mut };
    }
    return undefined;
  }
  const t = inferCType(n, scope, ctx, depth + 1);
  if (t?.k === "ptr") return { elem: t.to, mut: t.mut };
  return undefined;
}

function enclosingClass(fn: Node, declName: string): { cls?: string; method: string } {
  // `int blk::work(…)` out of line
  const q = declName.split("::");
  if (q.length > 1) return { cls: q[q.length - 2], method: q[q.length - 1]! };
  for (let p = fn.parent; p; p = p.parent) {
    if (p.type === "class_specifier" || p.type === "struct_specifier") return { cls: p.childForFieldName("name")?.text, method: declName };
    if (p.type === "translation_unit" || p.type === "compound_statement") break;
  }
  return { method: declName };
}

function classFields(classNode: Node, file: string, ctx: DeclCtx): CVar[] {
  const out: CVar[] = [];
  const body = classNode.childForFieldName("body");
  const scope = new Scope(out);
  for (const f of body?.namedChildren ?? []) {
    if (f.type !== "field_declaration") continue;
    if (f.childrenForFieldName("declarator").some((d) => d.type === "function_declarator")) continue;
    out.push(...varsFromDeclaration(f, "field", file, ctx, scope));
  }
  return out;
}

function fnDeclaratorOf(n: Node): Node | null {
  let d: Node | null = n.childForFieldName("declarator");
  let g = 0;
  while (d && d.type !== "function_declarator" && g++ < 20) d = d.childForFieldName("declarator") ?? (d.type === "parenthesized_declarator" ? d.namedChild(0) : null);
  return d?.type === "function_declarator" ? d : null;
}

// The per-function walks below (locals; calls in the body and the member-initialiser list).
const C_FN_WALKED = ["declaration", "lambda_expression", "class_specifier", "call_expression"];
for (const t of C_FN_WALKED) bodyWalkTypes.c.add(t);
let C_FN_INDEX: string[] = [];

function extractCFile(root: Node, facts: FileFacts): void {
  C_FN_INDEX = [...bodyWalkTypes.c];
  const file = facts.file;
  const ctx: DeclCtx = { file, consts: new Map() };
  const out: CBufferFacts = { fns: [] };
  const classes = new Map<string, Node>();
  walkFile(root, ["class_specifier", "struct_specifier", "preproc_def", "enumerator", "compound_statement"], (n) => {
    if ((n.type === "class_specifier" || n.type === "struct_specifier") && n.childForFieldName("body")) {
      const nm = n.childForFieldName("name")?.text;
      if (nm && !classes.has(nm)) classes.set(nm, n);
    }
    if (n.type === "preproc_def") {
      const name = n.childForFieldName("name")?.text;
      const v = n.childForFieldName("value")?.text.trim();
      if (name && v && /^\(?\s*\d+[uUlL]*\s*\)?$/.test(v)) ctx.consts.set(name, Number(v.replace(/[^\d]/g, "")));
    }
    if (n.type === "enumerator") {
      const v = evalConst(n.childForFieldName("value"), ctx.consts);
      const nm = n.childForFieldName("name")?.text;
      if (nm && v !== null) ctx.consts.set(nm, v);
    }
    if (n.type === "compound_statement") return false;
    return;
  });
  // File-scope variables (`static const float table[64]`), visible in every function.
  const globals: CVar[] = [];
  const gScope = new Scope(globals);
  walkFile(root, ["function_definition", "class_specifier", "compound_statement", "declaration"], (n) => {
    if (n.type === "function_definition" || n.type === "class_specifier" || n.type === "compound_statement") return false;
    if (n.type === "declaration") {
      const vs = varsFromDeclaration(n, "global", file, ctx, gScope);
      for (const v of vs) if (v.type.k !== "fn") globals.push(v);
      return false;
    }
    return;
  });
  const fieldCache = new Map<string, CVar[]>();
  const calls: CallSite[] = [];
  walkFile(root, ["function_definition"], (n) => {
    indexSubtree(n, C_FN_INDEX);
    const fd = fnDeclaratorOf(n);
    const nameNode = fd?.childForFieldName("declarator");
    if (!fd || !nameNode) return false;
    const { cls, method } = enclosingClass(n, nameNode.text);
    const vars: CVar[] = [...globals];
    if (cls) {
      if (!fieldCache.has(cls)) fieldCache.set(cls, classes.has(cls) ? classFields(classes.get(cls)!, file, ctx) : []);
      vars.push(...fieldCache.get(cls)!);
    }
    const paramsNode = fd.childForFieldName("parameters");
    if (paramsNode) {
      for (const p of readParams(paramsNode, ctx).params) {
        const v: CVar = { name: p.name, kind: "param", type: p.type, text: p.text, line: p.range.line, range: p.range };
        vars.push(v);
      }
      // containers passed by reference: `const std::vector<float> &taps`
      for (const pn of paramsNode.namedChildren) {
        if (pn.type !== "parameter_declaration") continue;
        const cont = containerOf(pn.childForFieldName("type"), ctx);
        if (!cont) continue;
        const d = applyDeclarator(pn.childForFieldName("declarator"), { k: "unknown", text: "" }, false, ctx);
        const v = vars.find((x) => x.kind === "param" && x.name === d.name);
        if (v) { v.container = cont.container; v.elem = cont.elem; v.constElems = cont.constElems || hasConstQual(pn); }
      }
    }
    const scope = new Scope(vars);
    const body = n.childForFieldName("body");
    // Locals first (declarations anywhere in the body; lookups pick the one in force by line).
    walkTypes(n, ["declaration", "lambda_expression", "class_specifier"], (m) => {
      if (m.type === "declaration" && m !== n) {
        vars.push(...varsFromDeclaration(m, "local", file, ctx, scope));
        return;
      }
      if (m.type === "lambda_expression" || m.type === "class_specifier") return false;
      return;
    });
    const sc: CFnScope = { name: method, range: rangeOf(file, n), vars };
    if (cls) sc.cls = cls;
    if (cls && cls === method) sc.ctor = true;
    out.fns.push(sc);
    // Calls: in the body and in a constructor's member-initialiser list.
    const roots: Node[] = [];
    if (body) roots.push(body);
    for (const c of n.namedChildren) if (c.type === "field_initializer_list") roots.push(c);
    for (const r of roots) {
      walkTypes(r, ["lambda_expression", "call_expression"], (m) => {
        if (m.type === "lambda_expression") return false;
        if (calls.length >= MAX_CALLS_PER_FILE) return;
        const cs = callSite(m, scope, ctx, file);
        if (cs) {
          cs.inFn = method;
          if (cls) cs.inClass = cls;
          calls.push(cs);
        }
        return;
      });
    }
    return false;
  });
  facts.calls.push(...calls);
  facts.extra.buffers = out;
}

function castOperand(a: Node): Node | null {
  let n: Node | null = a;
  while (n?.type === "parenthesized_expression") n = n.namedChild(0);
  if (!n) return null;
  if (n.type === "cast_expression") return n.childForFieldName("value");
  if (n.type === "call_expression" && n.childForFieldName("function")?.type === "template_function" && /^(static_cast|reinterpret_cast|const_cast)$/.test(n.childForFieldName("function")?.childForFieldName("name")?.text ?? "")) {
    return n.childForFieldName("arguments")?.namedChild(0) ?? null;
  }
  return null;
}

function callSite(m: Node, scope: Scope, ctx: DeclCtx, file: string): CallSite | undefined {
  const f = m.childForFieldName("function");
  const argList = m.childForFieldName("arguments");
  if (!f || !argList) return undefined;
  let callee: string;
  let recv: CallSite["recv"];
  if (f.type === "field_expression") {
    callee = f.childForFieldName("field")?.text ?? "";
    const obj = f.childForFieldName("argument");
    recv = { expr: cExpr(obj, ctx), text: obj?.text ?? "", arrow: f.childForFieldName("operator")?.text === "->" };
    const rt = inferCType(obj, scope, ctx);
    if (rt) recv.type = rt;
  } else if (f.type === "template_function") {
    callee = f.childForFieldName("name")?.text ?? "";
    if (/^(static_cast|reinterpret_cast|const_cast|dynamic_cast)$/.test(callee)) return undefined;
  } else if (f.type === "identifier" || f.type === "qualified_identifier") {
    callee = f.text.replace(/^::/, "");
  } else return undefined;
  if (!callee) return undefined;
  const args: CallSite["args"] = [];
  for (const a of argList.namedChildren) {
    if (a.type === "comment") continue;
    const arg: CallSite["args"][number] = { expr: cExpr(a, ctx), text: a.text.length > 300 ? a.text.slice(0, 300) : a.text, range: rangeOf(file, a) };
    const t = inferCType(a, scope, ctx);
    if (t) arg.type = t;
    // An explicit cast: remember what was cast, so rules can see `(const float *)cbuf` of complex items.
    const castInner = castOperand(a);
    if (castInner) {
      const ft = inferCType(castInner, scope, ctx);
      if (ft) (arg as typeof arg & { castFrom?: AbiType }).castFrom = ft;
    }
    args.push(arg);
  }
  const cs: CallSite = { callee, args, range: rangeOf(file, m), calleeRange: rangeOf(file, f.type === "field_expression" ? f.childForFieldName("field") ?? f : f), file };
  if (recv) cs.recv = recv;
  return cs;
}

/**
 * Explicit length declarations on C prototypes and definitions: GCC `access` attributes, C99
 * array parameters (`float out[static n]`) and clang's `__counted_by(n)` / `__sized_by(n)`.
 * Stored as `FileFacts.extra.bufferHints[fn.id]`.
 */
function collectCHints(facts: FileFacts, nullFix: Map<string, string>): void {
  const hints: Record<string, BufferHint[]> = {};
  for (const fn of facts.fns) {
    const list: BufferHint[] = [];
    fn.params.forEach((p, i) => {
      // clang nullability qualifiers after the `*` (`const float *_Nullable mask`) read as the
      // declarator name to the grammar; the real name follows them.
      const fixed = nullFix.get(`${p.range.line}:${p.range.col}`);
      if (fixed && /^(_Nullable|_Nonnull|_Null_unspecified|__nullable|__nonnull)$/.test(p.name)) {
        p.name = fixed;
        p.text = `${p.text} ${fixed}`;
      }
      // clang bounds-safety macros: `float *__counted_by(n) out` reads as a function declarator
      // to the grammar; the macro argument is opaque text, so it is read from the parameter text.
      const cb = /__(counted_by|sized_by)(?:_or_null)?\s*\(\s*([A-Za-z_]\w*)\s*\)\s*([A-Za-z_]\w*)\s*$/.exec(p.text) ?? /__attribute__\s*\(\(\s*(counted_by|sized_by)\s*\(\s*([A-Za-z_]\w*)\s*\)\s*\)\)\s*([A-Za-z_]\w*)?\s*$/.exec(p.text);
      if (cb) {
        if (p.name === "__counted_by" || p.name === "__sized_by" || p.name.startsWith("__counted_by") || p.name.startsWith("__sized_by")) {
          const base = /\bconst\b/.test(p.text.split("__")[0] ?? "");
          const spec = (p.text.split("*")[0] ?? "").replace(/\bconst\b/g, "").trim();
          const to = cTypeFromText(spec) ?? { k: "unknown", text: spec };
          p.name = cb[3] ?? p.name;
          p.type = { k: "ptr", to: to.k === "named" && spec === "void" ? { k: "void" } : spec === "void" ? { k: "void" } : to, mut: !base, via: "raw" };
        }
        list.push({ ptr: p.name || `#${i}`, len: { k: "ident", name: cb[2]! }, lenText: cb[2]!, unit: cb[1] === "sized_by" ? "bytes" : "items", source: "counted-by", range: p.range, evidence: `\`${cb[0].trim()}\`` });
      }
      const al = (p as typeof p & { arrayLen?: string }).arrayLen;
      if (al !== undefined) {
        const text = al.replace(/^\s*static\s+/, "").replace(/\b(const|restrict|volatile)\b/g, "").trim();
        if (text && text !== "*") {
          const e = parseCExprText(text);
          if (e && !(e.k === "num")) list.push({ ptr: p.name, len: e, lenText: text, unit: "items", source: "c99-array", range: p.range, evidence: `array parameter \`${p.text.trim()}\`` });
        }
      }
    });
    for (const a of fn.attrs) {
      const re = /\baccess\s*\(\s*(read_only|write_only|read_write|none)\s*,\s*(\d+)\s*(?:,\s*(\d+)\s*)?\)/g;
      let m: RegExpExecArray | null;
      while ((m = re.exec(a))) {
        const pi = Number(m[2]) - 1;
        const li = m[3] ? Number(m[3]) - 1 : -1;
        const p = fn.params[pi];
        const lp = li >= 0 ? fn.params[li] : undefined;
        if (!p) continue;
        // GCC "Common Function Attributes", access: the size argument counts elements of the
        // pointed-to type, bytes for `void *` (from memory of the GCC manual).
        const unit = p.type.k === "ptr" && p.type.to.k === "void" ? "bytes" : "items";
        const h: BufferHint = { ptr: p.name, len: lp ? { k: "ident", name: lp.name } : { k: "other", text: "" }, lenText: lp?.name ?? "", unit, source: "gcc-access", access: m[1] as BufferHint["access"], range: fn.nameRange, evidence: `\`__attribute__((access(${m[1]}, ${m[2]}${m[3] ? ", " + m[3] : ""})))\`` };
        list.push(h);
      }
    }
    if (list.length) hints[fn.id] = list;
  }
  facts.extra.bufferHints = hints;
}

/** `const float *_Nullable mask`: the grammar takes `_Nullable` for the name and leaves `mask`
 * in an ERROR node right after the parameter. Returns param position → real name. */
function nullabilityNames(root: Node): Map<string, string> {
  const out = new Map<string, string>();
  walkFile(root, ["compound_statement", "parameter_declaration"], (n) => {
    if (n.type === "compound_statement") return false;
    if (!/\b(_Nullable|_Nonnull|_Null_unspecified|__nullable|__nonnull)\s*$/.test(n.text)) return false;
    const next = n.nextSibling;
    const id = next?.type === "ERROR" ? next.namedChildren.find((c) => c.type === "identifier") : undefined;
    if (id) out.set(`${n.startPosition.row}:${n.startPosition.column}`, id.text);
    return false;
  });
  return out;
}

function parseCExprText(text: string): Expr | undefined {
  if (text.length > 200) return undefined;
  const t = parseText("c", `int _ferrule_len = (${text});`);
  try {
    let found: Expr | undefined;
    walk(t.rootNode, (m) => {
      if (found) return false;
      if (m.type === "init_declarator") {
        found = cExpr(m.childForFieldName("value"), { file: "", consts: new Map() });
        return false;
      }
      return;
    });
    return found;
  } finally {
    t.delete();
  }
}

cFileExtractors.file.push((root, facts) => {
  try {
    extractCFile(root, facts);
    collectCHints(facts, nullabilityNames(root));
  } catch (e) {
    // the file's time budget running out is not a failure of ferrule: extractFile reports it
    if (e instanceof ExtractTimeout) throw e;
    facts.notices.push({ rule: "internal-error", severity: "error", message: `ferrule could not read call sites in ${facts.file}: ${(e as Error).message}`, range: { file: facts.file, line: 0, col: 0, endLine: 0, endCol: 0 } });
  }
});

// ---------------------------------------------------------------------------------------------
// Rust bodies

const RUST_CTX_FILE = { file: "", consts: new Map<string, number>() };

/** Rust expression node → Expr. `unsafe { e }` and `{ e }` become their tail expression. */
export function rustExpr(n: Node | null, depth = 0): Expr {
  if (!n) return { k: "other", text: "" };
  if (depth > 60) return { k: "other", text: n.text.slice(0, 200) };
  switch (n.type) {
    case "identifier":
    case "self":
      return { k: "ident", name: n.text };
    case "scoped_identifier":
      return { k: "ident", name: n.text };
    case "integer_literal": {
      const v = parseIntLit(n.text);
      return { k: "num", value: v ?? 0, text: n.text };
    }
    case "float_literal":
      return { k: "num", value: Number.parseFloat(n.text.replace(/_/g, "").replace(/f(32|64)$/, "")) || 0, text: n.text };
    case "parenthesized_expression":
      return rustExpr(n.namedChild(0), depth + 1);
    case "unsafe_block":
    case "block": {
      const b = n.type === "unsafe_block" ? n.namedChildren.find((c) => c.type === "block") ?? null : n;
      const kids = (b?.namedChildren ?? []).filter((c) => !c.type.endsWith("comment"));
      const last = kids[kids.length - 1];
      if (last && last.type !== "expression_statement" && last.type !== "let_declaration") return rustExpr(last, depth + 1);
      return { k: "other", text: n.text.slice(0, 200) };
    }
    case "binary_expression":
      return { k: "bin", op: n.childForFieldName("operator")?.text ?? n.child(1)?.text ?? "?", l: rustExpr(n.childForFieldName("left"), depth + 1), r: rustExpr(n.childForFieldName("right"), depth + 1) };
    case "unary_expression":
      return { k: "un", op: n.child(0)?.text ?? "?", e: rustExpr(n.namedChild(0), depth + 1) };
    case "reference_expression":
      return { k: "un", op: n.children.some((c) => c.type === "mutable_specifier") ? "&mut" : "&", e: rustExpr(n.childForFieldName("value"), depth + 1) };
    case "type_cast_expression": {
      const tn = n.childForFieldName("type");
      return { k: "cast", e: rustExpr(n.childForFieldName("value"), depth + 1), to: rustType(tn, RUST_CTX_FILE), toText: tn?.text ?? "", style: "as" };
    }
    case "field_expression":
      return { k: "field", e: rustExpr(n.childForFieldName("value"), depth + 1), name: n.childForFieldName("field")?.text ?? "" };
    case "index_expression":
      return { k: "index", e: rustExpr(n.namedChild(0), depth + 1), idx: rustExpr(n.namedChild(1), depth + 1) };
    case "call_expression": {
      let f = n.childForFieldName("function");
      const args = (n.childForFieldName("arguments")?.namedChildren ?? []).filter((a) => !a.type.endsWith("comment") && a.type !== "attribute_item").map((a) => rustExpr(a, depth + 1));
      let targs: Node[] = [];
      if (f?.type === "generic_function") {
        targs = f.childForFieldName("type_arguments")?.namedChildren ?? [];
        f = f.childForFieldName("function");
      }
      if (f?.type === "field_expression") {
        const m = f.childForFieldName("field")?.text ?? "";
        const recv = rustExpr(f.childForFieldName("value"), depth + 1);
        if (m === "cast" && targs[0]) {
          const to = rustType(targs[0], RUST_CTX_FILE);
          return { k: "cast", e: recv, to: { k: "ptr", to, mut: true, via: "raw", nullable: true }, toText: `*_ ${targs[0].text}`, style: "cast" };
        }
        return { k: "call", callee: m, args, recv };
      }
      const callee = (f?.text ?? "").replace(/\s+/g, "");
      const last = callee.split("::").pop() ?? "";
      if ((last === "size_of" || last === "align_of") && targs[0]) {
        const t = rustType(targs[0], RUST_CTX_FILE);
        if (last === "size_of") return { k: "sizeof", type: t, typeText: targs[0].text };
      }
      if (last === "size_of_val" && args[0]) return { k: "sizeof", expr: args[0] };
      const c: Expr = { k: "call", callee, args };
      if (targs[0]) (c as Expr & { targs?: string[] }).targs = targs.map((t) => t.text);
      return c;
    }
  }
  return { k: "other", text: n.text.length > 200 ? n.text.slice(0, 200) : n.text };
}

const PTR_PASSTHROUGH = new Set(["add", "offset", "sub", "wrapping_add", "wrapping_sub", "wrapping_offset", "byte_add", "cast_mut", "cast_const", "as_ptr", "as_mut_ptr"]);

/** The variable a pointer expression derives from (through casts, `.add(i)`, `.cast()` …). */
export function exprRoot(e: Expr): string | undefined {
  let cur: Expr = e;
  for (let g = 0; g < 50; g++) {
    if (cur.k === "ident") return cur.name;
    if (cur.k === "cast") { cur = cur.e; continue; }
    if (cur.k === "call" && cur.recv && PTR_PASSTHROUGH.has(cur.callee)) { cur = cur.recv; continue; }
    if (cur.k === "bin" && (cur.op === "+" || cur.op === "-")) { cur = cur.l; continue; } // C pointer arithmetic
    return undefined;
  }
  return undefined;
}

// Only these node types matter below (visitNode's and the binders'); the rest are found in wasm.
const VISITED = ["call_expression", "binary_expression", "assignment_expression", "compound_assignment_expr", "unary_expression"];
const RUST_BODY_WALKED = ["function_item", "closure_expression", "for_expression", "let_condition", "match_arm", "let_declaration", ...VISITED];
for (const t of RUST_BODY_WALKED) bodyWalkTypes.rust.add(t);

function extractRustBody(fnNode: Node, fn: FnDecl, facts: FileFacts): void {
  const file = facts.file;
  const body = fnNode.childForFieldName("body");
  if (!body) return;
  const out: RustBufferFacts = { slices: [], writes: [], copies: [], nullChecks: [], derefs: [], lets: [] };
  const params = new Set(fn.params.map((p) => p.name));
  /** Names bound in the body: to the parameter they alias, or to undefined (shadowing). */
  const bound = new Map<string, string | undefined>();
  const rootOf = (e: Expr): string | undefined => {
    const r = exprRoot(e);
    if (!r) return undefined;
    if (bound.has(r)) return bound.get(r);
    return params.has(r) ? r : undefined;
  };
  const bindPattern = (pat: Node | null) => {
    if (!pat) return;
    walkTypes(pat, ["identifier"], (m) => { bound.set(m.text, undefined); });
  };
  const base = fnNode.startIndex;
  indexSubtree(body, [...bodyWalkTypes.rust]);
  walkTypes(body, RUST_BODY_WALKED, (n) => {
    const pos = n.startIndex - base;
    switch (n.type) {
      case "function_item":
      case "closure_expression": {
        if (n.type === "closure_expression") bindPattern(n.childForFieldName("parameters"));
        else return false;
        return;
      }
      case "for_expression":
        bindPattern(n.childForFieldName("pattern"));
        return;
      case "let_condition":
      case "match_arm":
        bindPattern(n.childForFieldName("pattern"));
        return;
      case "let_declaration": {
        const pat = n.childForFieldName("pattern");
        const val = n.childForFieldName("value");
        if (pat?.type === "identifier" && val) {
          const e = rustExpr(val);
          out.lets.push({ name: pat.text, expr: e, range: rangeOf(file, n), pos });
          // Visit the value before binding the name (`let taps = from_raw_parts(taps, n)`).
          walkValue(val);
          bound.set(pat.text, rootOf(e));
          return false;
        }
        bindPattern(pat);
        return;
      }
    }
    visitNode(n, pos);
    return;
  });

  function walkValue(val: Node) {
    walkTypes(val, ["function_item", "closure_expression", ...VISITED], (m) => {
      if (m.type === "function_item") return false;
      if (m.type === "closure_expression") bindPattern(m.childForFieldName("parameters"));
      visitNode(m, m.startIndex - base);
      return;
    });
  }

  function letTypeElem(n: Node): { elem?: AbiType; text?: string } {
    // `let s: &[T] = …from_raw_parts(…)`
    for (let p = n.parent; p && p !== body; p = p.parent) {
      if (p.type === "let_declaration") {
        const t = p.childForFieldName("type");
        if (t?.type === "reference_type") {
          const inner = t.childForFieldName("type");
          if (inner?.type === "array_type" && !inner.childForFieldName("length")) {
            const el = inner.childForFieldName("element");
            return { elem: rustType(el, RUST_CTX_FILE), text: el?.text };
          }
        }
        return {};
      }
      if (p.type === "expression_statement" || p.type === "block" && p.parent?.type !== "unsafe_block") return {};
    }
    return {};
  }

  function visitNode(n: Node, pos: number): void {
    switch (n.type) {
      case "call_expression": {
        const e = rustExpr(n);
        if (e.k === "call" && !e.recv) {
          const last = e.callee.split("::").pop() ?? "";
          if ((last === "from_raw_parts" || last === "from_raw_parts_mut") && e.args.length === 2) {
            const lenNode = n.childForFieldName("arguments")?.namedChildren.filter((a) => !a.type.endsWith("comment"))[1];
            const sf: RustBufferFacts["slices"][number] = { mut: last.endsWith("_mut"), ptr: e.args[0]!, len: e.args[1]!, lenText: lenNode?.text ?? "", range: rangeOf(file, n), pos };
            const root = rootOf(e.args[0]!);
            if (root) sf.root = root;
            const targs = (e as Expr & { targs?: string[] }).targs;
            const f = n.childForFieldName("function");
            const ta = f?.type === "generic_function" ? f.childForFieldName("type_arguments")?.namedChildren[0] : undefined;
            if (ta && targs) { sf.elem = rustType(ta, RUST_CTX_FILE); sf.elemText = ta.text; }
            else {
              let p0: Expr = e.args[0]!;
              if (p0.k === "cast" && p0.to.k === "ptr") { sf.elem = p0.to.to; sf.elemText = p0.toText.replace(/^\*\s*(const|mut|_)\s*/, ""); }
              else {
                const lt = letTypeElem(n);
                if (lt.elem) { sf.elem = lt.elem; sf.elemText = lt.text; }
              }
              void p0;
            }
            out.slices.push(sf);
            return;
          }
          if ((last === "copy_nonoverlapping" || last === "copy") && e.args.length === 3 && /(^|::)ptr::|^copy/.test(e.callee)) {
            const cnt = n.childForFieldName("arguments")?.namedChildren.filter((a) => !a.type.endsWith("comment"))[2];
            const c: RustBufferFacts["copies"][number] = { callee: last, src: e.args[0]!, dst: e.args[1]!, count: e.args[2]!, countText: cnt?.text ?? "", range: rangeOf(file, n), pos };
            const sr = rootOf(e.args[0]!); if (sr) c.srcRoot = sr;
            const dr = rootOf(e.args[1]!); if (dr) c.dstRoot = dr;
            out.copies.push(c);
            return;
          }
          if ((last === "write" || last === "write_unaligned" || last === "write_volatile" || last === "write_bytes") && /ptr::/.test(e.callee) && e.args[0]) {
            const r = rootOf(e.args[0]);
            if (r) out.writes.push({ root: r, how: `${e.callee}(…)`, range: rangeOf(file, n), pos });
            return;
          }
          if (last === "new" && /NonNull::new$/.test(e.callee) && e.args[0]) {
            const r = rootOf(e.args[0]);
            if (r) out.nullChecks.push({ root: r, range: rangeOf(file, n), pos });
          }
          return;
        }
        if (e.k === "call" && e.recv) {
          const m = e.callee;
          if (m === "is_null" || m === "as_ref" || m === "as_mut" || m === "is_some" || m === "is_none") {
            const r = rootOf(e.recv);
            if (r) out.nullChecks.push({ root: r, range: rangeOf(file, n), pos });
          } else if (m === "write" || m === "write_unaligned" || m === "write_volatile" || m === "write_bytes" || m === "replace" || m === "swap") {
            const r = rootOf(e.recv);
            if (r) out.writes.push({ root: r, how: `.${m}(…)`, range: rangeOf(file, n), pos });
          } else if (m === "read" || m === "read_unaligned" || m === "read_volatile") {
            const r = rootOf(e.recv);
            if (r) out.derefs.push({ root: r, range: rangeOf(file, n), pos });
          } else if ((m === "copy_to" || m === "copy_to_nonoverlapping" || m === "copy_from" || m === "copy_from_nonoverlapping") && e.args.length === 2) {
            const to = m.startsWith("copy_to");
            const src = to ? e.recv : e.args[0]!;
            const dst = to ? e.args[0]! : e.recv;
            const cnt = n.childForFieldName("arguments")?.namedChildren.filter((a) => !a.type.endsWith("comment"))[1];
            const c: RustBufferFacts["copies"][number] = { callee: m, src, dst, count: e.args[1]!, countText: cnt?.text ?? "", range: rangeOf(file, n), pos };
            const sr = rootOf(src); if (sr) c.srcRoot = sr;
            const dr = rootOf(dst); if (dr) c.dstRoot = dr;
            out.copies.push(c);
          }
        }
        return;
      }
      case "binary_expression": {
        const op = n.childForFieldName("operator")?.text ?? n.child(1)?.text;
        if (op === "==" || op === "!=") {
          const l = n.childForFieldName("left");
          const r = n.childForFieldName("right");
          const isNull = (x: Node | null) => !!x && /(^|::)null(_mut)?\s*(::<[^>]*>)?\s*\(\s*\)$|^0\s+as\s+\*/.test(x.text);
          const other = isNull(r) ? l : isNull(l) ? r : null;
          if (other) {
            const root = rootOf(rustExpr(other));
            if (root) out.nullChecks.push({ root, range: rangeOf(file, n), pos });
          }
        }
        return;
      }
      case "assignment_expression":
      case "compound_assignment_expr": {
        const l = n.childForFieldName("left");
        if (l?.type === "unary_expression" && l.child(0)?.text === "*") {
          const r = rootOf(rustExpr(l.namedChild(0)));
          if (r) out.writes.push({ root: r, how: `*${l.namedChild(0)?.text ?? "p"} = …`, range: rangeOf(file, n), pos });
        } else if (l?.type === "index_expression") {
          // writes into a slice are checked through the slice's creation
        }
        return;
      }
      case "unary_expression": {
        if (n.child(0)?.text === "*") {
          const r = rootOf(rustExpr(n.namedChild(0)));
          if (r) out.derefs.push({ root: r, range: rangeOf(file, n), pos });
        }
        return;
      }
    }
  }

  fn.body = fn.body ?? {};
  fn.body.buffers = out;
}

rustExtractors.fnBody.push((fnNode, fn, facts) => {
  // The family reads a Rust body only as the Rust side of a boundary symbol (contractOf, through
  // the model's symbol groups, which leave helpers out): a helper's buffer facts would never be
  // read (measured: ~7 % of all fact objects of the generated workspaces).
  if ((fn as { internal?: boolean }).internal) return;
  try {
    extractRustBody(fnNode, fn, facts);
  } catch (e) {
    if (e instanceof ExtractTimeout) throw e;
    facts.notices.push({ rule: "internal-error", severity: "error", message: `ferrule could not read the body of \`${fn.name}\` in ${facts.file}: ${(e as Error).message}`, range: fn.nameRange });
  }
});

// Exported for other families (ownership) that want the same scope view.
export { Scope as CScope };
export type { CVar, CFnScope, CBufferFacts, RustBufferFacts, Range, FnDecl };
