// Test driver of the tide-gauge unit: every seam call, the size-query path and
// too-small buffers.
#include <cstdio>
#include <cstring>
#include <string>
#include <vector>

#include "console.h"
#include "uplink.hpp"

static int failures = 0;

static void expect(bool ok, const char *what)
{
    if (!ok) {
        std::printf("FAILED: %s\n", what);
        failures++;
    }
}

int main()
{
    console_banner(stdout);
    expect(std::strcmp(tg_version(), "tide-gauge 2.3.1") == 0, "version");
    expect(std::strcmp(tg_error_name(TG_ERR_RANGE), "out of range") == 0, "error name");

    // owned strings: unique_ptr with the release function, and copy-then-free
    uplink::owned_name name = uplink::station_name(3);
    expect(name && std::strcmp(name.get(), "STN03") == 0, "station name");
    expect(uplink::station_label(12) == "STN12", "station label");
    tg_string_free(nullptr);

    // C caller: NUL-terminated lines, errors read from the borrowed last-error message
    tg_report rep;
    expect(tg_report_init(&rep, "harbour-mouth-east-02"), "report init");
    const char *lines[] = {
        "STN03 1733140000000 1234",
        "STN03 1733140060000 1301 4",
        "STN03 notatime 1200",
        "STN03 1733140120000 99999999999",
        "STN03 1733140180000 1188",
    };
    std::size_t rejected = console_ingest(stdout, lines, sizeof lines / sizeof lines[0], &rep);
    expect(rejected == 2, "two lines rejected");
    expect(std::strcmp(tg_error_name(tg_parse("STN03 x 1", nullptr)), "null argument") == 0, "null out");
    expect(rep.n_samples == 3 && rep.min_mm == 1188 && rep.max_mm == 1301, "report stats");
    expect(std::strcmp(reinterpret_cast<const char *>(rep.name), "harbour-mouth-e") == 0, "name truncated");
    expect(tg_parse(nullptr, nullptr) == TG_ERR_NULL && std::strcmp(tg_last_error(), "null argument") == 0, "null line");

    // report text: size query + exact buffer (C++), and a too-small stack buffer (C)
    std::string text = uplink::report_text(rep);
    std::printf("%s\n", text.c_str());
    expect(tg_format_report(&rep, nullptr, 0) == text.size() + 1, "size query");
    console_summary(stdout, &rep);
    char tiny[6];
    std::size_t need = tg_format_report(&rep, tiny, sizeof tiny);
    expect(need == text.size() + 1 && std::strcmp(tiny, "harbo") == 0, "truncated report");

    // (pointer, length) lines, no NUL needed
    std::vector<std::string> more = {"STN07 1733140240000 1402", "STN07\t1733140300000\t1399\t1"};
    std::vector<tg_sample> samples;
    std::string error;
    expect(uplink::parse_all(more, samples, error) && samples.size() == 2, "parse bytes");
    expect(std::strcmp(samples[1].station, "STN07") == 0 && samples[1].flags == 1, "parsed fields");
    std::vector<std::string> bad = {"STN07 1733140240000"};
    expect(!uplink::parse_all(bad, samples, error) && error == "missing level", "parse bytes error");
    tg_sample empty;
    expect(!tg_parse_bytes(nullptr, 0, &empty), "empty input");

    // binary frame: exact size, and a frame buffer too small
    std::vector<std::uint8_t> fr = uplink::frame(samples);
    expect(fr.size() == TG_FRAME_HEADER + 2 * TG_FRAME_PER_SAMPLE + 1 && fr[0] == 0x7e && fr[2] == 2, "frame");
    std::uint8_t small[8];
    expect(tg_encode_frame(samples.data(), samples.size(), small, sizeof small) == 0, "frame too small");
    expect(std::strcmp(tg_last_error(), "frame buffer too small") == 0, "frame error");

    // owned bytes: unique_ptr with a sized deleter (C++) and an explicit free (C); CRC over both
    uplink::owned_frame owned = uplink::frame_alloc(samples);
    expect(owned && owned.get_deleter().len == fr.size() && std::memcmp(owned.get(), fr.data(), fr.size()) == 0, "frame alloc");
    int crc = console_frame_crc(stdout, samples.data(), samples.size());
    expect(crc == uplink::frame_crc(fr), "frame crc");
    std::uint8_t check[] = {'1', '2', '3', '4', '5', '6', '7', '8', '9'};
    expect(tg_crc16(check, sizeof check) == 0x29B1, "crc16 check value");

    // owned JSON, fixed and sized sample text, name into a caller's buffer
    console_json(stdout, &rep);
    expect(uplink::json(rep) == "{\"station\":\"harbour-mouth-e\",\"n\":3,\"min_mm\":1188,\"max_mm\":1301}", "json");
    console_samples(stdout, samples.data(), samples.size());
    expect(uplink::sample_text(samples[1]) == "STN07 1733140300000 1399 1", "sample text");
    char six[6];
    expect(tg_station_name_into(12, six, sizeof six) && std::strcmp(six, "STN12") == 0, "name fits exactly");
    expect(!tg_station_name_into(123, six, sizeof six), "name does not fit");

    if (failures == 0)
        std::printf("all checks passed\n");
    return failures == 0 ? 0 : 1;
}
