// Scale-related CLI behaviour: the settings reach the files read on worker threads too.
// `ferrule check` reads files on worker threads from 200 files (FERRULE_WORKERS forces a count);
// the facts must be the same as with one thread, settings included.
import { describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { spawnSync } from "node:child_process";

const ROOT = path.resolve(__dirname, "..");
const BIN = path.join(ROOT, "bin/ferrule.js");

function check(dir: string, workers: number): { rule: string; file: string; line: number }[] {
  const r = spawnSync(process.execPath, [BIN, "check", "--format", "json", dir], {
    encoding: "utf8", timeout: 60_000, env: { ...process.env, FERRULE_WORKERS: String(workers) },
  });
  expect([0, 1]).toContain(r.status);
  return (JSON.parse(r.stdout).findings as { rule: string; file: string; line: number }[]).map((f) => ({ rule: f.rule, file: path.basename(f.file), line: f.line }));
}

describe("settings on worker threads", () => {
  test("strip_macros applies whether files are read in this thread or on workers", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-scale-"));
    try {
      // an export macro defined in a header outside the workspace: only the setting tells ferrule
      // to blank it (a workspace header's macros are read through the preprocessor; see below)
      fs.writeFileSync(path.join(dir, "api.h"), '#include <radio/export.h>\nRADIO_API int radio_tune(double hz);\n');
      fs.writeFileSync(path.join(dir, "export.h"), '#define RADIO_API __attribute__((visibility("default")))\n');
      fs.writeFileSync(path.join(dir, "radio.rs"), '#[no_mangle]\npub extern "C" fn radio_tune(hz: f64) -> i32 { 0 }\n');
      for (const w of [0, 2]) expect(check(dir, w)).toEqual([{ rule: "unknown-macro", file: "api.h", line: 2 }]);
      fs.writeFileSync(path.join(dir, ".ferrule.toml"), 'strip_macros = ["RADIO_API"]\n');
      // the Rust side returns i32, the C side int: clean once the macro is blanked
      for (const w of [0, 2]) expect(check(dir, w)).toEqual([]);
      // the macro defined in a workspace header the file includes: read on workers too
      fs.rmSync(path.join(dir, ".ferrule.toml"));
      fs.writeFileSync(path.join(dir, "api.h"), '#include "export.h"\nRADIO_API int radio_tune(double hz);\n');
      for (const w of [0, 2]) expect(check(dir, w)).toEqual([]);
      fs.writeFileSync(path.join(dir, "radio.rs"), '#[no_mangle]\npub extern "C" fn radio_tune(hz: f32) -> i32 { 0 }\n');
      for (const w of [0, 2]) expect(check(dir, w).map((f) => `${f.rule} ${f.file}:${f.line}`)).toEqual(["param-type-mismatch api.h:2"]);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});
