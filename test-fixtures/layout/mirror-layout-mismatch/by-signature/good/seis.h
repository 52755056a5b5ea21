/* Seismic array: trigger scan over a window of samples (C side of the Rust picker). */
#ifndef SEIS_H
#define SEIS_H
#include <stddef.h>
#include <stdint.h>

typedef struct seis_window {
    const float *start;
    const float *end;
    uint32_t n_ch;
    int32_t gain_db;
} seis_window;

typedef union seis_coef {
    int16_t taps[4];
    struct { int16_t a, b, c, d; } ab;
} seis_coef;

typedef struct seis_stage {
    seis_coef coef;
    uint32_t decim;
} seis_stage;

typedef enum seis_mode {
    SEIS_MODE_IDLE,
    SEIS_MODE_TRIGGER,
    SEIS_MODE_RECORD,
    N_SEIS_MODES
} seis_mode;

/* The C test double of the picker's state: C code only, never handed to Rust. */
typedef struct picker {
    double sta;
    double lta;
} picker;

_Static_assert(offsetof(seis_window, n_ch) == 2 * sizeof(const float *), "n_ch after the two pointers");
_Static_assert(sizeof(seis_stage) == 12, "8-byte coefficient union, then decim");

int seis_scan(seis_window *w, const seis_stage *st);
seis_mode seis_state(const seis_window *w);
#endif
