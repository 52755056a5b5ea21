// Predefined macros of each target (C11 §6.10.8 and the compilers' own), as the compilers of the
// trade define them for a C translation unit with no options: the Debian gcc cross compilers for
// the Linux targets (gcc 12), clang --target=x86_64-pc-windows-msvc for Windows (which, like MSVC,
// defines _MSC_VER/_WIN32/_WIN64 and not __GNUC__). A selection: the names headers test to pick
// an architecture, an OS, a data model or a compiler. `__clang__` is left out (ferrule reads code
// as gcc and MSVC would). Pinned by tests/preproc.oracle.test.ts, which compares every entry with
// `-dM -E` of those compilers. `__cplusplus` is added per translation unit (201703L in C++).
//
// Non-reserved names the compilers define in GNU modes (`linux`, `unix`, `i386`) are left out:
// real builds commonly use -std=c11/c17, where they are not defined.

import type { Triple } from "../../model/targets.js";

export const PREDEFINED: Record<Triple, Record<string, string>> = {
  // x86_64-linux-gnu-gcc -dM -E -x c /dev/null
  "x86_64-unknown-linux-gnu": {
    __STDC__: "1", __STDC_VERSION__: "201710L", __STDC_HOSTED__: "1", __CHAR_BIT__: "8",
    __ORDER_LITTLE_ENDIAN__: "1234", __ORDER_BIG_ENDIAN__: "4321", __ORDER_PDP_ENDIAN__: "3412",
    __BYTE_ORDER__: "__ORDER_LITTLE_ENDIAN__", __SIZEOF_INT__: "4", __SIZEOF_SHORT__: "2",
    __SIZEOF_LONG__: "8", __SIZEOF_LONG_LONG__: "8", __SIZEOF_FLOAT__: "4", __SIZEOF_DOUBLE__: "8",
    __SIZEOF_LONG_DOUBLE__: "16", __SIZEOF_POINTER__: "8", __SIZEOF_SIZE_T__: "8", __SIZEOF_PTRDIFF_T__: "8",
    __SIZEOF_WCHAR_T__: "4", __SIZEOF_WINT_T__: "4", __BIGGEST_ALIGNMENT__: "16", __INT_MAX__: "0x7fffffff",
    __LONG_MAX__: "0x7fffffffffffffffL", __LONG_LONG_MAX__: "0x7fffffffffffffffLL", __SCHAR_MAX__: "0x7f",
    __SHRT_MAX__: "0x7fff", __WCHAR_MAX__: "0x7fffffff", __SIZE_MAX__: "0xffffffffffffffffUL",
    __PTRDIFF_MAX__: "0x7fffffffffffffffL", __INTPTR_MAX__: "0x7fffffffffffffffL",
    __UINTPTR_MAX__: "0xffffffffffffffffUL", __linux__: "1", __linux: "1", __gnu_linux__: "1", __unix__: "1",
    __unix: "1", __ELF__: "1", __GNUC__: "12", __GNUC_MINOR__: "2", __GNUC_PATCHLEVEL__: "0", __LP64__: "1",
    _LP64: "1", __x86_64__: "1", __x86_64: "1", __amd64__: "1", __amd64: "1", __SSE__: "1", __SSE2__: "1",
    __MMX__: "1",
  },
  // aarch64-linux-gnu-gcc -dM -E -x c /dev/null
  "aarch64-unknown-linux-gnu": {
    __STDC__: "1", __STDC_VERSION__: "201710L", __STDC_HOSTED__: "1", __CHAR_BIT__: "8",
    __ORDER_LITTLE_ENDIAN__: "1234", __ORDER_BIG_ENDIAN__: "4321", __ORDER_PDP_ENDIAN__: "3412",
    __BYTE_ORDER__: "__ORDER_LITTLE_ENDIAN__", __SIZEOF_INT__: "4", __SIZEOF_SHORT__: "2",
    __SIZEOF_LONG__: "8", __SIZEOF_LONG_LONG__: "8", __SIZEOF_FLOAT__: "4", __SIZEOF_DOUBLE__: "8",
    __SIZEOF_LONG_DOUBLE__: "16", __SIZEOF_POINTER__: "8", __SIZEOF_SIZE_T__: "8", __SIZEOF_PTRDIFF_T__: "8",
    __SIZEOF_WCHAR_T__: "4", __SIZEOF_WINT_T__: "4", __BIGGEST_ALIGNMENT__: "16", __INT_MAX__: "0x7fffffff",
    __LONG_MAX__: "0x7fffffffffffffffL", __LONG_LONG_MAX__: "0x7fffffffffffffffLL", __SCHAR_MAX__: "0x7f",
    __SHRT_MAX__: "0x7fff", __WCHAR_MAX__: "0xffffffffU", __SIZE_MAX__: "0xffffffffffffffffUL",
    __PTRDIFF_MAX__: "0x7fffffffffffffffL", __INTPTR_MAX__: "0x7fffffffffffffffL",
    __UINTPTR_MAX__: "0xffffffffffffffffUL", __linux__: "1", __linux: "1", __gnu_linux__: "1", __unix__: "1",
    __unix: "1", __ELF__: "1", __GNUC__: "12", __GNUC_MINOR__: "2", __GNUC_PATCHLEVEL__: "0", __LP64__: "1",
    _LP64: "1", __CHAR_UNSIGNED__: "1", __aarch64__: "1", __ARM_ARCH: "8", __ARM_NEON: "1", __ARM_FP: "14",
  },
  // arm-linux-gnueabihf-gcc -dM -E -x c /dev/null
  "armv7-unknown-linux-gnueabihf": {
    __STDC__: "1", __STDC_VERSION__: "201710L", __STDC_HOSTED__: "1", __CHAR_BIT__: "8",
    __ORDER_LITTLE_ENDIAN__: "1234", __ORDER_BIG_ENDIAN__: "4321", __ORDER_PDP_ENDIAN__: "3412",
    __BYTE_ORDER__: "__ORDER_LITTLE_ENDIAN__", __SIZEOF_INT__: "4", __SIZEOF_SHORT__: "2",
    __SIZEOF_LONG__: "4", __SIZEOF_LONG_LONG__: "8", __SIZEOF_FLOAT__: "4", __SIZEOF_DOUBLE__: "8",
    __SIZEOF_LONG_DOUBLE__: "8", __SIZEOF_POINTER__: "4", __SIZEOF_SIZE_T__: "4", __SIZEOF_PTRDIFF_T__: "4",
    __SIZEOF_WCHAR_T__: "4", __SIZEOF_WINT_T__: "4", __BIGGEST_ALIGNMENT__: "8", __INT_MAX__: "0x7fffffff",
    __LONG_MAX__: "0x7fffffffL", __LONG_LONG_MAX__: "0x7fffffffffffffffLL", __SCHAR_MAX__: "0x7f",
    __SHRT_MAX__: "0x7fff", __WCHAR_MAX__: "0xffffffffU", __SIZE_MAX__: "0xffffffffU",
    __PTRDIFF_MAX__: "0x7fffffff", __INTPTR_MAX__: "0x7fffffff", __UINTPTR_MAX__: "0xffffffffU",
    __linux__: "1", __linux: "1", __gnu_linux__: "1", __unix__: "1", __unix: "1", __ELF__: "1",
    __GNUC__: "12", __GNUC_MINOR__: "2", __GNUC_PATCHLEVEL__: "0", __CHAR_UNSIGNED__: "1", __arm__: "1",
    __thumb__: "1", __ARM_EABI__: "1", __ARM_PCS_VFP: "1", __ARM_ARCH: "7", __ARM_FP: "12",
  },
  // i686-linux-gnu-gcc -dM -E -x c /dev/null
  "i686-unknown-linux-gnu": {
    __STDC__: "1", __STDC_VERSION__: "201710L", __STDC_HOSTED__: "1", __CHAR_BIT__: "8",
    __ORDER_LITTLE_ENDIAN__: "1234", __ORDER_BIG_ENDIAN__: "4321", __ORDER_PDP_ENDIAN__: "3412",
    __BYTE_ORDER__: "__ORDER_LITTLE_ENDIAN__", __SIZEOF_INT__: "4", __SIZEOF_SHORT__: "2",
    __SIZEOF_LONG__: "4", __SIZEOF_LONG_LONG__: "8", __SIZEOF_FLOAT__: "4", __SIZEOF_DOUBLE__: "8",
    __SIZEOF_LONG_DOUBLE__: "12", __SIZEOF_POINTER__: "4", __SIZEOF_SIZE_T__: "4", __SIZEOF_PTRDIFF_T__: "4",
    __SIZEOF_WCHAR_T__: "4", __SIZEOF_WINT_T__: "4", __BIGGEST_ALIGNMENT__: "16", __INT_MAX__: "0x7fffffff",
    __LONG_MAX__: "0x7fffffffL", __LONG_LONG_MAX__: "0x7fffffffffffffffLL", __SCHAR_MAX__: "0x7f",
    __SHRT_MAX__: "0x7fff", __WCHAR_MAX__: "0x7fffffffL", __SIZE_MAX__: "0xffffffffU",
    __PTRDIFF_MAX__: "0x7fffffff", __INTPTR_MAX__: "0x7fffffff", __UINTPTR_MAX__: "0xffffffffU",
    __linux__: "1", __linux: "1", __gnu_linux__: "1", __unix__: "1", __unix: "1", __ELF__: "1",
    __GNUC__: "12", __GNUC_MINOR__: "2", __GNUC_PATCHLEVEL__: "0", __ILP32__: "1", __i386__: "1", __i386: "1",
    __i686__: "1", __i686: "1",
  },
  // clang --target=x86_64-pc-windows-msvc -dM -E -x c /dev/null
  "x86_64-pc-windows-msvc": {
    __STDC_VERSION__: "201710L", __STDC_HOSTED__: "1", __CHAR_BIT__: "8", __ORDER_LITTLE_ENDIAN__: "1234",
    __ORDER_BIG_ENDIAN__: "4321", __ORDER_PDP_ENDIAN__: "3412", __BYTE_ORDER__: "__ORDER_LITTLE_ENDIAN__",
    __SIZEOF_INT__: "4", __SIZEOF_SHORT__: "2", __SIZEOF_LONG__: "4", __SIZEOF_LONG_LONG__: "8",
    __SIZEOF_FLOAT__: "4", __SIZEOF_DOUBLE__: "8", __SIZEOF_LONG_DOUBLE__: "8", __SIZEOF_POINTER__: "8",
    __SIZEOF_SIZE_T__: "8", __SIZEOF_PTRDIFF_T__: "8", __SIZEOF_WCHAR_T__: "2", __SIZEOF_WINT_T__: "2",
    __BIGGEST_ALIGNMENT__: "16", __INT_MAX__: "2147483647", __LONG_MAX__: "2147483647L",
    __LONG_LONG_MAX__: "9223372036854775807LL", __SCHAR_MAX__: "127", __SHRT_MAX__: "32767",
    __WCHAR_MAX__: "65535", __SIZE_MAX__: "18446744073709551615ULL", __PTRDIFF_MAX__: "9223372036854775807LL",
    __INTPTR_MAX__: "9223372036854775807LL", __UINTPTR_MAX__: "18446744073709551615ULL", __x86_64__: "1",
    __x86_64: "1", __amd64__: "1", __amd64: "1", __SSE__: "1", __SSE2__: "1", __MMX__: "1", _WIN32: "1",
    _WIN64: "1", _MSC_VER: "1920", _M_X64: "100", _M_AMD64: "100", _MSC_EXTENSIONS: "1",
  },
};

/** Every name any target's table defines (a name absent from a target's table is known not to be
 * defined on it). */
export const PREDEFINED_NAMES: ReadonlySet<string> = new Set(Object.values(PREDEFINED).flatMap((t) => Object.keys(t)));

