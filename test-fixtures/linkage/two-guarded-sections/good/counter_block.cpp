// C++ block that calls the Rust kernels through the C header.
#define FLASH_EXPERIMENTAL 1
#include "flash_count.h"
#include <vector>

uint32_t count_block(const std::vector<float> &buf, float thr) {
    return flash_count(buf.data(), buf.size(), thr) + flash_count_windowed(buf.data(), buf.size(), 64);
}
