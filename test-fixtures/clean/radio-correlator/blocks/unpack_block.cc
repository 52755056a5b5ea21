// Unpack block: the digitiser's interleaved int16 I/Q pairs to complex floats, then fringe
// stopping in place on the output buffer.
#include <complex>
#include <cstdint>
#include "blocks.h"

class unpack_block : public stream_block {
public:
    unpack_block(float phase, float rate) : stream_block("unpack"), phase_(phase), rate_(rate) {
        add_input_port(2 * sizeof(int16_t)); // one I/Q pair of shorts per sample
        add_output_port(sizeof(std::complex<float>));
    }

    int work(int noutput_items, const void *const *input_items, void *const *output_items) override {
        const int16_t *iq = static_cast<const int16_t *>(input_items[0]);
        std::complex<float> *out = static_cast<std::complex<float> *>(output_items[0]);
        const size_t n = static_cast<size_t>(noutput_items);
        xc_cf32 *samples = reinterpret_cast<xc_cf32 *>(out);
        if (xc_iq16_to_cf32(iq, samples, n) != XC_OK) return 0;
        xc_fringe_stop(samples, samples, n, phase_, rate_); // in place, as the header allows
        phase_ += rate_ * static_cast<float>(n);
        return noutput_items;
    }

private:
    float phase_;
    float rate_;
};

std::unique_ptr<stream_block> make_unpack_block(float fringe_phase, float fringe_rate) {
    return std::make_unique<unpack_block>(fringe_phase, fringe_rate);
}
