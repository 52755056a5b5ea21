#include <stddef.h>
#include <stdint.h>
#include "../include/quake.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
    QuakeThreshold thr = { size ? (float)data[0] : 0.0f, 0.0f };
    quake_picker_free(quake_picker_new(QUAKE_MODE_ENVELOPE, &thr));
    return 0;
}
