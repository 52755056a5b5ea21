; Comments of a C or C++ file (suppression comments `ferrule-allow(rule): reason` live here).
(comment) @comment
