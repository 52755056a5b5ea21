// Hydrophone array: the C++ block that feeds frames to the queue.
#include "hydro.h"

void hydro_block_feed(hydro_frame *f) {
    hydro_push(f);
}
