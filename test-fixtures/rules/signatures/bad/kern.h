#include <stddef.h>
#include <stdint.h>
#ifdef __cplusplus
extern "C" {
#endif
typedef void (*ld_strike_cb)(void *ctx, double amplitude);
int ld_filter(const float *x, float *y, size_t n, int flags);
int ld_envelope(const float *x, uint64_t n, float *out);
float ld_peak(const float *x, size_t n);
void ld_scale(const float *x, size_t n, float k);
int ld_window(int n);
int ld_offset(int64_t ns);
int ld_tag(char t);
int ld_pp(float *rows);
int ld_on_strike(ld_strike_cb cb, void *ctx);
int ld_log(int level, const char *fmt, ...);
int ld_read(float *x, size_t n);
#ifdef __cplusplus
}
#endif
