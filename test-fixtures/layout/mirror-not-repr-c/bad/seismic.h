/* Seismic array: one sample record per geophone channel. */
#include <stdint.h>

typedef struct seis_sample {
    uint32_t channel;
    float counts;
} seis_sample;

void seis_push(const seis_sample *s, uint32_t n);
