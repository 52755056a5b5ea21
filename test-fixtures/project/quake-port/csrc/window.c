#include "picker_internal.h"

size_t picker_window_len(size_t rate_hz) { return rate_hz / 10u; }
