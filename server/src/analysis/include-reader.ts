// Texts of the files `#include` names, for the C preprocessor (extract/preproc): resolved like the
// include graph (model/includes.ts: the including file's folder, the configured include paths,
// then a unique workspace file of that name), so only workspace files and configured folders are
// ever read. Texts are cached per reader; an open document's text wins over the disk.

import * as fs from "node:fs";
import type { IncludeIndex } from "../model/includes.js";
import type { IncludeSource } from "../extract/preproc/index.js";

export function includeReader(index: IncludeIndex, maxFileBytes: number, textOf?: (file: string) => string | undefined): (from: string, inc: string, system: boolean) => IncludeSource | undefined {
  const cache = new Map<string, string | null>();
  return (from, inc) => {
    const file = index.resolve(from, inc);
    if (!file) return undefined;
    const open = textOf?.(file);
    if (open !== undefined) return { file, text: open };
    let text = cache.get(file);
    if (text === undefined) {
      try {
        const st = fs.statSync(file);
        text = st.isFile() && st.size <= maxFileBytes ? fs.readFileSync(file, "utf8") : null;
      } catch {
        text = null;
      }
      cache.set(file, text);
    }
    return text === null ? undefined : { file, text };
  };
}
