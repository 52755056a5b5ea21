// Quick-fixes of the "ownership" family: each turns a finding (and the facts named in its data)
// into text edits. Nothing here reads or writes files; the CLI prints the edits with
// --show-fixes and the language server offers them as code actions.

import type { Model } from "../model/boundary.js";
import type { AbiType, FnDecl, Range } from "../model/types.js";
import type { RustOwnFacts } from "../model/ownership.js";
import type { Finding } from "../rules/api.js";
import { cDecl } from "./cgen.js";
import { registerFix, type Fix } from "./index.js";

const point = (file: string, line: number, col: number): Range => ({ file, line, col, endLine: line, endCol: col });
const sp = (n: number) => " ".repeat(Math.max(0, n));
const ownOf = (fn: FnDecl) => fn.body?.ownership as RustOwnFacts | undefined;

const SIGNED = new Set(["i8", "i16", "i32", "i64", "i128", "isize", "schar", "short", "int", "long", "llong", "ssize_t", "ptrdiff_t", "intptr_t"]);

/** A value of the function's return type that tells C "failed" (-1, 0, NaN, NULL, false, ()). */
function errorValue(t: AbiType): string | undefined {
  switch (t.k) {
    case "void": return "()";
    case "scalar":
      if (t.s === "bool") return "false";
      if (t.s === "f32" || t.s === "float") return "f32::NAN";
      if (t.s === "f64" || t.s === "double") return "f64::NAN";
      return SIGNED.has(t.s) ? "-1" : "0";
    case "ptr":
      if (t.via && t.via !== "raw") return undefined;
      return t.mut ? "core::ptr::null_mut()" : "core::ptr::null()";
  }
  return undefined;
}

function earlyReturn(t: AbiType): string | undefined {
  if (t.k === "void") return "return;";
  const v = errorValue(t);
  return v ? `return ${v};` : undefined;
}

function noMangleAttr(fn: FnDecl): string {
  return fn.attrs.some((a) => a.replace(/\s+/g, "").startsWith("unsafe(")) ? "#[unsafe(no_mangle)]" : "#[no_mangle]";
}

const STEM = /_?(new|create|open|alloc|allocate|init|make|build|plan|start)$/i;

function addReleaser(f: Finding, model: Model): Fix[] {
  const fn = model.fnById(f.data?.fn);
  if (!fn || fn.ret.k !== "ptr") return [];
  const how = f.data?.how;
  const stem = fn.symbol.replace(STEM, "") || fn.symbol;
  let name = `${stem}_free`;
  if (model.symbols.has(name)) name = `${stem}_release`;
  const o = ownOf(fn);
  const inner = fn.ret.to.k === "void" ? o?.produces.find((p) => p.inner)?.inner : undefined;
  const p = fn.ret.to.k === "void" && inner ? `h as *mut ${inner}` : "h";
  let take: string;
  if (how === "box") take = `Box::from_raw(${p})`;
  else if (how === "cstring") take = `std::ffi::CString::from_raw(h)`;
  else if (how === "arc") take = `std::sync::Arc::from_raw(${p})`;
  else if (how === "rc") take = `std::rc::Rc::from_raw(${p})`;
  else return []; // a leaked Vec needs its length and capacity back: no generic fix
  if (fn.ret.to.k === "void" && !inner && how !== "cstring") return [];
  const ind = sp(fn.range.col);
  const rustText = `\n\n${ind}/// Releases a handle made by \`${fn.symbol}\`; NULL is ignored.\n` +
    `${ind}${noMangleAttr(fn)}\n` +
    `${ind}pub unsafe extern "C" fn ${name}(h: ${fn.retText}) {\n` +
    `${ind}    if h.is_null() {\n${ind}        return;\n${ind}    }\n` +
    `${ind}    drop(unsafe { ${take} });\n${ind}}`;
  const edits = [{ range: point(fn.file, fn.range.endLine, fn.range.endCol), newText: rustText }];
  const proto = model.fnById(f.data?.proto);
  if (proto && proto.ret.k === "ptr") {
    edits.push({ range: point(proto.file, proto.range.endLine + 1, 0), newText: `void ${name}(${cDecl({ ...proto.ret, mut: true }, "h", model)});\n` });
  }
  return [{ title: `Add \`${name}\`, which takes the handle back with ${take.replace(/\(.*$/, "")} (NULL-safe)${proto ? ", and declare it in the header" : ""}`, edits, preferred: true }];
}

function addNullCheck(f: Finding, model: Model): Fix[] {
  const fn = model.fnById(f.data?.fn);
  const pi = f.data?.param;
  if (!fn || typeof pi !== "number") return [];
  const p = fn.params[pi];
  const o = ownOf(fn);
  if (!p || !o) return [];
  if (f.data?.byParam) {
    return [{ title: `Take \`${p.name}\` as \`Option<${p.text}>\` (NULL becomes None)`, edits: [{ range: p.typeRange, newText: `Option<${p.text}>` }], preferred: true }];
  }
  const ret = earlyReturn(fn.ret);
  if (!ret) return [];
  const b = o.bodyRange;
  const ind = sp(fn.range.col + 4);
  return [{
    title: `Return early when \`${p.name}\` is NULL`,
    edits: [{ range: point(b.file, b.line, b.col + 1), newText: `\n${ind}if ${p.name}.is_null() {\n${ind}    ${ret}\n${ind}}` }],
    preferred: true,
  }];
}

function borrowInstead(f: Finding, model: Model): Fix[] {
  const fn = model.fnById(f.data?.fn);
  const pi = f.data?.param;
  if (!fn || typeof pi !== "number") return [];
  const p = fn.params[pi];
  if (!p) return [];
  if (f.data?.byParam) {
    if (p.type.k !== "ptr" || p.type.to.k !== "named") return [];
    return [{ title: `Borrow the handle: take \`&mut ${p.type.to.name}\``, edits: [{ range: p.typeRange, newText: `&mut ${p.type.to.name}` }], preferred: true }];
  }
  if (!f.data?.direct) return [];
  const rel = ownOf(fn)?.releases.find((r) => r.range.line === f.range.line && r.range.col === f.range.col);
  if (!rel?.arg.ident) return [];
  const target = rel.arg.cast ? `(${rel.arg.ident} as *mut ${rel.arg.cast})` : rel.arg.ident;
  return [{ title: `Borrow the handle (\`&mut *${target}\`) instead of taking ownership`, edits: [{ range: f.range, newText: `&mut *${target}` }], preferred: true }];
}

function catchPanics(f: Finding, model: Model): Fix[] {
  const fn = model.fnById(f.data?.fn);
  const o = fn && ownOf(fn);
  if (!fn || !o) return [];
  const err = errorValue(fn.ret);
  if (!err) return [];
  const b = o.bodyRange;
  if (b.line === b.endLine) return [];
  const ind = sp(fn.range.col + 4);
  return [{
    title: `Catch panics: wrap the body in std::panic::catch_unwind and return ${err === "()" ? "nothing" : `\`${err}\``} on panic`,
    edits: [
      { range: point(b.file, b.line, b.col + 1), newText: `\n${ind}std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {` },
      { range: point(b.file, b.endLine, b.endCol - 1), newText: `${ind}}))\n${ind}.unwrap_or(${err})\n${sp(fn.range.col)}` },
    ],
    preferred: true,
  }];
}

interface CopyReplace { kind: "copyCtor" | "copyAssign"; def: Range; decl: Range | null; inClass: boolean }

function deleteCopies(f: Finding): Fix[] {
  const cls = f.data?.cls as string | undefined;
  if (!cls || f.data?.defaulted) return [];
  const dtor = f.data?.dtor as Range | null | undefined;
  const text = (k: "copyCtor" | "copyAssign") => (k === "copyCtor" ? `${cls}(const ${cls} &) = delete;` : `${cls} &operator=(const ${cls} &) = delete;`);
  // user-written copy members that copy the pointer become deleted declarations
  const edits: Fix["edits"] = [];
  for (const r of (f.data?.replace ?? []) as CopyReplace[]) {
    if (r.inClass) edits.push({ range: r.def, newText: text(r.kind) });
    else if (r.decl) {
      edits.push({ range: r.decl, newText: text(r.kind) });
      edits.push({ range: r.def, newText: "" });
    } else return [];
  }
  const decl = [f.data?.copyCtor ? text("copyCtor") : "", f.data?.copyAssign ? text("copyAssign") : ""].filter(Boolean);
  if (!decl.length && !edits.length) return [];
  const title = `Delete the copy members of \`${cls}\``;
  if (!decl.length) return [{ title, edits, preferred: true }];
  if (dtor) {
    const ind = sp(dtor.col);
    return [{ title, edits: [...edits, { range: point(dtor.file, dtor.endLine, dtor.endCol), newText: decl.map((d) => `\n${ind}${d}`).join("") }], preferred: true }];
  }
  const body = f.data?.classBody as Range | undefined;
  if (!body) return [];
  return [{ title, edits: [...edits, { range: point(body.file, body.endLine, body.endCol - 1), newText: `public:\n${decl.map((d) => `    ${d}\n`).join("")}` }], preferred: true }];
}

function nullSource(f: Finding): Fix[] {
  const param = f.data?.param, field = f.data?.field;
  const body = f.data?.body as Range | undefined;
  const beforeRet = f.data?.before as Range | null | undefined;
  if (typeof param !== "string" || typeof field !== "string" || !body) return [];
  const stmt = `${param}.${field} = nullptr;`;
  if (beforeRet) return [{ title: `Leave \`${param}\` empty: \`${stmt}\``, edits: [{ range: point(beforeRet.file, beforeRet.line, beforeRet.col), newText: `${stmt}\n${sp(beforeRet.col)}` }], preferred: true }];
  const text = body.line === body.endLine ? ` ${stmt} ` : `    ${stmt}\n${sp(body.endCol - 1)}`;
  return [{ title: `Leave \`${param}\` empty: \`${stmt}\``, edits: [{ range: point(body.file, body.endLine, body.endCol - 1), newText: text }], preferred: true }];
}

function useReleaser(f: Finding): Fix[] {
  const after = f.data?.deleterAfter as Range | null | undefined;
  if (after && typeof f.data?.releaser === "string") {
    // a std::shared_ptr made without a deleter: pass the release function as its second argument
    return [{ title: `Pass \`&${f.data.releaser}\` as the deleter`, edits: [{ range: point(after.file, after.endLine, after.endCol), newText: `, &${f.data.releaser}` }], preferred: true }];
  }
  const rel = f.data?.releaser, arg = f.data?.arg;
  const r = f.data?.callRange as Range | undefined;
  if (typeof rel !== "string" || typeof arg !== "string" || !r) return [];
  return [{ title: `Release it with \`${rel}\``, edits: [{ range: r, newText: `${rel}(${arg})` }], preferred: true }];
}

function addRelease(f: Finding): Fix[] {
  const cls = f.data?.cls, field = f.data?.field, rel = f.data?.releaser;
  if (typeof cls !== "string" || typeof field !== "string" || typeof rel !== "string") return [];
  const call = `${rel}(${field});`;
  const dtor = f.data?.dtor as { body?: Range } | undefined;
  if (dtor?.body) {
    const b = dtor.body;
    const text = b.line === b.endLine ? ` ${call} ` : `    ${call}\n${sp(b.endCol - 1)}`;
    return [{ title: `Release \`${field}\` in the destructor`, edits: [{ range: point(b.file, b.endLine, b.endCol - 1), newText: text }], preferred: true }];
  }
  const anchor = f.data?.anchor as Range | null | undefined;
  if (anchor) return [{ title: `Add a destructor that releases \`${field}\``, edits: [{ range: point(anchor.file, anchor.endLine, anchor.endCol), newText: `\n${sp(anchor.col)}~${cls}() { ${call} }` }], preferred: true }];
  const body = f.data?.classBody as Range | undefined;
  if (!body) return [];
  return [{ title: `Add a destructor that releases \`${field}\``, edits: [{ range: point(body.file, body.endLine, body.endCol - 1), newText: `public:\n    ~${cls}() { ${call} }\n` }], preferred: true }];
}

function matchAllocation(f: Finding, model: Model): Fix[] {
  const ctor = model.fnById(f.data?.ctor);
  const cr = f.data?.calleeRange as Range | undefined;
  const how = f.data?.how;
  const inner = f.data?.inner;
  const relFn = model.fnById(f.data?.rel);
  if (ctor && relFn && typeof inner === "string" && f.data?.direct) {
    // Box<A> freed as Box<B>: correct the pointee type the release casts to
    const rel = ownOf(relFn)?.releases.find((r) => r.range.line === f.range.line && r.range.col === f.range.col);
    const castRange = rel?.arg.castRange;
    if (castRange) return [{ title: `Free it as \`${inner}\`, the type \`${ctor.symbol}\` allocated`, edits: [{ range: castRange, newText: inner }], preferred: true }];
    return [];
  }
  if (!ctor || !cr || typeof how !== "string") return [];
  const path = how === "cstring" ? "std::ffi::CString::from_raw" : how === "arc" ? "std::sync::Arc::from_raw" : how === "rc" ? "std::rc::Rc::from_raw" : how === "box" ? "Box::from_raw" : undefined;
  if (!path) return [];
  return [{ title: `Take it back with \`${path}\`, as \`${ctor.symbol}\` made it`, edits: [{ range: cr, newText: path }], preferred: true }];
}

registerFix("handle-no-release", addReleaser);
registerFix("release-without-null-check", addNullCheck);
registerFix("borrower-takes-ownership", borrowInstead);
registerFix("panic-across-c-abi", catchPanics);
registerFix("copyable-owning-wrapper", deleteCopies);
registerFix("move-keeps-source-handle", nullSource);
registerFix("foreign-allocator-free", useReleaser);
registerFix("wrapper-leaks-handle", addRelease);
registerFix("release-kind-mismatch", matchAllocation);
