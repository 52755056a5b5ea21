// Bundles the CLI/server and the VS Code client with esbuild, and copies the grammar wasm files
// and query files next to the bundles so nothing is fetched at run time.
import * as esbuild from "esbuild";
import * as fs from "node:fs";
import * as path from "node:path";
import { fileURLToPath } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const dist = path.join(root, "dist");
fs.mkdirSync(path.join(dist, "wasm"), { recursive: true });
const common = { bundle: true, platform: "node", target: "node20", format: "cjs", sourcemap: true, logLevel: "warning", logOverride: { "empty-import-meta": "silent" } };
await esbuild.build({ ...common, entryPoints: [path.join(root, "server/src/cli/index.ts")], outfile: path.join(dist, "cli.js") });
if (fs.existsSync(path.join(root, "client/src/extension.ts"))) {
  await esbuild.build({ ...common, entryPoints: [path.join(root, "client/src/extension.ts")], outfile: path.join(dist, "client.js"), external: ["vscode"] });
}
const req = (p) => path.join(root, "node_modules", p);
fs.copyFileSync(req("web-tree-sitter/tree-sitter.wasm"), path.join(dist, "wasm/tree-sitter.wasm"));
for (const g of ["rust", "c", "cpp"]) fs.copyFileSync(req(`tree-sitter-wasms/out/tree-sitter-${g}.wasm`), path.join(dist, `wasm/tree-sitter-${g}.wasm`));
fs.mkdirSync(path.join(dist, "queries"), { recursive: true });
for (const q of fs.readdirSync(path.join(root, "grammars/queries"))) fs.copyFileSync(path.join(root, "grammars/queries", q), path.join(dist, "queries", q));
