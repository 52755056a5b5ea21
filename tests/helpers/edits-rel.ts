// Test helper for suites that key in-memory files by workspace-relative path (tests/helpers/
// analyze.ts puts them under /ws/): applies fix edits through applyEdits (edits.ts).
import type { TextEdit } from "../../server/src/fixes/index.js";
import { applyEdits } from "./edits.js";

export function applyEditsRel(files: Record<string, string>, edits: TextEdit[]): Record<string, string> {
  const abs: Record<string, string> = {};
  for (const [k, v] of Object.entries(files)) abs[k.startsWith("/") ? k : `/ws/${k}`] = v;
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(applyEdits(abs, edits))) out[k.replace(/^\/ws\//, "")] = v;
  return out;
}
