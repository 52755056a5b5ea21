// Channel setup keeps handles in void* slots and releases one with the wrong function.
#include "../../common/ltg.h"

void cycle_channel(uint32_t ch) {
    void *slot = ltg_sensor_new(ch);
    ltg_tracker_free((ltg_tracker *)slot);
}

int count_on_sensor(uint32_t ch) {
    void *slot = ltg_sensor_new(ch);
    int n = (int)ltg_tracker_count((const ltg_tracker *)slot);
    ltg_sensor_free((ltg_sensor *)slot);
    return n;
}
