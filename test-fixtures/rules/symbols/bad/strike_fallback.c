#include "strike.h"
float strike_rate(float per_min) { return per_min * 2.0f; }
