// Inline suppressions of our own design. A comment on the finding's line, or on the line above:
//
//     // ferrule: accept param-signedness because lengths never exceed 2^31 on this block
//     /* ferrule: accept rule-a, rule-b because reason */
//
// The reason after `because` is required; a suppression without one suppresses nothing and is
// itself reported, so every silenced finding has a written justification next to it.

import type { Model } from "../model/boundary.js";
import type { Finding } from "../rules/api.js";
import type { Suppression } from "../model/types.js";

export type { Suppression };

import { SUPPRESSION_WITHOUT_REASON } from "../rules/index.js";

export const SUPPRESSION_RULE = SUPPRESSION_WITHOUT_REASON.id;

export function applySuppressions(findings: Finding[], model: Model): Finding[] {
  const out: Finding[] = [];
  const extraFindings: Finding[] = [];
  const byFile = new Map<string, Suppression[]>();
  for (const f of model.files.values()) {
    const s = (f.extra.suppressions as Suppression[] | undefined) ?? [];
    if (!s.length) continue;
    byFile.set(f.file, s);
    for (const x of s) {
      if (!x.reason) {
        extraFindings.push({
          rule: SUPPRESSION_RULE, severity: "warning", range: x.range, related: [],
          message: `this \`ferrule: accept\` comment gives no reason, so it accepts nothing: write \`ferrule: accept ${x.rules.join(", ") || "rule-id"} because <why this is safe>\``,
        });
      }
    }
  }
  out.push(...unsuppressed(findings, byFile));
  return [...out, ...extraFindings];
}

/** Each file's suppressions, for the files of this model that have any. */
export function suppressionsOf(model: Model): Map<string, Suppression[]> {
  const byFile = new Map<string, Suppression[]>();
  for (const f of model.files.values()) {
    const s = (f.extra.suppressions as Suppression[] | undefined) ?? [];
    if (s.length) byFile.set(f.file, s);
  }
  return byFile;
}

/** Where the findings a suppression silenced go while a `check` records them (SARIF reports them
 * as suppressed, with the comment's reason); unset, they are simply dropped. */
export const suppressedSink: { record?: (f: Finding, reason: string) => void } = {};

/** The findings no suppression (with a reason) covers. */
export function unsuppressed(findings: Finding[], byFile: ReadonlyMap<string, Suppression[]>): Finding[] {
  return findings.filter((f) => {
    const sups = byFile.get(f.range.file);
    const hit = sups?.find((s) => s.reason && (s.rules.includes(f.rule) || s.rules.includes("all")) && (s.endLine === f.range.line || s.endLine === f.range.line - 1 || s.line === f.range.line));
    if (hit) suppressedSink.record?.(f, hit.reason);
    return !hit;
  });
}
