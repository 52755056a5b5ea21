/* Passive-sonar receiver: narrowband detector kernels (hand-written C interface). */
#ifndef SONAR_DETECTOR_H
#define SONAR_DETECTOR_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Opaque narrowband detector state owned by Rust; release with sonar_det_free. */
typedef struct sonar_det sonar_det;

sonar_det *sonar_det_new(size_t nbins, float threshold);
int sonar_det_update(sonar_det *h, const float *power, size_t nbins);
void sonar_det_free(sonar_det *h);

#ifdef __cplusplus
}
#endif

#endif /* SONAR_DETECTOR_H */
