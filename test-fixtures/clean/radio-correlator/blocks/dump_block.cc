// Dump block: a sink for power spectra (vector port of nchan floats). Integrates them, checksums
// the raw bytes for the visibility dump, and lets a Rust flagger report hot channels through a
// callback with this block as its user pointer. The flagger is shared (std::shared_ptr with the
// release function) with whoever asks for it.
#include <cstdint>
#include "blocks.h"

class dump_block : public stream_block {
public:
    dump_block(size_t nchan, float level)
        : stream_block("dump"), nchan_(nchan), acc_(nchan),
          flagger_(xc_flagger_new(level, &dump_block::on_flag, this), &xc_flagger_free) {
        add_input_port(sizeof(float) * nchan);
    }

    int work(int noutput_items, const void *const *input_items, void *const *) override {
        const float *power = static_cast<const float *>(input_items[0]);
        const size_t n = static_cast<size_t>(noutput_items);
        checksum_ ^= xc_checksum(power, n * nchan_ * sizeof(float));
        if (!acc_.add(power, n, nchan_)) return 0;
        hot_.clear();
        flagged_ = xc_flagger_scan(flagger_.get(), acc_.get());
        return noutput_items;
    }

    std::shared_ptr<xc_flagger> flagger() const { return flagger_; }
    size_t flagged() const { return flagged_; }
    const std::vector<size_t> &hot_channels() const { return hot_; }
    uint32_t checksum() const { return checksum_; }

private:
    static void on_flag(size_t chan, float level, void *user) {
        dump_block *self = static_cast<dump_block *>(user);
        if (chan < self->nchan_ && level > 0.0f) self->hot_.push_back(chan);
    }

    size_t nchan_;
    accumulator acc_;
    std::shared_ptr<xc_flagger> flagger_;
    std::vector<size_t> hot_;
    size_t flagged_ = 0;
    uint32_t checksum_ = 0;
};

std::unique_ptr<stream_block> make_dump_block(size_t nchan, float flag_level) {
    return std::make_unique<dump_block>(nchan, flag_level);
}

size_t flagged_channels(stream_block &block) {
    dump_block &d = static_cast<dump_block &>(block);
    std::shared_ptr<xc_flagger> shared = d.flagger(); // a second owner: freed once, by the last
    return d.hot_channels().size() == d.flagged() && shared ? d.flagged() : 0;
}

uint32_t dump_checksum(stream_block &block) { return static_cast<dump_block &>(block).checksum(); }
