// Channel setup: each void* slot goes back to the release function of its own handle type.
#include "../../common/ltg.h"

void cycle_channel(uint32_t ch) {
    void *slot = ltg_sensor_new(ch);
    ltg_sensor_free((ltg_sensor *)slot);
    void *trk = ltg_tracker_new(ch);
    ltg_tracker_free(static_cast<ltg_tracker *>(trk));
}
