// The channel role: what the one simulated chain (sim/chain/chain.h) needs
// of any channel model. One instance per sweep point (it carries the point's
// noise level, from the single ComputeNoiseLevel() of blocks/core/energy.h),
// immutable and shared by all threads.
//
// Apply takes a block of transmitted samples at samples_per_symbol samples
// per symbol, draws its noise from `noise` and any channel process (fading
// gains, phase noise) from `process` (the unit's Substream::kFading
// stream: AWGN draws nothing from it), and describes the per-symbol state the
// receiver and the demapper must use (channel_state.h), writing any
// per-symbol values into `storage`, which the caller sizes to the block's
// symbols.
//
// Shaped chains (samples_per_symbol > 1): fading is flat and applied at the
// symbol rate (fades_symbols()). The chain calls FadeSymbols on the symbols
// of a block before the transmit filter (each symbol multiplied by its gain,
// constant over its symbol interval; the gains recorded in storage.gain, in
// transmission order), Apply on the samples (noise only), and, after the
// matched filter and downsampling, EqualiseSymbols with the same gains
// (perfect channel state at the receiver). Channels that do not fade keep
// the defaults and are never asked.
//
// additive_only(): the channel is exactly additive white Gaussian noise of
// level() on every sample (gain 1). The chain may then keep BPSK on the real
// axis (ApplyReal, I noise only) and use its fused kernels (uncoded BPSK,
// soft BPSK/QPSK channel LLRs, uncoded 16-QAM), which draw that noise
// themselves with sigma = level().sigma_per_dim.
#ifndef CAPGAP_BLOCKS_CHANNEL_CHANNEL_H_
#define CAPGAP_BLOCKS_CHANNEL_CHANNEL_H_

#include <cstdint>
#include <span>
#include <vector>

#include "blocks/channel/channel_state.h"
#include "blocks/core/energy.h"
#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"
#include "blocks/kernels/channel_llr_kernels.h"

namespace capgap {

// Mutable state of a channel process across the blocks of one work unit
// (block fading: the current block's gains; Doppler fading: the unit's
// sinusoids), owned by the caller's per-thread workspace. The chain calls
// Reset() when a unit begins, so a unit's gains depend only on its own
// kFading stream, never on which thread ran what before (counts stay
// identical for any thread or rank count). Channels without a process leave
// it alone; a channel may size its vectors on first use (once per thread).
struct ChannelProcessState {
  std::uint64_t symbol = 0;  // symbols of the unit already through the channel
  bool started = false;      // the unit's process has been drawn
  std::vector<cf32> held;    // per branch: the gain of the current block
  std::vector<double> sos;   // Doppler: per branch and sinusoid (freq, phase I, phase Q)
  std::vector<cf32> gains;   // scratch: branch gains of a block of symbols
  std::vector<cf32> branch;  // scratch: branch samples of a block of symbols
  void Reset() {
    symbol = 0;
    started = false;
  }
};

struct ChannelStateStorage {
  std::span<cf32> gain;  // one per symbol of the block
  std::span<float> n0;   // one per symbol of the block
  // The unit's process state; nullptr only for channels that need none.
  ChannelProcessState* process = nullptr;
};

class Channel {
 public:
  virtual ~Channel() = default;
  // The point's noise level (for fading channels: at the average SNR).
  virtual const NoiseLevel& level() const = 0;
  float n0() const { return static_cast<float>(level().n0); }
  virtual bool additive_only() const { return false; }

  virtual void Apply(std::span<cf32> samples, int samples_per_symbol, RngStream& noise,
                     RngStream& process, ChannelStateStorage storage,
                     ChannelStateView& state) const = 0;
  // Symbol-rate fading of shaped chains (see the file comment).
  virtual bool fades_symbols() const { return false; }
  // Multiplies symbols[i] by the process's next gain, writes the gains to
  // storage.gain[0 .. symbols.size()). REQUIRES fades_symbols().
  virtual void FadeSymbols(std::span<cf32> symbols, RngStream& process,
                           ChannelStateStorage storage) const {
    (void)symbols, (void)process, (void)storage;
  }
  // In place: y_i -> h_i* y_i / |h_i|^2 with gains[i] = h_i (as FadeSymbols
  // recorded them), per-symbol noise N0 / |h_i|^2 into n0_out; points `state`
  // at it (gain 1). REQUIRES fades_symbols().
  virtual void EqualiseSymbols(std::span<cf32> symbols, std::span<const cf32> gains,
                               std::span<float> n0_out, ChannelStateView& state) const {
    (void)symbols, (void)gains, (void)n0_out, (void)state;
  }
  // Uncoded Gray 16-QAM fused to the error count on a channel that is not
  // additive-only: counts_qam16() says whether this channel has such a path
  // (asked once per unit); CountQam16Errors then takes n_symbols symbols'
  // bits (4 per symbol), draws from `noise` and `process` exactly what Apply
  // would, and returns exactly the bit errors of Apply followed by the
  // demapper (`d` made at N0 = 1: MakeQam16Decider) and hard decisions.
  virtual bool counts_qam16() const { return false; }
  virtual std::uint64_t CountQam16Errors(const Bit* bits, std::size_t n_symbols,
                                         const Qam16Decider& d, RngStream& noise,
                                         RngStream& process, ChannelStateStorage storage) const {
    (void)bits, (void)n_symbols, (void)d, (void)noise, (void)process, (void)storage;
    return 0;
  }
  // Real-axis signal (BPSK): in-phase noise only. REQUIRES additive_only().
  virtual void ApplyReal(std::span<float> samples, RngStream& noise) const = 0;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CHANNEL_CHANNEL_H_
