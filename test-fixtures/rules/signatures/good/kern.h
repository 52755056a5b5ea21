#include <stddef.h>
#include <stdint.h>
#include <stdbool.h>
#include <complex.h>
#ifdef __cplusplus
extern "C" {
#endif
typedef struct ld_state ld_state;
typedef void (*ld_strike_cb)(void *ctx, float amplitude);
typedef float sample_t;
#define COUNT_T size_t
int ld_filter(const sample_t *x, sample_t *y, COUNT_T n);
int ld_envelope(const float *x, size_t n, float *out);
int ld_offset(long ns);
int ld_tag(char t);
int ld_pp(float **rows);
int ld_on_strike(ld_strike_cb cb, void *ctx);
bool ld_cplx(const float _Complex *x, size_t n, void *h);
int ld_log(int level, const char *fmt, ...);
void ld_handle(ld_state *h);
#ifdef __cplusplus
}
#endif
