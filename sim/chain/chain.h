// Chain composer: the one path of a simulated link,
//   source -> encoder -> mapper -> [shaper] -> channel -> [receiver]
//   -> demapper -> decoder -> counters,
// written once. What varies sits behind role interfaces looked up in the
// registry (registry.h): the code family (blocks/fec/channel_code.h) and the
// channel (blocks/channel/channel.h); the mapper/demapper pair comes from
// the scheme's modulation. The chain never asks which family it runs; it
// asks properties (an identity code, an additive-only channel) where a fast
// path pays.
//
// Polymorphism lives here, once per frame or batch: the blocks' inner loops
// see only spans. A Chain is immutable and shared by all threads; each thread
// owns a ChainWorkspace with every buffer sized once.
//
// Randomness of unit u at point p comes only from the streams
// (key(seed, scheme), p, u, substream), so a unit's counts are a pure function
// of (seed, scheme, point, unit). Substreams: kBits (bit source), kNoise
// (channel noise), kChannel (guard symbols of shaped chains), kFading
// (channel processes such as fading), kCode (codes' run-time randomness).
#ifndef CAPGAP_SIM_CHAIN_CHAIN_H_
#define CAPGAP_SIM_CHAIN_CHAIN_H_

#include <algorithm>
#include <atomic>
#include <cstdint>
#include <memory>
#include <optional>
#include <vector>

#include "blocks/channel/channel.h"
#include "blocks/core/rng_stream.h"
#include "blocks/core/status.h"
#include "blocks/fec/channel_code.h"
#include "blocks/fec/interleaver.h"
#include "blocks/mapping/demapper.h"
#include "blocks/mapping/mapper.h"
#include "blocks/shaping/fir_filter.h"
#include "blocks/shaping/impairments.h"
#include "blocks/source/bit_source.h"
#include "sim/chain/registry.h"
#include "sim/config/config.h"
#include "sim/engine/unit_counts.h"

namespace capgap {

struct ChainWorkspace {
  // Shaped chains: transmitter and receiver filter state, the frame plus its
  // trailing guard symbols at symbol rate and at S samples per symbol.
  FirWorkspace tx, rx;
  CarrierOffset::State carrier;
  std::vector<Bit> guard_bits;
  std::vector<cf32> block_symbols;  // [frame symbols | guard symbols]
  std::vector<cf32> samples;
  std::vector<cf32> received;      // receiver output for one block
  // Per-symbol channel state of one block (channels that report it).
  std::vector<cf32> state_gain;
  std::vector<float> state_n0;
  ChannelStateView state;
  // The code's own state, and one batch of frames: information bits,
  // channel LLRs, decisions and decoder results.
  std::unique_ptr<ChannelCode::Workspace> code;
  std::vector<Bit> coded;          // one frame's codeword
  std::vector<Bit> batch_bits;     // batch * info bits
  std::vector<float> batch_llrs;   // batch * coded bits
  std::vector<Bit> batch_decided;  // batch * info bits
  std::vector<FrameDecodeResult> batch_results;
  std::vector<cf32> symbols;
  std::vector<float> real_symbols;
  // The unit's channel process (block and Doppler fading), reset per unit.
  ChannelProcessState process;
  // Interleaved schemes: a group of interleaver_frames codewords, in code
  // order and interleaved, and its LLRs in channel order.
  std::vector<Bit> group_coded, group_mixed;
  std::vector<float> group_llrs;
};

class Chain {
 public:
  // context.stop reaches the code's construction: a stopped build returns a
  // Status with stopped() set (the run exits as interrupted).
  static Result<Chain> Create(const SchemeConfig& scheme, std::uint64_t seed,
                              const BuildContext& context = {});

  const SchemeConfig& scheme() const { return scheme_; }
  const Mapper& mapper() const { return *mapper_; }
  // The scheme's code (the identity code when uncoded).
  const ChannelCode& code() const { return *code_; }
  // Effective code rate: tail bits and puncturing included (1 uncoded).
  double code_rate() const { return code_->rate(); }
  bool coded() const { return !code_->identity(); }
  // Coded bits per frame (frame_bits when uncoded).
  std::size_t coded_bits() const { return code_->coded_bits(); }
  double info_bits_per_symbol() const { return code_rate() * mapper_->bits_per_symbol(); }
  bool shaped() const { return tx_.has_value(); }
  int samples_per_symbol() const { return shaped() ? scheme_.samples_per_symbol : 1; }
  // Transmitter of a shaped chain (REQUIRES shaped()).
  const Transmitter& transmitter() const { return *tx_; }
  std::uint32_t unit_frames() const { return unit_frames_; }
  std::uint64_t unit_bits() const {
    return static_cast<std::uint64_t>(unit_frames_) * scheme_.frame_bits;
  }

  // The channel of a point: the only place a point's Eb/N0 becomes noise
  // (through ComputeNoiseLevel with this chain's rate, bits per symbol and
  // samples per symbol).
  std::unique_ptr<const Channel> MakePointChannel(double ebno_db) const;

  ChainWorkspace MakeWorkspace() const;

  // For plots, not for counting: up to max_symbols demapper inputs (matched
  // filter output at the symbol instants, impairments and noise included)
  // from streams no sweep point uses. Allocates; not for hot loops.
  std::vector<cf32> CaptureDemapperInput(const Channel& channel, std::size_t max_symbols) const;

  // Simulates work unit `unit_index` of sweep point `point_index` at the given
  // channel. Deterministic in (seed, scheme name, point, unit).
  UnitCounts RunUnit(const Channel& channel, std::uint32_t point_index,
                     std::uint32_t unit_index, ChainWorkspace& ws) const;
  // The same unit, abandoned as soon as *stop reads true: the flag is read
  // before every frame (every decoder batch for codes that decode several
  // frames per call, LdpcChannelCode::BatchFrames), and an abandoned unit
  // returns nullopt, its partial counts dropped, so whatever is counted
  // stays a pure function of (seed, scheme, point, unit). With stop never
  // set the result is exactly RunUnit's. stop = nullptr: never abandoned.
  std::optional<UnitCounts> RunUnitUnlessStopped(const Channel& channel,
                                                 std::uint32_t point_index,
                                                 std::uint32_t unit_index, ChainWorkspace& ws,
                                                 const std::atomic<bool>* stop) const;

 private:
  Chain() = default;
  void FillSource(std::uint32_t unit_index, std::uint32_t frame, RngStream& bit_stream,
                  std::span<Bit> bits) const;

  SchemeConfig scheme_;
  PhiloxKey key_;
  std::uint32_t unit_frames_ = 1;
  std::uint32_t batch_frames_ = 1;  // frames per Decode call
  std::shared_ptr<const ChannelCode> code_;
  const ChannelFamily* channel_family_ = nullptr;
  std::shared_ptr<const Mapper> mapper_;
  std::shared_ptr<const Demapper> demapper_;
  std::optional<PrbsGenerator> prbs_;
  std::shared_ptr<const Interleaver> interleaver_;  // null: none
  bool real_axis_ = false;  // BPSK: real samples, in-phase noise only
  // QPSK, unshaped, no carrier offset, soft demapper: fused bits -> LLRs on
  // additive-only channels, with the mapper's points by label.
  bool qpsk_fused_ = false;
  float qpsk_re_[4] = {}, qpsk_im_[4] = {};
  // Uncoded 16-QAM with hard or max-log decisions, unshaped, no carrier
  // offset: fused bits -> error count on additive-only channels.
  bool qam16_fused_ = false;
  // The same for 64- and 256-QAM (CountQamAxisErrors) and 8-/16-PSK
  // (CountPskErrors).
  bool qam_axis_fused_ = false;
  bool psk_fused_ = false;
  // Shaped chains: transmit pulse, matched filter (with any timing offset),
  // carrier offset (also used without shaping when set), and the receiver's
  // delay in symbols (= guard symbols sent after every frame).
  std::optional<Transmitter> tx_;
  std::optional<Receiver> rx_;
  std::optional<CarrierOffset> carrier_;
  int guard_symbols_ = 0;

  // The unit's random streams.
  struct Streams {
    RngStream bits, noise, guard, process;
  };
  Streams UnitStreams(std::uint32_t point_index, std::uint32_t unit_index) const;
  // The channel on `samples` (S per symbol); ws.state describes the result.
  void ApplyChannel(const Channel& channel, std::span<cf32> samples, Streams& s,
                    ChainWorkspace& ws) const;
  void ShapedFrame(const Channel& channel, Streams& s, ChainWorkspace& ws) const;
  void PrimeUnit(const Channel& channel, Streams& s, ChainWorkspace& ws) const;
  void TransmitComplex(std::span<const Bit> tx_bits, const Channel& channel, Streams& s,
                       ChainWorkspace& ws) const;
  // Coded bits of one frame through mapper and channel to the demapper's
  // LLRs (the real BPSK path: L = 4 y / N0).
  void ChannelLlrs(std::span<const Bit> tx_bits, const Channel& channel, Streams& s,
                   ChainWorkspace& ws, std::span<float> llrs) const;
};

}  // namespace capgap

#endif  // CAPGAP_SIM_CHAIN_CHAIN_H_
