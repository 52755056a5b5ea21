/* Radio-telescope correlator: status word as a plain integer with documented bits. */
#include <stdint.h>

struct corr_status {
    uint32_t bits; /* bit 0 locked, bit 1 overflow, bits 2..11 channel */
    uint16_t temp_c;
};

void corr_status_read(struct corr_status *out);
