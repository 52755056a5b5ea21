// Factories of the correlator blocks (one translation unit per block).
#ifndef XC_BLOCKS_H
#define XC_BLOCKS_H

#include <cstddef>
#include <memory>
#include <vector>
#include "../include/xc/stream.h"
#include "accumulator.h"

std::unique_ptr<stream_block> make_unpack_block(float fringe_phase, float fringe_rate);
std::unique_ptr<stream_block> make_delay_block(size_t delay, const std::vector<float> &taps);
std::unique_ptr<stream_block> make_power_block(size_t nchan, float gain);
std::unique_ptr<stream_block> make_dump_block(size_t nchan, float flag_level);

// The power block integrates into an accumulator the caller can take over (moved out).
accumulator take_accumulator(stream_block &power_block);
size_t flagged_channels(stream_block &dump_block);
uint32_t dump_checksum(stream_block &dump_block);

#endif
