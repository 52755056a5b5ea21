// Beamformer block of the passive-sonar receiver: filters each stave, then hands the
// spectrum to the Rust kernels.
#include <cstddef>
#include <vector>
#include "../include/sonar_kernels.h"

class beamformer_block {
public:
    beamformer_block(const std::vector<float> &taps)
        : fir_(sonar_fir_new(taps.data(), taps.size())) {}
    ~beamformer_block() { sonar_fir_free(fir_); }
    beamformer_block(const beamformer_block &) = delete;
    beamformer_block &operator=(const beamformer_block &) = delete;

    int work(int noutput_items, const void *in_buf, void *out_buf) {
        const float *in = static_cast<const float *>(in_buf);
        float *out = static_cast<float *>(out_buf);
        std::vector<double> filtered(noutput_items);
        sonar_fir_process(fir_, in, filtered.data(), noutput_items);
        float p = sonar_beam_power(in, noutput_items);
        out[0] = p;
        return noutput_items;
    }

private:
    sonar_fir *fir_;
};
