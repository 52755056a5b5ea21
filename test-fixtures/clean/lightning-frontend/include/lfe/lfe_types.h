/* Types shared by every lightning-frontend kernel and block. */
#ifndef LFE_TYPES_H
#define LFE_TYPES_H

#include <stddef.h>
#include <stdint.h>

#define LFE_MAX_STATIONS 8

/* Interleaved complex baseband sample (same layout as std::complex<float>). */
typedef struct lfe_cf32 {
    float re;
    float im;
} lfe_cf32;

typedef enum lfe_status {
    LFE_OK = 0,
    LFE_EINVAL = 1,
    LFE_EFULL = 2
} lfe_status;

/* One located discharge. */
typedef struct lfe_strike {
    uint64_t t_ns;
    float azimuth_deg;
    float energy;
    uint32_t station_mask;
    uint16_t stations_used;
    uint8_t polarity;
    uint8_t flags;
} lfe_strike;

/* Per-station calibration, filled by the block from its configuration. */
typedef struct lfe_station_cal {
    double gain;
    int32_t delay_ns;
    uint32_t enabled;
    float phase_deg[LFE_MAX_STATIONS];
} lfe_station_cal;

typedef struct lfe_trigger lfe_trigger; /* opaque: owned by the Rust kernel */

typedef void (*lfe_strike_cb)(const lfe_strike *strike, void *user);

#endif
