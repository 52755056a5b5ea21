#include <stddef.h>
#include <stdint.h>
#include "../include/quake.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
    QuakeThreshold thr = { 1.0f, 0.5f };
    quake_picker *p = quake_picker_new(QUAKE_MODE_STA_LTA, &thr);
    quake_bin hist[16] = {0};
    quake_picker_run(p, (const float *)data, size / sizeof(float), hist);
    quake_picker_free(p);
    return 0;
}
