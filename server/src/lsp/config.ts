// Configuration for the language server: defaults ← editor settings (`ferrule.*`) ← the
// project's `.ferrule.toml` (the CLI reads the same file, so the editor and CI agree: the file
// wins over personal editor settings). Each key is validated on its own: a bad key is reported
// (file and key named) and skipped, the rest still apply, and ferrule keeps working.

import * as fs from "node:fs";
import * as path from "node:path";
import { readSmallRegularFile, UnsafeFileError } from "../analysis/textio.js";
import { parse as parseToml } from "smol-toml";
import { CONFIG_FILE, ConfigError, DEFAULTS, configFromObject, type FerruleConfig } from "../analysis/config.js";

/** The VS Code settings under `ferrule.*` (see package.json `contributes.configuration`). */
export interface EditorSettings {
  targets?: unknown;
  includePaths?: unknown;
  exclude?: unknown;
  rules?: unknown;
  ports?: unknown;
  maxFileBytes?: unknown;
  [k: string]: unknown;
}

export interface ConfigProblem {
  file: string;
  key: string;
  message: string;
}

const SETTINGS_TO_KEYS: Record<string, string> = {
  targets: "targets", includePaths: "include_paths", exclude: "exclude", rules: "rules", ports: "ports", maxFileBytes: "max_file_bytes",
};
const CLIENT_ONLY = new Set(["trace", "server", "enable"]);

function applyKey(cfg: FerruleConfig, key: string, value: unknown, file: string, shownKey: string, problems: ConfigProblem[]): FerruleConfig {
  try {
    return configFromObject({ [key]: value }, file, cfg);
  } catch (e) {
    if (e instanceof ConfigError) {
      problems.push({ file, key: shownKey, message: e.message.replace(`${file}: key \`${key}\``, `${file}: key \`${shownKey}\``) });
      return cfg;
    }
    problems.push({ file, key: shownKey, message: `${file}: key \`${shownKey}\`: ${(e as Error).message}` });
    return cfg;
  }
}

export function fromSettings(s: EditorSettings | undefined, base: FerruleConfig, problems: ConfigProblem[], roots: string[]): FerruleConfig {
  let cfg = base;
  if (!s || typeof s !== "object") return cfg;
  const file = "editor settings";
  for (const [k, v] of Object.entries(s)) {
    if (v === null || v === undefined || CLIENT_ONLY.has(k)) continue;
    const key = SETTINGS_TO_KEYS[k];
    if (!key) continue; // unknown keys belong to the client (or a newer version)
    if (k === "targets" && Array.isArray(v) && v.length === 0) continue; // empty = all targets
    if (k === "rules" && typeof v === "object" && !Array.isArray(v) && Object.keys(v as object).length === 0) continue;
    if (k === "ports" && typeof v === "object" && !Array.isArray(v) && Object.keys(v as object).length === 0) continue;
    cfg = applyKey(cfg, key, v, file, `ferrule.${k}`, problems);
  }
  if (roots[0]) cfg = { ...cfg, includePaths: cfg.includePaths.map((p) => path.resolve(roots[0]!, p)) };
  return cfg;
}

export function fromTomlFile(file: string, base: FerruleConfig, problems: ConfigProblem[]): FerruleConfig {
  let text: string;
  const shown = CONFIG_FILE;
  try {
    text = readSmallRegularFile(file, { root: path.dirname(file) });
  } catch (e) {
    if (e instanceof UnsafeFileError) problems.push({ file: shown, key: "", message: `${shown}: ${e.message} — using the defaults for everything this file would set` });
    return base;
  }
  let obj: Record<string, unknown>;
  try {
    obj = parseToml(text) as Record<string, unknown>;
  } catch (e) {
    const m = (e as Error).message.split("\n")[0];
    problems.push({ file: shown, key: "", message: `${shown}: not valid TOML: ${m} — using the defaults for everything this file would set` });
    return base;
  }
  let cfg = base;
  for (const [k, v] of Object.entries(obj)) cfg = applyKey(cfg, k, v, shown, k, problems);
  if (cfg.includePaths !== base.includePaths) cfg = { ...cfg, includePaths: cfg.includePaths.map((p) => path.resolve(path.dirname(file), p)) };
  return cfg;
}

export function resolveConfig(roots: string[], settings: EditorSettings | undefined): { config: FerruleConfig; problems: ConfigProblem[]; tomlFile?: string } {
  const problems: ConfigProblem[] = [];
  let cfg = fromSettings(settings, DEFAULTS, problems, roots);
  let tomlFile: string | undefined;
  for (const r of roots) {
    const f = path.join(r, CONFIG_FILE);
    if (fs.existsSync(f)) {
      tomlFile = f;
      cfg = fromTomlFile(f, cfg, problems);
      break;
    }
  }
  return { config: cfg, problems, tomlFile };
}
