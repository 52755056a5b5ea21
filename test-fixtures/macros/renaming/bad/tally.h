/* Seismic event tally: the C API, with the large-file renames of the platform build. */
#ifndef TALLY_H
#define TALLY_H

#ifdef TALLY_PREFIX
#  define tally_open z_tally_open
#  define tally_seek z_tally_seek
#endif

#if defined(TALLY_WANT64)
#  define tally_open tally_open64
#  define tally_seek tally_seek64
   extern int tally_open64(const char *path);
   extern long long tally_seek64(int fd, long long off);
#else
   extern int tally_open(const char *path);
   extern long tally_seek(int fd, long off);
#endif

#endif
