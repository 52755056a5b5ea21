/* Hydrophone array: the C side of the frame queue. */
#include "hydro.h"

static uint32_t hydro_rate;

HYDRO_EXPORT int HYDRO_CALL hydro_open(uint32_t rate) {
    hydro_rate = rate;
    return rate > 0 ? 0 : -1;
}

HYDRO_API void HYDRO_CALL hydro_push(hydro_frame *frame) {
    frame->seq += hydro_rate;
}

HYDRO_API int hydro_bands_read(hydro_bands *out) {
    out->energy[HYDRO_BAND_LOW] = 0.0f;
    return HYDRO_BAND_COUNT;
}
