// Correlator front end (C++): interleaved complex passed correctly as 2 * n floats.
#include <complex>
#include <vector>
#include "corr.h"

float baseband_power(const std::complex<float> *bb, size_t n) {
    return corr_power(reinterpret_cast<const float *>(bb), 2 * n);
}

float baseband_power_vec(const std::vector<std::complex<float>> &bb) {
    const float *f = reinterpret_cast<const float *>(bb.data());
    return corr_power(f, 2 * bb.size());
}
