/* Lightning detector: configuration spelled through macros (an oracle corpus: no system headers). */
#ifndef CORPUS_CONFIG_H
#define CORPUS_CONFIG_H

#if defined(__x86_64__) || defined(__aarch64__)
#  define STRIKE_WORD 8
#elif defined(__arm__) || defined(__i386__)
#  define STRIKE_WORD 4
#else
#  error "unknown target"
#endif

#if __SIZEOF_LONG__ == 8 && !defined(_WIN32)
#  define STRIKE_LONG_BITS 64
#else
#  define STRIKE_LONG_BITS (8 * __SIZEOF_LONG__)
#endif

#if defined(__GNUC__) && __GNUC__ >= 4
#  define STRIKE_API __attribute__((visibility("default")))
#else
#  define STRIKE_API
#endif

#ifdef __CHAR_UNSIGNED__
#  define STRIKE_CHAR_SIGN 0
#else
#  define STRIKE_CHAR_SIGN 1
#endif

#if (0x10 << 2) == 64 && (-1 < 0) && (0u - 1 > 0) && ('A' == 65) && (7 / 2 == 3) && (1 ? 2 : (1 / 0))
#  define STRIKE_ARITH_OK 1
#endif

#define STRIKE_CAT(a, b) a ## b
#define STRIKE_XCAT(a, b) STRIKE_CAT(a, b)
#define STRIKE_STR(x) #x
#define STRIKE_XSTR(x) STRIKE_STR(x)
#define STRIKE_LOG(fmt, ...) strike_log(fmt, ## __VA_ARGS__)
#define STRIKE_ALIGN(n) __attribute__((aligned(n)))

#endif
