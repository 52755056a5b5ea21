// Plain-data facts the "buffers" extractor (extract/plugins/buffers.ts) stores for the buffer
// contract rules (rules/buffers.ts) and the pairing inference (model/pairing.ts). No syntax nodes.

import type { AbiType, Expr, Range } from "./types.js";

// ---------------------------------------------------------------------------------------------
// C / C++ side: per-function scopes (parameters, locals, class fields), stored in
// `FileFacts.extra.buffers` as `CBufferFacts`. Call sites themselves go to `FileFacts.calls`.

/** A named value visible in a C/C++ function: parameter, local variable or class field. */
export interface CVar {
  name: string;
  kind: "param" | "local" | "field" | "global";
  /** Declared type (for `auto`, the type inferred from the initialiser when known). */
  type: AbiType;
  text: string;
  /** 0-based line of the declaration. */
  line: number;
  /** Element type of a C array, std::vector, std::array, std::span (what `.data()`/`&x[0]` point to). */
  elem?: AbiType;
  container?: "carray" | "vector" | "array" | "span";
  /** C array length, when constant. */
  arrayLen?: number | null;
  /** Whether the container/array elements are const. */
  constElems?: boolean;
  /** The initialiser, when any. */
  init?: Expr;
  /** When the initialiser is an explicit cast: the type of what was cast. */
  castFrom?: AbiType;
  range: Range;
}

export interface CFnScope {
  name: string;
  /** Enclosing class (method defined inside it, or `cls::name` out of line). */
  cls?: string;
  /** A constructor (name equals its class). */
  ctor?: boolean;
  range: Range;
  vars: CVar[];
}

export interface CBufferFacts {
  fns: CFnScope[];
}

// ---------------------------------------------------------------------------------------------
// Rust side: per-function body facts, stored in `FnDecl.body.buffers` as `RustBufferFacts`.

export interface RustSliceFact {
  /** from_raw_parts or from_raw_parts_mut. */
  mut: boolean;
  ptr: Expr;
  len: Expr;
  /** The parameter (or let-bound alias of one) the pointer derives from. */
  root?: string;
  /** Element type of the slice when known: turbofish, `as *const T` cast, `.cast::<T>()` or a `let s: &[T]` annotation. */
  elem?: AbiType;
  elemText?: string;
  /** Text of the length expression as written. */
  lenText: string;
  range: Range;
  /** Byte offset order inside the function, for "before/after" questions. */
  pos: number;
}

export interface RustWriteFact {
  root: string;
  how: string; // "*p = …", "p.write(…)", "ptr::write(p, …)"
  range: Range;
  pos: number;
}

export interface RustCopyFact {
  callee: string; // copy_nonoverlapping | copy | copy_to | copy_from | …
  src: Expr;
  dst: Expr;
  count: Expr;
  srcRoot?: string;
  dstRoot?: string;
  countText: string;
  range: Range;
  pos: number;
}

export interface RustNullCheckFact {
  root: string;
  range: Range;
  pos: number;
}

export interface RustDerefFact {
  root: string;
  range: Range;
  pos: number;
}

export interface RustBufferFacts {
  slices: RustSliceFact[];
  writes: RustWriteFact[];
  copies: RustCopyFact[];
  nullChecks: RustNullCheckFact[];
  derefs: RustDerefFact[];
  /** Simple `let name = expr;` bindings, for following a length or pointer through a local. */
  lets: { name: string; expr: Expr; range: Range; pos: number }[];
}

/** An explicit length declaration found on a C/C++ declaration (stored in `FileFacts.extra.bufferHints[fnId]`). */
export interface BufferHint {
  ptr: string;
  len: Expr;
  lenText: string;
  unit: "items" | "bytes";
  source: "gcc-access" | "c99-array" | "counted-by";
  access?: "read_only" | "write_only" | "read_write" | "none";
  range: Range;
  evidence: string;
}
