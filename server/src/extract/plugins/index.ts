// Body/call-site extractors of the rule families register themselves in ../hooks.ts when
// imported. One module per family.
import "./buffers.js";
import "./ownership.js";
