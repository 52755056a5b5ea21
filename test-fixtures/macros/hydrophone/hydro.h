/* Hydrophone array: frames, band energies and the filter stages. */
#ifndef HYDRO_H
#define HYDRO_H

#include <stdint.h>
#include "hydro_config.h"

HYDRO_BEGIN_DECLS

typedef enum { HYDRO_BAND_LOW, HYDRO_BAND_MID, HYDRO_BAND_HIGH, HYDRO_BAND_COUNT } hydro_band;

/* one frame of all channels, aligned to a cache line half */
typedef struct HYDRO_ALIGN(16) hydro_frame {
    float samples[HYDRO_CHANNELS];
    uint32_t seq;
} hydro_frame;

/* a ping record the beamformer reads with 32-byte vector loads */
typedef struct HYDRO_ALIGN(32) hydro_ping {
    double t0;
    float bearing;
} hydro_ping;

typedef struct hydro_bands {
    float energy[HYDRO_BAND_COUNT];
    float taps[HYDRO_TAPS];
} hydro_bands;

_Static_assert(sizeof(hydro_frame) == 64, "a frame is 64 bytes");
_Static_assert(sizeof(hydro_bands) == 140, "3 band energies and 32 taps");

HYDRO_EXPORT int HYDRO_CALL hydro_open(uint32_t rate);
HYDRO_API void HYDRO_CALL hydro_push(hydro_frame *frame);
HYDRO_API int hydro_bands_read(hydro_bands *out);
HYDRO_API void hydro_ping_log(const hydro_ping *ping);

/* every filter stage has the same shape */
#define HYDRO_STAGE(name, T) \
    HYDRO_API int HYDRO_CALL hydro_##name##_run(const T *in, T *out, uint32_t n)
HYDRO_STAGE(fir, float);
HYDRO_STAGE(
    decimate, int16_t);

HYDRO_END_DECLS

#endif
