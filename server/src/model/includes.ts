// Where `#include "x"` lands among a set of workspace files: the including file's folder, then the
// configured include paths, then a unique file of that name anywhere in the workspace (common
// practice: build systems add the header folders with -I). A model of part of a workspace (the
// CLI's chunked check) resolves against the whole workspace's index, so the answer does not depend
// on which other files happen to share its chunk.

import * as path from "node:path";

export class IncludeIndex {
  private byBase: Map<string, string[]> | undefined;

  constructor(private readonly has: (file: string) => boolean, private readonly files: () => Iterable<string>, private readonly includePaths: readonly string[]) {}

  static of(files: Iterable<string>, includePaths: readonly string[]): IncludeIndex {
    const set = new Set(files);
    return new IncludeIndex((f) => set.has(f), () => set, includePaths);
  }

  resolve(from: string, inc: string): string | undefined {
    const cands = [path.normalize(path.join(path.dirname(from), inc))];
    for (const p of this.includePaths) cands.push(path.normalize(path.join(p, inc)));
    for (const c of cands) if (this.has(c)) return c;
    if (!this.byBase) {
      this.byBase = new Map();
      for (const f of this.files()) {
        const b = path.basename(f);
        const arr = this.byBase.get(b);
        if (arr) arr.push(f);
        else this.byBase.set(b, [f]);
      }
    }
    const base = path.basename(inc);
    const hits = (this.byBase.get(base) ?? []).filter((f) => f === inc || f.endsWith("/" + inc) || inc === base);
    return hits.length === 1 ? hits[0] : undefined;
  }
}
