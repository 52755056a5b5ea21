// Stroke-counter block: keeps a Rust stroke tracker per antenna, but never releases it.
#include "../../common/ltg.h"

class stroke_block {
public:
    explicit stroke_block(uint32_t window) : tracker_(ltg_tracker_new(window)) {}
    stroke_block(const stroke_block &) = delete;
    stroke_block &operator=(const stroke_block &) = delete;

    int work(const float *field, int n) {
        for (int i = 0; i < n; i++) ltg_tracker_feed(tracker_, field[i]);
        return (int)ltg_tracker_count(tracker_);
    }

private:
    ltg_tracker *tracker_;
};

int main() {
    float field[4] = {10.0f, 2500.0f, -3000.0f, 5.0f};
    stroke_block b(8);
    return b.work(field, 4) == 2 ? 0 : 1;
}
