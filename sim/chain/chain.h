// Chain composer: turns a SchemeConfig into the blocks of one simulated link
// (bit source -> [encoder] -> mapper -> [shaping] -> AWGN -> [matched filter]
// -> demapper -> [decoder] -> decisions) and runs one work unit of frames
// through them.
//
// Polymorphism lives here, once per frame: the chain picks its path (real BPSK
// or complex) when it is built; the blocks' inner loops see only spans. A
// Chain is immutable and shared by all threads; each thread owns a
// ChainWorkspace with every buffer sized once.
//
// Randomness of unit u at point p comes only from the streams
// (key(seed, scheme), p, u, substream), so a unit's counts are a pure function
// of (seed, scheme, point, unit).
#ifndef CAPGAP_SIM_CHAIN_H_
#define CAPGAP_SIM_CHAIN_H_

#include <algorithm>
#include <cstdint>
#include <memory>
#include <optional>
#include <vector>

#include "blocks/channel/awgn_channel.h"
#include "blocks/core/rng_stream.h"
#include "blocks/core/status.h"
#include "blocks/fec/bcjr_decoder.h"
#include "blocks/fec/conv_code.h"
#include "blocks/fec/distance_spectrum.h"
#include "blocks/fec/ldpc_code.h"
#include "blocks/fec/ldpc_decoder.h"
#include "blocks/fec/ldpc_encoder.h"
#include "blocks/fec/viterbi_decoder.h"
#include "blocks/mapping/demapper.h"
#include "blocks/mapping/mapper.h"
#include "blocks/shaping/fir_filter.h"
#include "blocks/shaping/impairments.h"
#include "blocks/source/bit_source.h"
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
  // Coded chains: coded bits of a frame, their LLRs, decoder state.
  std::vector<Bit> coded;
  std::vector<Bit> coded_hard;
  std::vector<float> info_llrs;
  ViterbiDecoder::Workspace viterbi;
  BcjrDecoder::Workspace bcjr;
  // LDPC chains decode a whole unit at once (the decoder's SIMD lanes take
  // frames side by side): every frame's information bits, channel LLRs,
  // decisions and decoder result.
  LdpcDecoder::Workspace ldpc;
  std::vector<Bit> unit_bits;
  std::vector<float> unit_llrs;
  std::vector<Bit> unit_decided;
  std::vector<LdpcDecoder::FrameResult> ldpc_results;
  std::vector<Bit> bits;
  std::vector<Bit> decided;
  std::vector<cf32> symbols;
  std::vector<float> real_symbols;
  std::vector<float> llrs;
};

class Chain {
 public:
  static Result<Chain> Create(const SchemeConfig& scheme, std::uint64_t seed);

  const SchemeConfig& scheme() const { return scheme_; }
  const Mapper& mapper() const { return *mapper_; }
  // Effective code rate: tail bits and puncturing included (1 uncoded).
  double code_rate() const { return code_rate_; }
  bool coded() const { return conv_.has_value() || ldpc_decoder_.has_value(); }
  bool conv_coded() const { return conv_.has_value(); }
  bool ldpc_coded() const { return ldpc_decoder_.has_value(); }
  const ConvCode& conv_code() const { return *conv_; }
  // LDPC chains (REQUIRES ldpc_coded()).
  const LdpcCode& ldpc_code() const { return *ldpc_code_; }
  const LdpcEncoder& ldpc_encoder() const { return *ldpc_encoder_; }
  const LdpcDecoder& ldpc_decoder() const { return *ldpc_decoder_; }
  // Coded bits per frame (frame_bits when uncoded).
  std::size_t coded_bits() const { return coded_bits_; }
  double info_bits_per_symbol() const { return code_rate() * mapper_->bits_per_symbol(); }
  bool shaped() const { return tx_.has_value(); }
  int samples_per_symbol() const { return shaped() ? scheme_.samples_per_symbol : 1; }
  // Transmitter of a shaped chain (REQUIRES shaped()).
  const Transmitter& transmitter() const { return *tx_; }
  std::uint32_t unit_frames() const { return unit_frames_; }
  std::uint64_t unit_bits() const {
    return static_cast<std::uint64_t>(unit_frames_) * scheme_.frame_bits;
  }

  ChainWorkspace MakeWorkspace() const;

  // For plots, not for counting: up to max_symbols demapper inputs (matched
  // filter output at the symbol instants, impairments and noise included)
  // from streams no sweep point uses. Allocates; not for hot loops.
  std::vector<cf32> CaptureDemapperInput(const AwgnChannel& channel, std::size_t max_symbols) const;

  // Simulates work unit `unit_index` of sweep point `point_index` at the given
  // channel. Deterministic in (seed, scheme name, point, unit).
  UnitCounts RunUnit(const AwgnChannel& channel, std::uint32_t point_index,
                     std::uint32_t unit_index, ChainWorkspace& ws) const;

 private:
  Chain() = default;
  Status BuildLdpc(const std::string& key_prefix);
  void FillSource(std::uint32_t point_index, std::uint32_t unit_index, std::uint32_t frame,
                  RngStream& bit_stream, std::span<Bit> bits) const;

  SchemeConfig scheme_;
  PhiloxKey key_;
  std::uint32_t unit_frames_ = 1;
  std::shared_ptr<const Mapper> mapper_;
  std::shared_ptr<const Demapper> demapper_;
  std::optional<PrbsGenerator> prbs_;
  bool real_axis_ = false;  // BPSK: real samples, in-phase noise only
  // Shaped chains: transmit pulse, matched filter (with any timing offset),
  // carrier offset (also used without shaping when set), and the receiver's
  // delay in symbols (= guard symbols sent after every frame).
  std::optional<Transmitter> tx_;
  std::optional<Receiver> rx_;
  std::optional<CarrierOffset> carrier_;
  // Convolutional code and its decoder (viterbi_soft/viterbi_hard or bcjr).
  std::optional<ConvCode> conv_;
  std::optional<ViterbiDecoder> viterbi_;
  std::optional<BcjrDecoder> bcjr_;
  bool hard_decoding_ = false;
  // LDPC code, its systematic encoder and decoder.
  std::shared_ptr<const LdpcCode> ldpc_code_;
  std::optional<LdpcEncoder> ldpc_encoder_;
  std::optional<LdpcDecoder> ldpc_decoder_;
  double code_rate_ = 1.0;
  std::size_t coded_bits_ = 0;
  int guard_symbols_ = 0;
  void ShapedFrame(const AwgnChannel& channel, RngStream& guard_stream, RngStream& noise_stream,
                   ChainWorkspace& ws) const;
  void PrimeUnit(const AwgnChannel& channel, RngStream& guard_stream, RngStream& noise_stream,
                 ChainWorkspace& ws) const;
  void TransmitComplex(std::span<const Bit> tx_bits, const AwgnChannel& channel,
                       RngStream& guard_stream, RngStream& noise_stream, ChainWorkspace& ws) const;
  // Coded bits of one frame through mapper and channel to the demapper's
  // LLRs (the real BPSK path: L = 4 y / N0).
  void ChannelLlrs(std::span<const Bit> tx_bits, const AwgnChannel& channel,
                   RngStream& guard_stream, RngStream& noise_stream, ChainWorkspace& ws,
                   std::span<float> llrs) const;
  // The frame's bits on the channel: the information bits, or their codeword
  // in ws.coded.
  std::span<const Bit> EncodeFrame(std::span<const Bit> bits, ChainWorkspace& ws) const;
  UnitCounts RunLdpcUnit(const AwgnChannel& channel, std::uint32_t point_index,
                         std::uint32_t unit_index, ChainWorkspace& ws) const;
};

}  // namespace capgap

#endif  // CAPGAP_SIM_CHAIN_H_
