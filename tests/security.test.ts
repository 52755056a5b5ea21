// What ferrule may touch: it reads source files under the paths it is given (and the configured
// include paths), never follows an include or a symlink out of them, never runs anything from the
// workspace (no build scripts, no macros, no compilers: the only process is node itself), and
// never writes into the workspace during a check.
//
// The CLI runs under strace (-f: worker threads too) so the check is on the system calls the
// process really made, not on what the code says it does.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as os from "node:os";
import * as path from "node:path";
import { spawnSync } from "node:child_process";
import { FIXTURES } from "./helpers/analyze.js";
import { Workspace, listSources } from "../server/src/analysis/workspace.js";
import { DEFAULTS } from "../server/src/analysis/config.js";

const ROOT = path.resolve(FIXTURES, "..");
const CLI = path.join(ROOT, "bin", "ferrule.js");
let tmp: string;
let ws: string;
let outside: string;

interface Traced { code: number | null; stdout: string; opened: string[]; execs: string[]; writes: string[] }

/** Runs the CLI under strace and returns the files it opened, wrote and the programs it ran. */
function traced(args: string[], cwd: string, env: Record<string, string> = {}): Traced {
  const log = path.join(tmp, `strace-${Date.now()}-${Math.random().toString(36).slice(2)}.log`);
  const r = spawnSync("strace", ["-f", "-qq", "-e", "trace=execve,open,openat,creat,rename,renameat,renameat2,unlink,unlinkat,mkdir,mkdirat", "-o", log, process.execPath, CLI, ...args], {
    cwd, encoding: "utf8", timeout: 120_000, maxBuffer: 64 * 1024 * 1024, env: { ...process.env, ...env },
  });
  const lines = fs.readFileSync(log, "utf8").split("\n");
  const quoted = (l: string) => /"((?:[^"\\]|\\.)*)"/.exec(l)?.[1] ?? "";
  const opened = lines.filter((l) => /\bopen(at)?\(/.test(l) && !/= -1 /.test(l)).map(quoted);
  const writes = lines.filter((l) => (/\bopen(at)?\(/.test(l) && /O_WRONLY|O_RDWR|O_CREAT/.test(l)) || /\b(creat|rename|renameat2?|unlink|unlinkat|mkdir|mkdirat)\(/.test(l)).filter((l) => !/= -1 /.test(l)).map(quoted);
  const execs = lines.filter((l) => /\bexecve\(/.test(l) && !/= -1 /.test(l)).map(quoted);
  return { code: r.status, stdout: r.stdout, opened: opened.map((p) => path.resolve(cwd, p)), execs, writes: writes.map((p) => path.resolve(cwd, p)) };
}

function snapshot(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
      const p = path.join(d, e.name);
      const st = fs.lstatSync(p);
      out.push(`${path.relative(dir, p)} ${st.mode} ${st.size} ${st.mtimeMs}`);
      if (e.isDirectory() && !e.isSymbolicLink()) walk(p);
    }
  };
  walk(dir);
  return out;
}

beforeAll(() => {
  expect(fs.existsSync(path.join(ROOT, "dist", "cli.js")), "run `node scripts/build.mjs` first (npm test does)").toBe(true);
  expect(spawnSync("strace", ["-V"]).status, "strace is needed (installed by .ci/run)").toBe(0);
  tmp = fs.realpathSync(fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-security-")));
  ws = path.join(tmp, "ws");
  outside = path.join(tmp, "outside");
  fs.cpSync(path.join(FIXTURES, "sonar-demo"), ws, { recursive: true });
  fs.mkdirSync(outside);
  // A header outside the workspace that would produce findings if it were ever read.
  fs.writeFileSync(path.join(outside, "secret.h"), "#ifndef S\n#define S\nint sonar_set_gain(double db, int extra);\nvoid outside_only_fn(void);\n#endif\n");
  fs.writeFileSync(path.join(outside, "secret.rs"), "#[no_mangle]\npub extern \"C\" fn outside_only_rust(x: f64) -> i64 { x as i64 }\n");
  // Includes that escape the workspace, by relative path and to a system file.
  fs.writeFileSync(path.join(ws, "blocks", "escape.cc"), `#include "../../outside/secret.h"\n#include "../../../../../../../../etc/passwd"\n#include "/etc/hostname"\nint use() { return 0; }\n`);
  // Symlinks: a file and a folder pointing outside, a loop, a dangling one.
  fs.symlinkSync(path.join(outside, "secret.h"), path.join(ws, "include", "evil.h"));
  fs.symlinkSync(outside, path.join(ws, "vendor"));
  fs.symlinkSync("..", path.join(ws, "kernels", "loop"));
  // Things a build would run: ferrule must not.
  const marker = path.join(tmp, "EXECUTED");
  fs.writeFileSync(path.join(ws, "kernels", "build.rs"), `fn main() { std::fs::write(${JSON.stringify(marker)}, "build.rs ran").unwrap(); }\n`);
  fs.writeFileSync(path.join(ws, "Makefile"), `all:\n\ttouch ${marker}\n`);
  fs.writeFileSync(path.join(ws, "kernels", "src", "macros.rs"), `macro_rules! boom { () => { std::process::Command::new("touch").arg(${JSON.stringify(marker)}).status() } }\n#[no_mangle]\npub extern "C" fn macro_user() -> i32 { let _ = boom!(); 0 }\n`);
});
afterAll(() => {
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
});

describe("includes never leave the workspace", () => {
  test("Model.resolveInclude matches only files already in the workspace", async () => {
    const w = await Workspace.create({ ...DEFAULTS });
    w.loadAll([ws]);
    const model = w.model();
    for (const f of model.files.keys()) expect(f.startsWith(ws + path.sep), f).toBe(true);
    const esc = model.files.get(path.join(ws, "blocks", "escape.cc"))!;
    expect(esc.includes.map((i) => [i.path, model.includeTarget(i)])).toEqual([
      ["../../outside/secret.h", undefined],
      ["../../../../../../../../etc/passwd", undefined],
      ["/etc/hostname", undefined],
    ]);
    expect(model.resolveInclude(path.join(ws, "blocks", "x.cc"), "../../outside/secret.h")).toBeUndefined();
    // (the only mention of the outside is the notice that a symlink to it was not followed)
    expect(w.check().filter((f) => f.rule !== "file-skipped" && /outside_only|secret/.test(f.message + f.range.file)).map((f) => f.message)).toEqual([]);
  });

  test("the CLI opens no file outside the workspace except its own install and the system's", () => {
    const t = traced(["check", "--format", "json", ws], ws);
    expect([0, 1]).toContain(t.code);
    const foreign = t.opened.filter((p) => p.startsWith(outside) || p === "/etc/passwd" || p === "/etc/hostname");
    expect(foreign).toEqual([]);
    // and it did read the workspace (the trace is not empty by accident)
    expect(t.opened).toContain(path.join(ws, "include", "sonar_kernels.h"));
    const out = JSON.parse(t.stdout) as { findings: { rule: string; file: string; message: string }[] };
    expect(out.findings.filter((f) => f.rule !== "file-skipped" && /outside_only|secret\.h/.test(f.message))).toEqual([]);
  });
});

describe("symlinks", () => {
  test("a symlink out of the workspace is not followed and says so; a loop terminates", () => {
    const walk = listSources([ws]);
    expect(walk.files.some((f) => f.includes(`${path.sep}vendor${path.sep}`) || f.endsWith("evil.h"))).toBe(false);
    expect(walk.files.some((f) => f.includes(`${path.sep}loop${path.sep}`))).toBe(false);
    expect(new Set(walk.files).size).toBe(walk.files.length);
    const notes = walk.notices.map((n) => `${path.relative(ws, n.range.file)}: ${n.message}`);
    expect(notes).toContainEqual(expect.stringMatching(/^include\/evil\.h: skipped: .*outside the workspace/));
    expect(notes).toContainEqual(expect.stringMatching(/^vendor: skipped: .*outside the workspace/));
  });

  test("a symlink into a configured include path is followed (it is a configured root)", () => {
    const walk = listSources([ws], [], undefined, [ws, outside]);
    expect(walk.files).toContain(path.join(ws, "include", "evil.h"));
    expect(walk.files).toContain(path.join(ws, "vendor", "secret.rs"));
  });
});

describe("nothing runs, nothing is written", () => {
  test("check (text, json, sarif) and layout run no program and leave the workspace byte-for-byte as it was", () => {
    const before = snapshot(ws);
    for (const args of [["check", ws], ["check", "--format", "json", ws], ["check", "--format", "sarif", ws], ["layout", ws], ["check", "--show-fixes", "--format", "json", ws]]) {
      const t = traced(args, ws, { FERRULE_WORKERS: "2" });
      expect([0, 1], args.join(" ")).toContain(t.code);
      // the only program started is node itself (worker threads are threads, not processes)
      expect(t.execs, args.join(" ")).toEqual([process.execPath]);
      // nothing created, renamed, removed or opened for writing in the workspace or next to it
      expect(t.writes.filter((p) => p.startsWith(tmp)), args.join(" ")).toEqual([]);
    }
    expect(snapshot(ws)).toEqual(before);
    expect(fs.existsSync(path.join(tmp, "EXECUTED"))).toBe(false);
  });

  test("the only write in the sources is the baseline file the user names", () => {
    const hits: string[] = [];
    const walk = (d: string) => {
      for (const e of fs.readdirSync(d, { withFileTypes: true })) {
        const p = path.join(d, e.name);
        if (e.isDirectory()) walk(p);
        else if (p.endsWith(".ts")) {
          fs.readFileSync(p, "utf8").split("\n").forEach((l, i) => {
            if (/\b(writeFileSync|writeFile|appendFile|createWriteStream|child_process|execSync|execFile|spawn\(|fork\(|node:vm|new Function\(|\beval\()/.test(l) && !/^\s*(\/\/|\*)/.test(l)) hits.push(`${path.relative(ROOT, p)}:${i + 1}`);
          });
        }
      }
    };
    walk(path.join(ROOT, "server", "src"));
    // cli/main.ts writes the baseline named by --update-baseline; nothing else writes or runs
    // anything. analysis/memory.ts imports node:vm for one fixed call, checked below.
    // analysis/facts-cache.ts writes the facts cache: one write, of a temporary file inside the
    // cache folder (never inside the checked folder: tests/facts-cache.test.ts), renamed over the entry
    const cacheSrc = fs.readFileSync(path.join(ROOT, "server/src/analysis/facts-cache.ts"), "utf8").split("\n");
    const cacheWrite = cacheSrc.findIndex((l) => /writeFileSync/.test(l) && !/^\s*(\/\/|\*)/.test(l));
    expect(cacheSrc[cacheWrite]!.trim()).toBe("fs.writeFileSync(tmp, body);");
    expect(cacheSrc.filter((l) => /const tmp = /.test(l)).map((l) => l.trim())).toEqual(["const tmp = `${p}.${process.pid}.${Math.random().toString(36).slice(2)}.tmp`;"]);
    expect(cacheSrc.filter((l) => /const p = this\.pathOf\(key\)/.test(l)).length).toBe(2);
    expect(cacheSrc.some((l) => l.includes("return path.join(this.spec.dir, key.slice(0, 2), `${key}.facts`);"))).toBe(true);
    expect(hits.filter((h) => !h.startsWith("server/src/cli/") && h !== "server/src/analysis/memory.ts:9" && h !== `server/src/analysis/facts-cache.ts:${cacheWrite + 1}`)).toEqual([]);
    const memory = fs.readFileSync(path.join(ROOT, "server/src/analysis/memory.ts"), "utf8");
    expect(memory.split("\n")[8]).toBe('import * as vm from "node:vm";');
    // the only use of vm: fetch V8's collector function by its constant name, nothing read from outside
    expect(memory.match(/\bvm\.\w+\([^)]*\)/g)).toEqual(['vm.runInNewContext("gc")']);
  });
});
