// Channel labels shared between the display and the strike log through std::shared_ptr built
// without a deleter: the last owner frees the Rust CString with `delete`.
#include <cstdio>
#include <memory>
#include "../../common/ltg.h"

std::shared_ptr<char> shared_label(uint32_t channel) {
    return std::shared_ptr<char>(ltg_label(channel));
}

class strike_log {
public:
    explicit strike_log(uint32_t channel) : label_(ltg_label(channel)) {}
    void rebind(uint32_t channel) { label_.reset(ltg_label(channel)); }
    const char *label() const { return label_.get(); }

private:
    std::shared_ptr<char> label_;
};

int main() {
    char *raw = ltg_label(4);
    std::shared_ptr<char> display(raw);
    std::shared_ptr<char> logger = shared_label(8);
    strike_log log(1);
    log.rebind(2);
    std::printf("%s %s %s\n", display.get(), logger.get(), log.label());
    return 0;
}
