// Flat fading channel with L-branch receive diversity and coherent
// combining, perfect channel state at the receiver (implements channel.h).
// Per symbol and branch r_l = h_l x + n_l, n_l ~ CN(0, N0) independent, gains
// from FadingProcess (E|h_l|^2 = 1: Eb/N0 is the average per branch). The
// combiner hands the demapper the equalised sufficient statistic
//   MRC:       z = (sum_l h_l* r_l) / g,  g = sum_l |h_l|^2,
//   selection: z = r_k / h_k with k the branch of largest |h_k|^2, g = |h_k|^2,
// so z = x + n', n' ~ CN(0, N0 / g): the per-symbol state is gain 1 and noise
// N0 / g (channel_state.h), which the demapper's LLRs use and which keeps
// hard decisions on z maximum-likelihood (MRC: D. G. Brennan, "Linear
// diversity combining techniques", Proc. IRE 47, 1959; common practice). One
// branch is z = r / h with noise N0 / |h|^2.
//
// Symbol rate only (samples_per_symbol 1): a pulse-shaped chain is refused
// with fading by the channel keys. Draws, per block of n symbols: the gains
// (FadingProcess, from `process`), then n L complex noise samples from
// `noise`, branch-major (branch l takes normals of samples l n .. l n + n - 1).
// Immutable; one instance per sweep point shared by all threads; the unit's
// process state travels in ChannelStateStorage::process.
#ifndef CAPGAP_BLOCKS_CHANNEL_FADING_CHANNEL_H_
#define CAPGAP_BLOCKS_CHANNEL_FADING_CHANNEL_H_

#include <span>

#include "blocks/channel/channel.h"
#include "blocks/channel/fading_process.h"
#include "blocks/core/energy.h"
#include "blocks/core/rng_stream.h"
#include "blocks/core/status.h"
#include "blocks/core/types.h"

namespace capgap {

class FadingChannel final : public Channel {
 public:
  static Result<FadingChannel> Create(const NoiseSpec& noise, const ChannelSpec& spec);

  const NoiseLevel& level() const override { return level_; }
  const FadingProcess& process() const { return process_; }

  // REQUIRES: samples_per_symbol == 1, storage sized to samples.size(),
  // storage.process != nullptr (Reset() at the start of every unit).
  void Apply(std::span<cf32> samples, int samples_per_symbol, RngStream& noise,
             RngStream& process, ChannelStateStorage storage,
             ChannelStateView& state) const override;
  // Not additive: the chain never takes the real-axis path with it.
  void ApplyReal(std::span<float> samples, RngStream& noise) const override;

 private:
  FadingChannel(const NoiseLevel& level, FadingProcess process)
      : level_(level), process_(std::move(process)) {}
  NoiseLevel level_;
  FadingProcess process_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CHANNEL_FADING_CHANNEL_H_
