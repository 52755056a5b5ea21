/* Rust kernels of the lightning-frontend (kernels/src/lib.rs). */
#ifndef LFE_KERNELS_H
#define LFE_KERNELS_H

#include "lfe_types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Mixes n samples down by phase_inc radians per sample; *phase carries over between calls. */
lfe_status lfe_mix_down(const lfe_cf32 *in, lfe_cf32 *out, size_t n, float phase_inc, float *phase);

/* Magnitude envelope: env[i] = |in[i]| for i < n. */
void lfe_envelope(const lfe_cf32 *in, float *env, size_t n);

/* Applies the calibration to n samples of one station in place. */
lfe_status lfe_calibrate(const lfe_station_cal *cal, size_t station, lfe_cf32 *samples, size_t n);

lfe_trigger *lfe_trigger_new(float threshold, uint32_t holdoff);
void lfe_trigger_free(lfe_trigger *trigger);

/* Scans n envelope values; writes at most max_out strikes and returns how many it wrote. */
size_t lfe_trigger_run(lfe_trigger *trigger, const float *env, size_t n, lfe_strike *out, size_t max_out);

/* Calls cb for every strike found from now on; cb may be NULL to stop. */
void lfe_trigger_on_strike(lfe_trigger *trigger, lfe_strike_cb cb, void *user);

int32_t lfe_version(void);

#ifdef __cplusplus
}
#endif

#endif
