// Project configuration: `.ferrule.toml` at the workspace root (read by the CLI and the language
// server alike) merged with editor settings. Parsed with smol-toml; every problem names the file
// and the key.

import { parse as parseToml } from "smol-toml";
import { ALL_TRIPLES, parseTriple, type Triple } from "../model/targets.js";
import type { Severity } from "../model/types.js";
import { allRules } from "../rules/index.js";

export const CONFIG_FILE = ".ferrule.toml";

export interface FerruleConfig {
  targets: Triple[];
  includePaths: string[];
  exclude: string[];
  maxFileBytes: number;
  /** The whole run's time budget in seconds (reading and extraction): files not read by then are
   * skipped and listed. */
  maxTotalSeconds: number;
  /** C/C++ export/attribute macros to blank before reading (`SONAR_API int f(void);`). */
  stripMacros: string[];
  /** Macros of the build for the C preprocessor (`defines`): NAME or NAME(params) → replacement. */
  defines: Record<string, string>;
  /** Per-rule severity override; "off" disables the rule. */
  severity: Record<string, Severity | "off">;
  /** Per-family settings (e.g. port-declaration patterns), passed to the model. */
  families: Record<string, unknown>;
  /** Cargo features the build enables besides each package's defaults (`name` for every package
   * that has it, `package/name` for one). */
  features: string[];
  /** Size cap of the facts cache folder in MiB (analysis/facts-cache.ts). */
  cacheMaxMb: number;
}

export const DEFAULTS: FerruleConfig = {
  targets: [...ALL_TRIPLES],
  includePaths: [],
  exclude: [],
  maxFileBytes: 2_000_000,
  maxTotalSeconds: 900,
  stripMacros: [],
  defines: {},
  severity: {},
  families: {},
  features: [],
  cacheMaxMb: 200,
};

export class ConfigError extends Error {
  constructor(readonly file: string, readonly key: string, message: string) {
    super(`${file}: ${key ? `key \`${key}\`: ` : ""}${message}`);
  }
}

const SEVERITIES = ["error", "warning", "info", "hint", "off"];
/** Top-level settings, and the tables handed to rule families (`[ports]`, `[layout]`). */
const TOP_KEYS = ["targets", "include_paths", "exclude", "strip_macros", "max_file_bytes", "max_total_seconds", "features", "defines", "rules", "cache_max_mb"];
const FAMILY_TABLES = ["ports", "layout"];

/** ` — did you mean \`x\`?` for a close name (edit distance ≤ 2), else "". */
function nearest(name: string, known: string[]): string {
  let best: string | undefined;
  let bestD = 3;
  for (const k of known) {
    const d = editDistance(name, k);
    if (d < bestD) [best, bestD] = [k, d];
  }
  return best ? ` — did you mean \`${best}\`?` : "";
}

function editDistance(a: string, b: string): number {
  if (Math.abs(a.length - b.length) > 2) return 3;
  let prev = Array.from({ length: b.length + 1 }, (_, i) => i);
  for (let i = 1; i <= a.length; i++) {
    const cur = [i];
    for (let j = 1; j <= b.length; j++) cur[j] = Math.min(prev[j]! + 1, cur[j - 1]! + 1, prev[j - 1]! + (a[i - 1] === b[j - 1] ? 0 : 1));
    prev = cur;
  }
  return prev[b.length]!;
}

function strList(v: unknown, file: string, key: string): string[] {
  if (!Array.isArray(v) || v.some((x) => typeof x !== "string")) throw new ConfigError(file, key, "expected a list of strings");
  return v as string[];
}

/** Validates a plain object (from TOML or from editor settings) into a config. Throws ConfigError. */
export function configFromObject(obj: Record<string, unknown>, file: string, base: FerruleConfig = DEFAULTS): FerruleConfig {
  const cfg: FerruleConfig = { ...base, severity: { ...base.severity }, families: { ...base.families } };
  for (const [k, v] of Object.entries(obj)) {
    switch (k) {
      case "targets": {
        const list = strList(v, file, "targets");
        const out: Triple[] = [];
        for (const t of list) {
          const p = parseTriple(t);
          if (!p) throw new ConfigError(file, "targets", `unknown target \`${t}\` (known: ${ALL_TRIPLES.join(", ")})`);
          out.push(p);
        }
        if (out.length === 0) throw new ConfigError(file, "targets", "needs at least one target");
        cfg.targets = out;
        break;
      }
      case "include_paths":
      case "includePaths":
        cfg.includePaths = strList(v, file, k);
        break;
      case "exclude":
        cfg.exclude = strList(v, file, k);
        break;
      case "strip_macros":
      case "stripMacros":
        cfg.stripMacros = strList(v, file, k);
        break;
      case "defines": {
        // a table (NAME = "value") or a list ("NAME", "NAME=value"), as -D takes them
        const out: Record<string, string> = {};
        if (Array.isArray(v)) {
          for (const x of strList(v, file, k)) {
            const eq = x.indexOf("=");
            if (eq < 0) out[x] = "1";
            else out[x.slice(0, eq)] = x.slice(eq + 1);
          }
        } else if (typeof v === "object" && v !== null) {
          for (const [name, val] of Object.entries(v as Record<string, unknown>)) {
            if (!/^[A-Za-z_][A-Za-z0-9_]*(\([A-Za-z0-9_,.\s]*\))?$/.test(name)) throw new ConfigError(file, `${k}.${name}`, "not a C macro name (NAME or NAME(params))");
            if (typeof val !== "string" && typeof val !== "number" && typeof val !== "bigint" && typeof val !== "boolean") throw new ConfigError(file, `${k}.${name}`, "expected a string, a number or a boolean");
            out[name] = typeof val === "boolean" ? (val ? "1" : "0") : String(val);
          }
        } else throw new ConfigError(file, k, "expected a table of NAME = value or a list of NAME=value");
        cfg.defines = out;
        break;
      }
      case "max_file_bytes":
      case "maxFileBytes": {
        // a size of 0, a negative or fractional size or NaN would skip every file and pass
        const n = typeof v === "bigint" ? Number(v) : v;
        if (typeof n !== "number" || !Number.isInteger(n) || n < 1) throw new ConfigError(file, k, `expected a whole number of bytes of at least 1 (got ${typeof v === "string" ? JSON.stringify(v) : String(v)})`);
        cfg.maxFileBytes = n;
        break;
      }
      case "max_total_seconds":
      case "maxTotalSeconds": {
        const n = typeof v === "bigint" ? Number(v) : v;
        if (typeof n !== "number" || !Number.isFinite(n) || n <= 0) throw new ConfigError(file, k, `expected a number of seconds above 0 (got ${typeof v === "string" ? JSON.stringify(v) : String(v)})`);
        cfg.maxTotalSeconds = n;
        break;
      }
      case "cache_max_mb":
      case "cacheMaxMb": {
        const n = typeof v === "bigint" ? Number(v) : v;
        if (typeof n !== "number" || !Number.isFinite(n) || n < 1) throw new ConfigError(file, k, `expected a size in MiB of at least 1 (got ${typeof v === "string" ? JSON.stringify(v) : String(v)})`);
        cfg.cacheMaxMb = n;
        break;
      }
      case "features": {
        const list = strList(v, file, k);
        for (const f of list) {
          if (!/^[A-Za-z0-9_][A-Za-z0-9_+.-]*(\/[A-Za-z0-9_][A-Za-z0-9_+.-]*)?$/.test(f)) throw new ConfigError(file, k, `\`${f}\` is not a Cargo feature name (expected \`name\` or \`package/name\`)`);
        }
        cfg.features = list;
        break;
      }
      case "rules":
      case "severity": {
        if (typeof v !== "object" || v === null || Array.isArray(v)) throw new ConfigError(file, k, "expected a table of rule = severity");
        const ids = new Set(allRules().map((r) => r.id));
        for (const [rule, sev] of Object.entries(v as Record<string, unknown>)) {
          if (!ids.has(rule)) throw new ConfigError(file, `${k}.${rule}`, `unknown rule id \`${rule}\`${nearest(rule, [...ids])} (rule ids: ${[...ids].sort().join(", ")})`);
          if (typeof sev !== "string" || !SEVERITIES.includes(sev)) throw new ConfigError(file, `${k}.${rule}`, `expected one of ${SEVERITIES.join(", ")}`);
          cfg.severity[rule] = sev as Severity | "off";
        }
        break;
      }
      default:
        if (FAMILY_TABLES.includes(k) && typeof v === "object" && v !== null && !Array.isArray(v)) cfg.families[k] = v;
        else if (FAMILY_TABLES.includes(k)) throw new ConfigError(file, k, "expected a table");
        else throw new ConfigError(file, k, `unknown setting${nearest(k, [...TOP_KEYS, ...FAMILY_TABLES])} (settings: ${[...TOP_KEYS, ...FAMILY_TABLES].join(", ")})`);
    }
  }
  return cfg;
}

export function parseConfigText(text: string, file: string, base: FerruleConfig = DEFAULTS): FerruleConfig {
  let obj: Record<string, unknown>;
  try {
    obj = parseToml(text) as Record<string, unknown>;
  } catch (e) {
    const m = (e as Error).message.split("\n")[0];
    throw new ConfigError(file, "", `not valid TOML: ${m}`);
  }
  return configFromObject(obj, file, base);
}
