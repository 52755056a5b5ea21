// Output formats of `ferrule check`: text, JSON (version 1, fixed interface) and SARIF 2.1.0.

import * as path from "node:path";
import { createHash } from "node:crypto";
import type { Finding, RuleMeta } from "../rules/api.js";

export interface JsonFinding {
  rule: string;
  severity: Finding["severity"];
  file: string;
  line: number;
  column: number;
  endLine: number;
  endColumn: number;
  message: string;
  related: { file: string; line: number; column: number; message: string }[];
  targets?: string[];
  fixes?: { title: string; edits: { file: string; line: number; column: number; endLine: number; endColumn: number; newText: string }[] }[];
}

export const CLEAN_NOTE = "ferrule is an aid, not a proof of memory safety: a clean run means these checks found nothing, not that the seam is safe.";

export function rel(cwd: string, file: string): string {
  const r = path.relative(cwd, file);
  return r.startsWith("..") || path.isAbsolute(r) ? file : r.split(path.sep).join("/");
}

export function toJsonFinding(f: Finding, cwd: string): JsonFinding {
  const j: JsonFinding = {
    rule: f.rule,
    severity: f.severity,
    file: rel(cwd, f.range.file),
    line: f.range.line + 1,
    column: f.range.col + 1,
    endLine: f.range.endLine + 1,
    endColumn: f.range.endCol + 1,
    message: f.message,
    related: f.related.map((r) => ({ file: rel(cwd, r.range.file), line: r.range.line + 1, column: r.range.col + 1, message: r.message })),
  };
  if (f.targets) j.targets = f.targets;
  return j;
}

export function formatJson(findings: JsonFinding[]): string {
  return JSON.stringify({ version: 1, findings }, null, 2) + "\n";
}

export function formatText(findings: JsonFinding[], color: boolean): string {
  const c = (code: string, s: string) => (color ? `\x1b[${code}m${s}\x1b[0m` : s);
  const sevColor: Record<string, string> = { error: "31", warning: "33", note: "36" };
  // info and hint print as gcc's `note` so that editors' and CI's problem matchers pick them up
  const label = (s: string) => (s === "info" || s === "hint" ? "note" : s);
  const lines: string[] = [];
  for (const f of findings) {
    lines.push(`${f.file}:${f.line}:${f.column}: ${c(sevColor[label(f.severity)] ?? "0", label(f.severity))}: ${f.message} [${f.rule}]`);
    for (const r of f.related) lines.push(`    ${r.file}:${r.line}:${r.column}: ${r.message}`);
    for (const fx of f.fixes ?? []) {
      lines.push(`    fix: ${fx.title}`);
      for (const e of fx.edits) {
        const shown = e.newText.length > 200 ? e.newText.slice(0, 200) + "…" : e.newText;
        lines.push(`      ${e.file}:${e.line}:${e.column}-${e.endLine}:${e.endColumn} → ${JSON.stringify(shown)}`);
      }
    }
  }
  const counts = { error: 0, warning: 0, info: 0, hint: 0 };
  for (const f of findings) counts[f.severity]++;
  if (findings.length === 0) lines.push(`no findings. ${CLEAN_NOTE}`);
  else {
    lines.push(`${findings.length} finding(s): ${counts.error} error(s), ${counts.warning} warning(s), ${counts.info + counts.hint} note(s)`);
    // notes only: as clean as a run gets, so it says what clean means
    if (counts.error + counts.warning === 0) lines.push(`no errors or warnings. ${CLEAN_NOTE}`);
  }
  return lines.join("\n") + "\n";
}

const SARIF_LEVEL: Record<string, string> = { error: "error", warning: "warning", info: "note", hint: "note" };

/** What a SARIF log says about the run beside the findings. */
export interface SarifRun {
  version: string;
  /** file:// URI of the folder the relative paths start from (%SRCROOT%). */
  rootUri: string;
  /** where the rule pages live (package.json `homepage`). */
  homepage: string;
  exitCode: number;
  /** the text of a finding's line, for fingerprints (undefined: file not readable). */
  lineText: (file: string, line: number) => string | undefined;
  /** findings an inline `ferrule: accept` comment silenced, with its reason. */
  suppressed?: { finding: JsonFinding; reason: string }[];
}

/** A fingerprint that survives inserted lines: rule, file, the trimmed text of the finding's line
 * and the message with line numbers taken out — never the line number itself. */
export function fingerprint(f: JsonFinding, lineText: string | undefined): string {
  const msg = f.message.replace(/:\d+(:\d+)?\b/g, "").replace(/\blines? \d+(\s*[-–]\s*\d+)?/g, "line");
  return createHash("sha256").update([f.rule, f.file, (lineText ?? "").trim(), msg].join("\0")).digest("hex").slice(0, 32);
}

export function formatSarif(findings: JsonFinding[], rules: RuleMeta[], runInfo: SarifRun): string {
  const { version, rootUri } = runInfo;
  const home = runInfo.homepage.replace(/\/$/, "");
  const seen = new Map<string, number>();
  const fp = (f: JsonFinding) => {
    const h = fingerprint(f, runInfo.lineText(f.file, f.line));
    const n = seen.get(h) ?? 0;
    seen.set(h, n + 1);
    // two findings alike in every way but place: numbered in file order (stable while their order is)
    return n ? `${h}:${n}` : h;
  };
  const notices = findings.filter((f) => f.rule === "internal-error" || (f.rule === "file-skipped" && f.message.startsWith("skipped:")));
  const ruleIndex = new Map(rules.map((r, i) => [r.id, i]));
  const loc = (file: string, line: number, column: number, endLine?: number, endColumn?: number) => ({
    physicalLocation: {
      artifactLocation: { uri: file.split(path.sep).join("/"), uriBaseId: "%SRCROOT%" },
      region: { startLine: line, startColumn: column, ...(endLine ? { endLine, endColumn } : {}) },
    },
  });
  const log = {
    $schema: "https://json.schemastore.org/sarif-2.1.0.json",
    version: "2.1.0",
    runs: [
      {
        tool: {
          driver: {
            name: "ferrule",
            version,
            informationUri: home,
            rules: rules.map((r) => ({
              id: r.id,
              name: r.id.replace(/(^|-)(\w)/g, (_m, _d, ch: string) => ch.toUpperCase()),
              shortDescription: { text: r.summary },
              fullDescription: { text: r.why },
              help: { text: `${r.summary} ${r.why}`, markdown: `**${r.summary}**\n\n${r.why}\n\nSee [the rule's page](${home}/blob/main/docs/rules/${r.id}.md).` },
              helpUri: `${home}/blob/main/docs/rules/${r.id}.md`,
              defaultConfiguration: { level: SARIF_LEVEL[r.severity] },
            })),
          },
        },
        originalUriBaseIds: { "%SRCROOT%": { uri: rootUri.endsWith("/") ? rootUri : rootUri + "/" } },
        invocations: [
          {
            executionSuccessful: runInfo.exitCode !== 2 && !notices.some((f) => f.rule === "internal-error"),
            exitCode: runInfo.exitCode,
            toolExecutionNotifications: notices.map((f) => ({
              level: f.rule === "internal-error" ? "error" : "warning",
              message: { text: f.message },
              descriptor: { id: f.rule },
              locations: [loc(f.file, f.line, f.column)],
            })),
          },
        ],
        results: [...findings.map((f) => ({ f, reason: undefined as string | undefined })), ...(runInfo.suppressed ?? []).map((s) => ({ f: s.finding, reason: s.reason as string | undefined }))].map(({ f, reason }) => {
          const res: Record<string, unknown> = {
            ruleId: f.rule,
            level: SARIF_LEVEL[f.severity],
            message: { text: f.message },
            locations: [loc(f.file, f.line, f.column, f.endLine, f.endColumn)],
            partialFingerprints: { "ferruleFinding/v1": fp(f) },
          };
          if (reason !== undefined) res.suppressions = [{ kind: "inSource", justification: reason }];
          const idx = ruleIndex.get(f.rule);
          if (idx !== undefined) res.ruleIndex = idx;
          if (f.related.length) {
            res.relatedLocations = f.related.map((r, i) => ({ id: i + 1, ...loc(r.file, r.line, r.column), message: { text: r.message } }));
          }
          if (f.fixes?.length) {
            res.fixes = f.fixes.map((fx) => ({
              description: { text: fx.title },
              artifactChanges: fx.edits.map((e) => ({
                artifactLocation: { uri: e.file, uriBaseId: "%SRCROOT%" },
                replacements: [{ deletedRegion: { startLine: e.line, startColumn: e.column, endLine: e.endLine, endColumn: e.endColumn }, insertedContent: { text: e.newText } }],
              })),
            }));
          }
          return res;
        }),
      },
    ],
  };
  return JSON.stringify(log, null, 2) + "\n";
}
