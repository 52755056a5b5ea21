// Plain-data facts of the "ownership" family: what the extract layer records about handles
// (Rust constructors / borrowers / releasers, panic sites) and C/C++ classes and function flows.
// Written by extract/plugins/ownership.ts, read by rules/ownership.ts and fixes/ownership.ts.
// No syntax nodes live here; every position is a Range.

import type { Range } from "./types.js";

/** How a Rust value was turned into a raw pointer (or back). */
export type OwnHow = "box" | "arc" | "rc" | "cstring" | "vec" | "forget" | "manuallydrop" | "drop_in_place";

/** An argument or operand, resolved through `let` aliases and pointer casts to a root identifier. */
export interface RustArg {
  ident?: string;
  /** Pointee type named by a cast on the way (`h as *mut Det`, `h.cast::<Det>()`). */
  cast?: string;
  /** Where that pointee type is written (for fixes that correct it). */
  castRange?: Range;
  /** Reached through one dereference: `*out` of an out-parameter `out: *mut *mut T`. */
  deref?: boolean;
  text: string;
}

export interface RustProduce {
  how: OwnHow;
  /** The Rust type inside the Box/Arc (`Box::new(Det { … })` → "Det"), when visible. */
  inner?: string;
  range: Range;
  protected: boolean;
}

export interface RustRelease {
  how: OwnHow;
  arg: RustArg;
  inner?: string;
  range: Range;
  /** The path of the releasing call (`Box::from_raw`), for fixes that replace it. */
  calleeRange?: Range;
  /** The `let` name the released value is bound to (a later `into_raw`/`forget`/`leak` of it cancels the release). */
  binding?: string;
  /** A Box<T> parameter (released when the function returns). */
  byParam?: boolean;
  nullableParam?: boolean;
}

/** A site inside a closure passed as argument `arg` (0-based, the receiver not counted) of the
 * call at `call`: a crate helper that runs that argument under catch_unwind protects it. */
export interface RustUnder {
  call: Range;
  arg: number;
}

export interface RustPanic {
  kind: "unwrap" | "expect" | "panic" | "unreachable" | "todo" | "assert" | "index" | "overflow" | "division" | "borrow_mut";
  text: string;
  range: Range;
  protected: boolean;
  /** "warning": an explicit panic on a value C hands over (a pointer, a string conversion, a
   * parameter), `panic!`/`unreachable!`/`assert!` on runtime values; "info": a possible overflow,
   * out-of-range index or division with no guard seen, an unwrap of internal state. */
  level?: "warning" | "info";
  /** A warning only on call paths where one of these parameters (bit i = parameter i, `self` not
   * counted) carries a value C handed over; info on the others. Absent: `level` as it is. */
  taint?: number;
  /** assert!: lower bounds on parameters that make its condition hold (`rate > 0` → rate >= 1). */
  needs?: { param: number; ge: number }[];
  under?: RustUnder[];
}

export interface RustCall {
  callee: string;
  method: boolean;
  args: RustArg[];
  range: Range;
  protected: boolean;
  /** Method call: the receiver's type when the body shows it (`self`, a typed parameter or
   * local, `(*p)` with `p: *mut T`); `Self` already replaced by the impl's type. */
  recv?: string;
  /** Path call `Head::name(…)`: the last segment of the path before the name (`Self` replaced). */
  head?: string;
  /** Per argument (the receiver not counted): the caller's parameters it reads (bitmask). */
  argTaint?: number[];
  /** Per argument: the lower bound the caller's guards give it at the call (null: none known). */
  argGe?: (number | null)[];
  under?: RustUnder[];
}

export interface RustOwnFacts {
  hasSelf: boolean;
  /** The body block: `{` at (line, col), `}` at (endLine, endCol - 1). */
  bodyRange: Range;
  produces: RustProduce[];
  releases: RustRelease[];
  borrows: { ident: string; mut: boolean; range: Range }[];
  nullChecks: { ident: string; range: Range }[];
  /** into_raw / forget / leak applied to a local binding (re-leaks a value taken with from_raw). */
  reLeaks: { ident: string; range: Range }[];
  panics: RustPanic[];
  calls: RustCall[];
  catchUnwind: boolean;
  /** The type of the `impl` block the function is in (`impl Det` / `impl Trait for Det` → "Det"). */
  implType?: string;
  /** The trait of that impl block (`impl Write for Det` → "Write"). */
  traitName?: string;
  /** Indices of parameters the body runs under catch_unwind (`catch_unwind(f)`, a closure calling `f`). */
  catchParams?: number[];
}

// ---- C / C++ ----

/** A place that can hold a handle: a local/parameter/field name, `this->x`, or `o.x`. */
export interface CRef {
  name: string;
  this?: boolean;
  /** Object of a member access on something other than `this` (`other.h_` → "other"). */
  of?: string;
}

export interface CArg {
  text: string;
  ref?: CRef;
  /** The argument is (a cast of) a call: `free(sonar_name())`. */
  call?: string;
  /** `p.get()` on a smart pointer. */
  viaGet?: boolean;
  castTo?: string;
  range: Range;
}

export type CEvent =
  | { k: "call"; callee: string; args: CArg[]; range: Range; calleeRange: Range; exitsAfter: boolean }
  | { k: "assign"; lhs: CRef; rhs: CArg | null; isNull: boolean; range: Range; decl?: boolean; declType?: string }
  | { k: "swap"; a: CRef; b: CRef; range: Range }
  | { k: "delete"; arg: CArg; array: boolean; range: Range; exitsAfter: boolean }
  | { k: "use"; ref: CRef; range: Range }
  | { k: "return"; arg: CArg | null; range: Range }
  /** A smart pointer made to own `arg`: `std::shared_ptr<T>(p)`, `std::unique_ptr<T>(p)` in an
   * expression, or a local/field declaration of one initialised with `p`. */
  | { k: "smart"; up: UniquePtrDecl; arg: CArg; range: Range }
  /** `obj.reset(p)` / `obj.reset(p, d)` (the rule looks up whether `obj` is a smart pointer). */
  | { k: "reset"; obj: CRef; arg: CArg; deleter?: DeleterArg; range: Range };

/** A deleter passed as a constructor or reset argument: a function name (`&sonar_fir_free`), or
 * anything else (a lambda, a functor object) with the calls and deletes its body makes. */
export interface DeleterArg {
  name?: string;
  text: string;
  calls: string[];
  deletes: boolean;
}

export type MemberKind = "ctor" | "dtor" | "copyCtor" | "copyAssign" | "moveCtor" | "moveAssign" | "method";

/** `std::unique_ptr<T, D>` or `std::shared_ptr<T>` declared as a field or a local (or built in an
 * expression). */
export interface UniquePtrDecl {
  name: string;
  /** "shared" for std::shared_ptr (its deleter is never part of the type); absent for unique_ptr. */
  smart?: "shared";
  pointee: string;
  /** "default" (std::default_delete: `delete`), the deleter function name, or a functor class. */
  deleter: { k: "default" } | { k: "fn"; name: string } | { k: "functor"; cls: string } | { k: "unknown"; text: string };
  /** The function called to produce the initial pointer, when visible in the declaration. */
  initCall?: string;
  /** The deleter passed to the constructor (`&sonar_fir_free`), when given there. */
  initDeleter?: string;
  /** Any other deleter passed to the constructor (a lambda, a functor object). */
  initDeleterOther?: DeleterArg;
  /** Where the pointer argument of the constructor is written (fixes add a deleter after it). */
  initArgRange?: Range;
  /** A local initialised in its declaration: checked at its "smart" event, in flow order. */
  byEvent?: boolean;
  range: Range;
}

export interface CFlow {
  name: string;
  className?: string;
  member?: MemberKind;
  /** "deleted"/"defaulted" members have no body. */
  state: "user" | "deleted" | "defaulted" | "declared";
  params: string[];
  /** Names declared in the body (locals), to tell them from fields. */
  locals: string[];
  range: Range;
  nameRange: Range;
  /** The body block; `}` is at (endLine, endCol - 1). */
  bodyRange?: Range;
  events: CEvent[];
  uptrs: UniquePtrDecl[];
}

export interface CField {
  name: string;
  typeText: string;
  /** Pointee type name of a raw pointer field (`sonar_fir *fir_` → "sonar_fir"). */
  ptrTo?: string;
  uptr?: UniquePtrDecl;
  /** Default member initializer. */
  init?: CArg | null;
  initNull?: boolean;
  range: Range;
}

export interface CClass {
  name: string;
  file: string;
  range: Range;
  nameRange: Range;
  bodyRange: Range;
  bases: string[];
  fields: CField[];
  /** Member declarations and in-class definitions (definitions also have a flow in `flows`). */
  members: { kind: MemberKind; state: CFlow["state"]; name: string; range: Range; nameRange: Range; param?: string }[];
}

export interface COwnFacts {
  flows: CFlow[];
}
