/* Lidar return binning: C interface. Older headers leave input arrays without const. */
#ifndef LIDAR_H
#define LIDAR_H
#include <stddef.h>
#include <stdint.h>

/* Counts the n ranges into n_bins histogram bins of hist. */
int ldr_histogram(float *ranges, size_t n, uint32_t *hist, size_t n_bins);
/* Implemented in C: mean of n echo intensities. */
float ldr_mean_intensity(float *in, size_t n);
#endif
