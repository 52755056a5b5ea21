// Extractor plugin for the "buffers" rule family (placeholder: filled in by its issue).
export {};
