// Calibration pass: reads the count, then releases; an early exit releases and returns.
#include "../../common/ltg.h"

int calibrate(const float *field, int n) {
    ltg_tracker *t = ltg_tracker_new(16);
    if (n <= 0) {
        ltg_tracker_free(t);
        return -1;
    }
    for (int i = 0; i < n; i++) ltg_tracker_feed(t, field[i]);
    int strokes = (int)ltg_tracker_count(t);
    ltg_tracker_free(t);
    t = ltg_tracker_new(4);
    ltg_tracker_feed(t, 0.0f);
    ltg_tracker_free(t);
    return strokes;
}
