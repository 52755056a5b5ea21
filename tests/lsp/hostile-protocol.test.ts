// The language server under random valid and invalid protocol messages (fast-check, fixed seed;
// FERRULE_FUZZ_RUNS for more): after each sequence it still answers, malformed requests get
// InvalidParams, and the diagnostics of the open documents equal a fresh analysis of their final
// texts — so no malformed message changed what the server holds.

import { afterAll, beforeAll, describe, expect, test } from "vitest";
import fc from "fast-check";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { startClient, uri, type Client } from "./client.js";
import { Workspace } from "../../server/src/analysis/workspace.js";
import { DEFAULTS } from "../../server/src/analysis/config.js";
import { initParsers } from "../../server/src/parse/parser.js";

const HEADER = "#include <stdint.h>\n#include <stddef.h>\n#ifdef __cplusplus\nextern \"C\" {\n#endif\nvoid surge_gain(float *buf, size_t n, float g);\nint64_t surge_count(const int16_t *xs, long n);\n#ifdef __cplusplus\n}\n#endif\n";
const RUST = "#[no_mangle]\npub unsafe extern \"C\" fn surge_gain(buf: *mut f32, n: usize, g: f32) {\n    if buf.is_null() { return; }\n    for x in std::slice::from_raw_parts_mut(buf, n) { *x *= g; }\n}\n\n#[no_mangle]\npub unsafe extern \"C\" fn surge_count(xs: *const i16, n: i64) -> i64 {\n    if xs.is_null() || n <= 0 { return 0; }\n    n\n}\n";
// full texts a valid edit may install: the clean one, and one slip each
const HEADERS = [HEADER, HEADER.replace("float *buf", "double *buf"), HEADER.replace("size_t n, float g", "size_t n")];
const RUSTS = [RUST, RUST.replace("g: f32", "g: f64"), RUST.replace("n: i64", "n: i32")];

let dir: string;
let client: Client;
const H = () => path.join(dir, "include/surge.h");
const R = () => path.join(dir, "src/lib.rs");

beforeAll(async () => {
  await initParsers();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-proto-"));
  fs.mkdirSync(path.join(dir, "include"));
  fs.mkdirSync(path.join(dir, "src"));
  fs.writeFileSync(H(), HEADER);
  fs.writeFileSync(R(), RUST);
  client = await startClient(dir);
  await client.open(H());
  await client.open(R());
}, 60_000);

afterAll(async () => {
  await client?.close();
});

type Msg =
  | { k: "edit"; file: 0 | 1; text: number }
  | { k: "bad-notification"; which: number }
  | { k: "bad-request"; which: number };

const msgArb: fc.Arbitrary<Msg> = fc.oneof(
  fc.record({ k: fc.constant("edit" as const), file: fc.constantFrom(0 as const, 1 as const), text: fc.integer({ min: 0, max: 2 }) }),
  fc.record({ k: fc.constant("bad-notification" as const), which: fc.integer({ min: 0, max: 6 }) }),
  fc.record({ k: fc.constant("bad-request" as const), which: fc.integer({ min: 0, max: 4 }) }),
);

const files = () => [H(), R()];

function badNotification(which: number): [string, unknown] {
  const u = uri(files()[which % 2]!);
  switch (which) {
    case 0: return ["textDocument/didChange", { textDocument: { uri: u, version: 99 }, contentChanges: [{ text: 42 }] }];
    case 1: return ["textDocument/didChange", { textDocument: { uri: u, version: "x" }, contentChanges: [{ text: "" }] }];
    case 2: return ["textDocument/didChange", { textDocument: { uri: u, version: 100 }, contentChanges: [{ range: { start: { line: -1, character: 0 }, end: { line: 0, character: 0 } }, text: "" }] }];
    case 3: return ["textDocument/didOpen", { textDocument: { uri: 7, languageId: "c", version: 1, text: "int x;" } }];
    case 4: return ["textDocument/didClose", { textDocument: {} }];
    case 5: return ["workspace/didChangeWatchedFiles", { changes: [{ uri: u, type: 9 }] }];
    default: return ["textDocument/didChange", null];
  }
}

function badRequest(which: number): [string, unknown] {
  const u = uri(files()[which % 2]!);
  switch (which) {
    case 0: return ["textDocument/hover", { textDocument: { uri: u }, position: { line: -3, character: 0 } }];
    case 1: return ["textDocument/definition", { textDocument: { uri: u }, position: { line: 0.5, character: 0 } }];
    case 2: return ["textDocument/codeAction", { textDocument: { uri: u }, range: {}, context: {} }];
    case 3: return ["textDocument/documentSymbol", { textDocument: 5 }];
    default: return ["ferrule/layout", { textDocument: { uri: u }, position: "top" }];
  }
}

/** The findings a fresh analysis gives for the open documents' texts, per file, as `line|rule`
 * (at the finding's place and mirrored at its related places, as the server shows them). */
function fresh(texts: string[]): Map<string, string[]> {
  const ws = new Workspace({ ...DEFAULTS });
  files().forEach((f, i) => ws.update(f, texts[i]!));
  const out = new Map<string, string[]>(files().map((f) => [f, []]));
  for (const f of ws.check()) {
    if (f.severity !== "error" && f.severity !== "warning") continue;
    // the server shows a finding at its place and mirrors it onto the other side's location
    const at = new Set([`${f.range.file}|${f.range.line}`, ...f.related.map((r) => `${r.range.file}|${r.range.line}`)]);
    for (const a of at) {
      const [file, line] = a.split("|");
      out.get(file!)?.push(`${line}|${f.rule}`);
    }
  }
  for (const v of out.values()) v.sort();
  return out;
}

describe("language server under random valid and invalid messages", () => {
  test("still answers; malformed requests get InvalidParams; diagnostics equal a fresh analysis", async () => {
    const runs = Number(process.env.FERRULE_FUZZ_RUNS) || 6;
    await fc.assert(
      fc.asyncProperty(fc.array(msgArb, { minLength: 1, maxLength: 10 }), async (msgs) => {
        for (const m of msgs) {
          if (m.k === "edit") {
            const f = files()[m.file]!;
            client.change(f, [{ text: (m.file === 0 ? HEADERS : RUSTS)[m.text]! }]);
          } else if (m.k === "bad-notification") {
            const [method, params] = badNotification(m.which);
            await client.conn.sendNotification(method, params);
          } else {
            const [method, params] = badRequest(m.which);
            const err = await client.conn.sendRequest(method, params).then(() => undefined, (e: { code?: number }) => e);
            expect(err?.code).toBe(-32602); // InvalidParams
          }
        }
        // the texts the server should hold: the client's, which only valid edits changed
        const texts = files().map((f) => client.text(f));
        const want = fresh(texts);
        const got = () => new Map(files().map((f) => [f, (client.diags.get(uri(f))?.diagnostics ?? []).filter((d) => d.severity === 1 || d.severity === 2).map((d) => `${d.range.start.line}|${d.code}`).sort()]));
        await client.waitFor(() => JSON.stringify([...got()]) === JSON.stringify([...want]), 30_000, `diagnostics equal to a fresh analysis: want ${JSON.stringify([...want])}`).catch((e: Error) => {
          throw new Error(`${e.message}\ngot ${JSON.stringify([...got()])}\nmessages ${JSON.stringify(msgs)}`);
        });
        // and it still answers a well-formed request
        const hover = await client.conn.sendRequest("textDocument/hover", { textDocument: { uri: uri(H()) }, position: { line: 5, character: 6 } });
        expect(hover === null || typeof hover === "object").toBe(true);
      }),
      { numRuns: runs, seed: 20261205 },
    );
  }, 240_000);
});
