// The VS Code package: builds the .vsix with @vscode/vsce from the current dist/ (npm test builds
// dist/ first) and checks what is inside — the server and client bundles, the grammar .wasm files,
// nothing from the tests or fixtures, under 10 MB — and that the server runs from the unpacked
// extension folder alone (no node_modules next to it), which is how VS Code runs it.

import { beforeAll, describe, expect, test } from "vitest";
import { spawnSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { fileURLToPath } from "node:url";
import { listZip, unzipTo, type ZipEntry } from "./helpers/zip.js";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const TMP = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-vsix-"));
const VSIX = path.join(TMP, "ferrule.vsix");
let entries: ZipEntry[] = [];

beforeAll(async () => {
  if (!fs.existsSync(path.join(ROOT, "dist/client.js"))) spawnSync("node", ["scripts/build.mjs"], { cwd: ROOT, stdio: "inherit" });
  const r = spawnSync("npx", ["vsce", "package", "--no-dependencies", "--allow-missing-repository", "--skip-license", "--no-rewrite-relative-links", "--allow-unused-files-pattern", "-o", VSIX], { cwd: ROOT, encoding: "utf8", timeout: 240_000 });
  if (r.status !== 0) throw new Error(`vsce package failed:\n${r.stdout}\n${r.stderr}`);
  entries = await listZip(VSIX);
}, 300_000);

describe("ferrule.vsix", () => {
  test("holds the server and client bundles and the three grammars plus the runtime", () => {
    const names = entries.map((e) => e.name);
    for (const f of ["extension/package.json", "extension/dist/cli.js", "extension/dist/client.js", "extension/dist/wasm/tree-sitter.wasm", "extension/dist/wasm/tree-sitter-rust.wasm", "extension/dist/wasm/tree-sitter-c.wasm", "extension/dist/wasm/tree-sitter-cpp.wasm"]) {
      expect(names, f).toContain(f);
    }
    const manifest = JSON.parse(fs.readFileSync(path.join(ROOT, "package.json"), "utf8"));
    expect(names).toContain("extension/" + manifest.main.replace(/^\.\//, ""));
  });

  test("holds no tests, fixtures, sources, source maps or node_modules", () => {
    const bad = entries.map((e) => e.name).filter((n) => /(^|\/)(tests?|test-fixtures|node_modules|server\/src|client\/src|scripts)\//.test(n) || n.endsWith(".map") || n.endsWith(".ts"));
    expect(bad).toEqual([]);
  });

  test("is under 10 MB", () => {
    expect(fs.statSync(VSIX).size).toBeLessThan(10 * 1024 * 1024);
  });

  test("declares our commands and settings", async () => {
    const dir = path.join(TMP, "manifest");
    await unzipTo(VSIX, dir, "extension/");
    const m = JSON.parse(fs.readFileSync(path.join(dir, "package.json"), "utf8"));
    expect(m.contributes.commands.map((c: { command: string }) => c.command)).toEqual(expect.arrayContaining(["ferrule.recheck", "ferrule.showLayout"]));
    expect(Object.keys(m.contributes.configuration.properties)).toEqual(expect.arrayContaining(["ferrule.targets", "ferrule.includePaths", "ferrule.exclude", "ferrule.rules", "ferrule.ports"]));
    expect(m.activationEvents).toEqual(expect.arrayContaining(["onLanguage:rust", "onLanguage:c", "onLanguage:cpp"]));
  });

  test("the bundled server runs from the unpacked extension folder alone (grammars loaded from it)", async () => {
    const dir = path.join(TMP, "unpacked");
    await unzipTo(VSIX, dir, "extension/");
    expect(fs.existsSync(path.join(dir, "node_modules"))).toBe(false);
    const r = spawnSync("node", [path.join(dir, "dist/cli.js"), "check", "--format", "json", path.join(ROOT, "test-fixtures/sonar-demo")], { cwd: TMP, encoding: "utf8", timeout: 60_000 });
    expect(r.stderr).toBe("");
    const j = JSON.parse(r.stdout);
    // the demo's planted slip #1 (test-fixtures/sonar-demo/README.md)
    expect(j.findings.some((f: { rule: string; file: string }) => f.rule === "param-type-mismatch" && f.file.endsWith("sonar_kernels.h"))).toBe(true);
  });
});
