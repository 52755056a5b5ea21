// Channel labelling: releases Rust-allocated memory with the C/C++ allocator.
#include <cstdio>
#include <cstdlib>
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

int count_once(float v) {
    std::unique_ptr<ltg_tracker> t{ltg_tracker_new(8)};
    ltg_tracker_feed(t.get(), v);
    return (int)ltg_tracker_count(t.get());
}
