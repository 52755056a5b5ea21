#include "console.h"

void console_banner(FILE *f)
{
    /* static string owned by the library: printed, never freed */
    fprintf(f, "%s\n", tg_version());
}

size_t console_ingest(FILE *f, const char *const *lines, size_t n_lines, tg_report *rep)
{
    size_t rejected = 0;
    for (size_t i = 0; i < n_lines; i++) {
        tg_sample s;
        int rc = tg_parse(lines[i], &s);
        if (rc != TG_OK) {
            /* borrowed until the next tg_ call: print it now, do not keep or free it */
            const char *why = tg_last_error();
            fprintf(f, "line %zu rejected: %s (%s)\n", i + 1, tg_error_name(rc), why ? why : "?");
            rejected++;
            continue;
        }
        tg_report_add(rep, &s);
    }
    return rejected;
}

void console_summary(FILE *f, const tg_report *rep)
{
    char line[40];
    size_t need = tg_format_report(rep, line, sizeof line);
    if (need > sizeof line)
        fprintf(f, "%s... (%zu bytes needed)\n", line, need);
    else
        fprintf(f, "%s\n", line);
}

void console_json(FILE *f, const tg_report *rep)
{
    char *json = tg_report_json(rep);
    if (json == NULL) {
        fprintf(f, "no report\n");
        return;
    }
    fprintf(f, "%s\n", json);
    tg_string_free(json);
    json = NULL;
}

int console_frame_crc(FILE *f, const tg_sample *samples, size_t n_samples)
{
    size_t len = 0;
    uint8_t *frame = tg_encode_alloc(samples, n_samples, &len);
    if (frame == NULL)
        return -1;
    uint16_t crc = tg_crc16(frame, len);
    fprintf(f, "frame %zu bytes crc %04x\n", len, (unsigned)crc);
    tg_bytes_free(frame, len);
    return crc;
}

void console_samples(FILE *f, const tg_sample *samples, size_t n_samples)
{
    char tag[4];
    char label[TG_NAME_MAX];
    if (n_samples > 0 && !tg_station_name_into(7, tag, sizeof tag) && tg_station_name_into(7, label, sizeof label))
        fprintf(f, "station %s\n", label);
    for (size_t i = 0; i < n_samples; i++) {
        char text[64];
        size_t need = tg_format_sample(&samples[i], text, sizeof text);
        fprintf(f, "%s%s\n", text, need > sizeof text ? "..." : "");
    }
}
