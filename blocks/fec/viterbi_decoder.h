// Viterbi decoder for ConvCode (Viterbi, IEEE Trans. Inf. Theory 13(2),
// 1967; Forney, "The Viterbi algorithm", Proc. IEEE 61(3), 1973; from
// memory): soft input (channel LLRs) or hard input (bits), terminated or
// tail-biting, punctured or not.
//
// Input convention: L = ln P(c=0|y) / P(c=1|y), L > 0 favours 0 (the
// project's convention, blocks/mapping/demapper.h). Punctured positions are
// re-inserted as erasures (L = 0) by ConvCode::Depuncture. The path metric is
// the correlation sum_t sum_i (1 - 2 c_i) L_i, maximised; for LLRs of an
// AWGN channel this is the maximum-likelihood metric. Hard input bits b are
// decoded as LLRs 1 - 2 b, i.e. with the Hamming metric.
//
// Metric arithmetic (ViterbiOptions::metric):
//  * kInt16 (default): per frame the mother LLRs are scaled so their mean
//    magnitude over unpunctured positions is kQuantMean = 16 and rounded to
//    integers in [-127, 127] (8-bit soft input: the Viterbi metric is
//    scale-invariant, and a step of mean/16 costs far less than the ~0.2 dB
//    of 3-bit quantisation); the ACS runs in int16 with saturation and
//    renormalisation, vectorised (blocks/kernels/viterbi_kernels.h, Highway
//    dynamic dispatch) and bit-exact with its scalar oracle.
//  * kFloat: the unquantised scalar float reference (same trellis, tie rule
//    and traceback).
//
// Traceback. Decisions of the whole frame are kept in the workspace. With
// traceback length D > 0 the decoder emulates a fixed-delay decoder that
// decides steps in blocks of C = kTracebackChunk D = 8 D: it runs the ACS to
// e = min(b + C + D, T), traces back from the best state at e and keeps the
// decisions of steps [b, b + C) (each decided at least D steps late; the
// traceback costs (C + D) / C = 9/8 steps per bit), then b += C. At the end
// of a terminated frame the traceback starts from state 0. D = 0 means one
// traceback of the whole frame (exact maximum-likelihood sequence decision
// for a terminated code). Default D (traceback_length = -1): 5 K for
// unpunctured codes, 10 K for punctured ones (common practice: punctured
// codes need a longer decision depth).
//
// Tail-biting: circular decoding by extension (the wrap-around idea of
// Cox & Sundberg, IEEE Trans. Veh. Technol. 43(1), 1994, in its simplest
// form; from memory): the mother LLRs are extended circularly by W steps on
// each side (default W = 6 K, wrapping as often as needed for short frames),
// the decoder starts with all states equal, runs over T + 2 W steps, traces
// back from the best final state and keeps the middle T decisions. This is
// near-ML, not exact ML: the decision can differ from the best tail-biting
// codeword when the W-step head has not settled the start state.
//
// Immutable after Create(); one instance may be shared by all threads, each
// with its own Workspace. Decode allocates nothing.
#ifndef CAPGAP_BLOCKS_FEC_VITERBI_DECODER_H_
#define CAPGAP_BLOCKS_FEC_VITERBI_DECODER_H_

#include <cstddef>
#include <cstdint>
#include <span>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/fec/conv_code.h"

namespace capgap {

enum class ViterbiMetric { kInt16, kFloat };

struct ViterbiOptions {
  int traceback_length = -1;  // D: -1 = default (5K / 10K punctured), 0 = whole frame
  ViterbiMetric metric = ViterbiMetric::kInt16;
  int tail_biting_extension = -1;  // W: -1 = default 6 K
};

class ViterbiDecoder {
 public:
  static constexpr float kQuantMean = 16.0f;
  static constexpr std::size_t kTracebackChunk = 8;

  // Per-thread mutable state, sized for frames of up to max_info_bits.
  class Workspace {
   public:
    Workspace() = default;
    std::size_t max_info_bits() const { return max_info_bits_; }

   private:
    friend class ViterbiDecoder;
    std::size_t max_info_bits_ = 0;
    std::vector<float> mother_;      // depunctured (and extended) LLRs
    std::vector<std::int16_t> q_;    // quantised mother LLRs
    std::vector<std::uint8_t> decisions_;
    std::vector<std::int16_t> metrics_i_;
    std::vector<float> metrics_f_;
  };

  static Result<ViterbiDecoder> Create(const ConvCode& code, const ViterbiOptions& options = {});

  Workspace MakeWorkspace(std::size_t max_info_bits) const;

  const ConvCode& code() const { return code_; }
  int traceback_length() const { return traceback_; }
  int tail_biting_extension() const { return extension_; }
  ViterbiMetric metric() const { return metric_; }
  // Instruction set of the ACS ("SCALAR" for the kFloat path).
  const char* AcsTarget() const;

  // Soft decoding. REQUIRES: llrs.size() == code().CodedLength(info.size()),
  // info.size() <= ws.max_info_bits(), info.size() >= K - 1 for tail-biting.
  void Decode(std::span<const float> llrs, std::span<Bit> info, Workspace& ws) const;
  // Hard decoding of received bits (Hamming metric). Same REQUIRES.
  void DecodeHard(std::span<const Bit> coded, std::span<Bit> info, Workspace& ws) const;

 private:
  explicit ViterbiDecoder(ConvCode code) : code_(std::move(code)) {}
  // Decodes ws.mother_ (already depunctured) of info.size() bits.
  void DecodeMother(std::span<Bit> info, Workspace& ws) const;
  void Forward(Workspace& ws, std::size_t from, std::size_t to) const;
  int BestState(const Workspace& ws) const;
  void Traceback(const Workspace& ws, int state, std::size_t end, std::size_t begin,
                 std::size_t keep_end, std::size_t out_offset, std::span<Bit> info) const;

  ConvCode code_;
  int traceback_ = 0;
  int extension_ = 0;
  ViterbiMetric metric_ = ViterbiMetric::kInt16;
  std::vector<std::int16_t> signs_i_;  // [4][n][H]
  std::vector<float> signs_f_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_VITERBI_DECODER_H_
