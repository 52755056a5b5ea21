// Stroke tallies whose hand-written copy members make a new tracker (a deep copy), and a sensor
// block whose copies are deleted: every tracker and sensor is freed exactly once.
#include "../../common/ltg.h"

class tally_block {
public:
    explicit tally_block(uint32_t window) : window_(window), tracker_(ltg_tracker_new(window)) {}
    tally_block(const tally_block &o) : window_(o.window_), tracker_(ltg_tracker_new(o.window_)) {}
    tally_block &operator=(const tally_block &o) {
        if (this != &o) {
            ltg_tracker *fresh = ltg_tracker_new(o.window_);
            ltg_tracker_free(tracker_);
            tracker_ = fresh;
            window_ = o.window_;
        }
        return *this;
    }
    ~tally_block() { ltg_tracker_free(tracker_); }

    int feed(float v) { return ltg_tracker_feed(tracker_, v); }

private:
    uint32_t window_;
    ltg_tracker *tracker_;
};

class gain_block {
public:
    explicit gain_block(uint32_t channel) : sensor_(ltg_sensor_new(channel)) {}
    gain_block(const gain_block &o) = delete;
    gain_block &operator=(const gain_block &) = delete;
    ~gain_block() { ltg_sensor_free(sensor_); }

    float gain() const { return ltg_sensor_gain(sensor_); }

private:
    ltg_sensor *sensor_;
};

int main() {
    tally_block a(8);
    tally_block b(a);
    tally_block c(2);
    c = a;
    gain_block g(3);
    a.feed(2500.0f);
    return b.feed(5.0f) == 0 && c.feed(1.0f) == 0 && g.gain() > 0.0f ? 0 : 1;
}
