/* Seismic array stacker: the slips. The grid is a struct C defines and fills. */
#ifndef SEIS_H
#define SEIS_H
#include <stddef.h>
#include <stdint.h>

typedef struct seis_array seis_array;

typedef struct seis_grid {
    size_t width;
    size_t n_rows;
    const float *const *rows;
    const size_t *row_len;
} seis_grid;

int seis_add_frames(seis_array *arr, const float *src, size_t frames, size_t channels);
int seis_grid_stack(const seis_grid *grid, float *out, size_t out_len);
int seis_take_packet(const uint8_t **data, size_t *len);
void seis_bytes_free(uint8_t *p, size_t len);

/* A file handle: C sees the public part at the front of the crate's own state. */
typedef struct seis_file_s { unsigned have; } *seis_file;
int seis_file_close(seis_file file);

#endif
