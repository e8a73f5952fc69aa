// Scalar oracle of the exhaustive ML block decoder (block_ml_kernels.h): the
// correlation of one frame with every codeword, in codeword index order, each
// metric accumulated in float in bit index order, argmax with ties to the
// lowest index. Every SIMD target matches it exactly. Header-only.
#ifndef CAPGAP_BLOCKS_KERNELS_BLOCK_ML_REFERENCE_H_
#define CAPGAP_BLOCKS_KERNELS_BLOCK_ML_REFERENCE_H_

#include <bit>
#include <cstddef>
#include <cstdint>
#include <limits>

#include "blocks/kernels/block_ml_kernels.h"

namespace capgap {
namespace reference {

// Metric of codeword j: acc = 0; acc += (c_{j,i} ? -L_i : L_i), i = 0..n-1.
// The negation is written as a flip of the IEEE sign bit (which is what
// negation is, for every value) so that the loop has no data-dependent
// branch: with a branch on random codeword bits half the iterations were
// mispredicted and the oracle ran about 5x slower (measured on the Golay
// code, tests/bench/block_ml_bench.cc).
inline float BlockMlMetric(const BlockMlView& v, std::uint32_t j, const float* llr) {
  const std::uint64_t* c = v.codewords + static_cast<std::size_t>(j) * kBlockMlWords;
  float acc = 0.0f;
  for (int i = 0; i < v.n; ++i) {
    const auto sign = static_cast<std::uint32_t>((c[i >> 6] >> (i & 63)) & 1u) << 31;
    acc += std::bit_cast<float>(std::bit_cast<std::uint32_t>(llr[i]) ^ sign);
  }
  return acc;
}

// The decided codeword index of one frame.
inline std::uint32_t BlockMlDecodeFrame(const BlockMlView& v, const float* llr) {
  const std::uint32_t count = std::uint32_t{1} << v.k;
  float best = -std::numeric_limits<float>::infinity();
  std::uint32_t best_j = 0;
  for (std::uint32_t j = 0; j < count; ++j) {
    const float m = BlockMlMetric(v, j, llr);
    if (m > best) {  // strict: the first (lowest) index of the maximum stays
      best = m;
      best_j = j;
    }
  }
  return best_j;
}

inline void BlockMlDecode(const BlockMlView& v, const float* llrs, std::size_t frames,
                          std::uint32_t* best) {
  const auto n = static_cast<std::size_t>(v.n);
  for (std::size_t f = 0; f < frames; ++f) best[f] = BlockMlDecodeFrame(v, llrs + f * n);
}

}  // namespace reference
}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_BLOCK_ML_REFERENCE_H_
