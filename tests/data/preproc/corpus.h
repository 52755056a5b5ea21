/* Lightning detector: declarations spelled through macros. */
#include "corpus_config.h"
#ifndef CORPUS_H
#define CORPUS_H

#define STRIKE_CHANNELS (STRIKE_WORD * 2)
enum strike_kind { STRIKE_CG, STRIKE_IC, STRIKE_KINDS };

typedef struct STRIKE_ALIGN(16) strike_event {
    long t_ns;
    float amplitude[STRIKE_CHANNELS];
    unsigned char kind[STRIKE_KINDS];
} strike_event;

STRIKE_API int STRIKE_XCAT(strike_open_, STRIKE_WORD)(void);
const char *strike_version = STRIKE_XSTR(STRIKE_LONG_BITS) "-" STRIKE_STR( a  "b\n"  'c' );
int strike_sign = STRIKE_CHAR_SIGN, strike_arith = STRIKE_ARITH_OK;
void strike_trace(void) { STRIKE_LOG("x"); STRIKE_LOG("%d %d", 1, 2); }

#define STRIKE_PROTO(name, T) STRIKE_API T strike_##name(T v, \
        unsigned n)
STRIKE_PROTO(gain, float);
STRIKE_PROTO(
    clip, double);

/* C11 §6.10.3.5 EXAMPLE 3: redefinition, rescanning and the hide sets */
#define x 3
#define f(a) f(x * (a))
#undef x
#define x 2
#define g f
#define z z[0]
#define h g(~
#define m(a) a(w)
#define w 0,1
#define t(a) a
#define p() int
#define q(x) x
#define r(x,y) x ## y
#define str(x) # x
int ex3[] = { f(y+1) + f(f(z)) % t(t(g)(0) + t)(1),
  g(x+(3,4)-w) | h 5) & m
    (f)^m(m) };
p() i[q()] = { q(1), r(2,3), r(4,), r(,5), r(,) };
char c[2][6] = { str(hello), str() };
#undef x
#undef f
#undef g
#undef z
#undef h
#undef m
#undef w
#undef t
#undef p
#undef q
#undef r
#undef str

#endif
