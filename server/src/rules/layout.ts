// Rule family "layout" (placeholder: filled in by its issue).
import type { RuleFamily } from "./api.js";

export const layoutFamily: RuleFamily = { name: "layout", rules: [], check: () => [] };
