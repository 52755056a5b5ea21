#include <stddef.h>
#include <stdint.h>
#include "../include/quake.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
    QuakeThreshold thr = { 1.0f, 0.5f };
    quake_picker *p = quake_picker_new(QUAKE_MODE_STA_LTA, &thr);
    uint32_t hist[16] = {0};
    quake_picker_run(p, (const float *)data, size / sizeof(float), (quake_bin *)hist);
    quake_picker_free(p);
    return 0;
}
