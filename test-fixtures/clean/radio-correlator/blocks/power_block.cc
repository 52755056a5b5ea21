// Power block: vector ports of nchan channels per item. Complex spectra in, power spectra out
// (scaled by a gain), integrated into an accumulator the caller can take over.
#include <complex>
#include <utility>
#include "blocks.h"

class power_block : public stream_block {
public:
    power_block(size_t nchan, float gain) : stream_block("power"), nchan_(nchan), gain_(gain), acc_(nchan) {
        add_input_port(sizeof(std::complex<float>) * nchan);
        add_output_port(sizeof(float) * nchan);
    }

    int work(int noutput_items, const void *const *input_items, void *const *output_items) override {
        const std::complex<float> *spec = static_cast<const std::complex<float> *>(input_items[0]);
        float *power = static_cast<float *>(output_items[0]);
        const size_t n = static_cast<size_t>(noutput_items);
        xc_power_spectrum(reinterpret_cast<const xc_cf32 *>(spec), power, n, nchan_);
        xc_scale_raw(power, n * nchan_ * sizeof(float), gain_);
        if (!acc_.add(power, n, nchan_)) return 0;
        return noutput_items;
    }

    accumulator release_accumulator() {
        accumulator taken = std::move(acc_);
        acc_ = accumulator(nchan_);
        return taken;
    }

private:
    size_t nchan_;
    float gain_;
    accumulator acc_;
};

std::unique_ptr<stream_block> make_power_block(size_t nchan, float gain) {
    return std::make_unique<power_block>(nchan, gain);
}

accumulator take_accumulator(stream_block &block) {
    return static_cast<power_block &>(block).release_accumulator();
}
