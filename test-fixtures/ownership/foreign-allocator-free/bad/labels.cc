// Channel labelling: releases Rust-allocated memory with the C/C++ allocator.
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <memory>
#include "../../common/ltg.h"

void print_label(uint32_t ch) {
    char *name = ltg_label(ch);
    std::puts(name);
    free(name);
}

void reset_tracker() {
    ltg_tracker *t = ltg_tracker_new(8);
    ltg_tracker_feed(t, 1.0f);
    delete t;
}

size_t label_len(uint32_t ch) {
    std::unique_ptr<char[]> name{ltg_label(ch)};
    return std::strlen(name.get());
}
