/* Seismic array picker: public C API. The C original (csrc/) and the Rust port (src/) both
 * implement it; the build picks one. */
#ifndef QUAKE_H
#define QUAKE_H
#include <stddef.h>
#include <stdint.h>

#if defined (__cplusplus)
extern "C" {
#endif

typedef struct quake_picker_s quake_picker;   /* opaque to callers */

/* Detection modes; the Rust side spells it as an integer newtype. */
typedef enum { QUAKE_MODE_STA_LTA = 0, QUAKE_MODE_ENVELOPE = 1 } quake_mode;

/* The threshold pair is spelled with a tag and a typedef name. */
typedef struct QuakeThresholdTag {
    float on;
    float off;
} QuakeThreshold;

typedef uint16_t quake_bin;   /* histogram bin */

quake_picker *quake_picker_new(quake_mode mode, const QuakeThreshold *thr);
size_t quake_picker_run(quake_picker *p, const float *samples, size_t n, quake_bin *hist);
void quake_picker_free(quake_picker *p);

#if defined (__cplusplus)
}
#endif
#endif /* QUAKE_H */

/* Experimental section, only with QUAKE_EXPERIMENTAL from the build. */
#if defined(QUAKE_EXPERIMENTAL) && !defined(QUAKE_H_EXPERIMENTAL)
#define QUAKE_H_EXPERIMENTAL
#if defined (__cplusplus)
extern "C" {
#endif
size_t quake_picker_backlog(const quake_picker *p);
#if defined (__cplusplus)
}
#endif
#endif
