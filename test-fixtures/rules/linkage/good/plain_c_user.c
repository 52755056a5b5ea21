#include "agc.h"
void use_it(float *x) { agc_run(x, 4); }
