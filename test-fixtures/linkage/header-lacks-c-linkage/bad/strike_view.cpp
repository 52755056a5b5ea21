// A C++ display of the ring: includes the C header, which has no extern "C" block.
#include "strike_front.h"

namespace view {
class StrikePanel {
public:
    int refresh(const strike_slot *slots, size_t n) {
        uint8_t kinds[64];
        return strike_classify(slots, n < 64 ? n : 64, kinds);
    }
};
}
