// A header that renames its functions through object-like macros under build options it cannot
// see (large-file `*64` names, a symbol prefix) — common practice in compression and I/O
// libraries. With no option set, the compiler's own preprocessor (`gcc -E`, the oracle here)
// declares the plain names, so a Rust export of a plain name is declared; an export the header
// never names under any option is still reported.
import { describe, expect, test } from "vitest";
import { execFileSync } from "node:child_process";
import * as path from "node:path";
import { checkDir, FIXTURES } from "../helpers/analyze.js";

const severe = (lines: string[], findings: { severity: string }[]) => lines.filter((_, i) => findings[i]!.severity === "error" || findings[i]!.severity === "warning");

describe("renaming macros under undecided build options", () => {
  test("gcc -E with no options declares the plain names", () => {
    const out = execFileSync("gcc", ["-E", "-P", path.join(FIXTURES, "macros/renaming/good/tally.h")], { encoding: "utf8" });
    expect(out).toMatch(/extern int tally_open\(const char \*path\);/);
    expect(out).toMatch(/extern long tally_seek\(int fd, long off\);/);
  });
  test("good: the exports of the plain names are declared (no error or warning)", async () => {
    const { lines, findings } = await checkDir("macros/renaming/good");
    expect(severe(lines, findings)).toEqual([]);
  });
  test("bad: an export the header never names is still reported", async () => {
    const { lines, findings } = await checkDir("macros/renaming/bad");
    expect(severe(lines, findings)).toEqual(["lib.rs:16 export-without-declaration"]);
  });
});
