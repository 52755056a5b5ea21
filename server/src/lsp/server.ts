export function startServer(): void {
  throw new Error("language server not built yet");
}
