// AWGN channel block: complex baseband, noise level from the single
// ComputeNoiseLevel() of blocks/core/energy.h; the first implementation of
// the channel role (channel.h). Complex noise CN(0, N0) per sample (N0 / 2
// per dimension); the state it reports is uniform (gain 1, N0).
// Immutable; one instance per sweep point may be shared by all threads.
#ifndef CAPGAP_BLOCKS_CHANNEL_AWGN_CHANNEL_H_
#define CAPGAP_BLOCKS_CHANNEL_AWGN_CHANNEL_H_

#include <span>

#include "blocks/channel/channel.h"
#include "blocks/core/energy.h"
#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"

namespace capgap {

class AwgnChannel final : public Channel {
 public:
  explicit AwgnChannel(const NoiseSpec& spec) : level_(ComputeNoiseLevel(spec)) {}
  const NoiseLevel& level() const override { return level_; }
  bool additive_only() const override { return true; }

  // Complex noise, variance N0 per sample (N0 / 2 per dimension).
  void AddNoise(std::span<cf32> samples, RngStream& stream) const;
  // Real-axis signal (BPSK): only the in-phase noise matters, variance N0 / 2.
  void AddNoiseReal(std::span<float> samples, RngStream& stream) const;

  void Apply(std::span<cf32> samples, int /*samples_per_symbol*/, RngStream& noise,
             RngStream& /*process*/, ChannelStateStorage /*storage*/,
             ChannelStateView& state) const override {
    AddNoise(samples, noise);
    state = ChannelStateView{{}, {}, n0()};
  }
  void ApplyReal(std::span<float> samples, RngStream& noise) const override {
    AddNoiseReal(samples, noise);
  }

 private:
  NoiseLevel level_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CHANNEL_AWGN_CHANNEL_H_
