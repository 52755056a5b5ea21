#include "stream_block.hpp"

namespace geo {

stream_block::stream_block(const calib_ref &calib, uint32_t node)
    : stream_(gm_stream_new(calib.get(), node, &stream_block::tramp, this)) {}

stream_block::~stream_block() { gm_stream_release(stream_); }

size_t stream_block::push(const float *samples, size_t n) { return gm_stream_push(stream_, samples, n); }

void stream_block::tramp(const float *samples, size_t n, void *user) {
    static_cast<stream_block *>(user)->on_block(samples, n);
}

void stream_block::on_block(const float *samples, size_t n) {
    received_.insert(received_.end(), samples, samples + n);
    ++blocks_;
}

} // namespace geo
