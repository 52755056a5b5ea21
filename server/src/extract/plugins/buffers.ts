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
import type { CBufferFacts, CFnScope, CVar, RustBufferFacts } from "../../model/buffer-facts.js";
import { cFileExtractors, rustExtractors } from "../hooks.js";
import { evalConst, parseIntLit, rangeOf, walk } from "../common.js";
import { applyDeclarator, cScalar, readParams, typeFromSpecifier, type DeclCtx } from "../ctypes.js";
import { rustType } from "../rust.js";

const MAX_CALLS_PER_FILE = 20_000;

// ---------------------------------------------------------------------------------------------
// Shared: expression → Expr

function hasConstQual(n: Node): boolean {
  for (let i = 0; i < n.childCount; i++) {
    const c = n.child(i)!;
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

class Scope {
  constructor(readonly vars: CVar[]) {}
  /** The declaration of `name` in force at `line` (latest declared at or before it; else any). */
  get(name: string, line = Infinity): CVar | undefined {
    let best: CVar | undefined;
    for (const v of this.vars) {
      if (v.name !== name) continue;
      if (v.kind !== "local" || v.line <= line) {
        if (!best || (v.kind === "local" && (best.kind !== "local" || v.line >= best.line))) best = v;
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
    if (initNode && initNode.type !== "argument_list" && initNode.type !== "initializer_list") v.init = cExpr(initNode, ctx);
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

function extractCFile(root: Node, facts: FileFacts): void {
  const file = facts.file;
  const ctx: DeclCtx = { file, consts: new Map() };
  const out: CBufferFacts = { fns: [] };
  const classes = new Map<string, Node>();
  walk(root, (n) => {
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
  const fieldCache = new Map<string, CVar[]>();
  const calls: CallSite[] = [];
  walk(root, (n) => {
    if (n.type !== "function_definition") return;
    const fd = fnDeclaratorOf(n);
    const nameNode = fd?.childForFieldName("declarator");
    if (!fd || !nameNode) return false;
    const { cls, method } = enclosingClass(n, nameNode.text);
    const vars: CVar[] = [];
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
    walk(n, (m) => {
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
      walk(r, (m) => {
        if (m.type === "lambda_expression") return false;
        if (m.type !== "call_expression" || calls.length >= MAX_CALLS_PER_FILE) return;
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
    args.push(arg);
  }
  const cs: CallSite = { callee, args, range: rangeOf(file, m), calleeRange: rangeOf(file, f.type === "field_expression" ? f.childForFieldName("field") ?? f : f), file };
  if (recv) cs.recv = recv;
  return cs;
}

cFileExtractors.file.push((root, facts) => {
  try {
    extractCFile(root, facts);
  } catch (e) {
    facts.notices.push({ rule: "internal-error", severity: "warning", message: `ferrule could not read call sites in ${facts.file}: ${(e as Error).message}`, range: { file: facts.file, line: 0, col: 0, endLine: 0, endCol: 0 } });
  }
});

// Exported for other families (ownership) that want the same scope view.
export { Scope as CScope };
export type { CVar, CFnScope, CBufferFacts, RustBufferFacts, Range, FnDecl };
