// Shared by the false-positive probes (tests/clean*.test.ts): a probe workspace must give no
// finding, in-process and through the shipped CLI, and its native build must run clean under
// Valgrind memcheck.
import { expect } from "vitest";
import { spawnSync } from "node:child_process";
import * as path from "node:path";
import { checkDir, FIXTURES } from "./analyze.js";

export const ROOT = path.resolve(__dirname, "..", "..");

export const have = (cmd: string): boolean => spawnSync("sh", ["-c", `command -v ${cmd}`]).status === 0;

/** `test-fixtures/clean/<name>` gives no finding: in-process, and `ferrule check` exits 0 with the
 * aid-not-proof line. */
export async function expectNoFindings(name: string): Promise<void> {
  const { lines } = await checkDir(`clean/${name}`);
  expect(lines).toEqual([]);
  const dir = path.join(FIXTURES, "clean", name);
  const r = spawnSync(process.execPath, [path.join(ROOT, "bin", "ferrule.js"), "check", path.relative(ROOT, dir)], { cwd: ROOT, encoding: "utf8" });
  expect(r.status).toBe(0);
  expect(r.stdout).toMatch(/no findings/i);
  expect(r.stdout).toMatch(/not a proof of memory safety/);
}

/** Runs a native build under Valgrind memcheck (every load and store checked, leaks reported:
 * definite and indirect leaks count as errors). */
export function memcheck(exe: string): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync("valgrind", ["--tool=memcheck", "--error-exitcode=97", "--leak-check=full", "--errors-for-leak-kinds=definite,indirect", "-q", exe], { encoding: "utf8", timeout: 60_000 });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr + (r.signal ? `\nsignal ${r.signal}` : "") };
}
