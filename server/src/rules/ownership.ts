// Rule family "ownership" (placeholder: filled in by its issue).
import type { RuleFamily } from "./api.js";

export const ownershipFamily: RuleFamily = { name: "ownership", rules: [], check: () => [] };
