// Stroke trackers, sensors and channel labels shared through std::shared_ptr with the Rust release
// function as deleter (a function pointer or a lambda that calls it); a C++ object in a
// shared_ptr keeps the default deleter, which is right for memory `new` made.
#include <cstdio>
#include <memory>
#include "../../common/ltg.h"

struct strike_note {
    float field_vm;
};

std::shared_ptr<ltg_tracker> shared_tracker(uint32_t window) {
    return std::shared_ptr<ltg_tracker>(ltg_tracker_new(window), &ltg_tracker_free);
}

std::shared_ptr<char> shared_label(uint32_t channel) {
    return std::shared_ptr<char>(ltg_label(channel), &ltg_label_free);
}

class strike_log {
public:
    explicit strike_log(uint32_t channel) : sensor_(ltg_sensor_new(channel), &ltg_sensor_free) {}
    void rebind(uint32_t channel) { sensor_.reset(ltg_sensor_new(channel), [](ltg_sensor *s) { ltg_sensor_free(s); }); }
    float gain() const { return ltg_sensor_gain(sensor_.get()); }

private:
    std::shared_ptr<ltg_sensor> sensor_;
};

int main() {
    ltg_tracker *raw = ltg_tracker_new(4);
    std::shared_ptr<ltg_tracker> display(raw, [](ltg_tracker *t) { ltg_tracker_free(t); });
    std::shared_ptr<ltg_tracker> logger = shared_tracker(8);
    std::shared_ptr<strike_note> note(new strike_note{2500.0f});
    auto last = std::make_shared<strike_note>(strike_note{5.0f});
    strike_log log(1);
    log.rebind(2);
    std::printf("%s\n", shared_label(5).get());
    ltg_tracker_feed(display.get(), note->field_vm);
    return ltg_tracker_feed(logger.get(), last->field_vm) == 0 && log.gain() > 0.0f ? 0 : 1;
}
