// Demappers for the Mapper's constellations: hard decision, exact log-MAP LLRs
// (log-sum-exp over the constellation) and max-log LLRs.
//
// LLR convention (the whole project): L(b) = ln P(b=0 | y) / P(b=1 | y);
// L > 0 favours bit 0. For BPSK (0 -> +1) L = 4 y / N0. The hard decision of
// an LLR is 1 when L < 0, else 0. With complex noise variance n0 (N0) the exact
// LLR is ln sum_{x: b=0} exp(-|y-x|^2/N0) - ln sum_{x: b=1} exp(-|y-x|^2/N0);
// max-log keeps the largest term of each sum. Square Gray QAM separates into
// two L-PAM problems (I bits from Re y, Q bits from Im y), which the fast paths
// use; the results equal the full 2-D sums.
// Immutable after Create(); one instance may be shared by all threads.
#ifndef CAPGAP_BLOCKS_MAPPING_DEMAPPER_H_
#define CAPGAP_BLOCKS_MAPPING_DEMAPPER_H_

#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/mapping/mapper.h"

namespace capgap {

enum class DemapMethod { kHard, kMaxLog, kLogMap };
Result<DemapMethod> ParseDemapMethod(std::string_view word);  // hard, maxlog, logmap
std::string ToString(DemapMethod method);
std::string DemapMethodChoices();

class Demapper {
 public:
  static Result<Demapper> Create(const Mapper& mapper, DemapMethod method);

  DemapMethod method() const { return method_; }
  int bits_per_symbol() const { return bits_per_symbol_; }

  // Soft output with the configured method (kHard gives +-1 "LLRs" of the
  // nearest point's label: +1 for bit 0, -1 for bit 1).
  // REQUIRES: llrs.size() == bits_per_symbol() * received.size(); n0 > 0.
  void Demap(std::span<const cf32> received, float n0, std::span<float> llrs) const;

  // Nearest-point (minimum distance) decisions, label bits of that point.
  // REQUIRES: bits.size() == bits_per_symbol() * received.size().
  void HardDecide(std::span<const cf32> received, std::span<Bit> bits) const;

 private:
  Demapper() = default;
  DemapMethod method_ = DemapMethod::kMaxLog;
  Modulation modulation_;
  int bits_per_symbol_ = 1;
  std::vector<cf32> points_;
  std::vector<float> pam_levels_;
};

// Hard decisions of LLRs: bit = (llr < 0). REQUIRES equal sizes.
void LlrToBits(std::span<const float> llrs, std::span<Bit> bits);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_MAPPING_DEMAPPER_H_
