// A real editor: Neovim from Debian (0.7) runs headless with tests/lsp/nvim/init.lua, starts
// `npx ferrule lsp --stdio` through its built-in LSP client, opens the demo header, waits for
// diagnostics and writes them (and a hover) to a file that this test reads.

import { describe, expect, test } from "vitest";
import { spawn, spawnSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { fileURLToPath } from "node:url";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const haveNvim = spawnSync("nvim", ["--version"]).status === 0;

function runNvim(env: Record<string, string>, timeoutMs = 150_000): Promise<{ code: number | null; out: string; stderr: string }> {
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-nvim-"));
  const out = path.join(tmp, "out.txt");
  const xdg = { XDG_CONFIG_HOME: path.join(tmp, "config"), XDG_DATA_HOME: path.join(tmp, "data"), XDG_STATE_HOME: path.join(tmp, "state"), XDG_CACHE_HOME: path.join(tmp, "cache") };
  return new Promise((resolve) => {
    const p = spawn("nvim", ["--headless", "--clean", "-n", "-i", "NONE", "-u", path.join(ROOT, "tests/lsp/nvim/init.lua")], {
      cwd: tmp, env: { ...process.env, ...xdg, ...env, FERRULE_ROOT: ROOT, FERRULE_OUT: out }, stdio: ["ignore", "pipe", "pipe"], detached: true,
    });
    let stderr = "";
    p.stderr.on("data", (d) => (stderr += d));
    p.stdout.on("data", () => {});
    const timer = setTimeout(() => { try { process.kill(-p.pid!, "SIGKILL"); } catch { /* gone */ } }, timeoutMs);
    p.on("exit", (code) => {
      clearTimeout(timer);
      try { process.kill(-p.pid!, "SIGKILL"); } catch { /* the server and npx are gone too */ }
      const text = fs.existsSync(out) ? fs.readFileSync(out, "utf8") : "";
      fs.rmSync(tmp, { recursive: true, force: true });
      resolve({ code, out: text, stderr });
    });
  });
}

describe.skipIf(!haveNvim)("Neovim 0.7 built-in LSP client", () => {
  test("shows ferrule's diagnostics on the demo header, and the layout hover", async () => {
    const ws = path.join(ROOT, "test-fixtures/sonar-demo");
    const header = path.join(ws, "include/sonar_kernels.h");
    const lines = fs.readFileSync(header, "utf8").split("\n");
    const hoverLine = lines.findIndex((l) => l.includes("} sonar_detection;"));
    const r = await runNvim({ FERRULE_WS: ws, FERRULE_FILE: header, FERRULE_HOVER_LINE: String(hoverLine), FERRULE_HOVER_COL: "4" });
    expect(r.out, r.stderr).not.toContain("error:");
    const diags = r.out.split("\n").filter((l) => l.startsWith("diag\t")).map((l) => {
      const [, lnum, col, sev, code, msg] = l.split("\t");
      return { lnum: Number(lnum), col: Number(col), sev: Number(sev), code, msg };
    });
    // planted slip #1 of the demo README: `double *output` in the header vs `*mut f32` in Rust
    const proc = lines.findIndex((l) => l.startsWith("int sonar_fir_process("));
    const d = diags.find((x) => x.code === "param-type-mismatch" && x.lnum === proc);
    expect(d, r.out).toBeDefined();
    expect(d!.sev).toBe(1); // vim.diagnostic.severity.ERROR
    expect(d!.col).toBe(lines[proc]!.indexOf("double *output"));
    expect(d!.msg).toContain("sonar_fir_process");
    // slip #3: the const pointee on sonar_fft_mag
    expect(diags.some((x) => x.code === "pointer-constness" && x.lnum === lines.findIndex((l) => l.includes("sonar_fft_mag(")))).toBe(true);
    // hover: the layout table, with the i386 psABI's 4-byte alignment of double members (20 bytes)
    const hover = r.out.split("\n").filter((l) => l.startsWith("hover\t")).map((l) => l.slice(6));
    expect(hover.some((l) => l.startsWith("| size / align") && l.includes("20 / 4") && l.includes("24 / 8")), hover.join("\n")).toBe(true);
  });
});
