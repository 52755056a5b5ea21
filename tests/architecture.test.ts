// Layering invariants of DEVELOPERS.md, checked on the import graph (read with the TypeScript
// compiler's own pre-processor, not by pattern matching) and on what rules may touch.
import { describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import ts from "typescript";

const SRC = path.resolve(__dirname, "../server/src");

function filesIn(dir: string): string[] {
  const out: string[] = [];
  for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) out.push(...filesIn(p));
    else if (p.endsWith(".ts")) out.push(p);
  }
  return out;
}

function importsOf(file: string): string[] {
  const info = ts.preProcessFile(fs.readFileSync(file, "utf8"), true, true);
  return info.importedFiles.map((i) => i.fileName);
}

/** Which server layers each layer may import (downward only). */
const ALLOWED: Record<string, string[]> = {
  parse: ["parse", "model"],
  extract: ["extract", "parse", "model"],
  model: ["model"],
  rules: ["rules", "model"],
  fixes: ["fixes", "rules", "model"],
  analysis: ["analysis", "extract", "parse", "model", "rules", "fixes"],
  cli: ["cli", "analysis", "extract", "parse", "model", "rules", "fixes", "lsp"],
  lsp: ["lsp", "analysis", "extract", "parse", "model", "rules", "fixes", "cli"],
};

describe("layering", () => {
  for (const file of filesIn(SRC)) {
    const layer = path.relative(SRC, file).split(path.sep)[0]!;
    test(`${path.relative(SRC, file)} imports only downward`, () => {
      for (const imp of importsOf(file)) {
        if (!imp.startsWith(".")) continue;
        const target = path.resolve(path.dirname(file), imp);
        const rel = path.relative(SRC, target);
        if (rel.startsWith("..")) continue; // grammars/ lives beside server/
        const tLayer = rel.split(path.sep)[0]!;
        expect(ALLOWED[layer] ?? [], `${file} imports ${imp}`).toContain(tLayer);
      }
    });
  }
});

describe("rules are pure", () => {
  for (const file of filesIn(path.join(SRC, "rules"))) {
    test(`${path.basename(file)} reads no files, prints nothing, speaks no protocol`, () => {
      const imports = importsOf(file);
      for (const bad of ["node:fs", "fs", "node:child_process", "vscode-languageserver", "vscode-languageserver/node"]) {
        expect(imports).not.toContain(bad);
      }
      const src = ts.createSourceFile(file, fs.readFileSync(file, "utf8"), ts.ScriptTarget.Latest, true);
      const offenders: string[] = [];
      const visit = (n: ts.Node) => {
        if (ts.isPropertyAccessExpression(n) && ts.isIdentifier(n.expression) && ["console", "process"].includes(n.expression.text)) offenders.push(n.getText());
        ts.forEachChild(n, visit);
      };
      visit(src);
      expect(offenders).toEqual([]);
    });
  }
});
