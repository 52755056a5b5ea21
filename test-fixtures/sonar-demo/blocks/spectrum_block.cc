// Spectrum block of the passive-sonar receiver: takes fft_len-bin power spectra from the
// upstream FFT block (vector ports) and writes them in decibels.
#include <complex>
#include <cstddef>
#include <vector>
#include "../include/sonar_spectrum.h"

class spectrum_block : public block {
public:
    explicit spectrum_block(size_t fft_len)
        : block("spectrum",
                io_signature::make(1, 1, sizeof(float) * fft_len),
                io_signature::make(1, 1, sizeof(float) * fft_len)),
          fft_len_(fft_len), power_(fft_len) {}

    int work(int noutput_items, const void *const *input_items, void *const *output_items) {
        // Slip: the input port carries float power values, but they are read as complex bins.
        const std::complex<float> *bins = static_cast<const std::complex<float> *>(input_items[0]);
        float *db = static_cast<float *>(output_items[0]);
        size_t n = noutput_items * fft_len_;
        power_.resize(n);
        sonar_bin_power(reinterpret_cast<const float *>(bins), power_.data(), n);
        // Slip: a byte count where the kernel takes a number of floats.
        sonar_spec_db(power_.data(), db, n * sizeof(float));
        return noutput_items;
    }

private:
    size_t fft_len_;
    std::vector<float> power_;
};
