/* Hydrophone array: how the public API is spelled on each compiler. */
#ifndef HYDRO_CONFIG_H
#define HYDRO_CONFIG_H

#if defined(_WIN32)
#  define HYDRO_EXPORT __declspec(dllexport)
#  define HYDRO_CALL __cdecl
#else
#  define HYDRO_EXPORT __attribute__((visibility("default")))
#  define HYDRO_CALL
#endif

#ifdef __cplusplus
#  define HYDRO_LINKAGE extern "C"
#  define HYDRO_BEGIN_C extern "C" {
#  define HYDRO_END_C }
#else
#  define HYDRO_LINKAGE extern
#  define HYDRO_BEGIN_C
#  define HYDRO_END_C
#endif

/* the guard pair is spelled through a second macro */
#define HYDRO_BEGIN_DECLS HYDRO_BEGIN_C
#define HYDRO_END_DECLS HYDRO_END_C
#define HYDRO_API HYDRO_LINKAGE HYDRO_EXPORT

#if defined(_MSC_VER)
#  define HYDRO_ALIGN(n) __declspec(align(n))
#else
#  define HYDRO_ALIGN(n) __attribute__((aligned(n)))
#endif

#define HYDRO_CHANNELS 12
#define HYDRO_TAPS (2 * 16)

#endif
