// Seismic array: one trace block.
#include <vector>
#include "seismic.h"

void detrend_trace(const std::vector<float> &trace, std::vector<float> &clean) {
    size_t n = trace.size();
    seis_detrend(trace.data(), clean.data(), n);
    float window[256];
    float smooth[256];
    seis_detrend(window, smooth, sizeof(window) / sizeof(window[0]));
    seis_scale(trace.data(), n * sizeof(float), clean.data());
}
