// The ABI type algebra and the language-neutral boundary model.
// Everything here is plain data: extract builds it from syntax, rules read it.

import type { ScalarKind } from "./targets.js";
import type { Cond } from "./conditions.js";

export type Lang = "rust" | "c" | "cpp";

/** 0-based line/column range inside one file (tree-sitter rows/columns). */
export interface Range {
  file: string;
  line: number;
  col: number;
  endLine: number;
  endCol: number;
}

export type AbiType =
  | { k: "void" }
  | { k: "scalar"; s: ScalarKind }
  | { k: "complex"; of: "float" | "double" }
  /**
   * A pointer. `mut` is whether the pointee may be written through it (C: no `const` on the
   * pointee; Rust: `*mut`/`&mut`). `via` records how Rust spelled it: a raw pointer, a reference,
   * a Box, NonNull or an Option around one of those (nullable).
   */
  | { k: "ptr"; to: AbiType; mut: boolean; via?: "raw" | "ref" | "box" | "nonnull"; nullable?: boolean }
  | { k: "array"; of: AbiType; len: number | null; lenText?: string }
  /** A reference to a named struct/union/enum/typedef/alias, resolved through the model. */
  | { k: "named"; name: string; tag?: "struct" | "union" | "enum" }
  | { k: "fn"; params: AbiType[]; ret: AbiType; variadic: boolean; abi: string; nullable: boolean }
  /** A Rust type that has no C equivalent (Vec, String, &str, slices, tuples, generics, …). */
  /**
   * `optionOf`: an `Option<Name>` whose inner type is an alias the extractor cannot see yet; the
   * model resolves it (an alias of a fn pointer or reference makes it a nullable pointer).
   */
  /**
   * `generic`: an instance of a generic type with type arguments (`WithOffset<*const u8>`); the
   * type's declaration decides whether it has a C layout (#[repr(C)]/transparent, and arguments
   * that have one).
   */
  | { k: "unsafe"; text: string; why: string; optionOf?: AbiType; generic?: { name: string; args: AbiType[] } }
  | { k: "unknown"; text: string };

export interface Param {
  name: string;
  type: AbiType;
  text: string; // the type as written
  range: Range; // the whole parameter
  typeRange: Range;
}

export interface FnDecl {
  id: string; // unique within the model: file#name#line
  lang: Lang;
  /** export: Rust fn with a body; import: Rust extern block item; proto: C/C++ declaration; def: C/C++ definition. */
  role: "export" | "import" | "proto" | "def";
  name: string;
  /** The symbol the linker sees (export_name / link_name / the plain name). */
  symbol: string;
  abi: string; // "C", "C-unwind", "system", "" for C prototypes (C linkage)
  params: Param[];
  ret: AbiType;
  retText: string;
  retRange?: Range;
  variadic: boolean;
  range: Range; // whole item
  nameRange: Range;
  file: string;
  /** Rust: has #[no_mangle] / #[unsafe(no_mangle)] / #[export_name]. */
  noMangle?: boolean;
  /** Rust: declared `extern "…"`. */
  isExtern?: boolean;
  /** Rust: `pub` visibility. */
  isPub?: boolean;
  /** C/C++: the declaration has C linkage as seen by a C++ compiler (extern "C" block/decl). */
  cLinkage?: boolean;
  /** C/C++: the file is a header (.h/.hpp). */
  inHeader?: boolean;
  /** C/C++: `static` (internal linkage): not a symbol the linker can match. */
  isStatic?: boolean;
  /** Doc comment text directly above the item (without comment markers). */
  doc: string;
  /** Raw attribute texts (Rust) or GCC __attribute__ texts (C). */
  attrs: string[];
  /** Generic parameters present (Rust). */
  generic?: boolean;
  /** Optional per-language facts extracted from the body, for body rules. */
  body?: BodyFacts;
  /** Rust: the item's `#[cfg(…)]` predicates (all of them), with its extern block's. */
  cfg?: Cond;
  /** Rust: `#[cfg_attr(PRED, no_mangle | export_name = …)]`: exported under `name` (the function's
   * own name when the attribute gives none, or gives it through a macro) when PRED holds. */
  cfgExport?: { cond: Cond; name?: string }[];
  /** Rust import: its extern block (`file#row`), and the block's `#[link(name = …)]` library. */
  block?: string;
  linkLib?: string;
}

/** Facts taken from a function body by the extract layer; rule families add what they need. */
export interface BodyFacts {
  [family: string]: unknown;
}

export interface Field {
  name: string;
  type: AbiType;
  text: string;
  range: Range;
  /** C bit-field width, when present. */
  bits?: number;
  /** C: the member lies in a conditional branch the preprocessor could not decide for all
   * targets; the branch's condition (a C expression), decided per target by the layout. */
  ppCond?: string;
  /** C: the comment directly above the field or after it on its line (without comment markers). */
  doc?: string;
  /** C: a nullability qualifier `_Nullable` on the field itself (not on a callback's parameters). */
  nullableQual?: boolean;
  /** Rust: the field's `#[cfg(…)]` predicate. */
  cfg?: Cond;
}

export interface Repr {
  c?: boolean;
  transparent?: boolean;
  packed?: number; // 1 for plain packed
  align?: number;
  int?: ScalarKind; // #[repr(u8)] etc.; C: underlying type of an enum (C23/C++11)
}

export interface TypeDecl {
  id: string;
  lang: Lang;
  kind: "struct" | "union" | "enum" | "alias" | "opaque";
  name: string;
  /** For C: the struct tag when the typedef name differs (typedef struct tag name). */
  tag?: string;
  fields: Field[];
  enumerators: { name: string; value: number | null; text: string; range: Range }[];
  aliasOf?: AbiType;
  repr: Repr;
  range: Range;
  nameRange: Range;
  file: string;
  doc: string;
  attrs: string[];
  generic?: boolean;
  /** Rust: has a #[derive(...)] that includes these names. */
  derives?: string[];
  /** C: a pragma-pack value in force where it was declared. */
  pragmaPack?: number;
  /** True for a Rust `struct Foo { _private: [u8; 0] }`-style or `enum Foo {}` opaque marker. */
  opaqueMarker?: boolean;
  /** Rust: the item's `#[cfg(…)]` predicate. */
  cfg?: Cond;
}

/** A size/offset assertion written in the source (checked per target by the layout rules). */
export interface SourceAssert {
  lang: Lang;
  kind: "sizeof" | "alignof" | "offsetof";
  typeName: string;
  field?: string;
  op: "==" | "!=" | "<=" | ">=" | "<" | ">";
  value: number;
  range: Range;
  file: string;
  text: string;
}

export interface IncludeRef {
  path: string; // as written
  system: boolean;
  range: Range;
}

export interface Diagnostic0 {
  // A finding made by extract itself (e.g. file skipped)
  rule: string;
  severity: Severity;
  message: string;
  range: Range;
}

export type Severity = "error" | "warning" | "info" | "hint";

/** What one file contributes to the boundary model. Pure function of (path, text). */
export interface FileFacts {
  file: string;
  lang: Lang;
  fns: FnDecl[];
  types: TypeDecl[];
  asserts: SourceAssert[];
  includes: IncludeRef[];
  /** C/C++: function calls found in bodies (filled by call-site extractors). */
  calls: CallSite[];
  /** C++ classes (filled by ownership extractors). */
  classes: unknown[];
  /** Object-like #define NAME <type> aliases (C). */
  defines: { name: string; type: AbiType; range: Range }[];
  /** Extract-level notices (skipped file, parse trouble). */
  notices: Diagnostic0[];
  /** Whether the tree had syntax errors. */
  hasErrors: boolean;
  /** C/C++ header: content is wrapped for C++ (extern "C" under #ifdef __cplusplus or plain). */
  cppGuarded?: boolean;
  /** C/C++: the tree holds constructs only C++ has (a class, a template), so a C compiler cannot
   * read the file; a `.h` read with the C++ grammar because it gave fewer errors may still be C. */
  cxxSyntax?: boolean;
  /** Free-form per-family facts (e.g. ports, suppressions). */
  extra: Record<string, unknown>;
  /** Rust: item-level macro invocations (`gain_kernel!(hyd_gain_f32, f32);`), which may define
   * items ferrule cannot see (it expands no macro). Absent when the file has none. */
  macroItems?: MacroItem[];
  /** Rust: out-of-line module declarations (`mod dsp;`, `#[path = "x.rs"] mod y;`), for the
   * project's module tree (analysis/project.ts). Absent when the file has none. */
  mods?: ModDecl[];
  /** Rust: inline modules and the file's inner `#![cfg(…)]` with a condition: the items between
   * `line` and `endLine` (0-based, inclusive) are compiled only where `cond` holds. */
  cfgScopes?: { line: number; endLine: number; cond: Cond }[];
}

/** `mod NAME;` in a Rust file: where the module's file is looked for (Rust Reference, "Modules"). */
export interface ModDecl {
  name: string;
  /** `#[path = "…"]`, as written. */
  path?: string;
  /** `#[cfg_attr(PRED, path = "…")]`: the module's file where PRED holds. */
  cfgPaths?: { cond: Cond; path: string }[];
  /** The inline modules (`mod a { mod b; }`) it is declared in, outermost first. */
  inline: string[];
  /** The declaration's `#[cfg(…)]` (with its inline modules'). */
  cond?: Cond;
  line: number;
}

/** An item-level Rust macro invocation and the names its arguments mention: identifiers, and
 * string literals that are a single identifier (the symbols it could export). */
export interface MacroItem {
  /** The macro's name as written (`gain_kernel`, `kernels::export`). */
  macro: string;
  names: string[];
  /** The whole invocation. */
  range: Range;
  /** A C/C++ macro use ferrule left unexpanded (its definition depends on a condition it cannot
   * decide); `names` are what each candidate definition would make. */
  c?: boolean;
}

/** An expression at a call site, in a small language-neutral form. */
export type Expr =
  | { k: "ident"; name: string }
  | { k: "num"; value: number; text: string }
  | { k: "bin"; op: string; l: Expr; r: Expr }
  | { k: "un"; op: string; e: Expr }
  | { k: "call"; callee: string; args: Expr[]; recv?: Expr }
  | { k: "cast"; e: Expr; to: AbiType; toText: string; style: string }
  | { k: "sizeof"; type?: AbiType; typeText?: string; expr?: Expr }
  | { k: "field"; e: Expr; name: string }
  | { k: "index"; e: Expr; idx: Expr }
  | { k: "other"; text: string };

export interface CallSite {
  callee: string;
  args: { expr: Expr; text: string; range: Range; type?: AbiType }[];
  range: Range;
  calleeRange: Range;
  file: string;
  /** Enclosing function (or method) name. */
  inFn?: string;
  /** Enclosing class, for a method (defined in the class or as `cls::name`). */
  inClass?: string;
  /** Method calls (`obj.f(…)`, `obj->f(…)`): the receiver; `callee` is then the method name. */
  recv?: { expr: Expr; text: string; type?: AbiType; arrow: boolean };
}

export function rangeKey(r: Range): string {
  return `${r.file}:${r.line}:${r.col}`;
}

/** An inline `ferrule: accept rule because reason` comment (see analysis/suppress.ts). */
export interface Suppression {
  line: number;
  endLine: number;
  rules: string[];
  reason: string;
  range: Range;
}

/** What one Rust item (function, aggregate, alias, const, extern block) contributed to its file's
 * facts, kept for reuse by the next extraction of the same document. */
export interface CachedItem {
  /** Row and column of the item's start when these facts were made. */
  row: number;
  col: number;
  /** Rows the item spans, from its first attribute or doc comment to its last line. */
  first: number;
  last: number;
  /** With `spansOnly`: where the item's key text lies in the file's text (start, end offsets). */
  span?: [number, number];
  fns: FnDecl[];
  types: TypeDecl[];
  asserts: SourceAssert[];
}

/**
 * Reuse of item facts between two extractions of one file (the language server passes it for
 * open documents). An item's facts depend only on its own text (attributes and doc comments
 * included), its column and the file's integer consts, so an unchanged item's facts are reused:
 * shared as they are when it did not move, copied with lines shifted when it did. Extraction reads
 * `prev` and fills `next`; the caller keeps `next` as the following `prev`.
 */
export interface ItemCache {
  prev: Map<string, CachedItem>;
  next: Map<string, CachedItem>;
  /** The file's integer consts the entries of `prev` were made with (set by extraction). */
  consts?: string;
  /** Record each item's key as offsets (`CachedItem.span`) instead of keeping text: for files
   * read from disk, whose text is not kept; a caller that later has the same text builds the
   * keys from it (see Engine.open). Nothing is reused in this mode. */
  spansOnly?: boolean;
  /** Filled by extraction: every item read, in order, with the previous extraction's item it
   * reused (same object when it did not move), so a caller can tell what changed. */
  order?: { item: CachedItem; from?: CachedItem }[];
}
