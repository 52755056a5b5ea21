// Correlator front end (C++): complex baseband samples.
#include <complex>
#include "corr.h"

float baseband_power(const std::complex<float> *bb, size_t n) {
    return corr_power(reinterpret_cast<const float *>(bb), n); // expect: item-size-mismatch
}
