// Channel labelling: every Rust allocation goes back to its Rust release function.
#include <cstdio>
#include <cstdlib>
#include <memory>
#include "../../common/ltg.h"

void print_label(uint32_t ch) {
    char *name = ltg_label(ch);
    std::puts(name);
    ltg_label_free(name);
    char *scratch = static_cast<char *>(std::malloc(16));
    free(scratch);
}

void reset_tracker() {
    ltg_tracker *t = ltg_tracker_new(8);
    ltg_tracker_feed(t, 1.0f);
    ltg_tracker_free(t);
}

int count_once(float v) {
    std::unique_ptr<ltg_tracker, decltype(&ltg_tracker_free)> t{ltg_tracker_new(8), &ltg_tracker_free};
    ltg_tracker_feed(t.get(), v);
    return (int)ltg_tracker_count(t.get());
}
