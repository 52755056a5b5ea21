// The last step of every check, whole or partial: severity overrides from the configuration,
// inline suppressions, de-duplication and a stable order.

import type { Model } from "../model/boundary.js";
import type { Finding } from "../rules/index.js";
import type { FerruleConfig } from "./config.js";
import { applySuppressions, unsuppressed, type Suppression } from "./suppress.js";
import { concludeWorkspace, type GatheredItem } from "../rules/index.js";

export function finishFindings(raw: Finding[], model: Model, config: Pick<FerruleConfig, "severity">): Finding[] {
  return sortFindings(dedupe(applySuppressions(withSeverity(raw, config), model)));
}

/** Severity overrides; "off" drops the finding. */
export function withSeverity(raw: Finding[], config: Pick<FerruleConfig, "severity">): Finding[] {
  return raw.flatMap((f) => {
    const s = config.severity[f.rule];
    if (s === "off") return [];
    return s ? [{ ...f, severity: s }] : [f];
  });
}

export function dedupe(fs_: Finding[]): Finding[] {
  const seen = new Set<string>();
  return fs_.filter((f) => {
    // an internal error once per run: a check in chunks runs each family once per chunk
    const k = f.rule === "internal-error" && f.range.line === 0 && f.range.col === 0 ? `${f.rule}|${f.message}` : `${f.rule}|${f.range.file}|${f.range.line}|${f.range.col}|${f.message}`;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}

export function sortFindings(out: Finding[]): Finding[] {
  return out.sort((a, b) => a.range.file.localeCompare(b.range.file) || a.range.line - b.range.line || a.range.col - b.range.col || a.rule.localeCompare(b.rule) || a.message.localeCompare(b.message));
}

/** The workspace checks' findings (rules/api.ts WorkspaceCheck) from everything gathered, with
 * severity overrides and the suppressions of the files they land in (`suppressionsIn`). Used by
 * the CLI's chunked check and the language server, which no longer hold those files' model. */
export function concludeFinished(gathered: ReadonlyMap<string, GatheredItem[]>, config: Pick<FerruleConfig, "severity">, suppressionsIn: (file: string) => Suppression[] | undefined): Finding[] {
  const raw = withSeverity(concludeWorkspace(gathered), config);
  const byFile = new Map<string, Suppression[]>();
  for (const f of raw) {
    const s = suppressionsIn(f.range.file);
    if (s?.length) byFile.set(f.range.file, s);
  }
  return unsuppressed(raw, byFile);
}
