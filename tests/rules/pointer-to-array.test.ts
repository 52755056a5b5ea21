// A pointer to a whole table in Rust (`*const [u32; 256]`) against a pointer to its first element
// in C (`const uint32_t *`) is the same pointer (C11 §6.3.2.1p3; the Rust Reference, array layout):
// no finding. A table of another item type behind the pointer is still reported.
// (Found on real code: a CRC table getter; see docs/real-code.md.)
import { expect, test } from "vitest";
import { analyze, at } from "../helpers/analyze.js";

const H = `#include <stdint.h>
const uint32_t *chirp_crc_table(void);
const uint16_t *chirp_window_table(void);
`;
const RS = `static CRC: [u32; 256] = [0; 256];
static WIN: [u32; 64] = [0; 64];
#[no_mangle]
pub extern "C" fn chirp_crc_table() -> *const [u32; 256] { &CRC }
#[no_mangle]
pub extern "C" fn chirp_window_table() -> *const [u32; 64] { &WIN }
`;

test("pointer to a table vs pointer to its first item: only the item-type slip is reported", async () => {
  const { findings } = await analyze({ "chirp.h": H, "lib.rs": RS });
  const bad = findings.filter((f) => f.severity === "error" || f.severity === "warning").map((f) => `${f.rule}@${f.range.file.replace("/ws/", "")}:${f.range.line + 1}`);
  expect(bad).toEqual(["return-type-mismatch@chirp.h:3"]);
  expect(at(findings, "return-type-mismatch")).toEqual(["chirp.h:3"]);
});

test("#[no_mangle] with an explicit extern \"Rust\" and no C declaration is deliberate; a plain fn is reported", async () => {
  const RS2 = `#[no_mangle]
pub unsafe extern "Rust" fn chirp_trace_marker(n: usize) -> usize { n }
#[no_mangle]
pub fn chirp_forgot_abi(n: usize) -> usize { n }
`;
  const { findings } = await analyze({ "chirp.h": "#include <stdint.h>\nconst uint32_t *chirp_crc_table(void);\n", "lib.rs": RS + RS2.replace(/^/, "") });
  expect(at(findings, "export-name-mangled")).toEqual(["lib.rs:10"]);
});
