// Buffer-contract rules (issue 4): each rule has a bad and a good fixture under
// test-fixtures/buffers/<rule>/. A bad fixture marks every line that must be reported with a
// trailing `expect: <rule-id>` comment; the test asserts exactly those lines for the buffer rules
// (no more, no fewer), and no buffer finding at all on the good fixture (which includes vector
// ports and interleaved complex passed as `2 * n` floats).
import { describe, expect, it } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { analyze } from "../helpers/analyze";
import { buffersFamily } from "../../server/src/rules/buffers";
import { contractOf } from "../../server/src/model/pairing";
import type { Finding } from "../../server/src/rules/api";

const ROOT = path.join(__dirname, "..", "..", "test-fixtures", "buffers");
const BUFFER_RULES = new Set(buffersFamily.rules.map((r) => r.id));

function readDir(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const f of fs.readdirSync(dir, { recursive: true }) as string[]) {
    const p = path.join(dir, f);
    if (fs.statSync(p).isFile()) out[f] = fs.readFileSync(p, "utf8");
  }
  return out;
}

function expected(files: Record<string, string>): string[] {
  const out: string[] = [];
  for (const [f, text] of Object.entries(files)) {
    text.split("\n").forEach((line, i) => {
      const re = /expect: ([a-z-]+)/g;
      let m: RegExpExecArray | null;
      while ((m = re.exec(line))) out.push(`${m[1]} ${f}:${i + 1}`);
    });
  }
  return out.sort();
}

function got(findings: Finding[]): string[] {
  return findings.filter((f) => BUFFER_RULES.has(f.rule)).map((f) => `${f.rule} ${f.range.file.replace(/^\/ws\//, "")}:${f.range.line + 1}`).sort();
}

async function run(dir: string, cfg = {}) {
  const files = readDir(dir);
  const { ws, findings } = await analyze(files, cfg);
  return { files, ws, findings };
}

const rules = fs.readdirSync(ROOT).filter((d) => fs.existsSync(path.join(ROOT, d, "bad")));

describe("buffer rules on fixtures", () => {
  for (const rule of rules) {
    it(`${rule}: bad fixture reports exactly the marked lines`, async () => {
      const { files, findings } = await run(path.join(ROOT, rule, "bad"));
      const exp = expected(files);
      expect(exp.length).toBeGreaterThan(0);
      expect(exp.some((e) => e.startsWith(rule + " "))).toBe(true);
      expect(got(findings)).toEqual(exp);
    });
    it(`${rule}: good fixture has no buffer finding`, async () => {
      const { findings } = await run(path.join(ROOT, rule, "good"));
      expect(got(findings)).toEqual([]);
    });
  }
});
