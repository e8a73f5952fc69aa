// What the receiver knows about the channel, symbol by symbol: the complex
// gain h of y = h x + n and the complex noise variance N0 of n ~ CN(0, N0).
// A view (spans into buffers the caller owns, e.g. a fading channel's
// per-thread workspace); empty spans mean "the same for every symbol": gain 1
// and N0 = n0_uniform. AWGN therefore passes {{}, {}, n0}.
#ifndef CAPGAP_BLOCKS_CHANNEL_CHANNEL_STATE_H_
#define CAPGAP_BLOCKS_CHANNEL_CHANNEL_STATE_H_

#include <span>

#include "blocks/core/types.h"

namespace capgap {

struct ChannelStateView {
  std::span<const cf32> gain;  // h per symbol; empty: h = 1
  std::span<const float> n0;   // N0 per symbol; empty: n0_uniform
  float n0_uniform = 1.0f;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CHANNEL_CHANNEL_STATE_H_
