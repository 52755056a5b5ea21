// Parse layer: text → tree-sitter tree. Grammars are loaded once per process (see grammars/).
// Callers own the returned tree and must delete() it (trees live in wasm memory).

import { Parser, loadLanguage, type GrammarName } from "../../../grammars/index.js";
import type { Lang } from "../model/types.js";

export type Tree = Parser.Tree;
export type Node = Parser.SyntaxNode;

const parsers = new Map<GrammarName, Parser>();
let ready: Promise<void> | undefined;

/** Loads all three grammars; must be awaited once before parseText. */
export function initParsers(): Promise<void> {
  ready ??= (async () => {
    for (const g of ["rust", "c", "cpp"] as GrammarName[]) {
      const lang = await loadLanguage(g);
      const p = new Parser();
      p.setLanguage(lang);
      parsers.set(g, p);
    }
  })();
  return ready;
}

export function isReady(): boolean {
  return parsers.size === 3;
}

/** Grammar used for a source language. C headers are parsed with the C++ grammar when they
 * contain C++ constructs; callers decide by file extension and content (see langOf). */
export function parseText(lang: Lang, text: string, old?: Tree): Tree {
  const p = parsers.get(lang);
  if (!p) throw new Error("parsers not initialised: await initParsers() first");
  return p.parse(text, old);
}

export function getLanguage(lang: Lang): Parser.Language {
  const p = parsers.get(lang);
  if (!p) throw new Error("parsers not initialised: await initParsers() first");
  return p.getLanguage();
}

const RUST_EXT = new Set([".rs"]);
const C_EXT = new Set([".c", ".h"]);
const CPP_EXT = new Set([".cc", ".cpp", ".cxx", ".hpp", ".hh", ".hxx", ".h++", ".c++"]);

/** Language of a file by its extension; undefined for files ferrule does not read. */
export function langOf(file: string): Lang | undefined {
  const dot = file.lastIndexOf(".");
  if (dot < 0) return undefined;
  const ext = file.slice(dot).toLowerCase();
  if (RUST_EXT.has(ext)) return "rust";
  if (C_EXT.has(ext)) return "c";
  if (CPP_EXT.has(ext)) return "cpp";
  return undefined;
}

export function isHeader(file: string): boolean {
  return /\.(h|hpp|hh|hxx)$/i.test(file);
}
