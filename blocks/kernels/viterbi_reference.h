// Scalar references of the Viterbi add-compare-select step: the int16 oracle
// of viterbi_kernels.h (same operations, same saturation, same tie rule, so
// every SIMD target must match it bit for bit) and the float version the
// decoder's ViterbiMetric::kFloat path runs (the unquantised reference
// design). Header-only.
#ifndef CAPGAP_BLOCKS_KERNELS_VITERBI_REFERENCE_H_
#define CAPGAP_BLOCKS_KERNELS_VITERBI_REFERENCE_H_

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstring>

#include "blocks/kernels/viterbi_kernels.h"

namespace capgap {
namespace reference {

inline std::int16_t Sat16(int x) {
  return static_cast<std::int16_t>(std::clamp(x, -32768, 32767));
}

inline std::int16_t QuantiseOne(float x, float scale) {
  constexpr float kMax = static_cast<float>(kViterbiMaxQ);
  float v = x * scale;
  v = v > kMax ? kMax : v;
  v = v < -kMax ? -kMax : v;
  return static_cast<std::int16_t>(static_cast<int>(v + std::copysign(0.5f, v)));
}

inline void ViterbiQuantise(const float* x, std::size_t n, float scale, std::int16_t* q) {
  for (std::size_t i = 0; i < n; ++i) q[i] = QuantiseOne(x[i], scale);
}

inline void ViterbiAcsInt16(const ViterbiAcsArgs& args, std::int16_t* metrics,
                            const std::int16_t* q, std::size_t steps, std::uint8_t* decisions) {
  const int n = args.num_outputs;
  const std::size_t s_count = std::size_t{1} << (args.constraint_length - 1);
  const std::size_t h = s_count / 2;
  const std::size_t row = std::max<std::size_t>(1, s_count / 8);
  std::int16_t buf[2][256];
  std::memcpy(buf[0], metrics, s_count * sizeof(std::int16_t));
  for (std::size_t t = 0; t < steps; ++t) {
    const std::int16_t* old = buf[t & 1];
    std::int16_t* nw = buf[(t & 1) ^ 1];
    std::uint8_t* dec = decisions + t * row;
    std::memset(dec, 0, row);
    const std::int16_t* qt = q + t * static_cast<std::size_t>(n);
    for (std::size_t j = 0; j < h; ++j) {
      int bm[4];
      for (int c = 0; c < 4; ++c) {
        int sum = 0;
        for (int i = 0; i < n; ++i) {
          sum += args.signs[(static_cast<std::size_t>(c * n + i)) * h + j] * qt[i];
        }
        bm[c] = sum;
      }
      const int r = t % kViterbiRenormPeriod == 0 ? old[0] : 0;
      const std::int16_t a = Sat16(old[2 * j] - r);
      const std::int16_t b = Sat16(old[2 * j + 1] - r);
      const std::int16_t m0 = Sat16(a + bm[0]), m1 = Sat16(b + bm[1]);
      const std::int16_t m2 = Sat16(a + bm[2]), m3 = Sat16(b + bm[3]);
      nw[j] = std::max(m0, m1);
      nw[j + h] = std::max(m2, m3);
      // Branch-free: the decisions are data-dependent coin flips.
      dec[j / 8] = static_cast<std::uint8_t>(dec[j / 8] | (unsigned{m1 > m0} << (j % 8)));
      dec[(j + h) / 8] =
          static_cast<std::uint8_t>(dec[(j + h) / 8] | (unsigned{m3 > m2} << ((j + h) % 8)));
    }
  }
  std::memcpy(metrics, buf[steps & 1], s_count * sizeof(std::int16_t));
}

// Float ACS with the same trellis, tie rule and renormalisation, on float
// mother LLRs (llr[t n + i]) and float signs [4][n][H].
inline void ViterbiAcsFloat(int constraint_length, int num_outputs, const float* signs,
                            float* metrics, const float* llr, std::size_t steps,
                            std::uint8_t* decisions) {
  const int n = num_outputs;
  const std::size_t s_count = std::size_t{1} << (constraint_length - 1);
  const std::size_t h = s_count / 2;
  const std::size_t row = std::max<std::size_t>(1, s_count / 8);
  float buf[2][256];
  std::memcpy(buf[0], metrics, s_count * sizeof(float));
  for (std::size_t t = 0; t < steps; ++t) {
    const float* old = buf[t & 1];
    float* nw = buf[(t & 1) ^ 1];
    std::uint8_t* dec = decisions + t * row;
    std::memset(dec, 0, row);
    const float* lt = llr + t * static_cast<std::size_t>(n);
    const float ref = old[0];
    for (std::size_t j = 0; j < h; ++j) {
      float bm[4];
      for (int c = 0; c < 4; ++c) {
        float sum = 0.0f;
        for (int i = 0; i < n; ++i) sum += signs[(static_cast<std::size_t>(c * n + i)) * h + j] * lt[i];
        bm[c] = sum;
      }
      const float a = old[2 * j] - ref;
      const float b = old[2 * j + 1] - ref;
      const float m0 = a + bm[0], m1 = b + bm[1], m2 = a + bm[2], m3 = b + bm[3];
      nw[j] = m1 > m0 ? m1 : m0;
      nw[j + h] = m3 > m2 ? m3 : m2;
      dec[j / 8] = static_cast<std::uint8_t>(dec[j / 8] | (unsigned{m1 > m0} << (j % 8)));
      dec[(j + h) / 8] =
          static_cast<std::uint8_t>(dec[(j + h) / 8] | (unsigned{m3 > m2} << ((j + h) % 8)));
    }
  }
  std::memcpy(metrics, buf[steps & 1], s_count * sizeof(float));
}

}  // namespace reference
}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_VITERBI_REFERENCE_H_
