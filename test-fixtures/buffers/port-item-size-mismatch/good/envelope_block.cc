// Lightning-detector front end: envelope of the complex antenna signal.
#include <complex>
#include <cstdint>
#include "lightning.h"

class envelope_block : public block {
public:
    envelope_block()
        : block("envelope",
                io_signature::make(1, 1, sizeof(std::complex<float>)),
                io_signature::make(1, 1, sizeof(float) * 2)) {}

    // Interleaved complex read as 2 * n floats: the counts are scaled.
    int work(int noutput_items, const void *const *input_items, void *const *output_items) {
        const float *in = static_cast<const float *>(input_items[0]);
        float *out = static_cast<float *>(output_items[0]);
        strike_envelope(in, out, 2 * noutput_items);
        return noutput_items;
    }
};

class iq_block {
public:
    iq_block() {
        add_input_port(sizeof(float));
        add_output_port(sizeof(float));
    }
    int work(int n, const void *in_buf, void *out_buf) {
        const float *x = static_cast<const float *>(in_buf);
        float *env = static_cast<float *>(out_buf);
        strike_envelope(x, env, n);
        return n;
    }
};
