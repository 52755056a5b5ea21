// Rule family "buffers" (placeholder: filled in by its issue).
import type { RuleFamily } from "./api.js";

export const buffersFamily: RuleFamily = { name: "buffers", rules: [], check: () => [] };
