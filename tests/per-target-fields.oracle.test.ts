// Per-target members (issue: read real projects as their build does — conditional code per
// target). test-fixtures/project/per-target holds a C struct with an `#ifdef __LP64__` member and
// its Rust mirror with `#[cfg(…)]` field variants. The layout ferrule computes on each of the five
// targets must equal the compilers': clang --target=TRIPLE for the C struct (its predefined
// `__LP64__`), rustc --target=TRIPLE for the Rust struct (its `target_pointer_width` and
// `windows` cfgs). The good mirror agrees everywhere and gives no finding; the bad one keys the
// member on the pointer width, which parts from `__LP64__` on 64-bit Windows (LLP64) — the one
// target where the compilers also disagree, and the one the finding names.
import { describe, expect, it } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { Workspace } from "../server/src/analysis/workspace.js";
import { declLayout } from "../server/src/model/layout.js";
import { TRIPLES, cValuesClang, have, type Triple } from "./oracles/compilers";
import { rustValuesCross } from "./helpers/rust-cross";

const FIX = path.resolve(__dirname, "../test-fixtures/project/per-target");
const FIELDS = ["seq", "stamp_ns", "n_points", "points"];

async function ours(dir: string, triple: Triple) {
  const ws = await Workspace.create();
  ws.loadAll([dir]);
  const model = ws.model();
  const pick = (name: string, side: "c" | "rust") => model.typeDecls(name, side).find((d) => d.kind === "struct")!;
  const lay = (name: string, side: "c" | "rust") => {
    const l = declLayout(pick(name, side), { model, side, triple });
    expect(l.unknown, `${name} on ${triple}`).toBeUndefined();
    return [l.size, ...FIELDS.map((f) => l.fields!.find((x) => x.name === f)!.offset)];
  };
  return { c: lay("lidar_frame", "c"), rust: lay("LidarFrame", "rust"), findings: ws.check().filter((f) => f.severity === "error" || f.severity === "warning") };
}

/** The `#[repr(C)] pub struct LidarFrame { … }` item of a fixture's lib.rs (test-side slicing of our own fixture text). */
function rustItem(dir: string): string {
  const text = fs.readFileSync(path.join(dir, "lib.rs"), "utf8");
  const start = text.indexOf("#[repr(C)]");
  return text.slice(start, text.indexOf("\n}\n", start) + 3);
}

describe("members that exist on some targets only: layouts equal clang's and rustc's", () => {
  for (const which of ["good", "bad"] as const) {
    it(`${which}: C (clang) and Rust (rustc) layouts on all five targets`, async (ctx) => {
      if (!have("clang") || !have("rustc")) return ctx.skip();
      const dir = path.join(FIX, which);
      const differs: Triple[] = [];
      for (const triple of TRIPLES) {
        const got = await ours(dir, triple);
        const clang = cValuesClang(triple, `#include <stddef.h>\n#include "${path.join(dir, "lidar.h")}"\n`, ["sizeof(lidar_frame)", ...FIELDS.map((f) => `offsetof(lidar_frame, ${f})`)]);
        const rustc = rustValuesCross(triple, rustItem(dir), ["size_of::<LidarFrame>()", ...FIELDS.map((f) => `offset_of!(LidarFrame, ${f})`)]);
        expect({ triple, c: got.c }).toEqual({ triple, c: clang });
        expect({ triple, rust: got.rust }).toEqual({ triple, rust: rustc });
        if (JSON.stringify(clang) !== JSON.stringify(rustc)) differs.push(triple);
      }
      expect(differs).toEqual(which === "good" ? [] : ["x86_64-pc-windows-msvc"]);
    });
  }

  it("findings: none on the good mirror; on the bad one, the member, on 64-bit Windows only", async () => {
    expect((await ours(path.join(FIX, "good"), TRIPLES[0]!)).findings).toEqual([]);
    const bad = (await ours(path.join(FIX, "bad"), TRIPLES[0]!)).findings;
    expect(bad.map((f) => `${f.rule}@${path.basename(f.range.file)}:${f.range.line + 1}`)).toEqual(["mirror-layout-mismatch@lib.rs:9"]);
    expect(bad[0]!.message).toMatch(/stamp_ns/);
    expect(bad[0]!.message).toMatch(/x86_64-windows only/);
  });
});
