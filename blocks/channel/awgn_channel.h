// AWGN channel block: complex baseband, noise level from the single
// ComputeNoiseLevel() of blocks/core/energy.h.
// Immutable; one instance per sweep point may be shared by all threads.
#ifndef CAPGAP_BLOCKS_CHANNEL_AWGN_CHANNEL_H_
#define CAPGAP_BLOCKS_CHANNEL_AWGN_CHANNEL_H_

#include <span>

#include "blocks/core/energy.h"
#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"

namespace capgap {

class AwgnChannel {
 public:
  explicit AwgnChannel(const NoiseSpec& spec) : level_(ComputeNoiseLevel(spec)) {}
  const NoiseLevel& level() const { return level_; }
  float n0() const { return static_cast<float>(level_.n0); }

  // Complex noise, variance N0 per sample (N0 / 2 per dimension).
  void AddNoise(std::span<cf32> samples, RngStream& stream) const;
  // Real-axis signal (BPSK): only the in-phase noise matters, variance N0 / 2.
  void AddNoiseReal(std::span<float> samples, RngStream& stream) const;

 private:
  NoiseLevel level_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CHANNEL_AWGN_CHANNEL_H_
