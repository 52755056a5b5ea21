/* Lidar return binning: C interface (slips). */
#ifndef LIDAR_H
#define LIDAR_H
#include <stddef.h>

/* Writes n calibrated ranges into cal. */
int ldr_calibrate(const float *raw, size_t n, float *cal);
/* Implemented in C: removes the mean from the n echoes in place. */
void ldr_detrend(float *echo, size_t n);
int ldr_set_gain(const float *gain, size_t n);
#endif
