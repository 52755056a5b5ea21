// Inline suppressions: `ferrule: accept rule because reason` on the finding's line or the line above.
import { expect, test } from "vitest";
import { analyze, at } from "./helpers/analyze.js";

const RS = "#[no_mangle]\npub extern \"C\" fn lf_gain(idx: u32) -> i32 { 0 }\n#[no_mangle]\npub extern \"C\" fn lf_rate(hz: u32) -> i32 { 0 }\n#[no_mangle]\npub extern \"C\" fn lf_mode(m: u32) -> i32 { 0 }\n#[no_mangle]\npub extern \"C\" fn lf_tone(m: u32) -> i32 { 0 }\n";

test("a reasoned suppression silences its rule on the next line only; one without a reason silences nothing", async () => {
  const { findings } = await analyze({
    "lf.rs": RS,
    "lf.h": [
      "#include <stdint.h>",
      "// ferrule: accept param-signedness because the gain index never exceeds 127 on this front end",
      "int lf_gain(int idx);",
      "int lf_rate(int hz); /* ferrule: accept param-type-mismatch because wrong rule, so this stays */",
      "// ferrule: accept param-signedness",
      "int lf_mode(int m);",
      "// ferrule: accept param-signedness the word that starts a reason is missing",
      "int lf_tone(int m);",
    ].join("\n"),
  });
  expect(at(findings, "param-signedness").sort()).toEqual(["lf.h:4", "lf.h:6", "lf.h:8"]);
  expect(at(findings, "suppression-without-reason").sort()).toEqual(["lf.h:5", "lf.h:7"]);
});
