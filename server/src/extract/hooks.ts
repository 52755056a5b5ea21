// Extension points of the extract layer. Rule families that need facts from function bodies
// (buffer contracts, ownership) register extractors here; each writes plain data into the
// FileFacts / FnDecl.body it is given and must not keep references to syntax nodes.

import type { Node } from "../parse/parser.js";
import type { FileFacts, FnDecl } from "../model/types.js";

export type FnBodyExtractor = (fnNode: Node, fn: FnDecl, facts: FileFacts) => void;
export type FileExtractor = (root: Node, facts: FileFacts) => void;

export const rustExtractors = {
  /** Called for every Rust function item with a body (exported or not). */
  fnBody: [] as FnBodyExtractor[],
  /** Called once per Rust file after the built-in extraction. */
  file: [] as FileExtractor[],
};

export const cFileExtractors = {
  /** Called for every C/C++ function definition at file or namespace scope. */
  fnBody: [] as FnBodyExtractor[],
  /** Called once per C/C++ file after the built-in extraction (call sites, classes, ports). */
  file: [] as FileExtractor[],
};

/**
 * Node types the body extractors walk inside one function (each family adds its own when it
 * registers). Every family indexes a function with the union (common.ts indexSubtree), so the
 * function's nodes are searched for once, not once per family and per nested expression.
 */
export const bodyWalkTypes = {
  /** under a Rust function item's body */
  rust: new Set<string>(),
  /** under a C/C++ function_definition */
  c: new Set<string>(),
};
