// Strike channel (slip): close() releases the tracker but keeps the pointer, so the destructor
// releases it a second time after close(); restart() releases and replaces (correct).
#include <cstdio>
#include "../../../common/ltg.h"

class strike_channel {
public:
    explicit strike_channel(uint32_t window) : tracker_(ltg_tracker_new(window)) {}
    ~strike_channel() { ltg_tracker_free(tracker_); }
    strike_channel(const strike_channel &) = delete;
    strike_channel &operator=(const strike_channel &) = delete;

    void close() {
        ltg_tracker_free(tracker_);
    }
    void restart(uint32_t window) {
        ltg_tracker_free(tracker_);
        tracker_ = ltg_tracker_new(window);
    }
    int feed(float v) { return tracker_ ? ltg_tracker_feed(tracker_, v) : -1; }

private:
    ltg_tracker *tracker_ = nullptr;
};

int main() {
    strike_channel c(8);
    c.feed(2500.0f);
    c.restart(4);
    c.close();
    std::printf("%d\n", c.feed(1.0f));
    return 0;
}
