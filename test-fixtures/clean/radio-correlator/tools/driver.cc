// Runs the correlator chain once on a synthetic observation: unpack -> delay -> power -> dump.
// (The channeliser between delay and power is out of scope: each run of nchan delayed samples
// stands in for one spectrum.) Then moves the accumulator between owners and shares the flagger,
// so Valgrind sees every handle freed exactly once. Exit status 0 when the numbers add up.
#include <complex>
#include <cstdint>
#include <cstdio>
#include <utility>
#include <vector>
#include "../blocks/blocks.h"

extern "C" int xc_window_selftest(void);

int main() {
    const size_t nchan = 8;
    const size_t nspec = 4;
    const size_t n = nspec * nchan;

    std::vector<int16_t> iq(2 * n); // n samples of interleaved I/Q
    for (size_t i = 0; i < n; i++) {
        const int16_t v = i % nchan == 3 ? 24000 : 300;
        iq[2 * i] = v;
        iq[2 * i + 1] = static_cast<int16_t>(-v);
    }
    std::vector<std::complex<float>> volts(n);
    std::vector<std::complex<float>> delayed(n);
    std::vector<float> power(n); // nspec items of nchan floats

    std::unique_ptr<stream_block> unpack = make_unpack_block(0.0f, 0.0f);
    std::unique_ptr<stream_block> delay = make_delay_block(nchan, {1.0f}); // one spectrum late
    std::unique_ptr<stream_block> pw = make_power_block(nchan, 2.0f);
    std::unique_ptr<stream_block> dump = make_dump_block(nchan, 0.5f);

    const void *in0[] = {iq.data()};
    void *out0[] = {volts.data()};
    const void *in1[] = {volts.data()};
    void *out1[] = {delayed.data()};
    const void *in2[] = {delayed.data()};
    void *out2[] = {power.data()};
    const void *in3[] = {power.data()};

    bool ok = unpack->work(static_cast<int>(n), in0, out0) == static_cast<int>(n);
    ok = ok && delay->work(static_cast<int>(n), in1, out1) == static_cast<int>(n);
    ok = ok && pw->work(static_cast<int>(nspec), in2, out2) == static_cast<int>(nspec);
    ok = ok && dump->work(static_cast<int>(nspec), in3, nullptr) == static_cast<int>(nspec);

    // the accumulator changes owners three times; only the last one frees it
    accumulator a = take_accumulator(*pw);
    accumulator b(std::move(a));
    accumulator c(nchan);
    c = std::move(b);
    ok = ok && !a && !b && c && c.count() == nspec && c.nchan() == nchan;
    const std::vector<float> avg = c.average();

    const size_t flagged = flagged_channels(*dump);
    const uint32_t sum = dump_checksum(*dump);
    const int window_ok = xc_window_selftest();
    xc_flagger_free(nullptr); // a release of NULL is a no-op, as for free() and delete
    xc_accum_free(nullptr);
    std::printf("avg[3] %.4f avg[0] %.7f flagged %zu checksum %08x window %d\n", avg.at(3), avg.at(0), flagged,
                static_cast<unsigned>(sum), window_ok);
    return ok && flagged == 1 && window_ok == 1 ? 0 : 3;
}
