// The VS Code extension: a thin client. It starts the bundled language server (dist/cli.js,
// `ferrule lsp --stdio`, shipped in the extension folder with its grammar .wasm files, so nothing
// is fetched), forwards the `ferrule.*` settings and adds two commands.

import * as path from "node:path";
import * as vscode from "vscode";
import { LanguageClient, TransportKind, type LanguageClientOptions, type ServerOptions } from "vscode-languageclient/node";

let client: LanguageClient | undefined;
const LAYOUT_SCHEME = "ferrule-layout";

class LayoutDocs implements vscode.TextDocumentContentProvider {
  readonly texts = new Map<string, string>();
  private readonly emitter = new vscode.EventEmitter<vscode.Uri>();
  readonly onDidChange = this.emitter.event;
  provideTextDocumentContent(uri: vscode.Uri): string {
    return this.texts.get(uri.toString()) ?? "";
  }
  set(uri: vscode.Uri, text: string): void {
    this.texts.set(uri.toString(), text);
    this.emitter.fire(uri);
  }
}

export async function activate(context: vscode.ExtensionContext): Promise<void> {
  const serverModule = context.asAbsolutePath(path.join("dist", "cli.js"));
  const serverOptions: ServerOptions = {
    // Same heap flags as `npx ferrule lsp` (bin/ferrule.js): a capped young generation keeps the
    // long-lived server from growing its heap under a stream of edits.
    run: { module: serverModule, transport: TransportKind.stdio, args: ["lsp"], options: { execArgv: ["--max-semi-space-size=1", "--expose-gc"] } },
    debug: { module: serverModule, transport: TransportKind.stdio, args: ["lsp"] },
  };
  const clientOptions: LanguageClientOptions = {
    documentSelector: [
      { scheme: "file", language: "rust" },
      { scheme: "file", language: "c" },
      { scheme: "file", language: "cpp" },
    ],
    synchronize: { configurationSection: "ferrule" },
    initializationOptions: { settings: vscode.workspace.getConfiguration("ferrule") },
    outputChannelName: "ferrule",
  };
  client = new LanguageClient("ferrule", "ferrule", serverOptions, clientOptions);

  const layouts = new LayoutDocs();
  context.subscriptions.push(vscode.workspace.registerTextDocumentContentProvider(LAYOUT_SCHEME, layouts));

  context.subscriptions.push(
    vscode.commands.registerCommand("ferrule.recheck", async () => {
      if (!client) return;
      const r = (await client.sendRequest("workspace/executeCommand", { command: "ferrule.server.recheck", arguments: [] })) as { files: number; findings: number } | null;
      if (r) void vscode.window.setStatusBarMessage(`ferrule: re-checked ${r.files} files, ${r.findings} finding(s) — an aid, not a proof of memory safety`, 8000);
    }),
    vscode.commands.registerCommand("ferrule.showLayout", async () => {
      const ed = vscode.window.activeTextEditor;
      if (!client || !ed) {
        void vscode.window.showInformationMessage("ferrule: open a Rust, C or C++ file and put the cursor on a type or function first.");
        return;
      }
      const r = (await client.sendRequest("ferrule/layout", {
        textDocument: { uri: ed.document.uri.toString() },
        position: { line: ed.selection.active.line, character: ed.selection.active.character },
      })) as { text: string };
      const name = path.basename(ed.document.uri.fsPath);
      const uri = vscode.Uri.from({ scheme: LAYOUT_SCHEME, path: `/layout of ${name}.txt` });
      layouts.set(uri, r.text);
      const doc = await vscode.workspace.openTextDocument(uri);
      await vscode.window.showTextDocument(doc, { viewColumn: vscode.ViewColumn.Beside, preview: true });
    }),
  );

  await client.start();
}

export async function deactivate(): Promise<void> {
  await client?.stop();
  client = undefined;
}
