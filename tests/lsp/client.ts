// A small LSP test client: spawns `npx ferrule lsp --stdio` (the shipped bundle, as an editor
// would) and talks JSON-RPC to it with vscode-jsonrpc / vscode-languageserver-protocol.

import { spawn, type ChildProcess } from "node:child_process";
import * as fs from "node:fs";
import * as path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { StreamMessageReader, StreamMessageWriter, createMessageConnection, type MessageConnection } from "vscode-jsonrpc/node";
import {
  DidChangeTextDocumentNotification, DidOpenTextDocumentNotification, InitializeRequest, InitializedNotification,
  PublishDiagnosticsNotification, type Diagnostic, type InitializeParams, type PublishDiagnosticsParams,
  type TextDocumentContentChangeEvent, type TextEdit, type WorkspaceEdit,
} from "vscode-languageserver-protocol/node";

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
export const uri = (file: string) => pathToFileURL(file).href;

export interface Client {
  conn: MessageConnection;
  proc: ChildProcess;
  /** Latest diagnostics per URI. */
  diags: Map<string, PublishDiagnosticsParams>;
  /** Every publish, in order, with the time it arrived. */
  log: { at: number; params: PublishDiagnosticsParams }[];
  stderr: string[];
  open(file: string, text?: string): Promise<void>;
  change(file: string, changes: TextDocumentContentChangeEvent[]): number;
  text(file: string): string;
  waitFor(pred: () => boolean, ms?: number, what?: string): Promise<void>;
  close(): Promise<void>;
}

export async function startClient(rootDir: string, opts: { settings?: Record<string, unknown>; capabilities?: InitializeParams["capabilities"] } = {}): Promise<Client> {
  const proc = spawn("npx", ["ferrule", "lsp", "--stdio"], { cwd: ROOT, stdio: ["pipe", "pipe", "pipe"], detached: true });
  const stderr: string[] = [];
  proc.stderr!.on("data", (d) => stderr.push(String(d)));
  const conn = createMessageConnection(new StreamMessageReader(proc.stdout!), new StreamMessageWriter(proc.stdin!));
  const diags = new Map<string, PublishDiagnosticsParams>();
  const log: Client["log"] = [];
  const texts = new Map<string, string>();
  const versions = new Map<string, number>();
  conn.onNotification(PublishDiagnosticsNotification.type, (p) => {
    diags.set(p.uri, p);
    log.push({ at: performance.now(), params: p });
  });
  conn.onRequest("workspace/configuration", (p: { items: unknown[] }) => p.items.map(() => opts.settings ?? {}));
  conn.onRequest("window/workDoneProgress/create", () => null);
  conn.onRequest("client/registerCapability", () => null);
  conn.onNotification("window/showMessage", (m: unknown) => { stderr.push(`showMessage: ${(m as { message: string }).message}\n`); });
  conn.onNotification("window/logMessage", () => {});
  conn.onNotification("$/progress", () => {});
  conn.listen();
  await conn.sendRequest(InitializeRequest.type, {
    processId: process.pid,
    rootUri: uri(rootDir),
    workspaceFolders: [{ uri: uri(rootDir), name: path.basename(rootDir) }],
    capabilities: opts.capabilities ?? {
      workspace: { configuration: true, workspaceEdit: { documentChanges: true, resourceOperations: ["create"] } },
      window: { workDoneProgress: true },
      textDocument: { publishDiagnostics: { relatedInformation: true, versionSupport: true }, hover: { contentFormat: ["markdown"] } },
    },
  });
  await conn.sendNotification(InitializedNotification.type, {});
  const waitFor = async (pred: () => boolean, ms = 30_000, what = "condition") => {
    const t0 = Date.now();
    while (!pred()) {
      if (Date.now() - t0 > ms) throw new Error(`timed out waiting for ${what}; server stderr:\n${stderr.join("")}`);
      await new Promise((r) => setTimeout(r, 10));
    }
  };
  const client: Client = {
    conn, proc, diags, log, stderr, waitFor,
    async open(file, text) {
      const t = text ?? fs.readFileSync(file, "utf8");
      texts.set(file, t);
      versions.set(file, 1);
      const languageId = file.endsWith(".rs") ? "rust" : file.endsWith(".h") || file.endsWith(".c") ? "c" : "cpp";
      await conn.sendNotification(DidOpenTextDocumentNotification.type, { textDocument: { uri: uri(file), languageId, version: 1, text: t } });
    },
    change(file, changes) {
      let t = texts.get(file)!;
      for (const c of changes) t = "range" in c ? applyEdits(t, [{ range: c.range, newText: c.text }]) : c.text;
      texts.set(file, t);
      const v = (versions.get(file) ?? 1) + 1;
      versions.set(file, v);
      void conn.sendNotification(DidChangeTextDocumentNotification.type, { textDocument: { uri: uri(file), version: v }, contentChanges: changes });
      return v;
    },
    text: (file) => texts.get(file)!,
    async close() {
      try {
        await Promise.race([conn.sendRequest("shutdown"), new Promise((r) => setTimeout(r, 3000))]);
        await conn.sendNotification("exit");
      } catch {
        /* already gone */
      }
      await new Promise((r) => setTimeout(r, 100));
      try { process.kill(-proc.pid!, "SIGKILL"); } catch { /* exited */ }
      conn.dispose();
    },
  };
  return client;
}

function offsetOf(text: string, p: { line: number; character: number }): number {
  let off = 0;
  for (let l = 0; l < p.line; l++) {
    const nl = text.indexOf("\n", off);
    if (nl < 0) return text.length;
    off = nl + 1;
  }
  return Math.min(off + p.character, text.length);
}

/** Applies LSP text edits (non-overlapping, any order) to a text. */
export function applyEdits(text: string, edits: TextEdit[]): string {
  const sorted = [...edits].sort((a, b) => offsetOf(text, b.range.start) - offsetOf(text, a.range.start));
  for (const e of sorted) text = text.slice(0, offsetOf(text, e.range.start)) + e.newText + text.slice(offsetOf(text, e.range.end));
  return text;
}

/** The edits of a WorkspaceEdit for one URI (changes or documentChanges form). */
export function editsFor(we: WorkspaceEdit, u: string): TextEdit[] {
  const out: TextEdit[] = [...(we.changes?.[u] ?? [])];
  for (const dc of we.documentChanges ?? []) if ("textDocument" in dc && dc.textDocument.uri === u) out.push(...(dc.edits as TextEdit[]));
  return out;
}

export function messages(c: Client, file: string): Diagnostic[] {
  return c.diags.get(uri(file))?.diagnostics ?? [];
}
