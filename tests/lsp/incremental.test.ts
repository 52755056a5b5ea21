// The language server's incremental path against a from-scratch analysis: after each edit the
// engine re-parses one file from its edited previous tree and re-checks only the affected
// boundary items; the facts and the findings must equal those of a fresh Workspace over the
// same texts (the CLI's path).

import { describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { fileURLToPath } from "node:url";
import { Workspace } from "../../server/src/analysis/workspace.js";
import { extractFile } from "../../server/src/extract/index.js";
import { Engine, offsetAt } from "../../server/src/lsp/engine.js";
import type { Finding } from "../../server/src/rules/api.js";
import { replaceFirst } from "../helpers/edits.js";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const DEMO = path.join(ROOT, "test-fixtures/sonar-demo");
const H = path.join(DEMO, "include/sonar_kernels.h");
const RS = path.join(DEMO, "kernels/src/lib.rs");

const key = (f: Finding) => `${f.rule}|${path.relative(DEMO, f.range.file)}|${f.range.line}:${f.range.col}-${f.range.endLine}:${f.range.endCol}|${f.message}`;

/** Edits as (file, text to find, replacement): each introduces or removes a seam slip. */
const EDITS: [string, string, string][] = [
  [H, "double *output", "float *output"], // fixes slip #1
  [RS, "n_samples: i64", "n_samples: i32"], // changes slip #2
  [H, "void sonar_fir_free(sonar_fir *h);", "void sonar_fir_free(sonar_fir *h, int flags);"], // arity
  [RS, "pub extern \"C\" fn sonar_set_gain", "#[unsafe(no_mangle)]\npub extern \"C\" fn sonar_set_gain"], // fixes slip #4
  [H, "    double snr_db;", "    float snr_db;"], // layout mismatch on the struct
  [H, "float *output", "double *output"], // back to slip #1
  [RS, "pub flags: u8,", "pub flags: u16,"],
  [H, "typedef struct sonar_detection {", "typedef struct sonar_detection_t {"],
  // lines inserted and removed above unchanged functions: their reused body facts must shift
  [RS, "use core::slice;", "use core::slice;\n\n// two\n// more lines\n"],
  [RS, "\n    if h.is_null() {\n        return -1;", "\n    if h.is_null() {\n        return -2;"],
  [RS, "use core::slice;\n\n// two\n// more lines\n", "use core::slice;"],
  // an unchanged item whose facts depend on a const elsewhere in the file must be read again
  [RS, "use core::slice;", "use core::slice;\npub const SONAR_PROBE_TAPS: usize = 4;\n#[repr(C)]\npub struct SonarProbe {\n    pub taps: [f32; SONAR_PROBE_TAPS],\n}"],
  [RS, "SONAR_PROBE_TAPS: usize = 4;", "SONAR_PROBE_TAPS: usize = 8;"],
  // an edit inside one function after its neighbours moved
  [RS, "#[repr(C)]\npub struct SonarProbe {", "\n#[repr(C)]\npub struct SonarProbe {"],
  [RS, "        return -2;", "        return -3;"],
];

describe("incremental re-analysis equals a fresh analysis", () => {
  test("facts and findings after each of a series of edits", async () => {
    const ws = await Workspace.create();
    const engine = new Engine(ws);
    engine.scan([DEMO]);
    engine.analyze(true);
    const texts = new Map<string, string>();
    for (const f of [H, RS]) {
      texts.set(f, fs.readFileSync(f, "utf8"));
      engine.open(f, texts.get(f)!, 1);
    }
    engine.analyze();
    // opened as on disk: the items noted when the file was read are reused, nothing to read again
    expect(engine.needsSeed).toBe(false);
    let version = 1;
    const scopes: string[] = [];
    for (const [file, from, to] of EDITS) {
      const t = texts.get(file)!;
      const c = replaceFirst(t, from, to);
      const doc = engine.docs.get(file)!;
      expect(offsetAt(doc, c.range.start)).toBe(c.at);
      engine.change(file, [{ range: c.range, text: to }], ++version);
      const nt = c.after;
      texts.set(file, nt);
      expect(engine.docs.get(file)!.text).toBe(nt);
      const res = engine.analyze();
      expect(res.scope).not.toBe("full");
      scopes.push(res.scope);
      // facts from the incremental parse equal facts from a fresh parse
      const got = JSON.stringify(ws.facts(file));
      const want = JSON.stringify(extractFile(file, nt));
      if (got !== want) {
        let i = 0;
        while (got[i] === want[i]) i++;
        throw new Error(`facts differ after ${from} → ${to} at ${i}: …${got.slice(i - 300, i + 80)}… vs …${want.slice(i - 20, i + 80)}…`);
      }
      // findings equal a fresh workspace's
      const fresh = await Workspace.create();
      fresh.loadAll([DEMO]);
      for (const [f, tx] of texts) fresh.update(f, tx);
      expect(res.findings.map(key).sort(), `after ${from} → ${to}`).toEqual(fresh.check().map(key).sort());
    }
    // a Rust document opened with a text other than the disk's is read through the item cache by
    // the analysis of the open, and its next edit takes the item-level scope as well
    const DET = path.join(DEMO, "kernels/src/detector.rs");
    const det = "// opened with unsaved changes\n" + fs.readFileSync(DET, "utf8");
    engine.open(DET, det, 1);
    engine.analyze();
    expect(engine.needsSeed).toBe(false);
    const at = det.indexOf("threshold: f32");
    expect(at).toBeGreaterThan(0);
    const p0 = det.slice(0, at).split("\n");
    engine.change(DET, [{ range: { start: { line: p0.length - 1, character: p0[p0.length - 1]!.length }, end: { line: p0.length - 1, character: p0[p0.length - 1]!.length + "threshold: f32".length } }, text: "threshold: f64" }], 2);
    const r2 = engine.analyze();
    expect(r2.scope).toBe("items");
    const fresh = await Workspace.create();
    fresh.loadAll([DEMO]);
    for (const [f, tx] of texts) fresh.update(f, tx);
    fresh.update(DET, det.replace("threshold: f32", "threshold: f64"));
    expect(r2.findings.map(key).sort()).toEqual(fresh.check().map(key).sort());
    // the Rust edits that change one exported function take the item-level scope
    expect(scopes[1]).toBe("items");
    expect(scopes[3]).toBe("items");
    engine.dispose();
  });
});

describe("documents opened before the workspace was read", () => {
  test("are read through the item cache by the first analysis; the next edit takes the item-level scope", async () => {
    const engine = new Engine(await Workspace.create());
    const text = fs.readFileSync(RS, "utf8");
    engine.open(RS, text, 1); // the editor sent didOpen before the index was built
    engine.scan([DEMO]);
    engine.analyze(true);
    expect(engine.needsSeed).toBe(false);
    const at = text.indexOf("n_samples: i64");
    const p0 = text.slice(0, at).split("\n");
    const line = p0.length - 1;
    const ch = p0[line]!.length + "n_samples: ".length;
    engine.change(RS, [{ range: { start: { line, character: ch }, end: { line, character: ch + 3 } }, text: "i32" }], 2);
    const res = engine.analyze();
    expect(res.scope).toBe("items");
    const fresh = await Workspace.create();
    fresh.loadAll([DEMO]);
    fresh.update(RS, text.replace("n_samples: i64", "n_samples: i32"));
    expect(res.findings.map(key).sort()).toEqual(fresh.check().map(key).sort());
    engine.dispose();
  });
});
