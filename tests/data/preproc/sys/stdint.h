/* A stand-in for <stdint.h> for the preprocessor oracle (gcc runs with -nostdinc -isystem here). */
#ifndef ORACLE_STDINT_H
#define ORACLE_STDINT_H
typedef signed char int8_t;
typedef short int16_t;
typedef int int32_t;
typedef unsigned char uint8_t;
typedef unsigned short uint16_t;
typedef unsigned int uint32_t;
#endif
