#!/usr/bin/env node
"use strict";
// The language server is a long-lived process under a stream of small allocations: start it with
// a capped young generation, so V8 does not grow the heap to its semi-space maximum while the live
// data stays small (see server/src/lsp/server.ts). Other commands run in this process.
const LSP_FLAGS = ["--max-semi-space-size=1", "--expose-gc"];
if (process.argv[2] === "lsp" && !process.execArgv.includes(LSP_FLAGS[0])) {
  const { spawn } = require("node:child_process");
  const child = spawn(process.execPath, [...LSP_FLAGS, __filename, ...process.argv.slice(2)], { stdio: "inherit" });
  for (const sig of ["SIGINT", "SIGTERM", "SIGHUP"]) process.on(sig, () => child.kill(sig));
  child.on("exit", (code, signal) => (signal ? process.kill(process.pid, signal) : process.exit(code ?? 0)));
} else {
  require("../dist/cli.js");
}
