// C/C++ syntax → ABI types. Specifier + declarator, following the C declarator grammar
// (C11 §6.7.6: the declarator is read inside-out, each pointer level with its own qualifiers).

import type { Node } from "../parse/parser.js";
import type { AbiType, Param } from "../model/types.js";
import type { ScalarKind } from "../model/targets.js";
import { evalConst, rangeOf } from "./common.js";

/** C and C++ spellings of scalars (after folding `signed`/`unsigned`/`int` words). */
const C_SCALARS: Record<string, ScalarKind> = {
  "_Bool": "bool", bool: "bool",
  char: "char", "signed char": "schar", "unsigned char": "uchar",
  short: "short", "short int": "short", "signed short": "short", "signed short int": "short",
  "unsigned short": "ushort", "unsigned short int": "ushort",
  int: "int", signed: "int", "signed int": "int", unsigned: "uint", "unsigned int": "uint",
  long: "long", "long int": "long", "signed long": "long", "signed long int": "long",
  "unsigned long": "ulong", "unsigned long int": "ulong",
  "long long": "llong", "long long int": "llong", "signed long long": "llong", "signed long long int": "llong",
  "unsigned long long": "ullong", "unsigned long long int": "ullong",
  int8_t: "i8", uint8_t: "u8", int16_t: "i16", uint16_t: "u16", int32_t: "i32", uint32_t: "u32",
  int64_t: "i64", uint64_t: "u64", __int128: "i128", "__int128_t": "i128", "unsigned __int128": "u128", __uint128_t: "u128",
  size_t: "size_t", ssize_t: "ssize_t", ptrdiff_t: "ptrdiff_t", intptr_t: "intptr_t", uintptr_t: "uintptr_t",
  wchar_t: "wchar_t", char16_t: "u16", char32_t: "u32", char8_t: "u8",
  float: "float", double: "double", "long double": "ldouble",
};

export function cScalar(name: string): ScalarKind | undefined {
  const n = name.replace(/^std::/, "").replace(/\s+/g, " ").trim();
  return C_SCALARS[n];
}

export interface DeclCtx {
  file: string;
  /** Known constant names (enumerators, #define N 16) for array lengths. */
  consts: Map<string, number>;
  /** Called for an anonymous or inline struct/union/enum body found inside a type. */
  onInlineAggregate?: (spec: Node) => string | undefined;
}

function hasConst(n: Node): boolean {
  for (const c of n.children) {
    if (c.type === "type_qualifier" && /\bconst\b/.test(c.text)) return true;
  }
  return false;
}

/** The ABI type named by a type specifier node (primitive, sized, struct/union/enum, typedef name). */
export function typeFromSpecifier(spec: Node | null, ctx: DeclCtx): AbiType {
  if (!spec) return { k: "unknown", text: "" };
  const t = spec.type;
  if (t === "primitive_type") {
    if (spec.text === "void") return { k: "void" };
    const s = cScalar(spec.text);
    return s ? { k: "scalar", s } : { k: "named", name: spec.text };
  }
  if (t === "sized_type_specifier") {
    const words: string[] = [];
    let complex = false;
    for (const c of spec.children) {
      if (c.text === "_Complex" || c.text === "__complex__") complex = true;
      else words.push(c.text);
    }
    const text = words.join(" ");
    if (complex) return { k: "complex", of: /double/.test(text) ? "double" : "float" };
    const s = cScalar(text);
    return s ? { k: "scalar", s } : { k: "unknown", text: spec.text };
  }
  if (t === "type_identifier") {
    const s = cScalar(spec.text);
    return s ? { k: "scalar", s } : { k: "named", name: spec.text };
  }
  if (t === "struct_specifier" || t === "union_specifier" || t === "enum_specifier") {
    const tag = t === "struct_specifier" ? "struct" : t === "union_specifier" ? "union" : "enum";
    const nameNode = spec.childForFieldName("name");
    const body = spec.childForFieldName("body");
    let name = nameNode?.text;
    if (body && ctx.onInlineAggregate) name = ctx.onInlineAggregate(spec) ?? name;
    return name ? { k: "named", name, tag } : { k: "unknown", text: spec.text };
  }
  if (t === "qualified_identifier" || t === "template_type" || t === "scoped_type_identifier") {
    // C++: std::complex<float>, std::size_t, std::uint32_t, ns::Type
    const text = spec.text.replace(/\s+/g, "");
    const cm = /^(?:std::)?complex<(float|double)>$/.exec(text);
    if (cm) return { k: "complex", of: cm[1] as "float" | "double" };
    const s = cScalar(text);
    if (s) return { k: "scalar", s };
    const last = text.split("::").pop()!;
    return { k: "named", name: last };
  }
  if (t === "macro_type_specifier") return { k: "unknown", text: spec.text };
  return { k: "unknown", text: spec.text };
}

export interface Declared {
  name: string;
  nameNode: Node | null;
  type: AbiType;
  /** For a function declarator: its parameter list and variadic flag. */
  fn?: { params: Param[]; variadic: boolean; paramsNode: Node; attrs: string[] };
  bits?: number;
}

/**
 * Applies a declarator to a base type. `baseConst` is whether the specifier carried `const`
 * (it applies to the innermost pointee). Returns the declared name and full type.
 */
export function applyDeclarator(decl: Node | null, base: AbiType, baseConst: boolean, ctx: DeclCtx): Declared {
  let type = base;
  let constNow = baseConst;
  let n: Node | null = decl;
  let fn: Declared["fn"];
  let guard = 0;
  while (n && guard++ < 200) {
    switch (n.type) {
      case "identifier":
      case "field_identifier":
      case "type_identifier":
      case "primitive_type":
      case "qualified_identifier":
      case "destructor_name":
      case "operator_name":
        return { name: n.text, nameNode: n, type, fn };
      case "pointer_declarator":
      case "abstract_pointer_declarator":
      case "reference_declarator":
      case "abstract_reference_declarator": {
        type = { k: "ptr", to: type, mut: !constNow, via: n.type.includes("reference") ? "ref" : "raw" };
        constNow = hasConst(n);
        n = n.childForFieldName("declarator") ?? firstNamedDeclarator(n);
        continue;
      }
      case "array_declarator":
      case "abstract_array_declarator": {
        const size = n.childForFieldName("size");
        let len: number | null = null;
        let lenText: string | undefined;
        if (size && size.type !== "identifier" /* `static` */) {
          len = evalConst(size, ctx.consts);
          lenText = size.text;
        } else if (size) {
          lenText = size.text;
          const err = n.namedChildren.find((c) => c.type === "ERROR");
          if (size.text === "static" && err) lenText = err.text.trim();
          else len = evalConst(size, ctx.consts);
        }
        const elem = constNow ? { ...type } : type;
        type = { k: "array", of: elem, len, lenText };
        if (constNow) (type as { constElems?: boolean }).constElems = true;
        n = n.childForFieldName("declarator");
        continue;
      }
      case "function_declarator":
      case "abstract_function_declarator": {
        const paramsNode = n.childForFieldName("parameters");
        const { params, variadic } = paramsNode ? readParams(paramsNode, ctx) : { params: [], variadic: false };
        const attrs: string[] = [];
        for (const c of n.namedChildren) if (c.type === "attribute_specifier") attrs.push(c.text);
        const inner = n.childForFieldName("declarator");
        // The outermost function declarator (closest to the name) describes the function itself.
        const fnType: AbiType = { k: "fn", params: params.map((p) => p.type), ret: type, variadic, abi: "C", nullable: true };
        if (!inner || isNameNode(inner)) {
          fn = paramsNode ? { params, variadic, paramsNode, attrs } : undefined;
          if (!inner) return { name: "", nameNode: null, type: fnType, fn };
          return { name: inner.text, nameNode: inner, type: fnType, fn };
        }
        // function pointer: (*name)(params)
        type = fnType;
        constNow = false;
        n = inner;
        continue;
      }
      case "parenthesized_declarator":
      case "attributed_declarator":
        n = n.namedChildren.find((c) => c.type !== "attribute_specifier" && c.type !== "attribute_declaration" && c.type !== "ms_call_modifier") ?? null;
        continue;
      case "init_declarator":
        n = n.childForFieldName("declarator");
        continue;
      case "bitfield_clause":
        n = null;
        continue;
      default:
        n = n.childForFieldName("declarator");
    }
  }
  return { name: "", nameNode: null, type, fn };
}

function isNameNode(n: Node): boolean {
  return ["identifier", "field_identifier", "type_identifier", "qualified_identifier", "destructor_name", "operator_name"].includes(n.type);
}

function firstNamedDeclarator(n: Node): Node | null {
  for (const c of n.namedChildren) if (c.type !== "type_qualifier" && c.type !== "ms_pointer_modifier") return c;
  return null;
}

const COMPLEX_WORDS = new Set(["_Complex", "complex", "__complex__"]);

/**
 * `float _Complex x` is not in the C grammar version we use: the keyword lands in an ERROR node
 * after the type (or, for `<complex.h>`'s `complex` macro, becomes the declarator name with the
 * real name in a trailing ERROR). Reads both shapes from the tree.
 */
export function complexBase(decl: Node, base: AbiType): { base: AbiType; nameFromError?: string } {
  if (base.k !== "scalar" || (base.s !== "float" && base.s !== "double")) return { base };
  const of = base.s;
  for (const c of decl.namedChildren) {
    if (c.type === "ERROR" && COMPLEX_WORDS.has(c.text.trim())) return { base: { k: "complex", of } };
  }
  const d = decl.childForFieldName("declarator");
  const errAfter = decl.namedChildren.find((c) => c.type === "ERROR" && c.startIndex >= (d?.endIndex ?? 0));
  if (d && (d.type === "identifier" || d.type === "field_identifier") && COMPLEX_WORDS.has(d.text)) {
    return { base: { k: "complex", of }, nameFromError: errAfter?.text.trim() };
  }
  // `float _Complex x[5];`: array_declarator(declarator: `_Complex`, ERROR(x), size: 5).
  let inner = d;
  for (let g = 0; inner && g < 20 && inner.type === "array_declarator"; g++) {
    const nd: Node | null = inner.childForFieldName("declarator");
    if (nd && (nd.type === "identifier" || nd.type === "field_identifier") && COMPLEX_WORDS.has(nd.text)) {
      const err = inner.namedChildren.find((c) => c.type === "ERROR" && c.startIndex >= nd.endIndex);
      if (err) return { base: { k: "complex", of }, nameFromError: err.text.trim() };
    }
    inner = nd;
  }
  return { base };
}

export function readParams(list: Node, ctx: DeclCtx): { params: Param[]; variadic: boolean } {
  const params: Param[] = [];
  let variadic = false;
  for (const p of list.namedChildren) {
    if (p.type === "variadic_parameter" || p.text === "...") {
      variadic = true;
      continue;
    }
    if (p.type !== "parameter_declaration" && p.type !== "optional_parameter_declaration") continue;
    const spec = p.childForFieldName("type");
    const cx = complexBase(p, typeFromSpecifier(spec, ctx));
    const d = applyDeclarator(p.childForFieldName("declarator"), cx.base, hasConst(p), ctx);
    if (cx.nameFromError !== undefined) d.name = cx.nameFromError;
    let type = d.type;
    // Array parameters decay to pointers (C11 §6.7.6.3p7); keep the declared length as evidence.
    let arrayLen: string | undefined;
    if (type.k === "array") {
      arrayLen = type.lenText;
      type = { k: "ptr", to: type.of, mut: !(type as { constElems?: boolean }).constElems, via: "raw" };
    }
    if (type.k === "fn") type = { ...type, nullable: true };
    if (type.k === "void" && !d.name) continue; // f(void)
    const param: Param & { arrayLen?: string } = {
      name: d.name,
      type,
      text: p.text,
      range: rangeOf(ctx.file, p),
      typeRange: rangeOf(ctx.file, spec ?? p),
    };
    if (arrayLen) param.arrayLen = arrayLen;
    params.push(param);
  }
  return { params, variadic };
}
