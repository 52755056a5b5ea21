// Extractor plugin for the "ownership" rule family (placeholder: filled in by its issue).
export {};
