; Comments of a Rust file (suppression comments `ferrule-allow(rule): reason` live here).
(line_comment) @comment
(block_comment) @comment
