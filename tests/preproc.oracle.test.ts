// The C preprocessor (server/src/extract/preproc) against the compilers of the trade:
//  - every predefined macro ferrule knows per target equals `-dM -E` of the Debian gcc cross
//    compilers (Linux targets) and of clang --target=x86_64-pc-windows-msvc (Windows);
//  - ferrule's expansion of the oracle corpus (tests/data/preproc: the C11 §6.10.3.5 EXAMPLE 3
//    macros, #/##/__VA_ARGS__, #if arithmetic and target conditionals) and of the macro fixture
//    headers (test-fixtures/macros) equals `gcc -E`'s token sequence for each Linux target,
//    read in the C standard's mode (`strict`: unknown names are 0);
//  - struct sizes, alignments and member offsets computed through the fixture's macros (an
//    alignment macro, array lengths from macros and enum constants) equal clang's on all five
//    targets.

import { describe, expect, it } from "vitest";
import { execFileSync } from "node:child_process";
import * as fs from "node:fs";
import * as path from "node:path";
import { preprocess, tokenize, type Tok } from "../server/src/extract/preproc/index.js";
import { PREDEFINED } from "../server/src/extract/preproc/predefined.js";
import { Workspace } from "../server/src/analysis/workspace.js";
import { declLayout } from "../server/src/model/layout.js";
import { TRIPLES, cValuesClang, have, type Triple } from "./oracles/compilers";

const DATA = path.resolve(__dirname, "data/preproc");
const SYS = path.join(DATA, "sys");
const FIXTURE = path.resolve(__dirname, "../test-fixtures/macros/hydrophone");

const GCC: Partial<Record<Triple, string>> = {
  "x86_64-unknown-linux-gnu": "x86_64-linux-gnu-gcc",
  "aarch64-unknown-linux-gnu": "aarch64-linux-gnu-gcc",
  "armv7-unknown-linux-gnueabihf": "arm-linux-gnueabihf-gcc",
  "i686-unknown-linux-gnu": "i686-linux-gnu-gcc",
};

function predefinedOf(cmd: string, args: string[]): Map<string, string> {
  const out = execFileSync(cmd, [...args, "-dM", "-E", "-x", "c", "/dev/null"]).toString();
  const m = new Map<string, string>();
  for (const line of out.split("\n")) {
    if (!line.startsWith("#define ")) continue;
    const rest = line.slice(8);
    const sp = rest.indexOf(" ");
    m.set(sp < 0 ? rest : rest.slice(0, sp), sp < 0 ? "" : rest.slice(sp + 1));
  }
  return m;
}

/** Tokens outside directive lines. */
function textTokens(text: string): string[] {
  const toks = tokenize(text);
  const out: string[] = [];
  for (let i = 0; i < toks.length; i++) {
    const t = toks[i]!;
    if (t.bol && t.t === "#") {
      while (i + 1 < toks.length && !toks[i + 1]!.bol) i++;
      continue;
    }
    out.push(t.t);
  }
  return out;
}

function ours(file: string, triple: Triple): string[] {
  const text = fs.readFileSync(file, "utf8");
  const r = preprocess(file, text, {
    targets: [triple],
    strict: true,
    readInclude: (from, inc, system) => {
      const f = system ? path.join(SYS, inc) : path.join(path.dirname(from), inc);
      return fs.existsSync(f) ? { file: f, text: fs.readFileSync(f, "utf8") } : undefined;
    },
  });
  return textTokens(r.text);
}

/** gcc's tokens of `file` itself: ferrule's text of a file holds that file's expansion, not the
 * text of the headers it includes (their macros it reads), so the linemarkers of `gcc -E` pick
 * out the lines that belong to the main file. */
function theirs(gcc: string, file: string): string[] {
  const out = execFileSync(gcc, ["-E", "-std=c11", "-nostdinc", "-isystem", SYS, file]).toString();
  const kept: string[] = [];
  let current = "";
  for (const line of out.split("\n")) {
    const lm = /^# \d+ "(.*)"/.exec(line); // gcc's linemarker output, not code
    if (lm) { current = lm[1]!; continue; }
    if (current === file) kept.push(line);
  }
  return tokenize(kept.join("\n")).map((t: Tok) => t.t);
}

describe("predefined macros per target (gcc / clang -dM -E)", () => {
  for (const triple of TRIPLES) {
    const tool = GCC[triple] ?? "clang";
    it(`${triple}: every entry equals ${tool}'s, and a name left out is not defined there`, (ctx) => {
      if (!have(tool)) return ctx.skip();
      const real = predefinedOf(tool, tool === "clang" ? ["--target=x86_64-pc-windows-msvc"] : []);
      const table = PREDEFINED[triple];
      for (const [k, v] of Object.entries(table)) expect([k, real.get(k)]).toEqual([k, v]);
      const all = new Set(Object.values(PREDEFINED).flatMap((t) => Object.keys(t)));
      for (const k of all) if (!(k in table)) expect([k, real.has(k)]).toEqual([k, false]);
    });
  }
});

describe("expansion equals gcc -E (token sequence) for each Linux target", () => {
  const files = [path.join(DATA, "corpus.h"), path.join(FIXTURE, "hydro.h"), path.join(FIXTURE, "hydro.c")];
  for (const [triple, gcc] of Object.entries(GCC) as [Triple, string][]) {
    it(`${triple} (${gcc})`, (ctx) => {
      if (!have(gcc)) return ctx.skip();
      for (const f of files) expect({ file: path.basename(f), toks: ours(f, triple) }).toEqual({ file: path.basename(f), toks: theirs(gcc, f) });
    });
  }
});

describe("struct layouts through macros equal clang's on all five targets", () => {
  it("hydro_frame (alignment macro, macro array length), hydro_ping, hydro_bands (enum-constant and macro lengths)", async (ctx) => {
    if (!have("clang")) return ctx.skip();
    const ws = await Workspace.create();
    ws.loadAll([FIXTURE]);
    const model = ws.model();
    const names = ["hydro_frame", "hydro_ping", "hydro_bands"];
    const fields: Record<string, string[]> = { hydro_frame: ["samples", "seq"], hydro_ping: ["t0", "bearing"], hydro_bands: ["energy", "taps"] };
    for (const triple of TRIPLES) {
      const exprs: string[] = [];
      const mine: number[] = [];
      for (const n of names) {
        const d = model.typeDecls(n, "c").find((x) => x.kind === "struct");
        expect(d, n).toBeDefined();
        const l = declLayout(d!, { model, side: "c", triple });
        expect(l.unknown, n).toBeUndefined();
        exprs.push(`sizeof(${n})`, `_Alignof(${n})`);
        mine.push(l.size, l.align);
        for (const f of fields[n]!) {
          exprs.push(`offsetof(${n}, ${f})`);
          mine.push(l.fields!.find((x) => x.name === f)!.offset);
        }
      }
      const got = cValuesClang(triple, `#include <stddef.h>\n#include "${path.join(FIXTURE, "hydro.h")}"\n`, exprs);
      expect({ triple, values: mine }).toEqual({ triple, values: got });
    }
  });
});
