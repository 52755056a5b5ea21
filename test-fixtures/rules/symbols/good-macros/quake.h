/* Seismic array: exported C interface with an export macro and a calling-convention macro. */
#ifndef QUAKE_H
#define QUAKE_H
#include <stddef.h>
#if defined(_WIN32)
#  define QUAKE_API __declspec(dllexport)
#else
#  define QUAKE_API __attribute__((visibility("default")))
#endif
#define QUAKE_CALL
#ifdef __cplusplus
extern "C" {
#endif
QUAKE_API int quake_pick(const float *trace, size_t n);
QUAKE_API const float *QUAKE_CALL quake_window(size_t *len);
static inline int quake_clamp(int v) { return v < 0 ? 0 : v; }
#ifdef __cplusplus
}
#endif
#endif
