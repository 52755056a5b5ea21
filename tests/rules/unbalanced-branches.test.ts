// A function body whose undecided `#if`/`#else` branches each open a brace the other does not
// (`if (use_long) {` under one option, `(void) use_long; {` under the other; C11 §6.10.1: only one
// branch is compiled). Read both at once, the braces do not balance and the grammar loses the
// function; ferrule keeps the first such branch only. gcc (the oracle: `gcc -c` and `nm` with and
// without the option) shows the functions each reading defines. A prototype nothing defines, with
// a C call, is still reported.
import { describe, expect, test } from "vitest";
import { execFileSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { checkDir, FIXTURES } from "../helpers/analyze.js";

const severe = (lines: string[], findings: { severity: string }[]) => lines.filter((_, i) => findings[i]!.severity === "error" || findings[i]!.severity === "warning");

function definedBy(flags: string[]): string[] {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-branches-"));
  try {
    const obj = path.join(dir, "stack.o");
    execFileSync("gcc", ["-c", ...flags, "-o", obj, path.join(FIXTURES, "macros/unbalanced-branches/good/stack.c")]);
    const nm = execFileSync("nm", ["--defined-only", obj], { encoding: "utf8" });
    return nm.split("\n").filter((l) => / T /.test(l)).map((l) => l.split(" ").pop()!).sort();
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

describe("undecided branches with unmatched braces inside a function body", () => {
  test("gcc: both readings define seis_stack and seis_clear", () => {
    expect(definedBy([])).toEqual(["seis_clear", "seis_stack"]);
    expect(definedBy(["-DSEIS_FORCE_SHORT", "-DSEIS_PROFILE"])).toEqual(["seis_clear", "seis_stack"]);
  });
  test("good: the header's prototypes are defined (no error or warning)", async () => {
    const { lines, findings } = await checkDir("macros/unbalanced-branches/good");
    expect(severe(lines, findings)).toEqual([]);
  });
  test("bad: a prototype C calls but nothing defines is still reported", async () => {
    const { lines, findings } = await checkDir("macros/unbalanced-branches/bad");
    expect(severe(lines, findings)).toEqual(["stack.h:14 declaration-without-definition"]);
  });
});
