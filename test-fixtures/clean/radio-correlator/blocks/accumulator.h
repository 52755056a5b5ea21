// Move-only owner of one Rust accumulator (xc_accum). Copying would share the handle and free it
// twice, so copies are deleted; a move leaves the source empty.
#ifndef XC_ACCUMULATOR_H
#define XC_ACCUMULATOR_H

#include <cstddef>
#include <cstdint>
#include <vector>
#include "../include/xc/xc_kernels.h"

class accumulator {
public:
    explicit accumulator(size_t nchan) : acc_(xc_accum_new(nchan)) {}
    ~accumulator() { xc_accum_free(acc_); }

    accumulator(const accumulator &) = delete;
    accumulator &operator=(const accumulator &) = delete;

    accumulator(accumulator &&other) noexcept : acc_(other.acc_) { other.acc_ = nullptr; }
    accumulator &operator=(accumulator &&other) noexcept {
        if (this != &other) {
            xc_accum_free(acc_);
            acc_ = other.acc_;
            other.acc_ = nullptr;
        }
        return *this;
    }

    bool add(const float *power, size_t n, size_t nchan) { return xc_accum_add(acc_, power, n, nchan) == XC_OK; }
    size_t nchan() const { return xc_accum_nchan(acc_); }
    uint64_t count() const { return xc_accum_count(acc_); }
    std::vector<float> average() const {
        std::vector<float> out(nchan());
        out.resize(xc_accum_read(acc_, out.data(), out.size()));
        return out;
    }
    void reset() { xc_accum_reset(acc_); }

    // Borrowed view for kernels that read the accumulator (the flagger); ownership stays here.
    const xc_accum *get() const { return acc_; }
    explicit operator bool() const { return acc_ != nullptr; }

private:
    xc_accum *acc_;
};

#endif
