// Stroke-counter block that releases its tracker but can be copied: the copy frees it twice.
#include "../../common/ltg.h"

class stroke_block {
public:
    explicit stroke_block(uint32_t window) : tracker_(ltg_tracker_new(window)) {}
    ~stroke_block() { ltg_tracker_free(tracker_); }

    int work(const float *field, int n) {
        for (int i = 0; i < n; i++) ltg_tracker_feed(tracker_, field[i]);
        return (int)ltg_tracker_count(tracker_);
    }

private:
    ltg_tracker *tracker_;
};

int main() {
    float field[2] = {2500.0f, 5.0f};
    stroke_block a(8);
    stroke_block b = a; // shares a's tracker
    return a.work(field, 2) + b.work(field, 2) == 3 ? 0 : 1;
}
