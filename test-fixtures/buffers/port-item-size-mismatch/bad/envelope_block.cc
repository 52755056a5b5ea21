// Lightning-detector front end: envelope of the complex antenna signal.
#include <complex>
#include <cstdint>
#include "lightning.h"

class envelope_block : public block {
public:
    envelope_block()
        : block("envelope",
                io_signature::make(1, 1, sizeof(std::complex<float>)),
                io_signature::make(1, 1, sizeof(float))) {}

    int work(int noutput_items, const void *const *input_items, void *const *output_items) {
        const float *in = static_cast<const float *>(input_items[0]); // expect: port-item-size-mismatch
        float *out = static_cast<float *>(output_items[0]);
        strike_envelope(in, out, noutput_items);
        return noutput_items;
    }
};

class iq_block {
public:
    iq_block() {
        add_input_port(sizeof(int16_t) * 2);
        add_output_port(sizeof(float));
    }
    int work(int n, const void *in_buf, void *out_buf) {
        // The port carries int16 I/Q pairs (4 bytes); this reads them as complex float (8 bytes).
        const std::complex<float> *iq = static_cast<const std::complex<float> *>(in_buf); // expect: port-item-size-mismatch
        float *env = static_cast<float *>(out_buf);
        strike_envelope(reinterpret_cast<const float *>(iq), env, 2 * n);
        return n;
    }
};
