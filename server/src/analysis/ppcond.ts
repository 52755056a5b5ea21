// Registers the per-target decision of C preprocessor conditions for the model's layouts
// (model/conditions.ts setPpCondEvaluator): a member under `#ifdef __LP64__` exists on the 64-bit
// Linux targets only. The model cannot import the preprocessor (layering), so the analysis layer,
// which every entry point loads, hands it in.
import { baseTable, evalCondition, tokenize } from "../extract/preproc/index.js";
import { setPpCondEvaluator } from "../model/conditions.js";
import type { Triple } from "../model/targets.js";

const cache = new Map<string, boolean | undefined>();

setPpCondEvaluator((cond, triple, defines) => {
  const key = `${triple}\u0000${cond}\u0000${JSON.stringify(defines)}`;
  if (cache.has(key)) return cache.get(key);
  // read as a header is (C and C++ includers alike: `__cplusplus` stays undecided)
  const table = baseTable({ targets: [triple as Triple], defines }, "header");
  let v: boolean | undefined;
  try {
    v = evalCondition(tokenize(cond), table);
  } catch {
    v = undefined;
  }
  if (cache.size > 50_000) cache.clear();
  cache.set(key, v);
  return v;
});
