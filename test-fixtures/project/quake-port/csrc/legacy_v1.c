/* Reader of the version-1 archive format: its own private picker and typedefs. */
#include <stddef.h>
#include <stdint.h>

typedef uint32_t quake_bin;          /* v1 bins were 32-bit; local to this file */
typedef struct v1_state { double acc[64]; } v1_state;

static size_t quake_picker_run(v1_state *st, const float *samples, size_t n, quake_bin *hist) {
    for (size_t i = 0; i < n; i++) st->acc[i % 64] += samples[i];
    (void)hist;
    return n;
}

size_t quake_v1_replay(const float *samples, size_t n) {
    v1_state st = {{0}};
    quake_bin hist[16] = {0};
    return quake_picker_run(&st, samples, n, hist);
}
