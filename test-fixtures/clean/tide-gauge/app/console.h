/* Operator console of the tide-gauge unit (plain C). */
#ifndef TG_CONSOLE_H
#define TG_CONSOLE_H

#include <stddef.h>
#include <stdio.h>

#include "tg/tide_gauge.h"

#ifdef __cplusplus
extern "C" {
#endif

void console_banner(FILE *f);
/* Parses each line into the report; returns how many lines were rejected. */
size_t console_ingest(FILE *f, const char *const *lines, size_t n_lines, tg_report *rep);
/* Prints the report through a stack buffer, truncated if it does not fit. */
void console_summary(FILE *f, const tg_report *rep);

/* Prints the report as JSON (an owned string, freed here). */
void console_json(FILE *f, const tg_report *rep);
/* Encodes the samples into a Rust-allocated frame, prints its CRC, frees it. */
int console_frame_crc(FILE *f, const tg_sample *samples, size_t n_samples);
/* Prints each sample through a fixed buffer; the station name through a too-small one first. */
void console_samples(FILE *f, const tg_sample *samples, size_t n_samples);

#ifdef __cplusplus
}
#endif

#endif
