// Calibration block of the lightning-frontend: applies one station's calibration in place.
#include <complex>
#include <cstddef>
#include <cstring>
#include "../include/lfe/block.h"
#include "../include/lfe/lfe_kernels.h"

class calibrate_block : public block {
public:
    calibrate_block(const lfe_station_cal &cal, size_t station)
        : block("calibrate",
                io_signature::make(1, 1, sizeof(lfe_cf32)),
                io_signature::make(1, 1, sizeof(lfe_cf32))),
          cal_(cal), station_(station) {}

    int work(int noutput_items, const void *const *input_items, void *const *output_items) override {
        const lfe_cf32 *in = static_cast<const lfe_cf32 *>(input_items[0]);
        lfe_cf32 *out = static_cast<lfe_cf32 *>(output_items[0]);
        const size_t n = static_cast<size_t>(noutput_items);
        std::memcpy(out, in, n * sizeof(lfe_cf32));
        if (lfe_calibrate(&cal_, station_, out, n) != LFE_OK) return 0;
        return noutput_items;
    }

private:
    lfe_station_cal cal_;
    size_t station_;
};

block *make_calibrate_block(const lfe_station_cal &cal, size_t station) { return new calibrate_block(cal, station); }
