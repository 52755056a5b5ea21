// Seismic array: gain stage of a multi-channel trace block (counts in items, kernels in bytes).
#include <cstdint>
#include <vector>
#include "gain.h"

class gain_stage {
public:
    explicit gain_stage(size_t nchan) : nchan_(nchan) {}

    uint32_t process(float *block, size_t n, float g) {
        seis_gain_scaled(block, n * nchan_ * sizeof(float), g);
        seis_zero_raw(block, n * sizeof(*block));
        return seis_checksum(block, 2 * n * nchan_ * sizeof(float));
    }

private:
    size_t nchan_;
};

// Fills a taper of ntaps floats; the caller integrates it.
float taper_sum(size_t ntaps) {
    float *taper = new float[ntaps];
    seis_fill_taper(taper, ntaps * sizeof(float));
    float sum = 0.0f;
    for (size_t i = 0; i < ntaps; ++i) sum += taper[i];
    delete[] taper;
    return sum > 0.0f ? sum : 0.0f;
}

void gain_trace(std::vector<float> &raw, float g) {
    const size_t len_bytes = raw.size() * sizeof(float);
    seis_gain_raw(raw.data(), len_bytes, g);
}

void gain_window(float g) {
    float window[256] = {};
    seis_gain_raw(window, sizeof(window), g);
}

// Byte buffers are counted in bytes already; a byte-named count is passed through.
uint32_t frame_checksum(const uint8_t *wire, size_t n, const float *samples, size_t nbytes) {
    std::vector<uint8_t> tail(n);
    return seis_checksum(wire, n) ^ seis_checksum(samples, nbytes) ^ seis_checksum(tail.data(), tail.size());
}

// An item-named local that holds bytes: from a byte-named count, or the size of a byte vector.
uint32_t block_checksum(const float *block, size_t block_bytes, const std::vector<uint8_t> &frame) {
    const size_t n = block_bytes;
    const size_t count = frame.size();
    return seis_checksum(block, n) ^ seis_checksum(block, count);
}

// A byte buffer viewed as floats keeps its byte count.
void gain_wire(uint8_t *wire, size_t n, float g) {
    seis_gain_raw(reinterpret_cast<float *>(wire), n, g);
    float *samples = (float *)wire;
    seis_gain_raw(samples, n, g);
}
