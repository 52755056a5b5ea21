// Lightning-detector front end: per-bin envelope of vlen-bin spectra (vector ports).
#include <cstddef>
#include "lightning.h"

class spectrum_env_block : public block {
public:
    spectrum_env_block(size_t vlen)
        : block("spectrum_env",
                io_signature::make(1, 1, sizeof(float) * vlen),
                io_signature::make(1, 1, sizeof(float) * vlen)),
          vlen_(vlen) {}

    int work(int noutput_items, const void *const *input_items, void *const *output_items) {
        const float *in = static_cast<const float *>(input_items[0]);
        float *out = static_cast<float *>(output_items[0]);
        strike_envelope(in, out, noutput_items * vlen_);
        return noutput_items;
    }

private:
    size_t vlen_;
};
