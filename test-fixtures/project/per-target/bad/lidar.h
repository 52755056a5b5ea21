/* Lidar scan frames handed from the C++ capture block to the Rust point filter. */
#ifndef LIDAR_H
#define LIDAR_H
#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct lidar_frame {
    uint32_t seq;
#ifdef __LP64__
    uint64_t stamp_ns;     /* LP64 builds carry a full 64-bit capture time */
#else
    uint32_t stamp_ns;     /* ILP32 and LLP64 builds keep the 32-bit counter */
#endif
    size_t n_points;
    const float *points;
} lidar_frame;

size_t lidar_frame_valid(const lidar_frame *f);

#ifdef __cplusplus
}
#endif
#endif
