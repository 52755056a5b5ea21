// What a rule family is and what it returns. Rules are pure functions: Model → Finding[].
// They never read files, print, or speak the protocol.

import type { Model } from "../model/boundary.js";
import type { Range, Severity } from "../model/types.js";
import { shortTriple, type Triple } from "../model/targets.js";

export interface Related {
  range: Range;
  message: string;
}

export interface Finding {
  rule: string;
  severity: Severity;
  message: string;
  range: Range;
  related: Related[];
  /** Structured data the fixes layer turns into edits (rule-specific). */
  data?: Record<string, unknown>;
  /** Targets this finding applies to, when it does not apply to all configured targets. */
  targets?: Triple[];
}

export interface RuleMeta {
  id: string;
  severity: Severity;
  /** One line: what the rule reports. */
  summary: string;
  /** Why it matters, for SARIF help text and the README. */
  why: string;
}

export interface RuleFamily {
  name: string;
  rules: RuleMeta[];
  check(model: Model): Finding[];
  /** Checks whose findings depend on the whole workspace, not only on related files (see
   * WorkspaceCheck). */
  workspace?: WorkspaceCheck[];
}

/**
 * A check that compares items across the whole workspace, so that a finding in one file depends
 * on files no name or include links to it (e.g. "two handle types both reach Rust as
 * `*mut c_void`"). It runs in two steps, so that a check in chunks (analysis/chunks.ts) can
 * gather from every chunk before concluding: `gather` returns plain data about one model's items
 * (each item about related files only), `conclude` turns everything gathered into findings. For
 * one model of everything, the result is `conclude(gather(model))`.
 */
export interface WorkspaceCheck {
  /** The rule id of its findings. */
  id: string;
  gather(model: Model): GatheredItem[];
  conclude(items: GatheredItem[]): Finding[];
}

/** What a workspace check gathers about one item: plain data, anchored at the place its finding
 * would be (the language server keeps items by that file, and moves them with edits). */
export interface GatheredItem {
  range: Range;
}

/** "" when a difference holds on every checked target, else " (on armv7, i686 only)". */
export function targetPhrase(targets: Triple[], all: Triple[]): string {
  if (targets.length === all.length) return "";
  return ` (on ${targets.map(shortTriple).join(", ")} only)`;
}

export function finding(meta: RuleMeta, range: Range, message: string, related: Related[] = [], extra: Partial<Finding> = {}): Finding {
  return { rule: meta.id, severity: meta.severity, message, range, related, ...extra };
}
