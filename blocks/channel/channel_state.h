// Per-symbol channel state as the receiver and the demapper see it: the
// complex gain h and the noise level N0 of every symbol at the demapper's
// input (y = h x + n, n ~ CN(0, N0)). An empty span means "the same for every
// symbol": gain 1, noise n0_uniform. AWGN leaves both spans empty, so the
// demapper keeps its fast scalar-N0 paths.
#ifndef CAPGAP_BLOCKS_CHANNEL_CHANNEL_STATE_H_
#define CAPGAP_BLOCKS_CHANNEL_CHANNEL_STATE_H_

#include <span>

#include "blocks/core/types.h"

namespace capgap {

struct ChannelStateView {
  std::span<const cf32> gain;  // per symbol, or empty: gain 1
  std::span<const float> n0;   // per symbol, or empty: n0_uniform
  float n0_uniform = 1.0f;
  bool uniform() const { return gain.empty() && n0.empty(); }
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CHANNEL_CHANNEL_STATE_H_
