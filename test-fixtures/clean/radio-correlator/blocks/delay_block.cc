// Delay block: one antenna's integer delay and a short FIR, state kept in a Rust delay line owned
// through std::unique_ptr with the release function as deleter.
#include <complex>
#include "blocks.h"

class delay_block : public stream_block {
public:
    delay_block(size_t delay, const std::vector<float> &taps)
        : stream_block("delay"), line_(xc_delay_new(delay), &xc_delay_free), taps_(taps) {
        add_input_port(sizeof(std::complex<float>));
        add_output_port(sizeof(std::complex<float>));
        xc_delay_set_taps(line_.get(), taps_.data(), taps_.size());
    }

    int work(int noutput_items, const void *const *input_items, void *const *output_items) override {
        const std::complex<float> *in = static_cast<const std::complex<float> *>(input_items[0]);
        std::complex<float> *out = static_cast<std::complex<float> *>(output_items[0]);
        const size_t n = static_cast<size_t>(noutput_items);
        const size_t done = xc_delay_process(line_.get(), reinterpret_cast<const xc_cf32 *>(in),
                                             reinterpret_cast<xc_cf32 *>(out), n);
        return static_cast<int>(done);
    }

private:
    std::unique_ptr<xc_delay, decltype(&xc_delay_free)> line_;
    std::vector<float> taps_;
};

std::unique_ptr<stream_block> make_delay_block(size_t delay, const std::vector<float> &taps) {
    return std::make_unique<delay_block>(delay, taps);
}
