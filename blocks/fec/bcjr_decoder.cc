// Max-log BCJR decoder (see bcjr_decoder.h): forward recursion stored for
// the frame, backward recursion fused with the output LLRs.
#include "blocks/fec/bcjr_decoder.h"

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <utility>

namespace capgap {
namespace {

constexpr float kNegInf = -std::numeric_limits<float>::infinity();

// Branch metric (1/2) sum_i (1 - 2 c_i) L_i.
inline float Gamma(std::uint32_t label, const float* l, int n) {
  float g = 0.0f;
  for (int i = 0; i < n; ++i) g += ((label >> i) & 1u) ? -l[i] : l[i];
  return 0.5f * g;
}

}  // namespace

Result<BcjrDecoder> BcjrDecoder::Create(const ConvCode& code) {
  if (code.termination() != Termination::kTerminated) {
    return Status::Error("bcjr: termination = " + ToString(code.termination()) +
                         ": only terminated codes are supported");
  }
  return BcjrDecoder(code);
}

BcjrDecoder::Workspace BcjrDecoder::MakeWorkspace(std::size_t max_info_bits) const {
  Workspace ws;
  ws.max_info_bits_ = max_info_bits;
  const std::size_t steps = code_.TrellisSteps(max_info_bits);
  const std::size_t s = static_cast<std::size_t>(code_.num_states());
  ws.mother_.resize(code_.MotherLength(max_info_bits));
  ws.alpha_.resize((steps + 1) * s);
  ws.beta_.resize(s);
  ws.beta_next_.resize(s);
  return ws;
}

void BcjrDecoder::Decode(std::span<const float> llrs, std::span<float> info_llrs,
                         Workspace& ws) const {
  CAPGAP_DCHECK(info_llrs.size() <= ws.max_info_bits());
  CAPGAP_DCHECK(llrs.size() == code_.CodedLength(info_llrs.size()));
  const std::size_t len = info_llrs.size();
  const std::size_t steps = code_.TrellisSteps(len);
  const int n = code_.num_outputs();
  const int states = code_.num_states();
  const std::size_t s_count = static_cast<std::size_t>(states);
  code_.Depuncture(llrs, std::span<float>(ws.mother_.data(), code_.MotherLength(len)));

  // Forward: alpha_{t+1}(s') = max over branches s -> s' of alpha_t(s) + gamma.
  float* alpha = ws.alpha_.data();
  std::fill(alpha, alpha + s_count, kNegInf);
  alpha[0] = 0.0f;
  for (std::size_t t = 0; t < steps; ++t) {
    const float* a = alpha + t * s_count;
    float* an = alpha + (t + 1) * s_count;
    std::fill(an, an + s_count, kNegInf);
    const float* l = ws.mother_.data() + t * static_cast<std::size_t>(n);
    const int max_u = t < len ? 2 : 1;  // tail steps carry input 0
    for (int s = 0; s < states; ++s) {
      const float as = a[s];
      if (as == kNegInf) continue;
      for (int u = 0; u < max_u; ++u) {
        const int ns = code_.NextState(s, u);
        const float v = as + Gamma(code_.BranchLabel(s, u), l, n);
        an[ns] = std::max(an[ns], v);
      }
    }
    // Renormalise (the LLRs are differences, so a common shift is free).
    const float ref = *std::max_element(an, an + s_count);
    for (std::size_t s = 0; s < s_count; ++s) an[s] -= ref;
  }

  // Backward, with the output of each information step.
  float* beta = ws.beta_.data();
  float* bprev = ws.beta_next_.data();
  std::fill(beta, beta + s_count, kNegInf);
  beta[0] = 0.0f;  // terminated in state 0
  for (std::size_t t = steps; t-- > 0;) {
    const float* a = alpha + t * s_count;
    const float* l = ws.mother_.data() + t * static_cast<std::size_t>(n);
    const int max_u = t < len ? 2 : 1;
    float best[2] = {kNegInf, kNegInf};
    std::fill(bprev, bprev + s_count, kNegInf);
    for (int s = 0; s < states; ++s) {
      for (int u = 0; u < max_u; ++u) {
        const int ns = code_.NextState(s, u);
        const float gb = Gamma(code_.BranchLabel(s, u), l, n) + beta[ns];
        bprev[s] = std::max(bprev[s], gb);
        best[u] = std::max(best[u], a[s] + gb);
      }
    }
    if (t < len) info_llrs[t] = best[0] - best[1];
    const float ref = *std::max_element(bprev, bprev + s_count);
    for (std::size_t s = 0; s < s_count; ++s) bprev[s] -= ref;
    std::swap(beta, bprev);
  }
}

}  // namespace capgap
