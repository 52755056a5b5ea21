/* Radio-telescope correlator: packed status word with bit-fields, mirrored in Rust. */
#include <stdint.h>

struct __attribute__((packed)) corr_status {
    uint32_t locked : 1;
    uint32_t overflow : 1;
    uint32_t channel : 10;
    uint16_t temp_c;
};

void corr_status_read(struct corr_status *out);
