// The language server (`ferrule lsp --stdio`): an adapter from the Language Server Protocol to the
// analysis engine. Findings become diagnostics on both sides of the seam, fixes become code
// actions, the model answers hover / definition / references / symbols.

import * as fs from "node:fs";
import * as path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import {
  CodeActionKind, DiagnosticSeverity, ErrorCodes, DidChangeWatchedFilesNotification, FileChangeType, LSPErrorCodes, MessageType, ShowMessageNotification,
  ProposedFeatures, ResponseError, SymbolKind, TextDocumentSyncKind, createConnection,
  type CancellationToken, type CodeAction, type Connection, type Diagnostic, type DocumentSymbol,
  type InitializeParams, type InitializeResult, type Location, type Range as LspRange, type TextEdit as LspTextEdit,
  type WorkspaceEdit,
} from "vscode-languageserver/node";
import { Workspace } from "../analysis/workspace.js";
import { codeId, defaultCacheDir, insideAny } from "../analysis/facts-cache.js";
import { bundleScript } from "../analysis/parallel.js";
import { VERSION } from "../cli/main.js";
import type { FerruleConfig } from "../analysis/config.js";
import { CONFIG_FILE } from "../analysis/config.js";
import { initParsers, langOf } from "../parse/parser.js";
import type { Finding } from "../rules/api.js";
import type { Range } from "../model/types.js";
import { shortTriple } from "../model/targets.js";
import { fixesFor } from "../fixes/index.js";
import { cHeaderFor } from "../fixes/cgen.js";
import { Engine, relPath, type AnalysisResult } from "./engine.js";
import { resolveConfig, type EditorSettings } from "./config.js";
import { problemOf } from "./validate.js";
import { definitions, documentSymbols, hoverMarkdown, itemAt, layoutDocument, references } from "./features.js";

export const GENERATE_HEADER_KIND = "source.generateCDeclarations.ferrule";
const DEBOUNCE_MS = 2;
const IDLE_FULL_CHECK_MS = 2000;

const toUri = (file: string) => pathToFileURL(file).href;
function toFile(uri: string): string | undefined {
  try {
    return uri.startsWith("file:") ? path.normalize(fileURLToPath(uri)) : undefined;
  } catch {
    return undefined;
  }
}
const lspRange = (r: Range): LspRange => ({ start: { line: r.line, character: r.col }, end: { line: r.endLine, character: r.endCol } });
const SEV: Record<string, DiagnosticSeverity> = { error: DiagnosticSeverity.Error, warning: DiagnosticSeverity.Warning, info: DiagnosticSeverity.Information, hint: DiagnosticSeverity.Hint };

function findingKey(f: Finding): string {
  return `${f.rule}|${f.range.file}|${f.range.line}|${f.range.col}|${f.message}`;
}

function base(file: string): string {
  return path.basename(file);
}

/** Diagnostics per file: each finding on its own file, and mirrored at each related location in
 * another file so both sides of the seam show it. */
/** The diagnostics of each file (findings where they are, mirrors on the other side); with
 * `only`, just for those files. */
export function diagnosticsByFile(findings: Finding[], only?: Set<string>): Map<string, Diagnostic[]> {
  const out = new Map<string, Diagnostic[]>();
  const add = (file: string, d: Diagnostic) => {
    let a = out.get(file);
    if (!a) out.set(file, (a = []));
    a.push(d);
  };
  for (const f of findings) {
    if (only && !only.has(f.range.file) && !f.related.some((r) => only.has(r.range.file))) continue;
    const key = findingKey(f);
    if (!only || only.has(f.range.file)) add(f.range.file, {
      range: lspRange(f.range), severity: SEV[f.severity] ?? DiagnosticSeverity.Warning, code: f.rule, source: "ferrule",
      message: f.message,
      relatedInformation: f.related.map((r) => ({ location: { uri: toUri(r.range.file), range: lspRange(r.range) }, message: r.message })),
      data: { key },
    });
    const mirrored = new Set<string>();
    for (const r of f.related) {
      if (r.range.file === f.range.file || (only && !only.has(r.range.file))) continue;
      const mk = `${r.range.file}:${r.range.line}:${r.range.col}`;
      if (mirrored.has(mk)) continue;
      mirrored.add(mk);
      add(r.range.file, {
        range: lspRange(r.range), severity: SEV[f.severity] ?? DiagnosticSeverity.Warning, code: f.rule, source: "ferrule",
        message: `${r.message} — the other side (${base(f.range.file)}:${f.range.line + 1}) disagrees: ${f.message}`,
        relatedInformation: [{ location: { uri: toUri(f.range.file), range: lspRange(f.range) }, message: "reported here" }],
        data: { key, mirror: true },
      });
    }
  }
  return out;
}

function cancelled(token: CancellationToken | undefined): void {
  if (token?.isCancellationRequested) throw new ResponseError(LSPErrorCodes.RequestCancelled, "cancelled");
}

export interface ServerStats {
  lastAnalysis?: { scope: string; ms: number; changed: number; affected: number | "all"; context?: number; publishMs?: number };
}

export function startServer(conn?: Connection): void {
  const connection = conn ?? createConnection(ProposedFeatures.all);
  let engine: Engine | undefined;
  /** After `shutdown`, requests get InvalidRequest and notifications are dropped (LSP 3.17). */
  let shutDown = false;
  let roots: string[] = [];
  let settings: EditorSettings | undefined;
  let caps: InitializeParams["capabilities"] = {};
  let tomlFile: string | undefined;
  let ready: Promise<void> = Promise.resolve();
  let timer: NodeJS.Timeout | undefined;
  let idleTimer: NodeJS.Timeout | undefined;
  let generation = 0;
  const published = new Map<string, string>(); // file → JSON of the last diagnostics sent
  const forcePublish = new Set<string>(); // just opened: send its diagnostics even if unchanged
  let byKey = new Map<string, Finding>();
  const stats: ServerStats = {};

  const log = (m: string) => connection.console.log(`[ferrule] ${m}`);
  // A failed request to the client (e.g. one it does not implement) must not end the server.
  process.on("unhandledRejection", (e) => connection.console.error(`[ferrule] ${(e as Error)?.message ?? e}`));

  async function fetchSettings(): Promise<EditorSettings | undefined> {
    if (caps.workspace?.configuration) {
      try {
        const r = await connection.workspace.getConfiguration({ section: "ferrule" });
        if (r && typeof r === "object") return r as EditorSettings;
      } catch {
        /* client without settings: keep what we have */
      }
    }
    return settings;
  }

  function configure(): FerruleConfig {
    const r = resolveConfig(roots, settings);
    tomlFile = r.tomlFile;
    for (const p of r.problems) {
      const msg = `ferrule configuration: ${p.message} (ignored; ferrule keeps working with the other settings and the defaults)`;
      connection.console.warn(msg);
      // a notification, not window/showMessageRequest: nothing to await, nothing to fail
      void connection.sendNotification(ShowMessageNotification.type, { type: MessageType.Warning, message: msg });
    }
    return r.config;
  }

  /** The CLI's facts cache serves the first scan too (unless FERRULE_CACHE_DIR="" or the folder
   * lies inside a workspace folder). */
  function withCache(ws: Workspace): Workspace {
    const dir = process.env.FERRULE_CACHE_DIR === "" ? undefined : defaultCacheDir();
    if (dir && !insideAny(dir, roots)) ws.cacheAt = { dir, code: codeId(VERSION, bundleScript()), maxBytes: ws.config.cacheMaxMb * 2 ** 20 };
    return ws;
  }

  async function scan(reason: string): Promise<void> {
    if (!engine) return;
    let progress: { begin(t: string, p?: number, m?: string, c?: boolean): void; report(p: number, m?: string): void; done(): void } | undefined;
    if (caps.window?.workDoneProgress) {
      try {
        progress = await connection.window.createWorkDoneProgress();
        progress.begin("ferrule: indexing", 0, reason, false);
      } catch {
        progress = undefined;
      }
    }
    const t0 = performance.now();
    const n = engine.scan(roots, (done, total) => progress?.report(Math.round((100 * done) / Math.max(1, total)), `${done}/${total} files`));
    progress?.report(100, "checking");
    runAnalysis(true);
    progress?.done();
    log(`indexed ${n} files in ${Math.round(performance.now() - t0)} ms (${reason})`);
  }

  /**
   * A full garbage collection once the user pauses: V8 otherwise grows its heap lazily under a
   * stream of edits (RSS +30 % over 10,000 edits while the live data stays ~8 MiB). Collecting
   * when idle gives the memory back; it costs a few milliseconds on a heap that small. A second
   * collection a moment later hands back the pages the first one's sweeping emptied (measured:
   * V8's reserved heap 14 -> 21 MiB over 10,000 edits with one, 14 -> 15 MiB with two; server RSS
   * 1.11x -> 1.06-1.07x of the RSS after the first 1,000 edits, tests/fuzz/lsp-memory.test.ts).
   */
  function idleGc(): void {
    // present when started with --expose-gc (bin/ferrule.js and the VS Code client do so)
    const gc = (globalThis as { gc?: () => void }).gc;
    gc?.();
    if (gc) setTimeout(gc, 300).unref();
  }

  function schedule(delay = DEBOUNCE_MS): void {
    if (timer) clearTimeout(timer);
    timer = setTimeout(() => {
      timer = undefined;
      runAnalysis(false);
    }, delay);
  }

  function scheduleIdleFullCheck(): void {
    if (idleTimer) clearTimeout(idleTimer);
    idleTimer = setTimeout(() => {
      idleTimer = undefined;
      if (!engine) return;
      engine.needFull = true;
      runAnalysis(false);
      idleGc();
    }, IDLE_FULL_CHECK_MS);
  }

  /** Runs pending analysis now (requests call this so they see the latest text). */
  function flush(): void {
    if (timer) {
      clearTimeout(timer);
      timer = undefined;
    }
    if (engine?.hasWork) runAnalysis(false);
  }

  function runAnalysis(full: boolean): void {
    if (!engine) return;
    const myGen = ++generation;
    const versions = new Map([...engine.docs.values()].map((d) => [d.file, d.version] as const));
    let res: AnalysisResult;
    try {
      res = engine.analyze(full);
    } catch (e) {
      connection.console.error(`[ferrule] analysis failed: ${(e as Error).stack ?? e}`);
      return;
    }
    // Analysis is synchronous; a newer run can only have started if this one re-entered, in which
    // case its (newer) result has already been published.
    if (myGen !== generation) return;
    stats.lastAnalysis = { scope: res.scope, ms: Math.round(res.ms * 10) / 10, changed: res.changed.length, affected: res.affected === "all" ? "all" : res.affected.size, context: engine.lastContext };
    const tp = performance.now();
    const before = byKey;
    byKey = new Map(res.findings.map((f) => [findingKey(f), f]));
    publish(res, versions, before);
    stats.lastAnalysis.publishMs = Math.round((performance.now() - tp) * 10) / 10;
    if (engine.needsSeed) {
      setTimeout(() => {
        try {
          engine?.seed();
        } catch (e) {
          connection.console.error(`[ferrule] reading open documents failed: ${(e as Error).message}`);
        }
      }, 0);
    }
    if (res.scope === "scoped" && res.changed.length) scheduleIdleFullCheck();
  }

  function publish(res: AnalysisResult, versions: Map<string, number>, before: Map<string, Finding>): void {
    if (!engine) return;
    // Files with any diagnostic now (where a finding is, and where its mirrors are).
    const hasDiag = new Set<string>();
    for (const f of res.findings) {
      hasDiag.add(f.range.file);
      for (const r of f.related) hasDiag.add(r.range.file);
    }
    const candidates = new Set<string>();
    if (res.affected === "all") {
      for (const f of hasDiag) candidates.add(f);
      for (const f of published.keys()) candidates.add(f);
    } else {
      for (const f of res.affected) candidates.add(f);
      for (const f of res.changed) candidates.add(f);
      // mirrors of affected files' findings live in other files
      for (const f of res.findings) if (res.affected.has(f.range.file)) for (const r of f.related) candidates.add(r.range.file);
      // and where the mirrors of their previous findings were
      for (const f of before.values()) if (res.affected.has(f.range.file)) for (const r of f.related) candidates.add(r.range.file);
      for (const file of published.keys()) if (!hasDiag.has(file)) candidates.add(file);
    }
    const always = new Set([...res.changed, ...forcePublish]);
    for (const f of forcePublish) candidates.add(f);
    forcePublish.clear();
    const diags = diagnosticsByFile(res.findings, candidates);
    // the edited documents first: their diagnostics are the ones the user is waiting for
    for (const file of [...always, ...[...candidates].filter((f) => !always.has(f))]) {
      const list = diags.get(file) ?? [];
      const json = JSON.stringify(list);
      const prev = published.get(file);
      if (prev === json && !always.has(file)) continue;
      if (prev === undefined && list.length === 0 && !always.has(file) && !engine.docs.has(file)) continue;
      if (list.length) published.set(file, json);
      else published.delete(file);
      const version = versions.get(file);
      void connection.sendDiagnostics({ uri: toUri(file), diagnostics: list, ...(version !== undefined ? { version } : {}) });
    }
  }

  connection.onInitialize((params: InitializeParams): InitializeResult => {
    caps = params.capabilities;
    const folders = params.workspaceFolders?.map((f) => toFile(f.uri)).filter((x): x is string => !!x) ?? [];
    const rootFromUri = params.rootUri ? toFile(params.rootUri) : params.rootPath ?? undefined;
    roots = folders.length ? folders : rootFromUri ? [rootFromUri] : [];
    const io = params.initializationOptions as { settings?: EditorSettings } | undefined;
    settings = io?.settings;
    return {
      capabilities: {
        textDocumentSync: { openClose: true, change: TextDocumentSyncKind.Incremental, save: false },
        hoverProvider: true,
        definitionProvider: true,
        referencesProvider: true,
        documentSymbolProvider: true,
        codeActionProvider: { codeActionKinds: [CodeActionKind.QuickFix, GENERATE_HEADER_KIND] },
        executeCommandProvider: { commands: ["ferrule.server.recheck"] },
        workspace: { workspaceFolders: { supported: true, changeNotifications: false } },
      },
      serverInfo: { name: "ferrule", version: "0.1.0" },
    };
  });

  connection.onInitialized(() => {
    ready = (async () => {
      await initParsers();
      settings = await fetchSettings();
      engine = new Engine(withCache(new Workspace(configure())));
      if (caps.workspace?.didChangeWatchedFiles?.dynamicRegistration) {
        void connection.client.register(DidChangeWatchedFilesNotification.type, {
          watchers: [{ globPattern: "**/*.{rs,c,h,cc,cpp,cxx,hpp,hh,hxx}" }, { globPattern: `**/${CONFIG_FILE}` }, { globPattern: "**/{Cargo.toml,compile_commands.json}" }],
        });
      }
      // Documents opened before we were ready
      for (const [file, d] of early) engine.open(file, d.text, d.version);
      early.clear();
      await scan("start");
    })().catch((e) => connection.console.error(`[ferrule] start failed: ${(e as Error).stack ?? e}`));
  });

  const early = new Map<string, { text: string; version: number }>();

  /** Whether a notification is well formed and the server still takes it; logs a dropped one. */
  const accept = (method: string, p: unknown): boolean => {
    if (shutDown) return false;
    const why = problemOf(method, p);
    if (why) connection.console.log(`ferrule: dropped a malformed ${method}: ${why}`);
    return !why;
  };
  /** For requests: InvalidRequest after shutdown, InvalidParams for a malformed one. */
  const check = (method: string, p: unknown): void => {
    if (shutDown) throw new ResponseError(ErrorCodes.InvalidRequest, "the server is shutting down");
    const why = problemOf(method, p);
    if (why) throw new ResponseError(ErrorCodes.InvalidParams, `malformed ${method}: ${why}`);
  };

  connection.onDidOpenTextDocument((p) => {
    if (!accept("textDocument/didOpen", p)) return;
    const file = toFile(p.textDocument.uri);
    if (!file || !langOf(file)) return;
    if (!engine) {
      early.set(file, { text: p.textDocument.text, version: p.textDocument.version });
      return;
    }
    engine.open(file, p.textDocument.text, p.textDocument.version);
    forcePublish.add(file);
    schedule(0);
  });

  connection.onDidChangeTextDocument((p) => {
    if (!accept("textDocument/didChange", p)) return;
    const file = toFile(p.textDocument.uri);
    if (!file) return;
    if (!engine) {
      const e = early.get(file);
      const full = p.contentChanges.filter((c) => !("range" in c)).pop();
      if (e && full) e.text = full.text;
      // incremental changes before start: re-read on open; apply them once ready
      if (e && !full) void ready.then(() => { engine?.change(file, p.contentChanges as never, p.textDocument.version); schedule(); });
      return;
    }
    engine.change(file, p.contentChanges as never, p.textDocument.version);
    schedule();
  });

  connection.onDidCloseTextDocument((p) => {
    if (!accept("textDocument/didClose", p)) return;
    const file = toFile(p.textDocument.uri);
    if (!file) return;
    early.delete(file);
    if (!engine) return;
    engine.close(file);
    schedule();
  });

  connection.onDidChangeWatchedFiles(async (p) => {
    if (!accept("workspace/didChangeWatchedFiles", p)) return;
    await ready;
    if (!engine) return;
    let reconfigure = false;
    for (const c of p.changes) {
      const file = toFile(c.uri);
      if (!file) continue;
      if (path.basename(file) === CONFIG_FILE) {
        reconfigure = true;
        continue;
      }
      if (path.basename(file) === "Cargo.toml" || path.basename(file) === "compile_commands.json") {
        engine.buildFileChanged();
        continue;
      }
      engine.diskChanged(file, c.type === FileChangeType.Deleted ? "deleted" : c.type === FileChangeType.Created ? "created" : "changed");
    }
    if (reconfigure) await reconfigureAll("`.ferrule.toml` changed", true);
    else schedule();
  });

  async function reconfigureAll(reason: string, onlyIfChanged = false): Promise<void> {
    await ready;
    if (!engine) return;
    settings = await fetchSettings();
    const cfg = configure();
    // Clients send didChangeConfiguration right after start; re-index only when something changed.
    if (onlyIfChanged && JSON.stringify(cfg) === JSON.stringify(engine.ws.config)) return;
    engine.reset(withCache(new Workspace(cfg)));
    await scan(reason);
  }

  connection.onDidChangeConfiguration(async (p) => {
    const s = (p.settings as { ferrule?: EditorSettings } | undefined)?.ferrule;
    if (s) settings = s;
    await reconfigureAll("settings changed", true);
  });

  async function current(token?: CancellationToken): Promise<Engine> {
    if (shutDown) throw new ResponseError(ErrorCodes.InvalidRequest, "the server is shutting down");
    await ready;
    cancelled(token);
    if (!engine) throw new ResponseError(LSPErrorCodes.ContentModified, "ferrule is not ready");
    flush();
    cancelled(token);
    return engine;
  }

  /** The boundary item under the cursor of a position request, with the current engine. */
  async function itemRequest(p: { textDocument: { uri: string }; position: { line: number; character: number } }, token: CancellationToken | undefined) {
    check("position", p);
    const e = await current(token);
    const file = toFile(p.textDocument.uri);
    if (!file) return null;
    const model = e.model();
    const item = itemAt(model, file, p.position);
    return item ? { e, file, model, item } : null;
  }

  connection.onHover(async (p, token) => {
    const r = await itemRequest(p, token);
    if (!r) return null;
    cancelled(token);
    return { contents: { kind: "markdown", value: hoverMarkdown(r.model, r.item, (f) => r.e.text(f), roots) }, range: lspRange(r.item.at) };
  });

  connection.onDefinition(async (p, token) => {
    const r = await itemRequest(p, token);
    if (!r) return null;
    return definitions(r.model, r.item, r.file).map((l): Location => ({ uri: toUri(l.file), range: lspRange(l) }));
  });

  connection.onReferences(async (p, token) => {
    const r = await itemRequest(p, token);
    if (!r) return null;
    return references(r.model, r.item, p.context.includeDeclaration).map((l): Location => ({ uri: toUri(l.file), range: lspRange(l) }));
  });

  connection.onDocumentSymbol(async (p, token) => {
    check("uri", p);
    const e = await current(token);
    const file = toFile(p.textDocument.uri);
    if (!file) return null;
    const KIND = { function: SymbolKind.Function, struct: SymbolKind.Struct, enum: SymbolKind.Enum, union: SymbolKind.Struct, type: SymbolKind.TypeParameter };
    return documentSymbols(e.model(), file).map((s): DocumentSymbol => ({ name: s.name, detail: s.detail, kind: KIND[s.kind], range: lspRange(s.range), selectionRange: lspRange(s.selectionRange) }));
  });

  connection.onCodeAction(async (p, token) => {
    check("textDocument/codeAction", p);
    const e = await current(token);
    const file = toFile(p.textDocument.uri);
    if (!file) return null;
    const model = e.model();
    const actions: CodeAction[] = [];
    const only = p.context.only;
    const wants = (kind: string) => !only || only.some((o) => kind === o || kind.startsWith(o + "."));
    if (wants(CodeActionKind.QuickFix)) {
      const seen = new Set<string>();
      const found: { f: Finding; diag?: Diagnostic }[] = [];
      for (const d of p.context.diagnostics) {
        const key = (d.data as { key?: string } | undefined)?.key;
        const f = key ? byKey.get(key) : undefined;
        if (f && !seen.has(key!)) {
          seen.add(key!);
          found.push({ f, diag: d });
        }
      }
      if (!found.length) {
        // Clients that do not echo diagnostics back: findings touching the requested range.
        const overlaps = (r: Range) => r.file === file && r.line <= p.range.end.line && r.endLine >= p.range.start.line;
        for (const f of e.findings) {
          if (overlaps(f.range) || f.related.some((r) => overlaps(r.range))) {
            const key = findingKey(f);
            if (!seen.has(key)) {
              seen.add(key);
              found.push({ f });
            }
          }
        }
      }
      for (const { f, diag } of found) {
        for (const fix of fixesFor(f, model)) {
          const changes: Record<string, LspTextEdit[]> = {};
          for (const ed of fix.edits) (changes[toUri(ed.range.file)] ??= []).push({ range: lspRange(ed.range), newText: ed.newText });
          actions.push({ title: `ferrule: ${fix.title}`, kind: CodeActionKind.QuickFix, diagnostics: diag ? [diag] : undefined, isPreferred: fix.preferred, edit: { changes } });
        }
      }
    }
    if (wants(GENERATE_HEADER_KIND) && model.files.get(file)?.lang === "rust") {
      const a = generateHeaderAction(file);
      if (a) actions.push(a);
    }
    cancelled(token);
    return actions;

    function generateHeaderAction(rsFile: string): CodeAction | undefined {
      const fns = (model.files.get(rsFile)?.fns ?? []).filter((f) => f.role === "export" && f.noMangle);
      if (!fns.length) return undefined;
      const dir = path.dirname(rsFile);
      let stem = path.basename(rsFile, ".rs");
      if (stem === "lib" || stem === "mod" || stem === "main") stem = path.basename(path.basename(dir) === "src" ? path.dirname(dir) : dir);
      let target = path.join(dir, `${stem}.h`);
      for (let i = 2; fs.existsSync(target) && i < 100; i++) target = path.join(dir, `${stem}_${i}.h`);
      const guard = `${path.basename(target, ".h").replace(/[^A-Za-z0-9]/g, "_").toUpperCase()}_H`;
      let text: string;
      try {
        text = cHeaderFor(fns, guard, model);
      } catch (err) {
        connection.console.warn(`[ferrule] header generation failed: ${(err as Error).message}`);
        return undefined;
      }
      const uri = toUri(target);
      const canCreate = caps.workspace?.workspaceEdit?.resourceOperations?.includes("create") && caps.workspace?.workspaceEdit?.documentChanges;
      if (!canCreate) return undefined;
      const edit: WorkspaceEdit = {
        documentChanges: [
          { kind: "create", uri, options: { ignoreIfExists: false, overwrite: false } },
          { textDocument: { uri, version: null }, edits: [{ range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } }, newText: text }] },
        ],
      };
      return { title: `ferrule: Generate C declarations for this file's ${fns.length} export(s) in ${path.basename(target)}`, kind: GENERATE_HEADER_KIND, edit };
    }
  });

  connection.onExecuteCommand(async (p, token) => {
    check("workspace/executeCommand", p);
    if (p.command === "ferrule.server.recheck") {
      await ready;
      cancelled(token);
      await reconfigureAll("re-check requested");
      return { files: engine?.ws.files().length ?? 0, findings: engine?.findings.length ?? 0 };
    }
    return null;
  });

  /** ferrule/layout: the layout table text for the type at a position (or every type of the file). */
  connection.onRequest("ferrule/layout", async (p: { textDocument: { uri: string }; position?: { line: number; character: number } }, token) => {
    check("ferrule/layout", p);
    const e = await current(token);
    const file = toFile(p.textDocument.uri);
    if (!file) return { text: "Not a file." };
    const model = e.model();
    const facts = model.files.get(file);
    let decls = facts?.types.filter((t) => t.kind !== "alias") ?? [];
    if (p.position) {
      const item = itemAt(model, file, p.position);
      if (item?.kind === "type") decls = [item.decl];
      else if (item?.kind === "fn") {
        const g = model.symbols.get(item.symbol);
        const named = new Set<string>();
        for (const f of g ? [...g.rust, ...g.c] : []) for (const prm of [...f.params.map((x) => x.type), f.ret]) {
          let t = prm;
          while (t.k === "ptr") t = t.to;
          if (t.k === "named") {
            const d = model.aggregate(t, f.lang === "rust" ? "rust" : "c");
            if (d) named.add(d.id);
          }
        }
        const all = [...model.files.values()].flatMap((x) => x.types);
        if (named.size) decls = all.filter((d) => named.has(d.id));
      }
    }
    const head = `targets: ${model.targets.map(shortTriple).join(", ")} — ${relPath(roots, file)}\n`;
    return { text: head + layoutDocument(model, decls, roots) };
  });

  /** ferrule/stats: timings of the last analysis (used by the benchmark). */
  connection.onRequest("ferrule/stats", async () => ({ ...stats, files: engine?.ws.files().length ?? 0, findings: engine?.findings.length ?? 0, memory: process.memoryUsage() }));

  connection.onShutdown(() => {
    shutDown = true;
    if (timer) clearTimeout(timer);
    if (idleTimer) clearTimeout(idleTimer);
    engine?.dispose();
  });

  connection.listen();
}
