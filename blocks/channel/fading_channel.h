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
// Unshaped chains (samples_per_symbol 1): Apply draws, per block of n
// symbols, the gains (FadingProcess, from `process`), then n L complex noise
// samples from `noise`, branch-major (branch l takes normals of samples
// l n .. l n + n - 1).
//
// Pulse-shaped chains (samples_per_symbol S > 1, one branch only): flat
// fading at the symbol rate. FadeSymbols multiplies each transmitted symbol
// by its gain before the transmit filter, i.e. the gain is constant over the
// symbol's pulse (the fade is slow against one pulse: f_D T_s << 1, and
// frequency flat: delay spread << T_s); Apply adds complex noise of N0 per
// sample; after the matched filter (an RRC pair is Nyquist) the sample of
// symbol k is h_k x_k + n_k, n_k ~ CN(0, N0), and EqualiseSymbols hands the
// demapper z_k = h_k* y_k / |h_k|^2 with N0 / |h_k|^2, as above (perfect
// channel state). Uncoded BER therefore equals the symbol-rate fading theory
// (tests/system/shaped_fading_ber_test.cc). The process runs over every
// transmitted symbol in order, the chain's guard symbols included (they
// are transmitted too), so block boundaries with shaping count those.
// Several branches with shaping are refused (each branch would need its own
// matched filter).
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

  // samples_per_symbol == 1: REQUIRES storage sized to samples.size(),
  // storage.process != nullptr (Reset() at the start of every unit).
  // samples_per_symbol > 1: noise only (the gains went on in FadeSymbols).
  void Apply(std::span<cf32> samples, int samples_per_symbol, RngStream& noise,
             RngStream& process, ChannelStateStorage storage,
             ChannelStateView& state) const override;
  // Shaped chains (one branch): see the file comment.
  bool fades_symbols() const override { return true; }
  void FadeSymbols(std::span<cf32> symbols, RngStream& process,
                   ChannelStateStorage storage) const override;
  void EqualiseSymbols(std::span<cf32> symbols, std::span<const cf32> gains,
                       std::span<float> n0_out, ChannelStateView& state) const override;
  // Fused uncoded 16-QAM count (channel.h): one branch, fast Rayleigh or
  // Rician fading, a vector kernel target (FadingQam16Errors of
  // fading_kernels.h); the same draws and counts as Apply + demapper.
  bool counts_qam16() const override;
  std::uint64_t CountQam16Errors(const Bit* bits, std::size_t n_symbols, const Qam16Decider& d,
                                 RngStream& noise, RngStream& process,
                                 ChannelStateStorage storage) const override;
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
