// The rule registry and the runner. A family that throws becomes one internal finding; the
// other families' results stand.

import { systemMirrorsFamily } from "./system-mirrors.js";
import type { Model } from "../model/boundary.js";
import type { Finding, GatheredItem, RuleFamily, RuleMeta } from "./api.js";
import { symbolsFamily } from "./symbols.js";
import { signaturesFamily } from "./signatures.js";
import { cRepresentationFamily } from "./c-representation.js";
import { linkageFamily } from "./linkage.js";
import { layoutFamily } from "./layout.js";
import { buffersFamily } from "./buffers.js";
import { ownershipFamily } from "./ownership.js";

export const INTERNAL: RuleMeta = {
  id: "internal-error",
  severity: "error",
  summary: "ferrule itself failed while checking (a rule threw, or a file could not be read).",
  why: "The rest of the results stand, but the run is incomplete, so it fails (CI fails closed rather than passing with a check missing); please report the message.",
};
export const FILE_SKIPPED: RuleMeta = {
  id: "file-skipped",
  severity: "info",
  summary: "A file was not analysed (too large, unreadable, or outside the workspace).",
  why: "Findings that involve it are missing from this run.",
};

export const FILE_ENCODING: RuleMeta = {
  id: "file-encoding",
  severity: "info",
  summary: "A source file was not plain UTF-8 (UTF-16 with a byte order mark, or undecodable bytes) and was decoded as noted.",
  why: "Positions in a file with undecodable bytes may be off; compilers may read such a file differently.",
};

export const UNKNOWN_MACRO: RuleMeta = {
  id: "unknown-macro",
  severity: "info",
  summary: "A declaration uses a macro ferrule cannot expand where a type belongs (typically an export macro defined in another header).",
  why: "The affected type is not checked; list export/attribute macros in `strip_macros` so ferrule reads the declaration.",
};

export const SUPPRESSION_WITHOUT_REASON: RuleMeta = {
  id: "suppression-without-reason",
  severity: "warning",
  summary: "A `ferrule: accept <rule>` comment gives no reason after `because`, so it accepts nothing.",
  why: "Every silenced finding should carry a written justification next to it.",
};

export const FAMILIES: RuleFamily[] = [
  symbolsFamily, signaturesFamily, cRepresentationFamily, linkageFamily, layoutFamily, buffersFamily, ownershipFamily, systemMirrorsFamily,
];

/** Lets later rule families register themselves without editing this list by hand. */
export function registerFamily(f: RuleFamily): void {
  if (!FAMILIES.some((x) => x.name === f.name)) FAMILIES.push(f);
}

export function allRules(): RuleMeta[] {
  return [...FAMILIES.flatMap((f) => f.rules), INTERNAL, FILE_SKIPPED, FILE_ENCODING, UNKNOWN_MACRO, SUPPRESSION_WITHOUT_REASON];
}

function failed(what: string, e: unknown, file: string): Finding {
  // anything may be thrown (undefined, null, a string): never let the message itself throw
  const err = { message: e instanceof Error ? e.message : String(e) };
  const at = firstFrame(e);
  return {
    rule: INTERNAL.id,
    severity: "error",
    message: `${what} failed: ${err.message}${at ? ` (at ${at})` : ""} — its findings are missing from this run; the other families' results stand`,
    range: { file, line: 0, col: 0, endLine: 0, endCol: 0 },
    related: [],
  };
}

/** The first stack frame of a thrown error (`file:line:col`, bundle-relative), for the report. */
function firstFrame(e: unknown): string | undefined {
  if (!(e instanceof Error) || typeof e.stack !== "string") return undefined;
  const line = e.stack.split("\n").find((l) => /^\s+at /.test(l));
  const m = line?.match(/\(?([^()\s]+:\d+:\d+)\)?\s*$/);
  if (!m) return undefined;
  const parts = m[1]!.split(/[\\/]/);
  return parts.slice(-2).join("/");
}

/** A family's findings on one model; with `gathered`, its workspace checks only gather into it
 * (keyed by check id) and conclude later (concludeWorkspace). */
export function runFamily(f: RuleFamily, model: Model, gathered?: Map<string, GatheredItem[]>): Finding[] {
  const anyFile = () => model.files.keys().next().value ?? "";
  let out: Finding[];
  try {
    out = f.check(model);
  } catch (e) {
    return [failed(`rule family \`${f.name}\``, e, anyFile())];
  }
  for (const w of f.workspace ?? []) {
    try {
      const items = w.gather(model);
      if (gathered) {
        const arr = gathered.get(w.id);
        if (arr) arr.push(...items);
        else gathered.set(w.id, items);
      } else {
        out.push(...w.conclude(items));
      }
    } catch (e) {
      out.push(failed(`rule \`${w.id}\``, e, anyFile()));
    }
  }
  return out;
}

/** Findings of every family on one model. With `gathered` (a check in chunks), the workspace
 * checks gather into it instead of concluding; call concludeWorkspace once every chunk ran. */
export function runRules(model: Model, families: RuleFamily[] = FAMILIES, gathered?: Map<string, GatheredItem[]>): Finding[] {
  const out: Finding[] = [];
  for (const f of model.files.values()) {
    for (const n of f.notices) out.push({ rule: n.rule, severity: n.severity, message: n.message, range: n.range, related: [] });
  }
  for (const fam of families) out.push(...runFamily(fam, model, gathered));
  return out;
}

/** The findings of the workspace checks from what every chunk gathered. */
export function concludeWorkspace(gathered: ReadonlyMap<string, GatheredItem[]>, families: RuleFamily[] = FAMILIES): Finding[] {
  const out: Finding[] = [];
  for (const fam of families) {
    for (const w of fam.workspace ?? []) {
      try {
        out.push(...w.conclude(gathered.get(w.id) ?? []));
      } catch (e) {
        out.push(failed(`rule \`${w.id}\``, e, ""));
      }
    }
  }
  return out;
}

/** The rule ids of the workspace checks (rules/api.ts WorkspaceCheck). */
export function workspaceCheckIds(families: RuleFamily[] = FAMILIES): Set<string> {
  return new Set(families.flatMap((f) => (f.workspace ?? []).map((w) => w.id)));
}

export type { Finding, GatheredItem, RuleFamily, RuleMeta };
