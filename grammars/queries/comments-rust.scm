; Comments of a Rust file (suppression comments `ferrule: accept rule because reason` live here).
(line_comment) @comment
(block_comment) @comment
