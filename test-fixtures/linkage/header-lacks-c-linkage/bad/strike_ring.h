/* Lightning detector: ring of strike records shared by the C front end and the Rust classifier. */
#ifndef STRIKE_RING_H
#define STRIKE_RING_H
#include <stddef.h>
#include <stdint.h>

typedef struct strike_slot {
    _Alignas(16) uint64_t t_ns;
    float amplitude;
    float bearing_deg;
} strike_slot;

/* Implemented in Rust (classifier crate). */
int strike_classify(const strike_slot *slots, size_t n, uint8_t *kind_out);
#endif
