#ifndef STRIKE_H
#define STRIKE_H
#include <stdint.h>
#ifdef __cplusplus
extern "C" {
#endif
int strike_window_ms(uint32_t ms);
float strike_gain(float db);
int strike_threshold(float v);
float strike_rate(float per_min);
#ifdef __cplusplus
}
#endif
#endif
