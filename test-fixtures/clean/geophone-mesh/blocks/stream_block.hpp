// A stream block: one node's calibrated samples, collected by a C++ object that registers itself
// as the stream's callback target.
#pragma once

#include <cstddef>
#include <vector>

#include "gm/gm.h"
#include "gm_refs.hpp"

namespace geo {

class stream_block {
public:
    stream_block(const calib_ref &calib, uint32_t node);
    ~stream_block();
    // The stream holds `this` as its user pointer: the block can neither be copied nor moved.
    stream_block(const stream_block &) = delete;
    stream_block &operator=(const stream_block &) = delete;

    bool ok() const { return stream_ != nullptr; }
    size_t push(const float *samples, size_t n);
    const std::vector<float> &received() const { return received_; }
    size_t blocks() const { return blocks_; }

private:
    static void tramp(const float *samples, size_t n, void *user);
    void on_block(const float *samples, size_t n);

    gm_stream *stream_ = nullptr;
    std::vector<float> received_;
    size_t blocks_ = 0;
};

} // namespace geo
