/* Passive-sonar receiver: spectrum kernels (Rust), hand-written C interface. */
#ifndef SONAR_SPECTRUM_H
#define SONAR_SPECTRUM_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* spectrum: nbins complex bins as interleaved (re, im) floats; power: nbins outputs. */
void sonar_bin_power(const float *spectrum, float *power, size_t nbins);

/* Converts n power values to decibels. */
void sonar_spec_db(const float *power, float *db, size_t n);

#ifdef __cplusplus
}
#endif

#endif /* SONAR_SPECTRUM_H */
