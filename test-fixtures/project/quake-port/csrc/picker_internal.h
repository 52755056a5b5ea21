/* Helpers private to the C original. */
#ifndef PICKER_INTERNAL_H
#define PICKER_INTERNAL_H
#include <stddef.h>

size_t picker_window_len(size_t rate_hz);
/* left over from the removed decimating front end: nothing defines or calls it any more */
size_t picker_decimate(const float *in, size_t n, float *out);

#endif
