// Seismic array: gain stage of a multi-channel trace block (counts in items, kernels in bytes).
#include <cstdint>
#include <vector>
#include "gain.h"

class gain_stage {
public:
    explicit gain_stage(size_t nchan) : nchan_(nchan) {}

    uint32_t process(float *block, size_t n, float g) {
        seis_gain_scaled(block, n * nchan_, g); // expect: length-unit-mismatch
        seis_zero_raw(block, n); // expect: length-unit-mismatch
        return seis_checksum(block, 2 * n * nchan_); // expect: length-unit-mismatch
    }

private:
    size_t nchan_;
};

// Fills a taper of ntaps floats; the caller integrates it.
float taper_sum(size_t ntaps) {
    float *taper = new float[ntaps];
    seis_fill_taper(taper, ntaps); // expect: length-unit-mismatch
    float sum = 0.0f;
    for (size_t i = 0; i < ntaps; ++i) sum += taper[i];
    delete[] taper;
    return sum > 0.0f ? sum : 0.0f;
}

void gain_trace(std::vector<float> &raw, float g) {
    seis_gain_raw(raw.data(), raw.size(), g); // expect: length-unit-mismatch
}

// Byte buffers are counted in bytes already; a byte-named count is passed through.
uint32_t frame_checksum(const uint8_t *wire, size_t n, const float *samples, size_t nbytes) {
    return seis_checksum(wire, n) ^ seis_checksum(samples, nbytes);
}
