// Max-log BCJR (forward-backward) decoder for terminated ConvCode frames:
// soft output LLRs of the information bits (Bahl, Cocke, Jelinek, Raviv,
// "Optimal decoding of linear codes for minimizing symbol error rate",
// IEEE Trans. Inf. Theory 20(2), 1974; max-log simplification as in
// Robertson, Villebrun, Hoeher, ICC 1995; from memory).
//
// Convention: input and output L = ln P(b=0) / P(b=1), L > 0 favours 0
// (blocks/mapping/demapper.h). With channel LLRs L_i the branch metric is
// gamma = (1/2) sum_i (1 - 2 c_i) L_i (the log-likelihood of the branch
// label up to a constant), alpha/beta are max-log recursions from state 0 at
// both ends (the frame is terminated), and
//   L(u_t) = max_{u=0 branches} (alpha + gamma + beta)
//          - max_{u=1 branches} (alpha + gamma + beta),
// so the hard decision (1 if L < 0) is the bit of the maximum-likelihood
// path, i.e. equals the Viterbi decision except at exact ties. Punctured
// positions enter as erasures (L = 0, ConvCode::Depuncture). Float scalar
// arithmetic; alpha is stored for the whole frame, beta is kept for one step.
// Tail-biting codes are rejected by Create() (not implemented).
// Immutable after Create(); one instance may be shared by all threads, each
// with its own Workspace. Decode allocates nothing.
#ifndef CAPGAP_BLOCKS_FEC_BCJR_DECODER_H_
#define CAPGAP_BLOCKS_FEC_BCJR_DECODER_H_

#include <cstddef>
#include <span>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/fec/conv_code.h"

namespace capgap {

class BcjrDecoder {
 public:
  class Workspace {
   public:
    Workspace() = default;
    std::size_t max_info_bits() const { return max_info_bits_; }

   private:
    friend class BcjrDecoder;
    std::size_t max_info_bits_ = 0;
    std::vector<float> mother_;
    std::vector<float> alpha_;  // (steps + 1) x S
    std::vector<float> beta_, beta_next_;
  };

  static Result<BcjrDecoder> Create(const ConvCode& code);
  Workspace MakeWorkspace(std::size_t max_info_bits) const;
  const ConvCode& code() const { return code_; }

  // REQUIRES: llrs.size() == code().CodedLength(info_llrs.size()),
  // info_llrs.size() <= ws.max_info_bits().
  void Decode(std::span<const float> llrs, std::span<float> info_llrs, Workspace& ws) const;

 private:
  explicit BcjrDecoder(ConvCode code) : code_(std::move(code)) {}
  ConvCode code_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_BCJR_DECODER_H_
