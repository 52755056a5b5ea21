#ifndef SEIS_STACK_H
#define SEIS_STACK_H
#include <stddef.h>

#if defined(SEIS_PROFILE)
#define SEIS_HOT __attribute__((hot))
#else
#define SEIS_HOT
#endif

double seis_stack(const float *tr, size_t n, int use_long);
void seis_clear(float *tr, size_t n);
double seis_gain(double x);
void seis_rewind(float *tr, size_t n);

#endif
