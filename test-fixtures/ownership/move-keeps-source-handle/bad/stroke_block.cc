// Stroke-counter block whose move constructor copies the handle but leaves it in the source.
#include <utility>
#include "../../common/ltg.h"

class stroke_block {
public:
    explicit stroke_block(uint32_t window) : tracker_(ltg_tracker_new(window)) {}
    ~stroke_block() { ltg_tracker_free(tracker_); }
    stroke_block(const stroke_block &) = delete;
    stroke_block &operator=(const stroke_block &) = delete;
    stroke_block(stroke_block &&o) noexcept : tracker_(o.tracker_) {}

    int count() const { return (int)ltg_tracker_count(tracker_); }

private:
    ltg_tracker *tracker_;
};

int main() {
    stroke_block a(8);
    stroke_block b(std::move(a));
    return b.count();
}
