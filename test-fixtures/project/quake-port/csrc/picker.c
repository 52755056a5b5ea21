/* The C original of the picker (kept as the reference implementation). */
#include <stdlib.h>
#include "../include/quake.h"

struct quake_picker_s {
    quake_mode mode;
    QuakeThreshold thr;
    size_t backlog;
};

quake_picker *quake_picker_new(quake_mode mode, const QuakeThreshold *thr) {
    quake_picker *p = calloc(1, sizeof *p);
    if (p) { p->mode = mode; p->thr = *thr; }
    return p;
}

size_t quake_picker_run(quake_picker *p, const float *samples, size_t n, quake_bin *hist) {
    size_t picks = 0;
    for (size_t i = 0; i < n; i++) {
        if (samples[i] > p->thr.on) { picks++; hist[i % 16]++; }
    }
    return picks;
}

void quake_picker_free(quake_picker *p) { free(p); }

size_t quake_picker_backlog(const quake_picker *p) { return p->backlog; }
