// Baselines: a file of existing findings, so a team can adopt ferrule and fail only on new ones.
// Entries are keyed by rule + file + message (no line numbers, which move with unrelated edits),
// with a count for repeated identical findings. The format is our own, versioned JSON.

import { readSmallRegularFile } from "../analysis/textio.js";
import type { JsonFinding } from "./format.js";

export interface BaselineFile {
  ferruleBaseline: 1;
  entries: { rule: string; file: string; message: string; count: number }[];
}

const key = (f: { rule: string; file: string; message: string }) => `${f.rule}\u0000${f.file}\u0000${f.message}`;

export function makeBaseline(findings: JsonFinding[]): BaselineFile {
  const counts = new Map<string, { rule: string; file: string; message: string; count: number }>();
  for (const f of findings) {
    const k = key(f);
    const e = counts.get(k);
    if (e) e.count++;
    else counts.set(k, { rule: f.rule, file: f.file, message: f.message, count: 1 });
  }
  return { ferruleBaseline: 1, entries: [...counts.values()].sort((a, b) => a.file.localeCompare(b.file) || a.rule.localeCompare(b.rule)) };
}

export function readBaseline(file: string): BaselineFile {
  const obj = JSON.parse(readSmallRegularFile(file)) as BaselineFile;
  if (obj?.ferruleBaseline !== 1 || !Array.isArray(obj.entries)) throw new Error("not a ferrule baseline (expected {\"ferruleBaseline\":1,\"entries\":[…]})");
  return obj;
}

/** Findings not covered by the baseline (each baseline entry absorbs up to `count` findings). */
export function newSince(findings: JsonFinding[], base: BaselineFile): JsonFinding[] {
  const left = new Map(base.entries.map((e) => [key(e), e.count]));
  return findings.filter((f) => {
    const k = key(f);
    const n = left.get(k) ?? 0;
    if (n > 0) {
      left.set(k, n - 1);
      return false;
    }
    return true;
  });
}
