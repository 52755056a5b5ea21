// Stroke tallies with hand-written copy members that copy the tracker pointer instead of making a
// new tracker: the copy and the original both free the same tracker (double free).
#include "../../common/ltg.h"

class tally_block {
public:
    explicit tally_block(uint32_t window) : tracker_(ltg_tracker_new(window)) {}
    tally_block(const tally_block &o) : tracker_(o.tracker_) {}
    tally_block &operator=(const tally_block &o) {
        if (this != &o) tracker_ = o.tracker_;
        return *this;
    }
    ~tally_block() { ltg_tracker_free(tracker_); }

    int feed(float v) { return ltg_tracker_feed(tracker_, v); }

private:
    ltg_tracker *tracker_;
};

class gain_block {
public:
    explicit gain_block(uint32_t channel) : sensor_(ltg_sensor_new(channel)) {}
    gain_block(const gain_block &o);
    gain_block &operator=(const gain_block &) = delete;
    ~gain_block() { ltg_sensor_free(sensor_); }

    float gain() const { return ltg_sensor_gain(sensor_); }

private:
    ltg_sensor *sensor_;
};

gain_block::gain_block(const gain_block &o) : sensor_(o.sensor_) {}

int main() {
    tally_block a(8);
    tally_block b(a); // shares a's tracker
    gain_block g(3);
    gain_block h(g); // shares g's sensor
    a.feed(2500.0f);
    return b.feed(5.0f) == 0 && h.gain() > 0.0f ? 0 : 1;
}
