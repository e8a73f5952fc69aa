// Union bounds of block codes from their weight enumerators.
#include "analysis/block_code_bound.h"

#include <cmath>
#include <cstddef>
#include <cstdint>

#include "analysis/uncoded_theory.h"
#include "blocks/core/energy.h"

namespace capgap::analysis {
namespace {

// sum_{w>=1} weights[w] scale Q(sqrt(2 w R Eb/N0)) per Eb/N0.
std::vector<double> Bound(const BlockWeightEnumerator& e, const std::vector<std::uint64_t>& weights,
                          double scale, std::span<const double> ebno_db) {
  const double rate = static_cast<double>(e.k) / static_cast<double>(e.n);
  std::vector<double> out;
  out.reserve(ebno_db.size());
  for (const double db : ebno_db) {
    const double ebno = DbToLinear(db);
    double sum = 0.0;
    for (std::size_t w = 1; w < weights.size(); ++w) {
      if (weights[w] == 0) continue;
      sum += static_cast<double>(weights[w]) * scale *
             QFunction(std::sqrt(2.0 * static_cast<double>(w) * rate * ebno));
    }
    out.push_back(sum);
  }
  return out;
}

}  // namespace

std::vector<double> BlockCodeFerUnionBound(const BlockWeightEnumerator& enumerator,
                                           std::span<const double> ebno_db) {
  return Bound(enumerator, enumerator.codewords, 1.0, ebno_db);
}

std::vector<double> BlockCodeBerUnionBound(const BlockWeightEnumerator& enumerator,
                                           std::span<const double> ebno_db) {
  return Bound(enumerator, enumerator.info_weight, 1.0 / static_cast<double>(enumerator.k),
               ebno_db);
}

}  // namespace capgap::analysis
