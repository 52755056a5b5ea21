// Every registered rule has a page, docs/rules/<id>.md, and the pages are what `npm run docs:rules`
// generates from the rule metadata and fixtures (SARIF's helpUri points at them).
import { expect, test } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { FAMILIES, allRules } from "../server/src/rules/index.js";
import { ruleFixtures, rulePage } from "../server/src/cli/rules-doc.js";

const ROOT = path.resolve(__dirname, "..");

test("every registered rule id has a page that is up to date with the generator", () => {
  const familyOf = new Map(FAMILIES.flatMap((f) => f.rules.map((r) => [r.id, f.name] as const)));
  const rules = allRules();
  expect(rules.length).toBeGreaterThan(20);
  for (const r of rules) {
    const file = path.join(ROOT, "docs/rules", `${r.id}.md`);
    expect(fs.existsSync(file), `${r.id}: run npm run docs:rules`).toBe(true);
    const want = rulePage(r, familyOf.get(r.id) ?? "(ferrule)", ruleFixtures(ROOT, r.id));
    expect(fs.readFileSync(file, "utf8"), `${r.id}: run npm run docs:rules`).toBe(want);
    expect(want).toContain(r.summary);
  }
  // no page for a rule that no longer exists
  const ids = new Set(rules.map((r) => r.id));
  for (const f of fs.readdirSync(path.join(ROOT, "docs/rules"))) expect(ids.has(f.replace(/\.md$/, "")), f).toBe(true);
});

test("a rule with a fixture folder shows its bad and good text", () => {
  const withFx = allRules().map((r) => [r, ruleFixtures(ROOT, r.id)] as const).filter(([, fx]) => fx && fx.bad.length && fx.good.length);
  expect(withFx.length).toBeGreaterThan(10);
  const [r, fx] = withFx[0]!;
  const page = fs.readFileSync(path.join(ROOT, "docs/rules", `${r.id}.md`), "utf8");
  expect(page).toContain(fx!.bad[0]!.text.trim().split("\n")[0]!);
  expect(page).toContain(fx!.good[0]!.text.trim().split("\n")[0]!);
});
