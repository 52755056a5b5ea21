#include "uplink.hpp"

namespace uplink {

owned_name station_name(std::uint32_t id)
{
    // owned by the caller; the deleter hands it back to Rust
    return owned_name(tg_station_name(id), &tg_string_free);
}

std::string station_label(std::uint32_t id)
{
    char *p = tg_station_name(id);
    if (p == nullptr)
        return {};
    std::string label(p);
    tg_string_free(p);
    return label;
}

std::string report_text(const tg_report &rep)
{
    // size query, then a buffer of exactly the needed size (NUL included)
    std::size_t need = tg_format_report(&rep, nullptr, 0);
    std::vector<char> buf(need);
    tg_format_report(&rep, buf.data(), buf.size());
    return std::string(buf.data());
}

std::vector<std::uint8_t> frame(const std::vector<tg_sample> &samples)
{
    std::vector<std::uint8_t> out(TG_FRAME_HEADER + TG_FRAME_PER_SAMPLE * samples.size() + 1);
    std::size_t written = tg_encode_frame(samples.data(), samples.size(), out.data(), out.size());
    out.resize(written);
    return out;
}

owned_frame frame_alloc(const std::vector<tg_sample> &samples)
{
    std::size_t len = 0;
    std::uint8_t *p = tg_encode_alloc(samples.data(), samples.size(), &len);
    return owned_frame(p, frame_deleter{len});
}

std::uint16_t frame_crc(const std::vector<std::uint8_t> &bytes)
{
    return tg_crc16(bytes.data(), bytes.size());
}

std::string json(const tg_report &rep)
{
    owned_name text(tg_report_json(&rep), &tg_string_free);
    return text ? std::string(text.get()) : std::string();
}

std::string sample_text(const tg_sample &s)
{
    std::vector<char> buf(tg_format_sample(&s, nullptr, 0));
    tg_format_sample(&s, buf.data(), buf.size());
    return std::string(buf.data(), buf.size() - 1);
}

bool parse_all(const std::vector<std::string> &lines, std::vector<tg_sample> &out, std::string &error)
{
    for (const std::string &line : lines) {
        tg_sample s{};
        if (!tg_parse_bytes(line.data(), line.size(), &s)) {
            const char *why = tg_last_error();  // borrowed: copied, not freed
            error = why != nullptr ? why : "unknown";
            return false;
        }
        out.push_back(s);
    }
    return true;
}

}  // namespace uplink
