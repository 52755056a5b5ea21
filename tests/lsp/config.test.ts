// Configuration through the language server: `.ferrule.toml` (shared with the CLI) and editor
// settings; bad TOML or a bad key gives a message naming the file and key and ferrule keeps
// working; inline suppressions with a required reason.

import { afterEach, describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { ROOT, messages, startClient, type Client } from "./client.js";

let c: Client | undefined;
let dir: string | undefined;

function demoCopy(toml?: string): string {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-lspcfg-"));
  fs.cpSync(path.join(ROOT, "test-fixtures/sonar-demo"), dir, { recursive: true });
  if (toml !== undefined) fs.writeFileSync(path.join(dir, ".ferrule.toml"), toml);
  return dir;
}

afterEach(async () => {
  await c?.close();
  c = undefined;
  if (dir) fs.rmSync(dir, { recursive: true, force: true });
});

const header = (d: string) => path.join(d, "include/sonar_kernels.h");
const lineOf = (file: string, needle: string) => fs.readFileSync(file, "utf8").split("\n").findIndex((l) => l.includes(needle));

async function openHeader(d: string, settings?: Record<string, unknown>): Promise<Client> {
  c = await startClient(d, { settings });
  await c.open(header(d));
  await c.waitFor(() => messages(c!, header(d)).length > 0, 60_000, "diagnostics");
  return c;
}

describe("configuration in the editor", () => {
  test("invalid TOML: a message names the file, and ferrule keeps working with the defaults", async () => {
    const d = demoCopy("targets = [\"x86_64-unknown-linux-gnu\"\n");
    const cl = await openHeader(d);
    await cl.waitFor(() => cl.stderr.join("").includes("showMessage"), 10_000, "a message");
    expect(cl.stderr.join("")).toMatch(/\.ferrule\.toml: not valid TOML/);
    // defaults: all targets, so the 32-bit `long` slip (demo README #2) is still found
    expect(messages(cl, header(d)).some((x) => x.code === "param-type-mismatch" && x.range.start.line === lineOf(header(d), "sonar_beam_power("))).toBe(true);
  });

  test("a bad key is named and skipped; the other keys of the file still apply", async () => {
    const d = demoCopy(`targets = ["pdp11-unknown-none"]\n[rules]\npointer-constness = "hint"\n`);
    const cl = await openHeader(d);
    await cl.waitFor(() => cl.stderr.join("").includes("showMessage"), 10_000, "a message");
    expect(cl.stderr.join("")).toContain(".ferrule.toml: key `targets`");
    const pc = messages(cl, header(d)).find((x) => x.code === "pointer-constness");
    expect(pc?.severity).toBe(4); // DiagnosticSeverity.Hint
  });

  test(".ferrule.toml targets: a 64-bit-Linux-only project does not see the 32-bit `long` slip", async () => {
    const d = demoCopy(`targets = ["x86_64-unknown-linux-gnu"]\n[rules]\nparam-type-mismatch = "warning"\n`);
    const cl = await openHeader(d);
    const ds = messages(cl, header(d));
    // long is 8 bytes on x86-64 Linux (LP64, psABI), like i64: no mismatch there
    expect(ds.some((x) => x.range.start.line === lineOf(header(d), "sonar_beam_power(") && x.code === "param-type-mismatch")).toBe(false);
    const pm = ds.find((x) => x.code === "param-type-mismatch" && x.range.start.line === lineOf(header(d), "int sonar_fir_process("));
    expect(pm?.severity).toBe(2); // warning, from [rules]
  });

  test("editor settings (ferrule.rules) turn a rule off", async () => {
    const d = demoCopy();
    const cl = await openHeader(d, { rules: { "pointer-constness": "off" } });
    expect(messages(cl, header(d)).some((x) => x.code === "param-type-mismatch")).toBe(true);
    expect(messages(cl, header(d)).some((x) => x.code === "pointer-constness")).toBe(false);
  });

  test("inline suppression needs a reason", async () => {
    const d = demoCopy();
    const h = header(d);
    const lines = fs.readFileSync(h, "utf8").split("\n");
    const i = lines.findIndex((l) => l.startsWith("int sonar_fir_process("));
    const j = lines.findIndex((l) => l.startsWith("void sonar_fft_mag("));
    lines.splice(j, 0, "/* ferrule: accept pointer-constness */");
    lines.splice(i, 0, "/* ferrule: accept param-type-mismatch because output is converted by a wrapper in this block */");
    fs.writeFileSync(h, lines.join("\n"));
    const cl = await openHeader(d);
    const ds = messages(cl, h);
    expect(ds.some((x) => x.code === "param-type-mismatch" && x.range.start.line === i + 1)).toBe(false);
    // without a reason it suppresses nothing and is itself reported
    expect(ds.some((x) => x.code === "pointer-constness")).toBe(true);
    expect(ds.some((x) => x.code === "suppression-without-reason")).toBe(true);
  });
});
