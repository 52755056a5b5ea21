// Process entry of the CLI and the language server.
import * as v8 from "node:v8";
// Baseline (Liftoff) wasm code only: V8's optimising tier-up of the 4.6 MB C++ grammar costs
// seconds of background compilation and ~150 MB per process while parsing no faster on these
// inputs (measured: scripts/bench.mjs; a 9,000-line header parses in the same ~340 ms either way).
v8.setFlagsFromString("--liftoff-only");
// eslint-disable-next-line import/first
// A worker thread started by analysis/parallel.ts runs this same bundle and serves extraction.
void import("../analysis/parallel.js").then(async (p) => {
  if (!p.runWorkerIfAsked()) await (await import("./main.js")).main();
});
