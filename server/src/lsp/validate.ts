// Shapes of the protocol messages the server acts on. A client (or anything writing to the pipe)
// may send a number where text belongs, a negative line or no uri at all; such a message is
// dropped with a log line (notifications) or answered with InvalidParams (requests), and never
// reaches the engine, so one bad message cannot change what the server holds.

const isObj = (v: unknown): v is Record<string, unknown> => typeof v === "object" && v !== null && !Array.isArray(v);
const isUint = (v: unknown): v is number => typeof v === "number" && Number.isInteger(v) && v >= 0 && v <= 2 ** 31;
const isInt = (v: unknown): v is number => typeof v === "number" && Number.isInteger(v) && Math.abs(v) <= 2 ** 31;

export function isPosition(v: unknown): boolean {
  return isObj(v) && isUint(v.line) && isUint(v.character);
}

export function isRange(v: unknown): boolean {
  return isObj(v) && isPosition(v.start) && isPosition(v.end);
}

function hasUri(v: unknown): boolean {
  return isObj(v) && typeof v.uri === "string";
}

/** The reason a notification or request is malformed, or undefined when it is well formed. */
export function problemOf(method: string, p: unknown): string | undefined {
  if (!isObj(p)) return "params is not an object";
  switch (method) {
    case "textDocument/didOpen": {
      const d = p.textDocument;
      if (!hasUri(d)) return "textDocument.uri is not a string";
      if (typeof (d as Record<string, unknown>).text !== "string") return "textDocument.text is not a string";
      if (!isInt((d as Record<string, unknown>).version)) return "textDocument.version is not an integer";
      return undefined;
    }
    case "textDocument/didChange": {
      if (!hasUri(p.textDocument)) return "textDocument.uri is not a string";
      if (!isInt((p.textDocument as Record<string, unknown>).version)) return "textDocument.version is not an integer";
      if (!Array.isArray(p.contentChanges)) return "contentChanges is not an array";
      for (const c of p.contentChanges) {
        if (!isObj(c) || typeof c.text !== "string") return "a content change has no text string";
        if ("range" in c && c.range !== undefined && !isRange(c.range)) return "a content change has a malformed range";
      }
      return undefined;
    }
    case "textDocument/didClose":
      return hasUri(p.textDocument) ? undefined : "textDocument.uri is not a string";
    case "workspace/didChangeWatchedFiles":
      if (!Array.isArray(p.changes)) return "changes is not an array";
      return p.changes.every((c) => hasUri(c) && [1, 2, 3].includes((c as Record<string, unknown>).type as number)) ? undefined : "a change has no uri or an unknown type";
    case "position":
      if (!hasUri(p.textDocument)) return "textDocument.uri is not a string";
      return isPosition(p.position) ? undefined : "position is not {line, character} with whole numbers ≥ 0";
    case "textDocument/codeAction":
      if (!hasUri(p.textDocument)) return "textDocument.uri is not a string";
      if (!isRange(p.range)) return "range is malformed";
      if (!isObj(p.context) || !Array.isArray(p.context.diagnostics)) return "context.diagnostics is not an array";
      if (p.context.only !== undefined && (!Array.isArray(p.context.only) || p.context.only.some((k) => typeof k !== "string"))) return "context.only is not a list of strings";
      return undefined;
    case "ferrule/layout":
      if (!hasUri(p.textDocument)) return "textDocument.uri is not a string";
      return p.position === undefined || isPosition(p.position) ? undefined : "position is malformed";
    case "uri":
      return hasUri(p.textDocument) ? undefined : "textDocument.uri is not a string";
    default:
      return undefined;
  }
}
