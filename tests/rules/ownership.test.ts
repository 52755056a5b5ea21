// Rule family "ownership": a bad and a good fixture per rule under test-fixtures/ownership/
// (lightning-detector and seismic-array scenarios of our own). Bad fixtures must produce the
// finding at the exact line; good fixtures (including a RAII wrapper with deleted copy and a
// working move, a std::unique_ptr with the release function as deleter, and a handle released
// through a helper function) must produce no ownership finding at all. Each fix offered for a
// finding is applied to the fixture text and must make that finding go away.
import { describe, expect, it } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { analyze, at } from "../helpers/analyze.js";
import { fixesFor } from "../../server/src/fixes/index.js";
import { applyEditsRel as applyEdits } from "../helpers/edits-rel.js";
import { ownershipFamily } from "../../server/src/rules/ownership.js";
import type { Finding } from "../../server/src/rules/api.js";

const ROOT = path.resolve(__dirname, "../../test-fixtures/ownership");
const OWN = new Set(ownershipFamily.rules.map((r) => r.id));

function read(dir: string, withCommon: boolean): Record<string, string> {
  const out: Record<string, string> = {};
  const add = (d: string) => {
    for (const f of fs.readdirSync(d)) {
      const p = path.join(d, f);
      if (fs.statSync(p).isDirectory()) add(p);
      else if (/\.(rs|h|cc|c)$/.test(f)) out[path.relative(ROOT, p)] = fs.readFileSync(p, "utf8");
    }
  };
  add(path.join(ROOT, dir));
  if (withCommon) add(path.join(ROOT, "common"));
  return out;
}

const CXX_RULES = new Set(["wrapper-leaks-handle", "copyable-owning-wrapper", "move-keeps-source-handle", "handle-used-after-release", "foreign-allocator-free", "handle-kind-mismatch"]);

async function run(rule: string, kind: "bad" | "good") {
  const files = read(`${rule}/${kind}`, CXX_RULES.has(rule));
  const { findings } = await analyze(files);
  return { files, findings, own: findings.filter((f) => OWN.has(f.rule)) };
}

function show(fs_: Finding[]): string {
  return fs_.map((f) => `${f.rule} ${f.range.file}:${f.range.line + 1} ${f.message}`).join("\n");
}

const CASES: Record<string, string[]> = {
  "handle-no-release": ["handle-no-release/bad/lib.rs:13", "handle-no-release/bad/lib.rs:29"],
  "release-without-null-check": ["release-without-null-check/bad/lib.rs:16", "release-without-null-check/bad/lib.rs:31"],
  "borrower-takes-ownership": ["borrower-takes-ownership/bad/lib.rs:21"],
  "release-kind-mismatch": ["release-kind-mismatch/bad/lib.rs:24", "release-kind-mismatch/bad/lib.rs:36"],
  "panic-across-c-abi": ["panic-across-c-abi/bad/lib.rs:15", "panic-across-c-abi/bad/lib.rs:31", "panic-across-c-abi/bad/lib.rs:36"],
  "handle-types-indistinct": ["handle-types-indistinct/bad/lib.rs:14", "handle-types-indistinct/bad/lib.rs:21"],
  "wrapper-leaks-handle": ["wrapper-leaks-handle/bad/stroke_block.cc:16"],
  // stroke_block: implicit copies; tally_block: in-class user-written copy constructor and copy
  // assignment that copy the pointer; gain_block: an out-of-class user-written copy constructor
  "copyable-owning-wrapper": ["copyable-owning-wrapper/bad/stroke_block.cc:4", "copyable-owning-wrapper/bad/tally_block.cc:5", "copyable-owning-wrapper/bad/tally_block.cc:21"],
  "move-keeps-source-handle": ["move-keeps-source-handle/bad/stroke_block.cc:11"],
  "handle-used-after-release": ["handle-used-after-release/bad/calibrate.cc:8", "handle-used-after-release/bad/calibrate.cc:9"],
  // stroke_share: std::shared_ptr without a deleter, built in an expression (7), reset(p) on a
  // field (14), a field initialised in the constructor (18), a local taking over a raw pointer (23)
  "foreign-allocator-free": ["foreign-allocator-free/bad/labels.cc:11", "foreign-allocator-free/bad/labels.cc:17", "foreign-allocator-free/bad/labels.cc:21",
    "foreign-allocator-free/bad/stroke_share.cc:8", "foreign-allocator-free/bad/stroke_share.cc:14", "foreign-allocator-free/bad/stroke_share.cc:18", "foreign-allocator-free/bad/stroke_share.cc:23"],
  "handle-kind-mismatch": ["handle-kind-mismatch/bad/channels.cc:6", "handle-kind-mismatch/bad/channels.cc:11"],
};

describe("ownership rules", () => {
  for (const [rule, expected] of Object.entries(CASES)) {
    it(`${rule}: bad fixture is reported at the exact lines`, async () => {
      const { own } = await run(rule, "bad");
      expect(at(own, rule).sort(), show(own)).toEqual([...expected].sort());
    });
    it(`${rule}: good fixture has no ownership finding`, async () => {
      const { own } = await run(rule, "good");
      expect(own, show(own)).toEqual([]);
    });
  }
});

// Rules whose bad fixtures get a fix; every finding of these rules must offer one.
const FIXABLE = ["handle-no-release", "release-without-null-check", "borrower-takes-ownership", "release-kind-mismatch", "panic-across-c-abi",
  "wrapper-leaks-handle", "copyable-owning-wrapper", "move-keeps-source-handle", "foreign-allocator-free"];

describe("ownership quick-fixes", () => {
  for (const rule of FIXABLE) {
    it(`${rule}: applying each fix removes its finding`, async () => {
      const { files, own } = await run(rule, "bad");
      const { ws } = await analyze(files);
      const mine = own.filter((f) => f.rule === rule);
      expect(mine.length).toBeGreaterThan(0);
      let fixed = 0;
      for (const f of mine) {
        const fx = fixesFor(f, ws.model());
        // a std::unique_ptr with the default deleter needs its type changed: no text fix offered
        if (rule === "foreign-allocator-free" && f.message.includes("default deleter")) { expect(fx).toEqual([]); continue; }
        expect(fx.length, `no fix for ${f.message}`).toBeGreaterThan(0);
        const after = applyEdits(files, fx[0]!.edits);
        const again = (await analyze(after)).findings.filter((g) => g.rule === rule);
        expect(again.some((g) => g.message === f.message), `${f.message}\n--- after fix:\n${show(again)}`).toBe(false);
        expect(again.length).toBe(mine.length - 1);
        fixed++;
      }
      expect(fixed).toBeGreaterThan(0);
    });
  }
});

describe("sonar demo", () => {
  it("the CLI reports the copyable detector_block wrapper, with its fix under --show-fixes", async () => {
    const { run: cli } = await import("../../server/src/cli/main.js");
    let out = "";
    const demo = path.resolve(__dirname, "../../test-fixtures/sonar-demo");
    const code = await cli(["check", "--format", "json", "--show-fixes", demo], { cwd: demo, stdout: (s) => { out += s; }, stderr: () => {}, isTTY: false });
    expect(code).toBe(1);
    const json = JSON.parse(out) as { findings?: unknown[] } | unknown[];
    const list = (Array.isArray(json) ? json : json.findings ?? []) as { rule: string; file: string; line: number; fixes?: { title: string }[] }[];
    const hits = list.filter((f) => f.rule === "copyable-owning-wrapper");
    expect(hits.map((h) => `${h.file}:${h.line}`)).toEqual(["blocks/detector_block.cc:6"]);
    expect(hits[0]!.fixes?.[0]?.title).toMatch(/Delete the copy members of `detector_block`/);
    // the correct wrapper (beamformer_block: deleted copy members) is not reported
    expect(list.some((f) => f.rule === "copyable-owning-wrapper" && f.file.includes("beamformer"))).toBe(false);
  });
});

describe("ownership on broken and large input", () => {
  it("broken code yields no internal error and no crash", async () => {
    const files = {
      "a.rs": "pub extern \"C\" fn x_new() -> *mut X { Box::into_raw(Box::new(\n#[unsafe(no_mangle)] pub unsafe extern \"C\" fn x_free(h: *mut X) { Box::from_raw(",
      "b.cc": "class w { w() : h_(x_new( {} ~w() { x_free(h_) ; w(w&&o) : h_(o. {} ; struct { void operator()(",
      "c.cc": "void f() { " + "{".repeat(3000) + "x_free(p); delete p;" + "}".repeat(10),
      "d.h": "typedef struct x x; x *x_new(void); void x_free(x *h",
    };
    const { findings } = await analyze(files);
    expect(findings.filter((f) => f.rule === "internal-error")).toEqual([]);
  });

  it("a large C++ file (1,000 calls in one block, 150 classes) is checked quickly", async () => {
    const calls = Array.from({ length: 1000 }, (_, i) => `    ltg_tracker_feed(t, ${i}.0f);`).join("\n");
    const classes = Array.from({ length: 150 }, (_, i) => `class c${i} {\npublic:\n  c${i}() : h_(ltg_tracker_new(${i})) {}\n  ~c${i}() { ltg_tracker_free(h_); }\n  c${i}(const c${i} &) = delete;\n  c${i} &operator=(const c${i} &) = delete;\nprivate:\n  ltg_tracker *h_;\n};`).join("\n");
    const big = `#include "../../common/ltg.h"\nvoid run() {\n    ltg_tracker *t = ltg_tracker_new(4);\n${calls}\n    ltg_tracker_free(t);\n    ltg_tracker_feed(t, 1.0f);\n}\n${classes}\n`;
    const files = { ...read("wrapper-leaks-handle/good", true), "wrapper-leaks-handle/good/big.cc": big };
    const t0 = Date.now();
    const { findings } = await analyze(files);
    const ms = Date.now() - t0;
    // the file was read completely (within the per-file time budget of the extract layer)
    expect(findings.filter((f) => f.rule === "file-skipped")).toEqual([]);
    expect(at(findings, "handle-used-after-release")).toEqual([`wrapper-leaks-handle/good/big.cc:${1000 + 5}`]);
    expect(findings.filter((f) => f.rule === "copyable-owning-wrapper" || f.rule === "wrapper-leaks-handle")).toEqual([]);
    expect(ms).toBeLessThan(20_000);
  });
});

describe("copyable-owning-wrapper: user-written copies; foreign-allocator-free: std::shared_ptr", () => {
  const common = () => read("copyable-owning-wrapper/good", true);
  const withCc = async (cc: string) => {
    const files = { ...common(), "extra/block.cc": cc };
    const { findings } = await analyze(files);
    return findings.filter((f) => OWN.has(f.rule) && f.range.file.includes("/extra/"));
  };
  it("a copy that stores the pointer and then hands it to a function (a retain of a reference-counted handle) is not reported", async () => {
    const own = await withCc(`#include "../common/ltg.h"
extern "C" void host_track_ref(ltg_tracker *t); // a host-side reference count
class shared_tally {
public:
    explicit shared_tally(uint32_t w) : tracker_(ltg_tracker_new(w)) {}
    shared_tally(const shared_tally &o) : tracker_(o.tracker_) { host_track_ref(tracker_); }
    shared_tally &operator=(const shared_tally &) = delete;
    ~shared_tally() { ltg_tracker_free(tracker_); }
private:
    ltg_tracker *tracker_;
};
`);
    expect(at(own, "copyable-owning-wrapper"), show(own)).toEqual([]);
  });
  it("a copy assignment that copies the pointer is reported even when the copy constructor is deleted", async () => {
    const own = await withCc(`#include "../common/ltg.h"
class tally {
public:
    explicit tally(uint32_t w) : tracker_(ltg_tracker_new(w)) {}
    tally(const tally &) = delete;
    tally &operator=(const tally &o) { tracker_ = o.tracker_; return *this; }
    ~tally() { ltg_tracker_free(tracker_); }
private:
    ltg_tracker *tracker_;
};
`);
    expect(at(own, "copyable-owning-wrapper"), show(own)).toEqual(["extra/block.cc:2"]);
    expect(own[0]!.message).toContain("user-written copy assignment that copies the pointer");
    expect(own[0]!.related.some((r) => r.range.line === 5)).toBe(true);
  });
  it("std::shared_ptr of a C++ object, std::make_shared and shared_ptr(p, release) give nothing; unique_ptr::reset(p) with the default deleter is reported", async () => {
    const own = await withCc(`#include <memory>
#include "../common/ltg.h"
struct note { int v; };
int f(uint32_t ch) {
    std::shared_ptr<note> a(new note{1});
    auto b = std::make_shared<note>(note{2});
    std::shared_ptr<char> c(ltg_label(ch), &ltg_label_free);
    std::unique_ptr<char> d;
    d.reset(ltg_label(ch));
    return a->v + b->v + (c ? 1 : 0);
}
`);
    expect(at(own, "foreign-allocator-free"), show(own)).toEqual(["extra/block.cc:9"]);
    expect(own[0]!.message).toContain("default deleter");
  });
});
