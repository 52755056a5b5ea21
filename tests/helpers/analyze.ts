// Test helper: analyse in-memory files (no disk) and return findings.
import { Workspace } from "../../server/src/analysis/workspace.js";
import { DEFAULTS, type FerruleConfig } from "../../server/src/analysis/config.js";
import type { Finding } from "../../server/src/rules/api.js";
import type { Triple } from "../../server/src/model/targets.js";

export async function analyze(files: Record<string, string>, cfg: Partial<FerruleConfig> & { targets?: Triple[] } = {}): Promise<{ ws: Workspace; findings: Finding[] }> {
  const ws = await Workspace.create({ ...DEFAULTS, ...cfg });
  for (const [name, text] of Object.entries(files)) ws.update(name.startsWith("/") ? name : `/ws/${name}`, text);
  return { ws, findings: ws.check() };
}

/** Findings of one rule, as "file:line" (1-based) strings for compact assertions. */
export function at(findings: Finding[], rule: string): string[] {
  return findings.filter((f) => f.rule === rule).map((f) => `${f.range.file.replace(/^\/ws\//, "")}:${f.range.line + 1}`);
}

import * as path from "node:path";

export const FIXTURES = path.resolve(__dirname, "../../test-fixtures");

/** Loads a fixture folder from disk and checks it; findings as "file:line rule" relative to the folder. */
export async function checkDir(rel: string, cfg: Partial<FerruleConfig> = {}): Promise<{ ws: Workspace; findings: Finding[]; lines: string[] }> {
  const dir = path.join(FIXTURES, rel);
  const ws = await Workspace.create({ ...DEFAULTS, ...cfg });
  ws.loadAll([dir]);
  const findings = ws.check();
  const lines = findings.map((f) => `${path.relative(dir, f.range.file)}:${f.range.line + 1} ${f.rule}`);
  return { ws, findings, lines };
}
