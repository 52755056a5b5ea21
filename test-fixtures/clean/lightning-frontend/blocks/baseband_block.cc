// Baseband block of the lightning-frontend: mixes the station's complex stream down to baseband
// and writes its magnitude envelope.
#include <complex>
#include <cstddef>
#include <vector>
#include "../include/lfe/block.h"
#include "../include/lfe/lfe_kernels.h"

class baseband_block : public block {
public:
    explicit baseband_block(float phase_inc)
        : block("baseband",
                io_signature::make(1, 1, sizeof(std::complex<float>)),
                io_signature::make(1, 1, sizeof(float))),
          phase_inc_(phase_inc) {}

    int work(int noutput_items, const void *const *input_items, void *const *output_items) override {
        const lfe_cf32 *in = static_cast<const lfe_cf32 *>(input_items[0]);
        float *env = static_cast<float *>(output_items[0]);
        const size_t n = static_cast<size_t>(noutput_items);
        mixed_.resize(n);
        if (lfe_mix_down(in, mixed_.data(), n, phase_inc_, &phase_) != LFE_OK) return 0;
        lfe_envelope(mixed_.data(), env, n);
        return noutput_items;
    }

private:
    float phase_inc_;
    float phase_ = 0.0f;
    std::vector<lfe_cf32> mixed_;
};

block *make_baseband_block(float phase_inc) { return new baseband_block(phase_inc); }
