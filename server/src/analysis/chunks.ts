// Which files the CLI's chunked check reads together. Files are joined when the rules can look
// from one to the other, by the same relation the language server's scoped re-check uses
// (analysis/keys.ts): one declares a name the other declares or uses, both use one type, or one
// includes the other (a Rust helper name joins a caller to its declarers, not two declarers to
// each other). The connected groups of that relation are closed: a finding in a group depends
// only on files of the group — except the workspace checks' (rules/api.ts WorkspaceCheck), which
// gather per chunk and conclude once every chunk ran. Groups are packed in workspace order into chunks of at most
// `maxFiles` files (a larger group is a chunk of its own), and each chunk is checked with a model
// of its files only, so memory holds one chunk's facts at a time.

import "./ppcond.js";
import type { IncludeIndex } from "../model/includes.js";
import type { ProjectInfo } from "../model/project.js";
import { Model, type Side } from "../model/boundary.js";
import { FAMILIES, runRules, type Finding, type GatheredItem } from "../rules/index.js";
import { suppressionsOf, type Suppression } from "./suppress.js";
import { fixesFor, type Fix } from "../fixes/index.js";
import type { FerruleConfig } from "./config.js";
import { finishFindings } from "./finish.js";
import { systemFactsFor } from "./system.js";
import { unpackFacts, type PackedFile } from "./packed.js";

export interface PlanInput {
  file: string;
  decl: readonly string[];
  use: readonly string[];
  includes: readonly string[];
}

/** Chunks of file indices (each ascending), in workspace order of their first file. */
export function planChunks(files: readonly PlanInput[], includes: IncludeIndex, maxFiles: number): number[][] {
  const parent = files.map((_, i) => i);
  const find = (i: number): number => {
    while (parent[i] !== i) {
      parent[i] = parent[parent[i]!]!;
      i = parent[i]!;
    }
    return i;
  };
  const union = (a: number, b: number) => {
    a = find(a);
    b = find(b);
    if (a !== b) parent[Math.max(a, b)] = Math.min(a, b);
  };
  const declarer = new Map<string, number>();
  const helpers = new Map<string, number[]>(); // r: names: every declarer (they do not join each other)
  const typeUser = new Map<string, number>();
  const index = new Map<string, number>();
  files.forEach((f, i) => index.set(f.file, i));
  files.forEach((f, i) => {
    for (const x of f.decl) {
      if (x.startsWith("r:")) {
        const a = helpers.get(x);
        if (a) a.push(i);
        else helpers.set(x, [i]);
        continue;
      }
      const j = declarer.get(x);
      if (j === undefined) declarer.set(x, i);
      else union(i, j);
    }
    for (const x of f.use) {
      if (!x.startsWith("t:")) continue;
      const j = typeUser.get(x);
      if (j === undefined) typeUser.set(x, i);
      else union(i, j);
    }
    for (const inc of f.includes) {
      const r = includes.resolve(f.file, inc);
      const j = r === undefined ? undefined : index.get(r);
      if (j !== undefined) union(i, j);
    }
  });
  // a use joins the declarers of the name (a type use also joins, through typeUser, its users)
  files.forEach((f, i) => {
    for (const x of f.use) {
      const j = declarer.get(x);
      if (j !== undefined) union(i, j);
      for (const k of helpers.get(x) ?? []) union(i, k);
    }
  });
  const groups = new Map<number, number[]>();
  files.forEach((_, i) => {
    const r = find(i);
    const g = groups.get(r);
    if (g) g.push(i);
    else groups.set(r, [i]);
  });
  // roots are each group's smallest index, so map order is workspace order of first files
  const chunks: number[][] = [];
  let cur: number[] = [];
  for (const g of groups.values()) {
    if (cur.length && cur.length + g.length > maxFiles) {
      chunks.push(cur);
      cur = [];
    }
    cur.push(...g);
  }
  if (cur.length) chunks.push(cur);
  return chunks.map((c) => c.sort((a, b) => a - b));
}

/** What a chunk check needs besides the chunk (see checkChunk). */
export interface ChunkContext {
  config: FerruleConfig;
  /** Include resolution against the whole workspace. */
  includeIndex: IncludeIndex;
  sides: Record<Side, boolean>;
  /** Also compute each finding's fixes (`ferrule check --show-fixes`). */
  withFixes: boolean;
  /** The project model (analysis/project.ts), the same for every chunk. */
  project?: ProjectInfo;
}

export interface ChunkResult {
  findings: Finding[];
  /** Suppressions of the chunk's files that have any (for the workspace checks' findings). */
  suppressions: Map<string, Suppression[]>;
  /** Parallel to `findings` when fixes were asked for. */
  fixes?: Fix[][];
}

/** Checks one chunk of packed files with a model of those files only (see planChunks); the
 * workspace checks (rules/api.ts WorkspaceCheck) gather into `gathered`. */
export function checkChunk(chunk: readonly PackedFile[], ctx: ChunkContext, gathered: Map<string, GatheredItem[]>): ChunkResult {
  const facts = chunk.map((b) => unpackFacts(b));
  const system = systemFactsFor(facts, ctx.config.targets);
  const model = new Model(facts, { targets: ctx.config.targets, includePaths: ctx.config.includePaths, families: ctx.config.families, workspaceSides: ctx.sides, includeIndex: ctx.includeIndex, project: ctx.project, system });
  const findings = finishFindings(runRules(model, FAMILIES, gathered), model, ctx.config);
  return { findings, suppressions: suppressionsOf(model), fixes: ctx.withFixes ? findings.map((f) => fixesFor(f, model)) : undefined };
}
