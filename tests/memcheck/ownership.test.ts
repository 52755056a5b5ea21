// Memory proof for the ownership rules: the bad fixtures really leak / double free / use freed
// memory, and the good fixtures really run clean. Checked by valgrind's memcheck
// (`valgrind --error-exitcode=99 --leak-check=full`) on programs built from the fixtures with
// `rustc --crate-type staticlib` (the Rust side) and `g++` (the C++ side), linked with
// -lpthread -ldl -lm (what a Rust staticlib needs on Linux; rustc lists these native libraries
// with --print native-static-libs).
//
// The same test also shows that the quick-fix edits produce code the compilers accept: every
// Rust bad fixture with all its ownership fixes applied compiles with rustc, and every C++ bad
// fixture with its fixes applied compiles with g++ -fsyntax-only.
//
// ferrule is an aid, not a proof of memory safety: valgrind here checks the fixtures, not
// ferrule's reasoning in general.
import { beforeAll, describe, expect, it } from "vitest";
import { execFileSync, spawnSync } from "node:child_process";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { analyze } from "../helpers/analyze.js";
import { fixesFor } from "../../server/src/fixes/index.js";
import { ownershipFamily } from "../../server/src/rules/ownership.js";
import { applyEditsRel as applyEdits } from "../helpers/edits-rel.js";

const ROOT = path.resolve(__dirname, "../../test-fixtures/ownership");
const have = (tool: string) => spawnSync(tool, ["--version"], { stdio: "ignore" }).status === 0;
const TOOLS = have("rustc") && have("g++") && have("valgrind");
const OWN = new Set(ownershipFamily.rules.map((r) => r.id));

let tmp = "";
const LIBS = ["-lpthread", "-ldl", "-lm"];

function staticlib(rs: string, name: string): string {
  const out = path.join(tmp, `lib${name}.a`);
  execFileSync("rustc", ["--edition", "2021", "--crate-type", "staticlib", "-C", "debuginfo=1", "-C", "opt-level=0", "-A", "warnings", "-o", out, rs], { stdio: "pipe" });
  return out;
}

function program(cc: string, lib: string, name: string): string {
  const out = path.join(tmp, name);
  execFileSync("g++", ["-std=c++17", "-g", "-O0", "-o", out, cc, lib, ...LIBS], { stdio: "pipe" });
  return out;
}

function memcheck(exe: string): { status: number | null; log: string } {
  const r = spawnSync("valgrind", ["--error-exitcode=99", "--leak-check=full", exe], { encoding: "utf8", timeout: 60_000 });
  return { status: r.status, log: r.stderr };
}

describe.skipIf(!TOOLS)("valgrind memcheck on the ownership fixtures (rustc staticlib + g++)", () => {
  let ltg = "";
  beforeAll(() => {
    tmp = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-memcheck-"));
    ltg = staticlib(path.join(ROOT, "common/ltg.rs"), "ltg");
  });

  it("wrapper-leaks-handle/bad leaks the tracker: valgrind reports it definitely lost", () => {
    const r = memcheck(program(path.join(ROOT, "wrapper-leaks-handle/bad/stroke_block.cc"), ltg, "leak"));
    expect(r.status, r.log).toBe(99);
    expect(r.log).toMatch(/definitely lost: [1-9]/);
    expect(r.log).toMatch(/ltg_tracker_new/);
  });

  it("copyable-owning-wrapper/bad frees the tracker twice: valgrind reports an invalid free", () => {
    const r = memcheck(program(path.join(ROOT, "copyable-owning-wrapper/bad/stroke_block.cc"), ltg, "copy"));
    expect(r.status, r.log).toBe(99);
    expect(r.log).toMatch(/Invalid free\(\)/);
    expect(r.log).toMatch(/ltg_tracker_free/);
  });

  it("copyable-owning-wrapper/bad/tally_block: hand-written copies that copy the pointer free the tracker and the sensor twice", () => {
    const r = memcheck(program(path.join(ROOT, "copyable-owning-wrapper/bad/tally_block.cc"), ltg, "usercopy"));
    expect(r.status, r.log).toBe(99);
    expect(r.log).toMatch(/Invalid free\(\)/);
    expect(r.log).toMatch(/ltg_tracker_free/);
    expect(r.log).toMatch(/ltg_sensor_free/);
  });

  it("foreign-allocator-free/bad/stroke_share: a std::shared_ptr without a deleter frees a Rust CString with delete", () => {
    // C++ [util.smartptr.shared.dest]/1: with no deleter the destructor does `delete p`. The
    // Rust CString came from the global allocator, which in a staticlib is `System` (std::alloc
    // docs: "staticlibs are guaranteed to use the System by default"), i.e. malloc here, so
    // memcheck sees memory malloc made released by operator delete.
    const r = memcheck(program(path.join(ROOT, "foreign-allocator-free/bad/stroke_share.cc"), ltg, "shared"));
    expect(r.status, r.log).toBe(99);
    expect(r.log).toMatch(/Mismatched free\(\) \/ delete \/ delete \[\]/);
    expect(r.log).toMatch(/_Sp_counted_ptr<char\*/);
  });

  it("move-keeps-source-handle/bad frees the tracker twice after a move: invalid free", () => {
    const r = memcheck(program(path.join(ROOT, "move-keeps-source-handle/bad/stroke_block.cc"), ltg, "move"));
    expect(r.status, r.log).toBe(99);
    expect(r.log).toMatch(/Invalid free\(\)/);
  });

  it("borrower-takes-ownership/bad: the second push reads the freed picker (invalid read)", () => {
    const lib = staticlib(path.join(ROOT, "borrower-takes-ownership/bad/lib.rs"), "pickbad");
    const r = memcheck(program(path.join(ROOT, "borrower-takes-ownership/bad/main.cc"), lib, "borrow"));
    expect(r.status, r.log).toBe(99);
    expect(r.log).toMatch(/Invalid read of size/);
    expect(r.log).toMatch(/seis_picker_push/);
  });

  it("the good fixtures run clean (RAII wrapper with deleted copy and a move, unique_ptr with the release function as deleter, helper release; borrowing push; its moves empty the source)", () => {
    const runs = [
      memcheck(program(path.join(ROOT, "wrapper-leaks-handle/good/stroke_block.cc"), ltg, "good_raii")),
      memcheck(program(path.join(ROOT, "borrower-takes-ownership/good/main.cc"), staticlib(path.join(ROOT, "borrower-takes-ownership/good/lib.rs"), "pickgood"), "good_borrow")),
      // hand-written copies that make a new tracker; deleted copies
      memcheck(program(path.join(ROOT, "copyable-owning-wrapper/good/tally_block.cc"), ltg, "good_usercopy")),
      // std::shared_ptr with the release function (or a lambda calling it) as deleter
      memcheck(program(path.join(ROOT, "foreign-allocator-free/good/stroke_share.cc"), ltg, "good_shared")),
    ];
    for (const r of runs) {
      expect(r.log).toMatch(/ERROR SUMMARY: 0 errors/);
      expect(r.status, r.log).not.toBe(99);
    }
  });
});

function readDir(rel: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const d of [rel, "common"]) {
    for (const f of fs.readdirSync(path.join(ROOT, d))) {
      if (/\.(rs|h|cc)$/.test(f)) out[`${d}/${f}`] = fs.readFileSync(path.join(ROOT, d, f), "utf8");
    }
  }
  return out;
}

/** Applies the first fix of every ownership finding in `rel`, one after another (re-analysing each time). */
async function applyAllFixes(rel: string): Promise<{ files: Record<string, string>; applied: number }> {
  let files = readDir(rel);
  let applied = 0;
  for (let round = 0; round < 12; round++) {
    const { ws, findings } = await analyze(files);
    const f = findings.find((x) => OWN.has(x.rule) && x.range.file.includes(`/${rel}/`) && fixesFor(x, ws.model()).length);
    if (!f) break;
    files = applyEdits(files, fixesFor(f, ws.model())[0]!.edits);
    applied++;
  }
  return { files, applied };
}

describe.skipIf(!(have("rustc") && have("g++")))("fixed fixtures still compile (rustc, g++)", () => {
  const RUST = ["handle-no-release/bad", "release-without-null-check/bad", "borrower-takes-ownership/bad", "release-kind-mismatch/bad", "panic-across-c-abi/bad"];
  for (const rel of RUST) {
    it(`${rel} with its fixes applied compiles with rustc`, async () => {
      const { files, applied } = await applyAllFixes(rel);
      expect(applied).toBeGreaterThan(0);
      const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-fixed-"));
      const rs = path.join(dir, "lib.rs");
      fs.writeFileSync(rs, files[`${rel}/lib.rs`]!);
      const r = spawnSync("rustc", ["--edition", "2021", "--crate-type", "lib", "-A", "warnings", "--emit", "metadata", "-o", path.join(dir, "lib.rmeta"), rs], { encoding: "utf8" });
      expect(r.status, `${r.stderr}\n--- fixed source:\n${files[`${rel}/lib.rs`]}`).toBe(0);
    });
  }
  const CXX = ["wrapper-leaks-handle/bad", "move-keeps-source-handle/bad", "foreign-allocator-free/bad", "copyable-owning-wrapper/bad"];
  for (const rel of CXX) {
    it(`${rel} with its fixes applied compiles with g++`, async () => {
      const { files, applied } = await applyAllFixes(rel);
      expect(applied).toBeGreaterThan(0);
      const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-fixed-"));
      fs.mkdirSync(path.join(dir, "common"));
      fs.mkdirSync(path.join(dir, "x", "y"), { recursive: true });
      fs.writeFileSync(path.join(dir, "common", "ltg.h"), files["common/ltg.h"]!);
      const ccs = Object.keys(files).filter((k) => k.startsWith(rel) && k.endsWith(".cc"));
      expect(ccs.length).toBeGreaterThan(0);
      for (const cc of ccs) {
        const out = path.join(dir, "x", "y", path.basename(cc)); // ../../common/ltg.h resolves as in the fixture tree
        fs.writeFileSync(out, files[cc]!);
        const r = spawnSync("g++", ["-std=c++17", "-fsyntax-only", out], { encoding: "utf8" });
        if (rel === "copyable-owning-wrapper/bad") {
          // With the copy members deleted, the fixture's own copies (`stroke_block b = a;`,
          // `tally_block b(a);`) no longer compile: each double free became a compile error, and
          // nothing else is wrong.
          const errs = r.stderr.split("\n").filter((l) => / error: /.test(l));
          expect(r.status).not.toBe(0);
          expect(errs.length, r.stderr).toBeGreaterThan(0);
          for (const e of errs) expect(e, `${r.stderr}\n--- fixed source:\n${files[cc]}`).toMatch(/\.cc:\d+:\d+: error: use of deleted function .(\w+)::\1\(const \1&\)/);
          continue;
        }
        expect(r.status, `${r.stderr}\n--- fixed source:\n${files[cc]}`).toBe(0);
      }
    });
  }
});
