// Calibration pass of the lightning-detector front end: reads the count after releasing.
#include "../../common/ltg.h"

int calibrate(const float *field, int n) {
    ltg_tracker *t = ltg_tracker_new(16);
    for (int i = 0; i < n; i++) ltg_tracker_feed(t, field[i]);
    ltg_tracker_free(t);
    int strokes = (int)ltg_tracker_count(t);
    ltg_tracker_free(t);
    return strokes;
}
