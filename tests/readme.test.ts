// The README's promises: the rules table matches the rule metadata, and its two commands exist.
import { expect, test } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { spawnSync } from "node:child_process";
import { FAMILIES, INTERNAL, FILE_SKIPPED, FILE_ENCODING, UNKNOWN_MACRO, SUPPRESSION_WITHOUT_REASON } from "../server/src/rules/index.js";
import { rulesMarkdown } from "../server/src/cli/rules-doc.js";

const README = fs.readFileSync(path.resolve(__dirname, "../README.md"), "utf8");
const RULES_DOC = fs.readFileSync(path.resolve(__dirname, "../docs/rules.md"), "utf8");

test("the rules table (docs/rules.md) is generated from the rule metadata (run npm run docs:rules)", () => {
  expect(RULES_DOC).toContain(rulesMarkdown(FAMILIES, [INTERNAL, FILE_SKIPPED, FILE_ENCODING, UNKNOWN_MACRO, SUPPRESSION_WITHOUT_REASON]));
});

test("README starts with one paragraph, then the demo command and the test command", () => {
  const blocks = README.split(/\n```/);
  expect(blocks[1]).toContain("npx ferrule check test-fixtures/sonar-demo");
  expect(README).toMatch(/```(?:sh|bash)?\nnpm ci && npm test\n```/);
  expect(README).toContain("not a proof of memory safety");
});

test("the README is a user's page: at most about 300 lines, every docs/ link resolves", () => {
  expect(README.split("\n").length).toBeLessThanOrEqual(300);
  for (const m of README.matchAll(/\]\((docs\/[^)#]+|DEVELOPERS\.md)\)/g)) {
    expect(fs.existsSync(path.resolve(__dirname, "..", m[1]!)), m[1]).toBe(true);
  }
});

test("every rule id is unique", () => {
  const ids = FAMILIES.flatMap((f) => f.rules.map((r) => r.id));
  expect(new Set(ids).size).toBe(ids.length);
});

test("the README's sample text output is what `ferrule check` prints on the demo", () => {
  const root = path.resolve(__dirname, "..");
  const sample = README.split("Text output looks like this:\n\n```\n")[1]!.split("\n```")[0]!;
  const r = spawnSync(process.execPath, [path.join(root, "bin", "ferrule.js"), "check", "test-fixtures/sonar-demo"], { cwd: root, encoding: "utf8" });
  expect(r.status).toBe(1);
  expect(r.stdout).toContain(sample);
}, 60_000);
