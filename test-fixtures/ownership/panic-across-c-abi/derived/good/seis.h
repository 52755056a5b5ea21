/* Seismic array stacker: C holds the array and the trace only as handles. */
#ifndef SEIS_H
#define SEIS_H
#include <stddef.h>
#include <stdint.h>

typedef struct seis_array seis_array;
typedef struct seis_trace seis_trace;

int seis_add_frames(seis_array *arr, const float *src, size_t frames);
int seis_trace_stack(seis_trace *trace, float *out, size_t out_len);
int seis_take_packet(const uint8_t **data, size_t *len);
void seis_label_free(char *label);

/* A file handle: C sees the public part at the front of the crate's own state. */
typedef struct seis_file_s { unsigned have; } *seis_file;
int seis_file_close(seis_file file);

#endif
