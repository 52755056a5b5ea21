// Stroke-counter block whose move constructor takes the handle and empties the source.
#include <utility>
#include "../../common/ltg.h"

class stroke_block {
public:
    explicit stroke_block(uint32_t window) : tracker_(ltg_tracker_new(window)) {}
    ~stroke_block() { ltg_tracker_free(tracker_); }
    stroke_block(const stroke_block &) = delete;
    stroke_block &operator=(const stroke_block &) = delete;
    stroke_block(stroke_block &&o) noexcept : tracker_(std::exchange(o.tracker_, nullptr)) {}
    stroke_block &operator=(stroke_block &&o) noexcept {
        if (this != &o) {
            ltg_tracker_free(tracker_);
            tracker_ = o.tracker_;
            o.tracker_ = nullptr;
        }
        return *this;
    }

    int count() const { return (int)ltg_tracker_count(tracker_); }

private:
    ltg_tracker *tracker_;
};

int main() {
    stroke_block a(8);
    stroke_block b(std::move(a));
    stroke_block c(4);
    c = std::move(b);
    return c.count();
}
