/* Tide-gauge telemetry unit: Rust kernels for parsing, reporting and framing.
 * Hand-written; kept in step with rust/src by review. */
#ifndef TG_TIDE_GAUGE_H
#define TG_TIDE_GAUGE_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

#define TG_NAME_MAX 16
/* bytes of one encoded frame: 4 header + 14 per sample + 1 checksum */
#define TG_FRAME_HEADER 4
#define TG_FRAME_PER_SAMPLE 14

/* Error codes returned by tg_parse (0 = success). */
#define TG_OK 0
#define TG_ERR_NULL (-1)
#define TG_ERR_SYNTAX (-2)
#define TG_ERR_RANGE (-3)

typedef struct tg_sample {
    int64_t t_ms;              /* milliseconds since the epoch */
    int32_t level_mm;          /* water level above chart datum */
    uint16_t flags;
    char station[TG_NAME_MAX]; /* NUL-terminated, truncated to TG_NAME_MAX - 1 */
} tg_sample;

typedef struct tg_report {
    uint8_t name[TG_NAME_MAX]; /* NUL-terminated */
    uint32_t n_samples;
    int32_t min_mm;
    int32_t max_mm;
    double mean_mm;
} tg_report;

/* Owned string: a new NUL-terminated name such as "STN03", or NULL on failure.
 * The caller frees it with tg_string_free (never free()). */
char *tg_station_name(uint32_t station_id);

/* Frees a string returned by tg_station_name. NULL is allowed. */
void tg_string_free(char *s);

/* Borrowed: a static string; do not free. */
const char *tg_version(void);

/* Borrowed: static name of an error code; do not free. */
const char *tg_error_name(int code);

/* Borrowed: the message of the last failed call on this thread, or NULL.
 * Valid until the next tg_ call on the same thread; do not free. */
const char *tg_last_error(void);

/* Parses one NUL-terminated line "STATION T_MS LEVEL_MM [FLAGS]" into *out.
 * Returns TG_OK or a negative TG_ERR_ code (then tg_last_error says why). */
int tg_parse(const char *line, tg_sample *out);

/* Same, from `len` bytes at `buf` (no NUL needed). Returns true on success. */
bool tg_parse_bytes(const char *buf, size_t len, tg_sample *out);

/* Starts a report for station `name` (truncated to TG_NAME_MAX - 1 bytes). */
bool tg_report_init(tg_report *r, const char *name);

/* Adds one sample to the report. */
void tg_report_add(tg_report *r, const tg_sample *s);

/* Writes the report as text into `out`: at most `out_len` bytes including the
 * terminating NUL (snprintf convention). Returns the length the full text needs,
 * NUL included; pass out = NULL, out_len = 0 to ask for it. */
size_t tg_format_report(const tg_report *r, char *out, size_t out_len);

/* Encodes n_samples samples into the binary frame `frame` of frame_cap bytes.
 * Returns the number of bytes written, or 0 if frame_cap is too small. */
size_t tg_encode_frame(const tg_sample *samples, size_t n_samples, uint8_t *frame, size_t frame_cap);

/* Writes one sample as "STATION T_MS LEVEL_MM FLAGS" into buf (buf_size bytes,
 * NUL included, truncated if needed). Returns the length the full text needs,
 * NUL included. */
size_t tg_format_sample(const tg_sample *s, char *buf, size_t buf_size);

/* Owned string: the report as one JSON object, or NULL. Free with tg_string_free. */
char *tg_report_json(const tg_report *r);

/* Copies the station name into buf (buf_len bytes, NUL included).
 * Returns false, writing nothing, if it does not fit. */
bool tg_station_name_into(uint32_t station_id, char *buf, size_t buf_len);

/* CRC-16/CCITT of nbytes bytes at data. */
uint16_t tg_crc16(const uint8_t *data, size_t nbytes);

/* Owned bytes: the encoded frame of n_samples samples, its length in *out_len,
 * or NULL. Free with tg_bytes_free(p, *out_len). */
uint8_t *tg_encode_alloc(const tg_sample *samples, size_t n_samples, size_t *out_len);

/* Frees bytes returned by tg_encode_alloc; len is the length it reported. NULL is allowed. */
void tg_bytes_free(uint8_t *p, size_t len);

#ifdef __cplusplus
}
#endif

#endif
