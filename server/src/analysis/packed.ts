// Packed facts, for the CLI's chunked check of large workspaces (analysis/chunks.ts). A worker
// extracts a file's facts and packs them: the names they declare and use (analysis/keys.ts) and
// their include paths stay readable, for planning which files are checked together; the facts
// themselves become one compressed buffer (V8's value serializer, then raw deflate at level 1),
// moved to the main thread without a copy. The main thread then holds about 4.5 MiB per 100k
// lines instead of ~55 MiB of objects (measured on the generated bench workspace), and unpacks a
// chunk's facts only while that chunk is checked.

import * as v8 from "node:v8";
import * as zlib from "node:zlib";
import type { FileFacts, Lang, ModDecl } from "../model/types.js";
import { keysOf } from "./keys.js";

export interface PackedFile {
  file: string;
  /** SHA-1 of the text ("" when the file was skipped). */
  hash: string;
  lang: Lang;
  /** Names the facts declare and use (see analysis/keys.ts). */
  decl: string[];
  use: string[];
  /** The `#include "…"` paths as written (system includes left out). */
  includes: string[];
  /** Rust: the module declarations (for the project's module tree, analysis/project.ts). */
  mods?: ModDecl[];
  /** The facts, compressed (made on a worker thread, moved to the main thread)… */
  packed?: Uint8Array;
  /** …or as they are (read in this thread: a workspace too small for worker threads, where
   * packing would cost time and save nothing that matters). */
  facts?: FileFacts;
  /** The facts came from the facts cache. */
  cached?: boolean;
}

export function packFacts(facts: FileFacts, hash: string, compress = true): PackedFile {
  const k = keysOf(facts);
  return {
    file: facts.file,
    hash,
    lang: facts.lang,
    decl: [...k.decl],
    use: [...k.use],
    includes: facts.includes.filter((i) => !i.system).map((i) => i.path),
    ...(facts.mods ? { mods: facts.mods } : {}),
    // a buffer of its own, so it can be transferred between threads
    ...(compress ? { packed: new Uint8Array(zlib.deflateRawSync(v8.serialize(facts), { level: 1 })) } : { facts }),
  };
}

export function unpackFacts(p: PackedFile): FileFacts {
  return p.facts ?? (v8.deserialize(zlib.inflateRawSync(p.packed!)) as FileFacts);
}
