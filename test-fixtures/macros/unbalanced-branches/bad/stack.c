/* Seismic array: stacks the traces of one shot, long or short window by build option. */
#include <stddef.h>
#include "stack.h"

static double stack_long(const float *tr, size_t n) {
    double s = 0.0;
    size_t i;
    for (i = 0; i < n; ++i) s += tr[i];
    return s;
}

static double stack_short(const float *tr, size_t n) {
    return n ? (double) tr[0] : 0.0;
}

double seis_stack(const float *tr, size_t n, int use_long) {
    if (n > 0) {
#if !defined(SEIS_FORCE_SHORT)
        if (use_long) {
#else
        (void) use_long;
        {
#endif
            return stack_long(tr, n);
        }
    }
    return stack_short(tr, n);
}

SEIS_HOT
void seis_clear(float *tr, size_t n) {
    size_t i;
    for (i = 0; i < n; ++i) tr[i] = 0.0f;
    seis_rewind(tr, n);
}
