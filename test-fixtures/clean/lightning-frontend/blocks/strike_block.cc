// Strike block of the lightning-frontend: owns one Rust trigger, turns the envelope into strikes.
#include <cstddef>
#include <memory>
#include <vector>
#include "../include/lfe/block.h"
#include "../include/lfe/lfe_kernels.h"

struct trigger_deleter {
    void operator()(lfe_trigger *t) const { lfe_trigger_free(t); }
};

class strike_block : public block {
public:
    strike_block(float threshold, uint32_t holdoff, size_t max_strikes)
        : block("strike",
                io_signature::make(1, 1, sizeof(float)),
                io_signature::make(1, 1, sizeof(lfe_strike))),
          trigger_(lfe_trigger_new(threshold, holdoff)), max_strikes_(max_strikes) {
        lfe_trigger_on_strike(trigger_.get(), &strike_block::count_strike, this);
    }

    int work(int noutput_items, const void *const *input_items, void *const *output_items) override {
        const float *env = static_cast<const float *>(input_items[0]);
        lfe_strike *out = static_cast<lfe_strike *>(output_items[0]);
        const size_t n = static_cast<size_t>(noutput_items);
        const size_t found = lfe_trigger_run(trigger_.get(), env, n, out, n < max_strikes_ ? n : max_strikes_);
        return static_cast<int>(found);
    }

    size_t strikes_seen() const { return seen_; }

private:
    static void count_strike(const lfe_strike *strike, void *user) {
        if (strike != nullptr) static_cast<strike_block *>(user)->seen_++;
    }

    std::unique_ptr<lfe_trigger, trigger_deleter> trigger_;
    size_t max_strikes_;
    size_t seen_ = 0;
};

block *make_strike_block(float threshold, uint32_t holdoff, size_t max_strikes) {
    return new strike_block(threshold, holdoff, max_strikes);
}
