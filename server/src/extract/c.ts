// C and C++ syntax → boundary model facts: prototypes, definitions, typedefs, structs, unions,
// enums, object-like #define type aliases, #include lines, static asserts, #pragma pack.

import type { Node, Tree } from "../parse/parser.js";
import type { AbiType, Field, FileFacts, FnDecl, Lang, SourceAssert, TypeDecl } from "../model/types.js";
import { docAbove, emptyFacts, evalConst, rangeOf, trailingComment, walkFile } from "./common.js";
import { applyDeclarator, complexBase, cScalar, typeFromSpecifier, type DeclCtx } from "./ctypes.js";
import { cFileExtractors } from "./hooks.js";

const C_VISITED = [
  "preproc_include", "preproc_def", "preproc_call", "function_definition", "declaration", "field_declaration", "type_definition",
  "struct_specifier", "union_specifier", "enum_specifier", "call_expression", "static_assert_declaration", "class_specifier",
  "template_declaration", "compound_statement", "namespace_definition",
];

const HEADER_RE = /\.(h|hpp|hh|hxx)$/i;

export function extractC(file: string, tree: Tree, lang: Lang): FileFacts {
  const facts = emptyFacts(file, lang);
  const root = tree.rootNode;
  facts.hasErrors = root.hasError;
  const ctx: DeclCtx = { file, consts: new Map() };
  const inHeader = HEADER_RE.test(file);
  let anonCount = 0;
  const packStack: number[] = [];
  let pack: number | undefined;

  const addAggregate = (spec: Node, typedefName?: string, typedefNode?: Node, attrsExtra: string[] = []): string | undefined => {
    const kind = spec.type === "struct_specifier" ? "struct" : spec.type === "union_specifier" ? "union" : "enum";
    const tagNode = spec.childForFieldName("name");
    const body = spec.childForFieldName("body");
    const tag = tagNode?.text;
    const name = typedefName ?? tag ?? `<anonymous ${kind} ${++anonCount}>`;
    const attrs = [...attrsExtra];
    for (const c of spec.namedChildren) if (c.type === "attribute_specifier" || c.type === "alignas_qualifier" || c.type === "alignas_specifier") attrs.push(c.text);
    if (spec.parent?.type === "declaration" || spec.parent?.type === "type_definition") {
      for (const c of spec.parent.namedChildren) if (c.type === "attribute_specifier") attrs.push(c.text);
    }
    const decl: TypeDecl = {
      id: `${file}#${name}#${spec.startPosition.row}`,
      lang,
      kind: body ? kind : "opaque",
      name,
      tag,
      fields: [],
      enumerators: [],
      repr: reprFromAttrs(attrs),
      range: rangeOf(file, typedefNode?.parent ?? spec),
      nameRange: rangeOf(file, typedefNode ?? tagNode ?? spec),
      file,
      doc: docAbove(typedefNode?.parent ?? spec),
      attrs,
    };
    if (pack !== undefined) decl.pragmaPack = pack;
    if (body && kind === "enum") {
      let next = 0;
      for (const e of body.namedChildren) {
        if (e.type !== "enumerator") continue;
        const valNode = e.childForFieldName("value");
        const v = valNode ? evalConst(valNode, ctx.consts) : next;
        const ename = e.childForFieldName("name")?.text ?? "";
        decl.enumerators.push({ name: ename, value: v, text: e.text, range: rangeOf(file, e) });
        if (v !== null) {
          ctx.consts.set(ename, v);
          next = v + 1;
        }
      }
      const under = spec.childForFieldName("underlying_type") ?? spec.childForFieldName("base") ?? spec.namedChildren.find((c) => c.type === "primitive_type" || c.type === "sized_type_specifier" || c.type === "type_identifier" && c !== tagNode);
      if (under) {
        const s = cScalar(under.text);
        if (s) decl.repr.int = s;
      }
    } else if (body) {
      let pendingAlign: number | undefined;
      for (const f of membersOf(body)) {
        if (f.type === "ERROR") {
          // The C++ grammar reads `_Alignas(8) long x;` as ERROR(`_Alignas` `8`) + the field.
          const kids = f.namedChildren;
          const kw = kids.find((c) => c.text === "_Alignas" || c.text === "alignas");
          const num = kids.find((c) => c.type === "number_literal");
          pendingAlign = kw && num ? evalConst(num) ?? undefined : undefined;
          continue;
        }
        if (f.type !== "field_declaration") continue;
        const carried = pendingAlign;
        pendingAlign = undefined;
        const spec2 = f.childForFieldName("type");
        const innerCtx: DeclCtx = { ...ctx, onInlineAggregate: (s) => addAggregate(s) };
        const cx = complexBase(f, typeFromSpecifier(spec2, innerCtx));
        const base = cx.base;
        let bits: number | undefined;
        const bf = f.namedChildren.find((c) => c.type === "bitfield_clause");
        if (bf) bits = evalConst(bf.namedChild(0), ctx.consts) ?? undefined;
        const fattrs = f.namedChildren.filter((c) => c.type === "attribute_specifier" || c.type === "alignas_qualifier" || c.type === "alignas_specifier").map((c) => c.text);
        if (carried) fattrs.push(`_Alignas(${carried})`);
        const quirk = cFieldQuirk(f);
        if (quirk) {
          // `float _Complex z;` / `_Alignas(8) char d;`: spellings this C grammar version does not
          // know, read back from the tokens it produced (see cFieldQuirk).
          const fld: Field & { attrs?: string[] } = { name: quirk.name, type: quirk.type ?? base, text: f.text, range: rangeOf(file, f) };
          if (quirk.align) fld.attrs = [...fattrs, `_Alignas(${quirk.align})`];
          else if (fattrs.length) fld.attrs = fattrs;
          if (quirk.declarator) {
            const r = applyDeclarator(quirk.declarator, fld.type, hasConstChild(f), innerCtx);
            fld.name = r.name;
            fld.type = r.type;
          }
          if (bits !== undefined) fld.bits = bits;
          fieldNotes(f, fld);
          decl.fields.push(fld);
          continue;
        }
        const declarators = f.childrenForFieldName("declarator");
        if (declarators.length === 0) {
          // anonymous member struct/union, or an unnamed bit-field
          const fld: Field = { name: "", type: base, text: f.text, range: rangeOf(file, f) };
          bits ??= unnamedBitfieldWidth(f, ctx.consts);
          if (bits !== undefined) fld.bits = bits;
          decl.fields.push(fld);
          continue;
        }
        for (const d of declarators) {
          const r = applyDeclarator(d, base, hasConstChild(f), innerCtx);
          if (cx.nameFromError !== undefined) r.name = cx.nameFromError;
          // `void (*_Nullable on_close)(void *)`: the grammar takes the qualifier for the name
          // and leaves the real one in an ERROR node after it
          if (NULLABLE_QUALIFIERS.has(r.name) && r.nameNode) {
            const err = r.nameNode.parent?.nextNamedSibling;
            const real = err?.type === "ERROR" ? err.namedChildren.find((c) => c.type === "identifier" || c.type === "field_identifier") : undefined;
            if (real) r.name = real.text;
          }
          const fld: Field & { attrs?: string[] } = { name: r.name, type: r.type, text: f.text, range: rangeOf(file, f) };
          if (bits !== undefined) fld.bits = bits;
          if (fattrs.length) fld.attrs = fattrs;
          fieldNotes(f, fld);
          decl.fields.push(fld);
        }
      }
    }
    facts.types.push(decl);
    return name;
  };

  const ctxWithInline: DeclCtx = { ...ctx, onInlineAggregate: (s) => addAggregate(s) };

  const handleFunction = (node: Node, spec: Node | null, declarator: Node, isDef: boolean, cLinkage: boolean) => {
    let base = complexBase(node, typeFromSpecifier(spec, ctxWithInline)).base;
    // `RADIO_API int f(void);` with RADIO_API defined elsewhere: the macro reads as the type and
    // the real type lands in an ERROR node. Do not guess; say what to configure.
    const err = node.namedChildren.find((c) => c.type === "ERROR" && spec && c.startIndex >= spec.endIndex && c.endIndex <= declarator.startIndex);
    if (spec?.type === "type_identifier" && err) {
      base = { k: "unknown", text: `${spec.text} ${err.text}` };
      facts.notices.push({
        rule: "unknown-macro",
        severity: "info",
        message: `\`${spec.text}\` looks like a macro ferrule cannot expand; the return type of this declaration is not checked. If it is an export or attribute macro, add it to \`strip_macros\` in .ferrule.toml`,
        range: rangeOf(file, spec),
      });
    }
    const d = applyDeclarator(declarator, base, hasConstChild(node), ctxWithInline);
    if (!d.fn || d.type.k !== "fn" || !d.name) return;
    const nameNode = d.nameNode!;
    const attrs = [...d.fn.attrs];
    for (const c of node.namedChildren) if (c.type === "attribute_specifier" || c.type === "attribute_declaration") attrs.push(c.text);
    const retNode: Node | null = spec;
    const fn: FnDecl = {
      id: `${file}#${d.name}#${node.startPosition.row}`,
      lang,
      role: isDef ? "def" : "proto",
      name: d.name,
      symbol: d.name,
      abi: "",
      params: d.fn.params,
      ret: d.type.ret,
      retText: spec?.text ?? "",
      retRange: retNode ? rangeOf(file, retNode) : undefined,
      variadic: d.fn.variadic,
      range: rangeOf(file, node),
      nameRange: rangeOf(file, nameNode),
      file,
      cLinkage,
      inHeader,
      isStatic: node.namedChildren.some((c) => c.type === "storage_class_specifier" && c.text === "static"),
      doc: docAbove(node, []) || trailingComment(node),
      attrs,
    };
    // cLinkage records the syntactic truth (inside extern "C"); the linkage rule decides what it
    // means for a header that C++ includes.
    if (isDef) {
      fn.body = {};
      for (const x of cFileExtractors.fnBody) x(node, fn, facts);
    }
    facts.fns.push(fn);
  };

  // Every type the switch below acts on; the nodes in between are found inside wasm.
  walkFile(root, C_VISITED, (n) => {
    switch (n.type) {
      case "preproc_include": {
        const p = n.childForFieldName("path");
        if (p) {
          const system = p.type === "system_lib_string";
          facts.includes.push({ path: p.text.slice(1, -1), system, range: rangeOf(file, n) });
        }
        return;
      }
      case "preproc_def": {
        const name = n.childForFieldName("name")?.text;
        const value = n.childForFieldName("value")?.text.trim();
        if (name && value) {
          const num = /^\(?\s*-?\s*(0[xX][0-9a-fA-F]+|\d+)[uUlL]*\s*\)?$/.exec(value);
          if (num) ctx.consts.set(name, Number(num[1]));
          const s = cScalar(value);
          if (s) facts.defines.push({ name, type: { k: "scalar", s }, range: rangeOf(file, n) });
          else if (/^(struct|union|enum)\s+\w+$|^(float|double)\s+_Complex$/.test(value)) {
            const [kw, tn] = value.split(/\s+/);
            const t: AbiType = tn === "_Complex" ? { k: "complex", of: kw as "float" | "double" } : { k: "named", name: tn!, tag: kw as "struct" };
            facts.defines.push({ name, type: t, range: rangeOf(file, n) });
          }
        }
        return false;
      }
      case "preproc_call": {
        const dir = n.childForFieldName("directive")?.text;
        const arg = n.childForFieldName("argument")?.text ?? "";
        if (dir === "#pragma") {
          const m = /^\s*pack\s*\(\s*(push\s*,\s*(\d+)|push|pop|(\d+))?\s*\)/.exec(arg);
          if (m) {
            if (m[2]) { packStack.push(pack ?? 0); pack = Number(m[2]); }
            else if (m[1] === "push") packStack.push(pack ?? 0);
            else if (m[1] === "pop") { const p = packStack.pop(); pack = p ? p : undefined; }
            else if (m[3]) pack = Number(m[3]);
            else pack = undefined;
          }
        }
        return false;
      }
      case "function_definition": {
        const decl = n.childForFieldName("declarator");
        if (decl && !insideClass(n)) handleFunction(n, n.childForFieldName("type"), decl, true, hasCLinkage(n));
        return false;
      }
      case "declaration":
      case "field_declaration": {
        if (n.type === "field_declaration") return false;
        const spec = n.childForFieldName("type");
        if (spec && (spec.type === "struct_specifier" || spec.type === "union_specifier" || spec.type === "enum_specifier") && spec.childForFieldName("body")) {
          addAggregate(spec);
        }
 for (const d of n.childrenForFieldName("declarator")) {
          if (d.type !== "function_declarator" && d.type !== "pointer_declarator" && d.type !== "parenthesized_declarator" && d.type !== "attributed_declarator") continue;
          if (containsFunctionDeclarator(d)) handleFunction(n, spec, d, false, hasCLinkage(n));
        }
        return false;
      }
      case "type_definition": {
        const spec = n.childForFieldName("type");
        const declarators = n.childrenForFieldName("declarator");
        const attrs = n.namedChildren.filter((c) => c.type === "attribute_specifier").map((c) => c.text);
        for (const dn of declarators) {
          const isAgg = spec && (spec.type === "struct_specifier" || spec.type === "union_specifier" || spec.type === "enum_specifier");
          if (isAgg && (dn.type === "type_identifier")) {
            const body = spec.childForFieldName("body");
            const tag = spec.childForFieldName("name")?.text;
            if (body) {
              addAggregate(spec, dn.text, dn, attrs);
              if (tag && tag !== dn.text) {
                facts.types.push(aliasDecl(file, lang, tag, { k: "named", name: dn.text }, n, spec, attrs));
              }
              continue;
            }
            if (tag === dn.text || !tag) {
              // typedef struct sonar_fir sonar_fir;  → an opaque handle type
              addAggregate(spec, dn.text, dn, attrs);
              continue;
            }
          }
          const base = typeFromSpecifier(spec, ctxWithInline);
          const d = applyDeclarator(dn, base, hasConstChild(n), ctxWithInline);
          if (!d.name) continue;
          let aliasOf = d.type;
          if (aliasOf.k === "fn") aliasOf = { ...aliasOf, nullable: true };
          facts.types.push(aliasDecl(file, lang, d.name, aliasOf, n, d.nameNode ?? n, attrs));
        }
        return false;
      }
      case "struct_specifier":
      case "union_specifier":
      case "enum_specifier": {
        if (n.childForFieldName("body") && n.parent && (n.parent.type === "translation_unit" || n.parent.type === "declaration_list" || n.parent.type.startsWith("preproc_") || n.parent.type === "ERROR" || n.parent.type === "linkage_specification")) {
          addAggregate(n);
          return false;
        }
        return;
      }
      case "call_expression":
      case "static_assert_declaration": {
        const fnName = n.type === "call_expression" ? n.childForFieldName("function")?.text : "static_assert";
        if (fnName === "_Static_assert" || fnName === "static_assert") {
          const cond = n.type === "call_expression" ? n.childForFieldName("arguments")?.namedChild(0) : n.childForFieldName("condition");
          const a = cond ? readAssert(file, lang, cond, n) : undefined;
          if (a) facts.asserts.push(a);
          return false;
        }
        return;
      }
      case "class_specifier":
      case "template_declaration":
        if (lang === "cpp") facts.cxxSyntax = true;
        return false;
      case "namespace_definition":
        // only C++ reads a namespace (its functions have mangled names); its items are read on
        if (lang === "cpp") facts.cxxSyntax = true;
        return;
      case "compound_statement":
        return false;
    }
    return;
  });

  for (const x of cFileExtractors.file) x(root, facts);
  return facts;
}

/**
 * Field spellings the bundled C grammar (tree-sitter-wasms 0.1.13) does not parse, recovered from
 * the tree it does produce (node types and token texts, no text parsing):
 *  - `_Complex double z;`: the grammar takes `_Complex` as a type name, `double` as the field name
 *    and puts the real name in an ERROR node (`double _Complex z` is handled by complexBase).
 *  - `_Alignas(8) char d;` / `alignas(8) char d;` (<stdalign.h>): a macro_type_specifier named
 *    `_Alignas` holding the number in an ERROR node and the real type in a type_descriptor.
 */
const NULLABLE_QUALIFIERS = new Set(["_Nullable", "__nullable"]);

/**
 * A field's comment (above it, or after it on its line) and whether the field itself carries the
 * clang nullability qualifier `_Nullable`. The grammar does not know the qualifier and leaves it
 * as a lone identifier (often inside an ERROR node); the qualifiers of a callback's own
 * parameters (inside its parameter list) are not the field's.
 */
function fieldNotes(f: Node, fld: Field): void {
  const doc = docAbove(f, []) || trailingComment(f);
  if (doc) fld.doc = doc;
  const stack: Node[] = [...f.children];
  for (let i = 0; stack.length && i < 2000; i++) {
    const n = stack.pop()!;
    if (n.type === "parameter_list" || n.type.endsWith("comment")) continue;
    if (n.childCount === 0) {
      if (NULLABLE_QUALIFIERS.has(n.text)) fld.nullableQual = true;
      continue;
    }
    stack.push(...n.children);
  }
}

function cFieldQuirk(f: Node): { name: string; type?: AbiType; align?: number; declarator?: Node } | undefined {
  const spec = f.childForFieldName("type");
  if (!spec) return undefined;
  if (spec.type === "macro_type_specifier") {
    const mname = spec.childForFieldName("name")?.text;
    if (mname !== "_Alignas" && mname !== "alignas") return undefined;
    const num = spec.namedChildren.find((c) => c.type === "ERROR")?.namedChildren.find((c) => c.type === "number_literal");
    const td = spec.childForFieldName("type") ?? spec.namedChildren.find((c) => c.type === "type_descriptor");
    const inner = td?.childForFieldName("type");
    const decl = f.childForFieldName("declarator");
    if (!num || !inner || !decl) return undefined;
    const align = evalConst(num);
    return { name: "", type: typeFromSpecifier(inner, { file: "", consts: new Map() }), align: align ?? undefined, declarator: decl };
  }
  const decl = f.childForFieldName("declarator");
  const err = f.namedChildren.find((c) => c.type === "ERROR");
  const realName = err?.namedChildren.length === 1 && err.namedChild(0)!.type === "identifier" ? err.namedChild(0)!.text : undefined;
  if (!decl || decl.type !== "field_identifier" || !realName) return undefined;
  if (spec.type !== "type_identifier" || (spec.text !== "_Complex" && spec.text !== "__complex__")) return undefined;
  if (decl.text !== "float" && decl.text !== "double") return undefined;
  return { name: realName, type: { k: "complex", of: decl.text } };
}

/**
 * `unsigned short : 3;`, `unsigned long long : 8;`: the bundled C grammar parses an unnamed
 * bit-field whose type is a modifiers-only sized type (no declarator to end the type) as the type
 * followed by an ERROR node holding the `:` token and the width; the width is read back from that
 * node's tokens.
 */
function unnamedBitfieldWidth(f: Node, consts: Map<string, number>): number | undefined {
  const err = f.namedChildren.find((c) => c.type === "ERROR");
  if (!err || err.childCount !== 2 || err.child(0)!.type !== ":") return undefined;
  const w = err.namedChild(0);
  return w ? evalConst(w, consts) ?? undefined : undefined;
}

function aliasDecl(file: string, lang: Lang, name: string, aliasOf: AbiType, whole: Node, nameNode: Node, attrs: string[]): TypeDecl {
  return {
    id: `${file}#${name}#${whole.startPosition.row}`,
    lang, kind: "alias", name, fields: [], enumerators: [], aliasOf, repr: reprFromAttrs(attrs),
    range: rangeOf(file, whole), nameRange: rangeOf(file, nameNode), file, doc: docAbove(whole, []), attrs,
  };
}

function hasConstChild(n: Node): boolean {
  for (const c of n.namedChildren) if (c.type === "type_qualifier" && /\bconst\b/.test(c.text)) return true;
  return false;
}

function containsFunctionDeclarator(d: Node): boolean {
  let n: Node | null = d;
  let g = 0;
  while (n && g++ < 50) {
    if (n.type === "function_declarator") {
      // `int (*fp)(int);` is a variable, not a function: the name must sit directly in the function declarator
      const inner = n.childForFieldName("declarator");
      return !!inner && (inner.type === "identifier" || inner.type === "qualified_identifier");
    }
    n = n.childForFieldName("declarator") ?? (n.type === "parenthesized_declarator" ? n.namedChild(0) : null);
  }
  return false;
}

/**
 * The member declarations of a struct/union body, with those inside conditional branches the
 * preprocessor left undecided (`#ifdef __LP64__ … #else … #endif`): each such member carries its
 * branch's condition (`Field.ppCond`), decided per target by the layout.
 */
function membersOf(body: Node): Node[] {
  const out: Node[] = [];
  const visit = (n: Node, depth: number) => {
    for (const c of n.namedChildren) {
      if (depth < 16 && /^preproc_(if|ifdef|else|elif|elifdef)$/.test(c.type)) visit(c, depth + 1);
      else out.push(c);
    }
  };
  visit(body, 0);
  return out;
}

function hasCLinkage(n: Node): boolean {
  for (let p: Node | null = n; p; p = p.parent) {
    if (p.type === "linkage_specification") {
      const v = p.childForFieldName("value")?.text.replace(/"/g, "");
      if (v === "C") return true;
    }
  }
  return false;
}

function insideClass(n: Node): boolean {
  for (let p = n.parent; p; p = p.parent) {
    if (p.type === "field_declaration_list" || p.type === "class_specifier") return true;
    if (p.type === "translation_unit") return false;
  }
  return false;
}

export function reprFromAttrs(attrs: string[]): TypeDecl["repr"] {
  const repr: TypeDecl["repr"] = {};
  for (const a of attrs) {
    if (/\b__packed__\b|\bpacked\b/.test(a)) repr.packed = 1;
    const al = /\b(?:__aligned__|aligned)\s*\(\s*(\d+)\s*\)/.exec(a) ?? /\b(?:_Alignas|alignas)\s*\(\s*(\d+)\s*\)/.exec(a);
    if (al) repr.align = Math.max(repr.align ?? 0, Number(al[1]));
  }
  repr.c = true;
  return repr;
}

function readAssert(file: string, lang: Lang, cond: Node, whole: Node): SourceAssert | undefined {
  if (cond.type !== "binary_expression") return undefined;
  const op = cond.childForFieldName("operator")?.text ?? cond.child(1)?.text ?? "";
  const l = cond.childForFieldName("left");
  const r = cond.childForFieldName("right");
  if (!l || !r || !["==", "!=", "<=", ">=", "<", ">"].includes(op)) return undefined;
  const value = evalConst(r);
  if (value === null) return undefined;
  const base = { lang, op: op as SourceAssert["op"], value, range: rangeOf(file, whole), file, text: whole.text };
  if (l.type === "sizeof_expression" || l.type === "alignof_expression") {
    const td = l.childForFieldName("type") ?? l.namedChildren.find((c) => c.type === "type_descriptor" || c.type === "parenthesized_expression");
    const tn = typeNameOf(td);
    if (!tn) return undefined;
    return { ...base, kind: l.type === "sizeof_expression" ? "sizeof" : "alignof", typeName: tn };
  }
  if (l.type === "offsetof_expression") {
    // tree-sitter-c/cpp parse offsetof(T, f) as its own node (fields `type` and `member`).
    const tn = typeNameOf(l.childForFieldName("type"));
    const member = l.childForFieldName("member")?.text;
    if (!tn || !member) return undefined;
    return { ...base, kind: "offsetof", typeName: tn, field: member };
  }
  if (l.type === "call_expression") {
    const f = l.childForFieldName("function")?.text;
    const args = l.childForFieldName("arguments")?.namedChildren ?? [];
    if ((f === "offsetof" || f === "__builtin_offsetof") && args.length === 2) {
      const tn = typeNameOf(args[0]!);
      if (!tn) return undefined;
      return { ...base, kind: "offsetof", typeName: tn, field: args[1]!.text };
    }
    if ((f === "_Alignof" || f === "alignof" || f === "__alignof__") && args.length === 1) {
      const tn = typeNameOf(args[0]!);
      if (tn) return { ...base, kind: "alignof", typeName: tn };
    }
  }
  return undefined;
}

function typeNameOf(n: Node | null | undefined): string | undefined {
  if (!n) return undefined;
  if (n.type === "parenthesized_expression") return typeNameOf(n.namedChild(0));
  if (n.type === "identifier" || n.type === "type_identifier" || n.type === "primitive_type") return n.text;
  if (n.type === "type_descriptor") {
    const t = n.childForFieldName("type");
    if (!t) return undefined;
    if (t.type === "struct_specifier" || t.type === "union_specifier" || t.type === "enum_specifier") return t.childForFieldName("name")?.text;
    return t.text;
  }
  if (n.type === "struct_specifier" || n.type === "union_specifier") return n.childForFieldName("name")?.text;
  return n.text.replace(/^(struct|union|enum)\s+/, "");
}
