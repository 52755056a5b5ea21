// Grammar loading: the web-tree-sitter runtime and the Rust, C and C++ grammars from
// tree-sitter-wasms, loaded once per process. Query files (*.scm) live in ./queries.
//
// Files are looked up, in order, beside the running bundle (dist/wasm/, which is how the CLI,
// the language server and the VS Code extension ship) and then in node_modules (tests run the
// TypeScript sources directly).

import * as fs from "node:fs";
import * as path from "node:path";
import { createRequire } from "node:module";
import Parser from "web-tree-sitter";

export type GrammarName = "rust" | "c" | "cpp";

declare const __dirname: string | undefined;

function here(): string {
  if (typeof __dirname === "string") return __dirname;
  // ESM (vitest): derive from this module's URL.
  const url = (import.meta as { url?: string }).url ?? "";
  return path.dirname(new URL(url).pathname);
}

function req() {
  return createRequire(path.join(here(), "index.js"));
}

function locate(file: string, pkgPath: string): string {
  const candidates = [path.join(here(), "wasm", file), path.join(here(), "..", "dist", "wasm", file)];
  for (const c of candidates) if (fs.existsSync(c)) return c;
  return req().resolve(pkgPath);
}

let initPromise: Promise<void> | undefined;
const languages = new Map<GrammarName, Promise<Parser.Language>>();

export function initRuntime(): Promise<void> {
  initPromise ??= Parser.init({
    locateFile: () => locate("tree-sitter.wasm", "web-tree-sitter/tree-sitter.wasm"),
  });
  return initPromise;
}

export async function loadLanguage(name: GrammarName): Promise<Parser.Language> {
  await initRuntime();
  let p = languages.get(name);
  if (!p) {
    const file = `tree-sitter-${name}.wasm`;
    p = Parser.Language.load(locate(file, `tree-sitter-wasms/out/${file}`));
    languages.set(name, p);
  }
  return p;
}

/** Reads a query file from grammars/queries (shipped as dist/queries). */
export function queryText(name: string): string {
  const candidates = [
    path.join(here(), "queries", name),
    path.join(here(), "..", "grammars", "queries", name),
    path.join(here(), "..", "..", "grammars", "queries", name),
  ];
  for (const c of candidates) if (fs.existsSync(c)) return fs.readFileSync(c, "utf8");
  throw new Error(`query file ${name} not found`);
}

export { Parser };
