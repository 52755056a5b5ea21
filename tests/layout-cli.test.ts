// `ferrule layout [--target TRIPLE]... --format json|text PATH...`: the JSON shape promised in
// the README ("ferrule layout"), checked with a JSON Schema (ajv), and the text table with padding.
import { describe, expect, test } from "vitest";
import * as path from "node:path";
import Ajv from "ajv";
import { run } from "../server/src/cli/main.js";

const ROOT = path.resolve(__dirname, "..");

async function ferrule(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = "";
  let err = "";
  const code = await run(args, { cwd: ROOT, stdout: (s) => (out += s), stderr: (s) => (err += s), isTTY: false });
  return { code, out, err };
}

const field = {
  type: "object",
  required: ["name", "offset", "size", "align"],
  properties: {
    name: { type: "string" },
    offset: { type: "integer", minimum: 0 },
    size: { type: "integer", minimum: 0 },
    align: { type: "integer", minimum: 1 },
    bitOffset: { type: "integer" },
    bits: { type: "integer" },
  },
  additionalProperties: false,
};
const perTarget = {
  type: "object",
  required: ["size", "align", "fields"],
  properties: {
    size: { type: "integer", minimum: 0 },
    align: { type: "integer", minimum: 1 },
    fields: { type: "array", items: field },
    holes: { type: "array", items: { type: "array", items: { type: "integer" }, minItems: 2, maxItems: 2 } },
    notPortable: { type: "string" },
    unknown: { type: "string" },
  },
  additionalProperties: false,
};
const SCHEMA = {
  type: "object",
  required: ["version", "types"],
  additionalProperties: false,
  properties: {
    version: { const: 1 },
    types: {
      type: "array",
      items: {
        type: "object",
        required: ["name", "language", "file", "line", "targets"],
        additionalProperties: false,
        properties: {
          name: { type: "string" },
          language: { enum: ["c", "rust"] },
          file: { type: "string" },
          line: { type: "integer", minimum: 1 },
          kind: { enum: ["struct", "union", "enum"] },
          targets: { type: "object", additionalProperties: perTarget, minProperties: 1 },
        },
      },
    },
  },
};

describe("ferrule layout", () => {
  test("--format json: documented shape, every type of C headers and Rust files, per target", async () => {
    const r = await ferrule(["layout", "--format", "json", "test-fixtures/layout/mirror-layout-mismatch/bad"]);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    const ajv = new Ajv({ allErrors: true });
    const ok = ajv.validate(SCHEMA, j);
    expect(ajv.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
    const names = j.types.map((t: { name: string; language: string }) => `${t.language}:${t.name}`);
    expect(names).toEqual(expect.arrayContaining(["c:corr_frame_hdr", "c:corr_dma_desc", "rust:CorrFrameHdr", "rust:CorrelatorStats"]));
    const hdr = j.types.find((t: { name: string }) => t.name === "corr_frame_hdr");
    expect(hdr.file).toBe("test-fixtures/layout/mirror-layout-mismatch/bad/correlator.h");
    expect(hdr.line).toBe(7);
    expect(Object.keys(hdr.targets)).toHaveLength(5);
    // long is 8 bytes on LP64 (System V AMD64 psABI), 4 on ILP32 (i386 psABI) — tests/targets.oracle.test.ts
    expect(hdr.targets["x86_64-unknown-linux-gnu"]).toMatchObject({ size: 24, align: 8, holes: [[20, 4]] });
    expect(hdr.targets["i686-unknown-linux-gnu"].fields[3]).toEqual({ name: "gain", offset: 12, size: 4, align: 4 });
  });

  test("--target narrows the targets; --format text shows a table with padding rows", async () => {
    const j = JSON.parse((await ferrule(["layout", "--format", "json", "--target", "armv7", "test-fixtures/layout/mirror-layout-mismatch/bad/correlator.h"])).out);
    expect(Object.keys(j.types[0].targets)).toEqual(["armv7-unknown-linux-gnueabihf"]);
    const t = await ferrule(["layout", "--target", "x86_64", "--target", "i686", "test-fixtures/layout/mirror-layout-mismatch/bad/correlator.h"]);
    expect(t.code).toBe(0);
    expect(t.out).toContain("C struct corr_frame_hdr — test-fixtures/layout/mirror-layout-mismatch/bad/correlator.h:7");
    expect(t.out).toMatch(/\| timestamp_us +\| long +\| @8 \(8\) +\| @8 \(4\) +\|/);
    expect(t.out).toMatch(/\| +\(padding\) +\| +\| 4 bytes +\| +\|/);
    expect(t.out).toMatch(/\| size \/ align +\| +\| 24 \/ 8 +\| 16 \/ 4 +\|/);
  });

  test("not-portable and unknown layouts are stated, not guessed", async () => {
    const j = JSON.parse((await ferrule(["layout", "--format", "json", "test-fixtures/layout/layout-not-portable/bad"])).out);
    const st = j.types.find((t: { name: string }) => t.name === "corr_status");
    expect(st.targets["x86_64-pc-windows-msvc"].notPortable).toMatch(/Microsoft/);
    // (GCC `packed`: the bit-fields take bits 0..11, temp_c the next bytes, alignment 1)
    expect(st.targets["armv7-unknown-linux-gnueabihf"]).toMatchObject({ size: 4, align: 1 });
  });
});
