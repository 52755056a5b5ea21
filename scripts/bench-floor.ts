// The benchmark's parse floor: walk the workspace, read every file and parse it with
// web-tree-sitter, deleting each tree, with nothing else (no extraction, model or rules). It uses
// the same process model as `ferrule check` (same V8 flags as cli/index.ts, same worker threads
// and batches from analysis/parallel.ts), so check time / floor time is a fair ratio.
// Bundled by scripts/bench.mjs into bench-out/floor.js; prints one JSON line.
import * as v8 from "node:v8";
import * as path from "node:path";
v8.setFlagsFromString("--liftoff-only"); // as in server/src/cli/index.ts

import("../server/src/analysis/parallel.js").then(async (p) => {
  if (p.runWorkerIfAsked()) return;
  const { listSources } = await import("../server/src/analysis/workspace.js");
  const roots = process.argv.slice(2).map((a) => path.resolve(a));
  const files = listSources(roots).files;
  const out = await p.loadFiles(files, { maxFileBytes: 2_000_000, script: p.bundleScript(), mode: "parse" });
  process.stdout.write(JSON.stringify({ files: out.length, workers: p.workerCount(files.length) }) + "\n");
});
