#ifndef STRIKE_FRONT_H
#define STRIKE_FRONT_H
#include "strike_ring.h"
void front_push(strike_slot *s);
#endif
