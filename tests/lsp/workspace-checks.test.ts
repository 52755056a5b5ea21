// A workspace check (rules/api.ts WorkspaceCheck) in the language server: `handle-types-indistinct`
// reports a C handle type that reaches Rust as `*mut c_void` when another one anywhere in the
// workspace does too, so an edit in one kernel changes findings in another that shares no name
// with it. The engine keeps the gathered items per file (Engine.refreshLayer); after every edit
// its findings must equal a fresh analysis of the same texts (the oracle), and the finding must
// come and go in the untouched kernel.

import { afterAll, describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { Workspace } from "../../server/src/analysis/workspace.js";
import { Engine } from "../../server/src/lsp/engine.js";
import type { Finding } from "../../server/src/rules/api.js";
import { replaceFirst } from "../helpers/edits.js";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-wscheck-"));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

// two kernels of a lightning-detector front end that share nothing
const FILES: Record<string, string> = {
  "strike/strike.h": "#include <stdint.h>\ntypedef struct ld_strike ld_strike;\nld_strike *ld_strike_new(void);\nvoid ld_strike_free(ld_strike *s);\n",
  "strike/strike.rs": [
    "use core::ffi::c_void;",
    "pub struct Strike { n: u32 }",
    "#[unsafe(no_mangle)]",
    "pub extern \"C\" fn ld_strike_new() -> *mut c_void {",
    "    Box::into_raw(Box::new(Strike { n: 0 })) as *mut c_void",
    "}",
    "#[unsafe(no_mangle)]",
    "pub unsafe extern \"C\" fn ld_strike_free(s: *mut c_void) {",
    "    if !s.is_null() { drop(unsafe { Box::from_raw(s as *mut Strike) }); }",
    "}",
    "",
  ].join("\n"),
  "noise/noise.h": "#include <stdint.h>\ntypedef struct ld_noise ld_noise;\nvoid ld_noise_reset(ld_noise *n);\n",
  "noise/noise.rs": [
    "pub struct LdNoise { floor: f32 }",
    "#[unsafe(no_mangle)]",
    "pub unsafe extern \"C\" fn ld_noise_reset(n: *mut LdNoise) {",
    "    if let Some(n) = unsafe { n.as_mut() } { n.floor = 0.0; }",
    "}",
    "",
  ].join("\n"),
};
for (const [rel, text] of Object.entries(FILES)) {
  fs.mkdirSync(path.dirname(path.join(dir, rel)), { recursive: true });
  fs.writeFileSync(path.join(dir, rel), text);
}
const NOISE_RS = path.join(dir, "noise/noise.rs");
const STRIKE_RS = path.join(dir, "strike/strike.rs");
const NOISE_H = path.join(dir, "noise/noise.h");

const key = (f: Finding) => `${f.rule}|${path.relative(dir, f.range.file)}|${f.range.line}:${f.range.col}|${f.message}|${f.related.map((r) => `${path.relative(dir, r.range.file)}:${r.range.line}`).join(",")}`;
const indistinctIn = (fs_: Finding[], file: string) => fs_.filter((f) => f.rule === "handle-types-indistinct" && f.range.file === file).length;

describe("workspace checks in the language server", () => {
  test("an edit in one kernel adds and removes findings in another; equal to a fresh analysis after every edit", async () => {
    const engine = new Engine(await Workspace.create());
    engine.scan([dir]);
    expect(indistinctIn(engine.analyze(true).findings, STRIKE_RS)).toBe(0); // one c_void handle type: nothing to confuse
    const texts = new Map<string, string>();
    for (const f of [NOISE_RS, STRIKE_RS, NOISE_H]) {
      texts.set(f, fs.readFileSync(f, "utf8"));
      engine.open(f, texts.get(f)!, 1);
    }
    engine.analyze();
    let version = 1;
    const edit = async (file: string, from: string, to: string) => {
      const c = replaceFirst(texts.get(file)!, from, to);
      engine.change(file, [{ range: c.range, text: to }], ++version);
      texts.set(file, c.after);
      const res = engine.analyze();
      const fresh = await Workspace.create();
      fresh.loadAll([dir]);
      for (const [f, tx] of texts) fresh.update(f, tx);
      expect(res.findings.map(key).sort(), `${from} → ${to}`).toEqual(fresh.check().map(key).sort());
      return res;
    };
    // the noise kernel's handle becomes *mut c_void: now both kernels have findings
    let r = await edit(NOISE_RS, "pub unsafe extern \"C\" fn ld_noise_reset(n: *mut LdNoise) {\n    if let Some(n) = unsafe { n.as_mut() } { n.floor = 0.0; }", "pub unsafe extern \"C\" fn ld_noise_reset(n: *mut core::ffi::c_void) {\n    if let Some(n) = unsafe { (n as *mut LdNoise).as_mut() } { n.floor = 0.0; }");
    expect(r.scope).not.toBe("full");
    expect(indistinctIn(r.findings, STRIKE_RS)).toBe(2);
    expect(indistinctIn(r.findings, NOISE_RS)).toBe(1);
    expect(r.affected === "all" || r.affected.has(STRIKE_RS)).toBe(true); // republished though not re-checked
    // lines inserted above the strike kernel's functions: its findings move with them
    r = await edit(STRIKE_RS, "pub struct Strike { n: u32 }", "// strike counter\n\npub struct Strike { n: u32 }");
    expect(indistinctIn(r.findings, STRIKE_RS)).toBe(2);
    // the header's name for the type changes (a header edit: another scope)
    r = await edit(NOISE_H, "typedef struct ld_noise ld_noise;\nvoid ld_noise_reset(ld_noise *n);", "typedef struct ld_noise_state ld_noise_state;\nvoid ld_noise_reset(ld_noise_state *n);");
    expect(r.findings.some((f) => f.rule === "handle-types-indistinct" && f.message.includes("ld_noise_state"))).toBe(true);
    // back to a typed handle: the strike kernel's findings go away too
    r = await edit(NOISE_RS, "ld_noise_reset(n: *mut core::ffi::c_void)", "ld_noise_reset(n: *mut LdNoise)");
    expect(indistinctIn(r.findings, STRIKE_RS)).toBe(0);
    engine.dispose();
  });
});
