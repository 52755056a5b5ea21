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
import { parseConfigText } from "../../server/src/analysis/config";

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

describe("pairing inference", () => {
  it("ranks explicit declarations over Rust body evidence over naming, and keeps the evidence", async () => {
    const { ws } = await analyze({
      "k.h": [
        "#include <stddef.h>",
        "void a_fn(const float *x, float *y, size_t n, size_t m) __attribute__((access(write_only, 2, 4)));",
        "void b_fn(size_t n, const float in[static n]);",
        "void c_fn(float *__counted_by(len) buf, size_t len);",
        "/* ferrule-buffers: raw[nbytes bytes], ctx nullable */",
        "void d_fn(const void *raw, size_t nbytes, void *ctx);",
        "void e_fn(const float *samples, size_t count);",
      ].join("\n"),
      "lib.rs": [
        "#[no_mangle] pub unsafe extern \"C\" fn a_fn(x: *const f32, y: *mut f32, n: usize, m: usize) {",
        "    let _s = core::slice::from_raw_parts(x, n);",
        "    let _t = core::slice::from_raw_parts_mut(y, n);",
        "}",
      ].join("\n"),
    });
    const model = ws.model();
    const a = contractOf(model, "a_fn")!;
    expect(a.pairs.get(1)!.source).toBe("gcc-access"); // beats the body's `from_raw_parts_mut(y, n)`
    expect(a.pairs.get(1)!.lenParam).toBe(3);
    expect(a.pairs.get(0)!.source).toBe("rust-body");
    expect(a.pairs.get(0)!.evidence).toContain("from_raw_parts(x, n)` at lib.rs:2");
    const b = contractOf(model, "b_fn")!;
    expect(b.pairs.get(1)).toMatchObject({ source: "c99-array", lenParam: 0, unit: "items" });
    const c = contractOf(model, "c_fn")!;
    expect(c.c!.params[0]!.name).toBe("buf");
    expect(c.pairs.get(0)).toMatchObject({ source: "counted-by", lenParam: 1 });
    const d = contractOf(model, "d_fn")!;
    expect(d.pairs.get(0)).toMatchObject({ source: "ferrule-doc", unit: "bytes", lenParam: 1 });
    expect([...d.nullable.keys()]).toEqual([2]);
    const e = contractOf(model, "e_fn")!;
    expect(e.pairs.get(0)).toMatchObject({ source: "naming", unit: "items", lenParam: 1 });
  });
});

describe("port settings", () => {
  const block = [
    "#include \"lightning.h\"",
    "class front_end {",
    "public:",
    "    front_end() { declare_stream(0, sizeof(short)); declare_stream(1, sizeof(float)); }",
    "    int process(int n, const void *in_buf, void *out_buf) {",
    "        const float *x = static_cast<const float *>(in_buf);",
    "        float *y = static_cast<float *>(out_buf);",
    "        strike_envelope(x, y, n);",
    "        return n;",
    "    }",
    "};",
  ].join("\n");
  const dir = path.join(ROOT, "port-item-size-mismatch", "good");
  const base = { "lightning.h": fs.readFileSync(path.join(dir, "lightning.h"), "utf8"), "lib.rs": fs.readFileSync(path.join(dir, "lib.rs"), "utf8"), "front_end.cc": block };

  it("a configured port-declaration call is checked like the defaults", async () => {
    const { parseConfigText } = await import("../../server/src/analysis/config");
    const cfg = parseConfigText([
      "[ports]",
      "decl = [ { call = \"declare_stream\", item_size_args = [1], direction = \"seq\" } ]",
    ].join("\n"), ".ferrule.toml");
    const { findings } = await analyze(base, { families: cfg.families });
    expect(got(findings)).toEqual(["port-item-size-mismatch front_end.cc:6"]);
    expect(findings.find((f) => f.rule === "port-item-size-mismatch")!.message).toContain("`sizeof(short)` (2 bytes)");
  });

  it("without the setting the unknown call declares no ports", async () => {
    const { findings } = await analyze(base);
    expect(got(findings)).toEqual([]);
  });
});

describe("the demo workspace", () => {
  it("reports the planted complex-vs-float port slip and the bytes-as-items slip, and not the correct interleaved call", async () => {
    const demo = path.join(__dirname, "..", "..", "test-fixtures", "sonar-demo");
    const { findings } = await run(demo);
    const mine = got(findings);
    expect(mine).toEqual(["length-unit-mismatch blocks/spectrum_block.cc:24", "port-item-size-mismatch blocks/spectrum_block.cc:18"]);
    const unit = findings.find((f) => f.rule === "length-unit-mismatch")!;
    expect(unit.message).toContain("from `from_raw_parts(power, n)` at spectrum.rs:21");
  });
});

describe("documentation", () => {
  it("the documented [ports] example (README, Block ports) reports what the docs say", async () => {
    const cfg = parseConfigText(`[ports]
  decl = [
    { call = "add_channel", item_size_args = [1], direction = "in" },
    { call = "add_result",  item_size_args = [1], direction = "out" },
    { call = "ports::declare", item_size_args = [2], direction = "seq" },
  ]
  work_methods = ["work", "process_block"]
  `, ".ferrule.toml");
    const { findings } = await analyze({
      "seis.h": "#include <stddef.h>\nvoid seis_envelope(const float *in, float *out, size_t n);\n",
      "lib.rs": "#[no_mangle] pub unsafe extern \"C\" fn seis_envelope(input: *const f32, out: *mut f32, n: usize) { let x = core::slice::from_raw_parts(input, n); let y = core::slice::from_raw_parts_mut(out, n); y.copy_from_slice(x); }\n",
      "g.cc": `#include <complex>
  #include <cstdint>
  #include "seis.h"
  class geophone_block : public block {
  public:
      geophone_block(size_t vlen) : vlen_(vlen) {
          add_channel("raw", sizeof(int16_t) * 2);      // input port 0: int16 I/Q pairs
          add_result("envelope", sizeof(float) * vlen); // output port 0: vlen floats per item
      }
      int process_block(int n, const void *in_buf, void *out_buf) {
          auto *iq = static_cast<const std::complex<float> *>(in_buf); // port-item-size-mismatch: 8 vs 4 bytes
          auto *env = static_cast<float *>(out_buf);
          seis_envelope(reinterpret_cast<const float *>(iq), env, n);  // vector-port-count: n, not n * vlen
          return n;
      }
  private:
      size_t vlen_;
  };
  ` }, { families: cfg.families });
    expect(got(findings)).toEqual(["item-size-mismatch g.cc:13", "port-item-size-mismatch g.cc:11", "vector-port-count g.cc:13"]);
  });
});

describe("length-unit-mismatch: an item count where the kernel takes bytes", () => {
  it("reports each call at its line: an error on an explicit byte contract, a warning on naming alone, with the fix", async () => {
    const { findings } = await run(path.join(ROOT, "length-unit-mismatch", "bad"));
    const unit = findings.filter((f) => f.rule === "length-unit-mismatch" && f.range.file.endsWith("gain_block.cc"));
    const by = new Map(unit.map((f) => [f.range.line + 1, f]));
    expect([...by.keys()].sort((a, b) => a - b)).toEqual([11, 12, 13, 23, 31]);
    const sev = (l: number) => by.get(l)!.severity;
    const rel = (l: number) => by.get(l)!.related.map((r) => r.message).join(" | ");
    // Rust body `from_raw_parts_mut(raw, nbytes / size_of::<f32>())`
    expect(sev(11)).toBe("error");
    expect(by.get(11)!.message).toContain("`n * nchan_` counts float items (`n`, `nchan_` read as item counts), but `nbytes` of `seis_gain_scaled` is in bytes");
    expect(by.get(11)!.message).toContain("pass `n * nchan_ * sizeof(float)`");
    expect(rel(11)).toContain("from_raw_parts_mut(raw, nbytes / size_of::<f32>())");
    // clang `__sized_by(nbytes)`
    expect(sev(12)).toBe("error");
    expect(rel(12)).toContain("__sized_by(nbytes) raw");
    expect(by.get(12)!.message).toContain("pass `n * sizeof(float)`");
    // GCC access attribute on a `const void *`: the item type is the argument's (float)
    expect(sev(13)).toBe("error");
    expect(rel(13)).toContain("access(read_only, 1, 2)");
    expect(by.get(13)!.message).toContain("pass `2 * n * nchan_ * sizeof(float)`");
    // the ferrule annotation
    expect(sev(23)).toBe("error");
    expect(rel(23)).toContain("ferrule-buffers: taper[nbytes bytes]");
    // naming only (`nbytes`), with `.size()` of a std::vector<float> as the count
    expect(sev(31)).toBe("warning");
    expect(by.get(31)!.message).toContain("pass `raw.size() * sizeof(float)`");
    expect(rel(31)).toContain("naming: `nbytes` reads as a byte count");
  });

  it("the radio-correlator probe without `* sizeof(float)` at its two byte-count calls is reported at both", async () => {
    const dir = path.join(__dirname, "..", "..", "test-fixtures", "clean", "radio-correlator");
    const files = readDir(dir);
    const drop = (file: string, from: string, to: string) => {
      expect(files[file]).toContain(from);
      files[file] = files[file]!.replace(from, to);
    };
    drop("blocks/dump_block.cc", "xc_checksum(power, n * nchan_ * sizeof(float))", "xc_checksum(power, n * nchan_)");
    drop("blocks/power_block.cc", "xc_scale_raw(power, n * nchan_ * sizeof(float), gain_)", "xc_scale_raw(power, n * nchan_, gain_)");
    const { findings } = await analyze(files);
    const lines = (f: string) => files[f]!.split("\n").findIndex((l) => l.includes("n * nchan_)") || l.includes("n * nchan_, gain_)")) + 1;
    expect(got(findings)).toEqual([`length-unit-mismatch blocks/dump_block.cc:${lines("blocks/dump_block.cc")}`, `length-unit-mismatch blocks/power_block.cc:${lines("blocks/power_block.cc")}`]);
    expect(findings.filter((f) => f.rule === "length-unit-mismatch").every((f) => f.severity === "error")).toBe(true);
  });
});
