/* CPU feature probe, Arm build. */
#include <stdint.h>
#include "beam.h"

uint32_t beam_cpu_features(void) { return 2u; }
