// Protocol tests: spawn `npx ferrule lsp --stdio` and talk JSON-RPC to it as an editor would.
// The demo workspace (test-fixtures/sonar-demo) has the planted slips its README lists; these
// tests check that they reach the editor on both sides of the seam, that a quick-fix's edit removes
// its diagnostic, that hover carries the per-target layout table and that definitions jump across
// languages. Layout numbers below are facts of the ABIs (System V x86-64 psABI §3.1.2: double is
// 8-byte aligned; System V i386 psABI: double members of structs are 4-byte aligned), not
// ferrule's own output pasted back.

import { afterAll, beforeAll, describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { CodeActionRequest, DefinitionRequest, DidChangeWatchedFilesNotification, FileChangeType, DocumentSymbolRequest, HoverRequest, ReferencesRequest, type CodeAction, type Location } from "vscode-languageserver-protocol/node";
import { ROOT, applyEdits, editsFor, messages, startClient, uri, type Client } from "./client.js";

const DEMO_SRC = path.join(ROOT, "test-fixtures/sonar-demo");
let DEMO: string;
let HEADER: string;
let RUST: string;
let BLOCK: string;
let c: Client;

const lineOf = (text: string, needle: string) => text.split("\n").findIndex((l) => l.includes(needle));

beforeAll(async () => {
  // A private copy, so nothing another test does to the fixture folder can race with this one.
  DEMO = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-lsp-"));
  fs.cpSync(DEMO_SRC, DEMO, { recursive: true });
  HEADER = path.join(DEMO, "include/sonar_kernels.h");
  RUST = path.join(DEMO, "kernels/src/lib.rs");
  BLOCK = path.join(DEMO, "blocks/beamformer_block.cc");
  c = await startClient(DEMO);
  await c.open(HEADER);
  await c.waitFor(() => messages(c, HEADER).length > 0 && messages(c, RUST).length > 0, 60_000, "diagnostics on the header and the Rust file");
});

afterAll(async () => {
  await c?.close();
  if (DEMO) fs.rmSync(DEMO, { recursive: true, force: true });
});

describe("ferrule lsp --stdio on the demo", () => {
  test("the planted mismatch shows on both sides of the seam, each pointing at the other", () => {
    const h = fs.readFileSync(HEADER, "utf8");
    const r = fs.readFileSync(RUST, "utf8");
    const hLine = lineOf(h, "int sonar_fir_process(");
    const rLine = lineOf(r, "fn sonar_fir_process(");
    const onHeader = messages(c, HEADER).find((d) => d.code === "param-type-mismatch" && d.range.start.line === hLine);
    expect(onHeader, JSON.stringify(messages(c, HEADER), null, 1)).toBeDefined();
    expect(onHeader!.severity).toBe(1);
    expect(onHeader!.message).toContain("sonar_fir_process");
    expect(onHeader!.relatedInformation?.[0]?.location.uri).toBe(uri(RUST));
    expect(onHeader!.relatedInformation?.[0]?.location.range.start.line).toBe(rLine);
    // the `output` parameter on the header line
    expect(h.split("\n")[hLine]!.slice(onHeader!.range.start.character, onHeader!.range.end.character)).toContain("output");

    const onRust = messages(c, RUST).find((d) => d.code === "param-type-mismatch" && d.range.start.line === rLine);
    expect(onRust, JSON.stringify(messages(c, RUST), null, 1)).toBeDefined();
    expect(onRust!.message).toMatch(/other side \(sonar_kernels\.h:\d+\)/);
    expect(onRust!.relatedInformation?.[0]?.location.uri).toBe(uri(HEADER));
    expect(onRust!.relatedInformation?.[0]?.location.range.start.line).toBe(hLine);
    // Rust-side findings of their own are there too (no #[no_mangle] on sonar_set_gain)
    expect(messages(c, RUST).some((d) => d.code === "export-name-mangled" && d.range.start.line === lineOf(r, "fn sonar_set_gain("))).toBe(true);
  });

  test("diagnostics carry the document version they were computed for", () => {
    expect(c.diags.get(uri(HEADER))?.version).toBe(1);
  });

  test("a quick-fix's edit, applied to the text, makes its diagnostic disappear on both sides", async () => {
    const hLine = lineOf(c.text(HEADER), "int sonar_fir_process(");
    const diag = messages(c, HEADER).find((d) => d.code === "param-type-mismatch" && d.range.start.line === hLine)!;
    const actions = (await c.conn.sendRequest(CodeActionRequest.type, { textDocument: { uri: uri(HEADER) }, range: diag.range, context: { diagnostics: [diag] } })) as CodeAction[];
    const fix = actions.find((a) => a.kind === "quickfix" && a.isPreferred);
    expect(fix, JSON.stringify(actions, null, 1)).toBeDefined();
    expect(fix!.title).toContain("float *output");
    const edits = editsFor(fix!.edit!, uri(HEADER));
    expect(edits.length).toBeGreaterThan(0);
    const before = c.text(HEADER);
    const after = applyEdits(before, edits);
    expect(after.split("\n")[hLine]).toContain("float *output");
    // send the edit as the incremental change an editor would send
    c.change(HEADER, edits.map((e) => ({ range: e.range, text: e.newText })));
    const rLine = lineOf(fs.readFileSync(RUST, "utf8"), "fn sonar_fir_process(");
    await c.waitFor(() => !messages(c, HEADER).some((d) => d.code === "param-type-mismatch" && d.range.start.line === hLine), 20_000, "the header diagnostic to clear");
    await c.waitFor(() => !messages(c, RUST).some((d) => d.code === "param-type-mismatch" && d.range.start.line === rLine), 20_000, "the mirrored Rust diagnostic to clear");
    expect(c.text(HEADER)).toBe(after);
    // the other slips are still reported
    expect(messages(c, HEADER).some((d) => d.code === "pointer-constness")).toBe(true);
  });

  test("an edit that introduces a mismatch produces it; undoing the edit clears it", async () => {
    const h = c.text(HEADER);
    const line = lineOf(h, "void sonar_fir_free(");
    const col = h.split("\n")[line]!.indexOf("sonar_fir *h");
    // `sonar_fir *h` → `sonar_fir *h, int extra`: C now passes one argument more than Rust takes
    const at = { line, character: col + "sonar_fir *h".length };
    c.change(HEADER, [{ range: { start: at, end: at }, text: ", int extra" }]);
    await c.waitFor(() => messages(c, HEADER).some((d) => d.range.start.line === line && /arity|parameter/.test(String(d.code) + d.message)), 20_000, "the new mismatch");
    const introduced = messages(c, HEADER).filter((d) => d.range.start.line === line);
    expect(introduced.map((d) => d.code)).toContain("arity-mismatch");
    const end = { line, character: at.character + ", int extra".length };
    c.change(HEADER, [{ range: { start: at, end }, text: "" }]);
    await c.waitFor(() => !messages(c, HEADER).some((d) => d.range.start.line === line && d.code === "arity-mismatch"), 20_000, "the mismatch to clear");
  });

  test("hover on a boundary type shows both sides and the per-target layout table", async () => {
    const h = c.text(HEADER);
    const line = lineOf(h, "} sonar_detection;");
    const hover = await c.conn.sendRequest(HoverRequest.type, { textDocument: { uri: uri(HEADER) }, position: { line, character: 4 } });
    const md = (hover!.contents as { value: string }).value;
    expect(md).toContain("C struct `sonar_detection`");
    expect(md).toContain("Rust struct `SonarDetection`");
    const table = md.split("```text\n")[1]!.split("```")[0]!;
    const cells = (l: string) => l.trim().split("|").slice(1, -1).map((x) => x.trim());
    const rows = table.split("\n").filter((l) => l.trim().startsWith("|"));
    const head = cells(rows.find((l) => cells(l)[0] === "field")!);
    const sizeRow = cells(rows.find((l) => cells(l)[0] === "size / align")!);
    const col = (t: string) => sizeRow[head.indexOf(t)];
    // x86-64 psABI: {float, uint32_t, double, uint8_t} → 24 bytes, 8-aligned (7 bytes tail padding)
    expect(col("x86_64")).toBe("24 / 8");
    // i386 psABI: double members are 4-aligned → 20 bytes, 4-aligned
    expect(col("i686")).toBe("20 / 4");
    const snr = cells(rows.find((l) => cells(l)[0] === "snr_db")!);
    expect(snr[head.indexOf("x86_64")]).toBe("@8 (8)");
  });

  test("hover on a function shows the Rust and the C declarations", async () => {
    const h = c.text(HEADER);
    const line = lineOf(h, "sonar_beam_power(");
    const hover = await c.conn.sendRequest(HoverRequest.type, { textDocument: { uri: uri(HEADER) }, position: { line, character: h.split("\n")[line]!.indexOf("sonar_beam_power") + 3 } });
    const md = (hover!.contents as { value: string }).value;
    expect(md).toContain("```rust\n");
    expect(md).toContain("n_samples: i64");
    expect(md).toContain("```c\n");
    expect(md).toContain("long n_samples");
    // the buffer contract ferrule paired: `beam` holds `n_samples` items, from the Rust body
    const at = lineOf(fs.readFileSync(RUST, "utf8"), "from_raw_parts(beam") + 1;
    expect(md).toContain(`**Buffers**`);
    expect(md).toContain(`- \`beam\` holds \`n_samples as usize\` items — \`from_raw_parts(beam, n_samples as usize)\` at lib.rs:${at}`);
  });

  test("definition jumps from the C prototype to the Rust function, and back", async () => {
    const h = c.text(HEADER);
    const line = lineOf(h, "sonar_fir_free(");
    const defs = (await c.conn.sendRequest(DefinitionRequest.type, { textDocument: { uri: uri(HEADER) }, position: { line, character: h.split("\n")[line]!.indexOf("sonar_fir_free") + 2 } })) as Location[];
    const r = fs.readFileSync(RUST, "utf8");
    expect(defs[0]!.uri).toBe(uri(RUST));
    expect(defs[0]!.range.start.line).toBe(lineOf(r, "fn sonar_fir_free("));
    await c.open(RUST);
    const rl = lineOf(r, "fn sonar_fir_free(");
    const back = (await c.conn.sendRequest(DefinitionRequest.type, { textDocument: { uri: uri(RUST) }, position: { line: rl, character: r.split("\n")[rl]!.indexOf("sonar_fir_free") + 2 } })) as Location[];
    expect(back[0]!.uri).toBe(uri(HEADER));
    expect(back[0]!.range.start.line).toBe(line);
  });

  test("references of a kernel include the C++ call site in the block", async () => {
    const r = fs.readFileSync(RUST, "utf8");
    const rl = lineOf(r, "fn sonar_fir_new(");
    const refs = (await c.conn.sendRequest(ReferencesRequest.type, { textDocument: { uri: uri(RUST) }, position: { line: rl, character: r.split("\n")[rl]!.indexOf("sonar_fir_new") + 1 }, context: { includeDeclaration: true } })) as Location[];
    const b = fs.readFileSync(BLOCK, "utf8");
    expect(refs.some((l) => l.uri === uri(BLOCK) && l.range.start.line === lineOf(b, "sonar_fir_new("))).toBe(true);
    expect(refs.some((l) => l.uri === uri(HEADER))).toBe(true);
    expect(refs.some((l) => l.uri === uri(RUST) && l.range.start.line === rl)).toBe(true);
    // and definition from the call site lands on the Rust function
    const bl = lineOf(b, "sonar_fir_new(");
    await c.open(BLOCK);
    const defs = (await c.conn.sendRequest(DefinitionRequest.type, { textDocument: { uri: uri(BLOCK) }, position: { line: bl, character: b.split("\n")[bl]!.indexOf("sonar_fir_new") + 1 } })) as Location[];
    expect(defs[0]!.uri).toBe(uri(RUST));
    expect(defs[0]!.range.start.line).toBe(rl);
  });

  test("document symbols list the boundary functions and types of the header", async () => {
    const syms = (await c.conn.sendRequest(DocumentSymbolRequest.type, { textDocument: { uri: uri(HEADER) } })) as { name: string; kind: number }[];
    const names = syms.map((s) => s.name);
    expect(names).toEqual(expect.arrayContaining(["sonar_fir_new", "sonar_fir_process", "sonar_detection"]));
    expect(syms.find((s) => s.name === "sonar_detection")!.kind).toBe(23); // SymbolKind.Struct
  });

  test("source action: C declarations for a Rust file's exports, in a new header", async () => {
    const actions = (await c.conn.sendRequest(CodeActionRequest.type, { textDocument: { uri: uri(RUST) }, range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } }, context: { diagnostics: [], only: ["source"] } })) as CodeAction[];
    const gen = actions.find((a) => a.kind?.startsWith("source."));
    expect(gen, JSON.stringify(actions)).toBeDefined();
    const dc = gen!.edit!.documentChanges!;
    expect(dc[0]).toMatchObject({ kind: "create" });
    const text = (dc[1] as { edits: { newText: string }[] }).edits[0]!.newText;
    expect(text).toContain('extern "C" {');
    expect(text).toMatch(/int sonar_fir_process\(sonar_fir \*h, const float \*input, float \*output, size_t n\);|sonar_fir_process\(/);
    expect(text).not.toContain("sonar_set_gain"); // not exported under its name (no #[no_mangle])
  });

  test("a change on disk to a file that is not open (workspace/didChangeWatchedFiles) updates both sides", async () => {
    const spec = path.join(DEMO, "kernels/src/spectrum.rs");
    const sh = path.join(DEMO, "include/sonar_spectrum.h");
    const t = fs.readFileSync(spec, "utf8");
    const hl = fs.readFileSync(sh, "utf8").split("\n").findIndex((l) => l.includes("sonar_spec_db("));
    const has = () => messages(c, sh).some((d) => d.code === "param-type-mismatch" && d.range.start.line === hl);
    expect(has()).toBe(false);
    // the Rust side now takes f64 items: the header's `const float *power` disagrees
    const changed = t.replace(/fn sonar_spec_db\(power: \*const f32/, "fn sonar_spec_db(power: *const f64");
    expect(changed).not.toBe(t);
    fs.writeFileSync(spec, changed);
    await c.conn.sendNotification(DidChangeWatchedFilesNotification.type, { changes: [{ uri: uri(spec), type: FileChangeType.Changed }] });
    await c.waitFor(has, 20_000, "the mismatch from the disk change");
    fs.writeFileSync(spec, t);
    await c.conn.sendNotification(DidChangeWatchedFilesNotification.type, { changes: [{ uri: uri(spec), type: FileChangeType.Changed }] });
    await c.waitFor(() => !has(), 20_000, "the mismatch to clear");
  });
});
