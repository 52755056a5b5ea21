// Satellite uplink of the tide-gauge unit (C++17).
#pragma once

#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "tg/tide_gauge.h"

namespace uplink {

using owned_name = std::unique_ptr<char, decltype(&tg_string_free)>;

owned_name station_name(std::uint32_t id);
// a Rust-allocated frame, handed back to Rust with its length
struct frame_deleter {
    std::size_t len;
    void operator()(std::uint8_t *p) const { tg_bytes_free(p, len); }
};
using owned_frame = std::unique_ptr<std::uint8_t[], frame_deleter>;

owned_frame frame_alloc(const std::vector<tg_sample> &samples);
std::uint16_t frame_crc(const std::vector<std::uint8_t> &bytes);
std::string json(const tg_report &rep);
std::string sample_text(const tg_sample &s);
std::string station_label(std::uint32_t id);
std::string report_text(const tg_report &rep);
std::vector<std::uint8_t> frame(const std::vector<tg_sample> &samples);
bool parse_all(const std::vector<std::string> &lines, std::vector<tg_sample> &out, std::string &error);

}  // namespace uplink
