// Regenerates the rules table in docs/rules.md from the rule metadata in server/src/rules.
import * as esbuild from "esbuild";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { createRequire } from "node:module";
import { fileURLToPath } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const out = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-doc-")), "doc.cjs");
fs.writeFileSync(out + ".entry.ts", `export { FAMILIES, INTERNAL, FILE_SKIPPED, FILE_ENCODING, UNKNOWN_MACRO, SUPPRESSION_WITHOUT_REASON } from ${JSON.stringify(path.join(root, "server/src/rules/index.ts"))};\nexport { rulesMarkdown, replaceRulesSection, rulePage, ruleFixtures } from ${JSON.stringify(path.join(root, "server/src/cli/rules-doc.ts"))};\n`);
await esbuild.build({ entryPoints: [out + ".entry.ts"], outfile: out, bundle: true, platform: "node", format: "cjs", logLevel: "warning" });
const m = createRequire(import.meta.url)(out);
const readmePath = path.join(root, "docs/rules.md");
const readme = fs.readFileSync(readmePath, "utf8");
const next = m.replaceRulesSection(readme, m.rulesMarkdown(m.FAMILIES, [m.INTERNAL, m.FILE_SKIPPED, m.FILE_ENCODING, m.UNKNOWN_MACRO, m.SUPPRESSION_WITHOUT_REASON]));
if (next !== readme) {
  fs.writeFileSync(readmePath, next);
  console.log("docs/rules.md rules table updated");
} else console.log("docs/rules.md rules table already up to date");

// one page per rule: docs/rules/<id>.md
const pagesDir = path.join(root, "docs/rules");
fs.mkdirSync(pagesDir, { recursive: true });
let changed = 0;
const pages = [...m.FAMILIES.flatMap((f) => f.rules.map((r) => [r, f.name])), ...[m.INTERNAL, m.FILE_SKIPPED, m.FILE_ENCODING, m.UNKNOWN_MACRO, m.SUPPRESSION_WITHOUT_REASON].map((r) => [r, "(ferrule)"])];
for (const [r, fam] of pages) {
  const file = path.join(pagesDir, `${r.id}.md`);
  const text = m.rulePage(r, fam, m.ruleFixtures(root, r.id));
  if (!fs.existsSync(file) || fs.readFileSync(file, "utf8") !== text) {
    fs.writeFileSync(file, text);
    changed++;
  }
}
console.log(`docs/rules/: ${pages.length} rule pages, ${changed} written`);
