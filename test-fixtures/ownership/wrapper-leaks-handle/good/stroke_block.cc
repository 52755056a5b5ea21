// Stroke-counter block: a correct RAII wrapper (release in the destructor, copies deleted, a
// move that leaves the source empty), a std::unique_ptr with the release function as deleter,
// a unique_ptr with a deleter struct, and a handle released through a helper function.
#include <cstdio>
#include <memory>
#include <utility>
#include "../../common/ltg.h"

static void release_sensor(ltg_sensor *s) { ltg_sensor_free(s); }

struct label_deleter {
    void operator()(char *s) const noexcept { ltg_label_free(s); }
};

class stroke_block {
public:
    explicit stroke_block(uint32_t window) : tracker_(ltg_tracker_new(window)), sensor_(ltg_sensor_new(3)) {}
    ~stroke_block() {
        ltg_tracker_free(tracker_);
        release_sensor(sensor_);
    }
    stroke_block(const stroke_block &) = delete;
    stroke_block &operator=(const stroke_block &) = delete;
    stroke_block(stroke_block &&o) noexcept : tracker_(o.tracker_), sensor_(o.sensor_) {
        o.tracker_ = nullptr;
        o.sensor_ = nullptr;
    }
    stroke_block &operator=(stroke_block &&o) noexcept {
        std::swap(tracker_, o.tracker_);
        std::swap(sensor_, o.sensor_);
        return *this;
    }

    int work(const float *field, int n) {
        for (int i = 0; i < n; i++) ltg_tracker_feed(tracker_, field[i] * ltg_sensor_gain(sensor_));
        return (int)ltg_tracker_count(tracker_);
    }

private:
    ltg_tracker *tracker_ = nullptr;
    ltg_sensor *sensor_ = nullptr;
};

class logged_block {
public:
    logged_block() : history_{ltg_tracker_new(4), &ltg_tracker_free}, label_{ltg_label(7)} {}
    const char *label() const { return label_.get(); }
    int feed(float v) { return ltg_tracker_feed(history_.get(), v); }

private:
    std::unique_ptr<ltg_tracker, decltype(&ltg_tracker_free)> history_;
    std::unique_ptr<char, label_deleter> label_;
};

int main() {
    float field[4] = {10.0f, 2500.0f, -3000.0f, 5.0f};
    stroke_block a(8);
    stroke_block b(std::move(a));
    stroke_block c(2);
    c = std::move(b);
    logged_block l;
    l.feed(2000.0f);
    std::printf("%s\n", l.label());
    return c.work(field, 4) == 2 ? 0 : 1;
}
