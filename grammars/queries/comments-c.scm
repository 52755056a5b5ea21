; Comments of a C or C++ file (suppression comments `ferrule: accept rule because reason` live here).
(comment) @comment
