// End to end in the real VS Code: code-server 4.100.3 (VS Code 1.100.3, the last line that runs
// on Node 20) installed from the npm registry into a cache folder outside the repository
// (scripts/e2e/install-code-server.sh, the same recipe as ../shared/editor-e2e/ on the build
// machines), our .vsix unpacked into a fresh extensions folder, the demo workspace opened in
// Debian's Chromium through playwright-core. Everything is asserted from the page itself:
//   - the error squiggle on the planted mismatch in the header (slip #1 of the demo README),
//   - the matching row in the Problems panel with our message,
//   - the hover with the per-target layout table,
//   - applying the quick-fix (Ctrl+.) removes the diagnostic.
// Screenshots go to tests/.tmp/e2e/; FERRULE_E2E_SCREENSHOT=docs/screenshot.png also copies the
// diagnostic + hover one there.

import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import * as fs from "node:fs";
import * as net from "node:net";
import * as os from "node:os";
import * as path from "node:path";
import { fileURLToPath } from "node:url";
import { chromium, type Browser, type Page } from "playwright-core";
import { unzipTo } from "../helpers/zip.js";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const CS_VERSION = "4.100.3";
const CACHE = process.env.FERRULE_E2E_CACHE ?? path.join(os.homedir(), ".cache", "ferrule-e2e");
const CS_DIR = path.join(CACHE, `code-server-${CS_VERSION}`);
const CS_BIN = path.join(CS_DIR, "node_modules/.bin/code-server");
const CHROMIUM = process.env.FERRULE_E2E_CHROMIUM ?? "/usr/lib/chromium/chromium";
const SHOTS = path.join(ROOT, "tests/.tmp/e2e");
const VSIX = path.join(ROOT, "dist-vsix/ferrule.vsix");

let R: string; // run folder (home, user data, extensions, workspace)
let WS: string;
let server: ChildProcess | undefined;
let browser: Browser | undefined;
let page: Page;
let serverLog = "";

function log(m: string) {
  process.stderr.write(`[e2e] ${m}\n`);
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.listen(0, "127.0.0.1", () => {
      const p = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(p));
    });
    s.on("error", reject);
  });
}

async function retry<T>(what: string, n: number, fn: (attempt: number) => Promise<T>): Promise<T> {
  let last: unknown;
  for (let i = 1; i <= n; i++) {
    try {
      return await fn(i);
    } catch (e) {
      last = e;
      log(`${what}: attempt ${i}/${n} failed: ${(e as Error).message.split("\n")[0]}`);
      await page?.keyboard.press("Escape").catch(() => {});
      await new Promise((r) => setTimeout(r, 1000 * i));
    }
  }
  throw last;
}

async function shot(name: string): Promise<string> {
  fs.mkdirSync(SHOTS, { recursive: true });
  const p = path.join(SHOTS, name);
  await page.screenshot({ path: p });
  return p;
}

function killServer() {
  if (server?.pid) {
    try { process.kill(-server.pid, "SIGTERM"); } catch { /* gone */ }
    const pid = server.pid;
    setTimeout(() => { try { process.kill(-pid, "SIGKILL"); } catch { /* gone */ } }, 2000).unref();
  }
  server = undefined;
}

beforeAll(async () => {
  // 1. code-server from npm into the cache (idempotent; about a minute the first time)
  if (!fs.existsSync(CS_BIN) || !fs.existsSync(path.join(CS_DIR, ".ferrule-complete"))) {
    log(`installing code-server ${CS_VERSION} into ${CS_DIR}`);
    const r = spawnSync("sh", [path.join(ROOT, "scripts/e2e/install-code-server.sh"), CS_DIR], { stdio: ["ignore", "pipe", "pipe"], encoding: "utf8", timeout: 900_000 });
    if (r.status !== 0) throw new Error(`code-server install failed:\n${r.stdout?.slice(-3000)}\n${r.stderr?.slice(-3000)}`);
  }
  // 2. the .vsix (npm run test:e2e packages it first)
  if (!fs.existsSync(VSIX)) throw new Error(`${VSIX} missing: run \`npm run package\` first`);
  R = fs.mkdtempSync(path.join(os.tmpdir(), "ferrule-e2e-"));
  const ext = path.join(R, "extensions");
  const manifest = JSON.parse(fs.readFileSync(path.join(ROOT, "package.json"), "utf8"));
  const extDir = path.join(ext, `${manifest.publisher}.${manifest.name}-${manifest.version}`);
  await unzipTo(VSIX, extDir, "extension/");
  // 3. a private copy of the demo workspace
  WS = path.join(R, "sonar-demo");
  fs.cpSync(path.join(ROOT, "test-fixtures/sonar-demo"), WS, { recursive: true });
  // 4. user settings
  const home = path.join(R, "home");
  fs.mkdirSync(path.join(R, "data/User"), { recursive: true });
  fs.writeFileSync(path.join(R, "data/User/settings.json"), JSON.stringify({
    "workbench.startupEditor": "none", "security.workspace.trust.enabled": false, "telemetry.telemetryLevel": "off",
    "update.mode": "none", "extensions.autoCheckUpdates": false, "extensions.autoUpdate": false, "workbench.tips.enabled": false,
    "editor.hover.delay": 200, "editor.minimap.enabled": false, "workbench.enableExperiments": false,
    "chat.commandCenter.enabled": false, "workbench.secondarySideBar.defaultVisibility": "hidden",
  }, null, 1));
  fs.writeFileSync(path.join(R, "config.yaml"), "auth: none\ncert: false\n");
  const port = await freePort();
  const env = { ...process.env, HOME: home, XDG_CONFIG_HOME: path.join(home, ".config"), XDG_DATA_HOME: path.join(home, ".local/share"), XDG_CACHE_HOME: path.join(home, ".cache") };
  fs.mkdirSync(home, { recursive: true });
  server = spawn(CS_BIN, ["--bind-addr", `127.0.0.1:${port}`, "--auth", "none", "--disable-telemetry", "--disable-update-check", "--disable-workspace-trust",
    "--config", path.join(R, "config.yaml"), "--user-data-dir", path.join(R, "data"), "--extensions-dir", ext, WS], { env, detached: true, stdio: ["ignore", "pipe", "pipe"] });
  server.stdout!.on("data", (d) => (serverLog += d));
  server.stderr!.on("data", (d) => (serverLog += d));
  const t0 = Date.now();
  for (;;) {
    try {
      const r = await fetch(`http://127.0.0.1:${port}/healthz`);
      if (r.ok) break;
    } catch { /* not yet */ }
    if (Date.now() - t0 > 90_000) throw new Error(`code-server did not come up:\n${serverLog.slice(-3000)}`);
    await new Promise((r) => setTimeout(r, 300));
  }
  log(`code-server up on port ${port} after ${Date.now() - t0} ms`);
  browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: ["--no-sandbox", "--disable-dev-shm-usage", "--disable-gpu"] });
  page = await browser.newPage({ viewport: { width: 1400, height: 900 } });
  await page.goto(`http://127.0.0.1:${port}/?folder=${encodeURIComponent(WS)}`);
  await page.waitForSelector(".monaco-workbench", { timeout: 90_000 });
  // open the header through Quick Open
  await retry("open the header", 4, async () => {
    await page.locator(".monaco-workbench").click({ position: { x: 700, y: 400 } }).catch(() => {});
    await page.keyboard.press("Control+P");
    await page.waitForSelector(".quick-input-widget input", { timeout: 10_000 });
    await page.keyboard.type("sonar_kernels.h", { delay: 20 });
    await page.waitForSelector(".quick-input-widget .monaco-list-row", { timeout: 10_000 });
    await page.waitForTimeout(400);
    await page.keyboard.press("Enter");
    await page.waitForSelector(".tab.active:has-text('sonar_kernels.h')", { timeout: 10_000 });
    await page.waitForSelector(".editor-instance .view-lines", { timeout: 10_000 });
  });
}, 1_200_000);

afterAll(async () => {
  await browser?.close().catch(() => {});
  killServer();
  if (R && !process.env.FERRULE_E2E_KEEP) fs.rmSync(R, { recursive: true, force: true });
});

/** Top offsets (px) of the view lines whose text contains `needle`. */
async function lineTops(needle: string): Promise<number[]> {
  return page.evaluate((n) => [...document.querySelectorAll(".editor-instance .view-line")]
    .filter((el) => (el.textContent ?? "").replace(/\u00a0/g, " ").includes(n))
    .map((el) => parseFloat((el as HTMLElement).style.top)), needle);
}

/** Top offsets of the lines that carry an error squiggle. */
async function squiggleTops(): Promise<number[]> {
  return page.evaluate(() => [...document.querySelectorAll(".editor-instance .squiggly-error")]
    .map((el) => parseFloat((el.parentElement as HTMLElement).style.top)));
}

describe("ferrule in VS Code (code-server 4.100.3)", () => {
  test("an error squiggle sits on the planted mismatch in the header", async () => {
    await page.waitForSelector(".editor-instance .squiggly-error", { timeout: 120_000 });
    const target = await lineTops("int sonar_fir_process(");
    expect(target.length).toBe(1);
    await expect.poll(squiggleTops, { timeout: 30_000 }).toContain(target[0]);
  });

  test("hover on the struct shows the per-target layout table", async () => {
    const hover = await retry("hover", 4, async () => {
      const word = page.locator(".editor-instance .view-line span", { hasText: /^sonar_detection$/ }).last();
      await word.waitFor({ timeout: 10_000 });
      const box = (await word.boundingBox())!;
      await page.mouse.move(box.x + 2, box.y + box.height / 2);
      await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2, { steps: 4 });
      const h = page.locator(".monaco-hover:visible", { hasText: "size / align" });
      await h.first().waitFor({ timeout: 15_000 });
      return h.first();
    });
    await page.waitForTimeout(300);
    const p = await shot("1-diagnostic-and-hover.png");
    const text = (await hover.innerText()).replace(/\u00a0/g, " ");
    fs.writeFileSync(path.join(SHOTS, "hover.txt"), text);
    expect(text).toContain("C struct sonar_detection");
    expect(text).toContain("Rust struct SonarDetection");
    // x86-64 psABI: 24 bytes, 8-aligned; i386 psABI: double members 4-aligned → 20 / 4
    const cells = (l: string) => l.trim().split("|").slice(1, -1).map((c) => c.trim());
    const rows = text.split("\n").filter((l) => l.trim().startsWith("|"));
    const head = cells(rows.find((l) => cells(l)[0] === "field")!);
    const size = cells(rows.find((l) => cells(l)[0] === "size / align")!);
    expect(size[head.indexOf("x86_64")], text).toBe("24 / 8");
    expect(size[head.indexOf("i686")], text).toBe("20 / 4");
    const dest = process.env.FERRULE_E2E_SCREENSHOT;
    if (dest) fs.copyFileSync(p, path.resolve(ROOT, dest));
    await page.mouse.move(5, 880);
    await page.keyboard.press("Escape");
  });

  test("the Problems panel lists the finding with our message", async () => {
    const row = await retry("problems panel", 4, async () => {
      await page.keyboard.press("Control+Shift+P");
      await page.waitForSelector(".quick-input-widget input", { timeout: 10_000 });
      await page.keyboard.type("View: Focus Problems", { delay: 10 });
      await page.waitForTimeout(500);
      await page.keyboard.press("Enter");
      const r = page.locator(".markers-panel .monaco-list-row", { hasText: "parameter 3 `output`" }).filter({ hasNotText: "other side" });
      await r.first().waitFor({ timeout: 30_000 });
      return r.first();
    });
    const text = (await row.innerText()).replace(/\u00a0/g, " ");
    expect(text).toContain("sonar_fir_process");
    expect(text).toContain("points to `f32` in Rust but `double` in C");
    expect(text).toMatch(/param-type-mismatch/);
    await shot("2-problems.png");
  });

  test("applying the quick-fix (Ctrl+.) removes the diagnostic", async () => {
    const target = (await lineTops("int sonar_fir_process("))[0]!;
    await retry("quick fix", 4, async () => {
      // put the cursor on the diagnostic: click its row in the Problems panel
      await page.locator(".markers-panel .monaco-list-row", { hasText: "parameter 3 `output`" }).filter({ hasNotText: "other side" }).first().click();
      await page.waitForTimeout(400);
      await page.keyboard.press("Control+.");
      const item = page.locator(".action-widget .monaco-list-row, .context-view .action-item", { hasText: "float *output" });
      await item.first().waitFor({ timeout: 15_000 });
      await shot("3-quick-fix-menu.png");
      await item.first().click();
      await expect.poll(async () => (await lineTops("float *output")).length, { timeout: 15_000 }).toBe(1);
    });
    // the squiggle leaves that line, and the Problems row goes away
    await expect.poll(squiggleTops, { timeout: 30_000 }).not.toContain(target);
    await expect.poll(() => page.locator(".markers-panel .monaco-list-row", { hasText: "parameter 3 `output`" }).count(), { timeout: 30_000 }).toBe(0);
    // the other planted slips are still shown
    expect(await page.locator(".markers-panel .monaco-list-row", { hasText: "pointer-constness" }).count()).toBeGreaterThan(0);
    await shot("4-after-fix.png");
  });
});
