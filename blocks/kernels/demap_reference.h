// Scalar oracle of the demap kernels (demap_kernels.h): one symbol (or one
// axis sample) at a time, plain loops. It defines the results every target
// must reproduce bit for bit and stays as the reference after SIMD exists.
//
// LLR convention (the whole project): L(b) = ln P(b=0 | y) / P(b=1 | y) for
// equiprobable symbols, L > 0 favours bit 0; the exact LLR is
//   ln sum_{x: b=0} exp(-|y-x|^2/N0) - ln sum_{x: b=1} exp(-|y-x|^2/N0)
// and max-log keeps the largest term of each sum (common practice). Paths:
//  * BPSK: L = 4 Re y / N0; QPSK: L(b0) = 2 sqrt2 Im y / N0, L(b1) =
//    2 sqrt2 Re y / N0 (exact, so max-log and log-MAP coincide).
//  * Square Gray QAM: two L-PAM problems on the flat float array y (axis
//    sample t = 2 s + a gives LLRs p t .. p t + p - 1, which is exactly the
//    layout of the m = 2p bits of symbol s). Levels on the odd-integer grid
//    c_j = L - 1 - 2j (u = y / s): |y - s c|^2 = s^2 (u^2 - 2uc + c^2) and
//    u^2 is common to every level, so the per-level metric is
//    e = c^2 - c (2u) and an LLR is (s^2 / N0) times a metric difference.
//    2-PAM is linear (max-log is exact), and 4-PAM max-log has a closed form.
//  * M-PSK (M >= 8): |y - x|^2 = |y|^2 + 1 - 2 Re(y conj x); metric
//    e_l = -2 Re(y conj x_l), LLR = (1 / N0) times a metric difference. 8- and
//    16-PSK form it as (-2 Re y) Re x + (-2 Im y) Im x, 32- and 64-PSK as
//    Re y (-2 Re x) + Im y (-2 Im x) (equal except on overflow; kept apart so
//    that the counts of earlier builds are reproduced exactly).
//  * Log-MAP shifts each sum by its own smallest metric, so its largest term
//    is 1 and it lies in [1, M/2]; exp and log are the branch-free
//    polynomials below (errors about 1e-7).
//  * Hard decisions: sign for BPSK/QPSK, the per-axis slicer for QAM, the
//    angular sector for M-PSK; ties (probability zero) break arbitrarily.
// The order of every float operation matters (the SIMD targets repeat it):
// change it only together with demap_kernels-inl.h.
#ifndef CAPGAP_BLOCKS_KERNELS_DEMAP_REFERENCE_H_
#define CAPGAP_BLOCKS_KERNELS_DEMAP_REFERENCE_H_

#include <bit>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <numbers>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/kernels/demap_kernels.h"

namespace capgap::reference {
namespace demap_detail {

inline constexpr float kInf = std::numeric_limits<float>::infinity();
inline constexpr int kMaxLabels = 64;  // the most labels of one metric set (64-PSK)

constexpr int Gray(int k) { return k ^ (k >> 1); }

// b < a ? b : a (the running minimum a keeps its value on ties and NaN).
inline float Min(float a, float b) { return b < a ? b : a; }

// exp(x) for x <= 0. x is clamped to -87 (exp(-87) = 1.6e-38 is still a
// normal float, so 2^n needs no denormal); in the LLRs such terms are at most
// e^-87 of their sum's largest term, which is 1. Method: x = n ln2 + r,
// n = round(x / ln2), |r| <= ln2 / 2, exp(r) by its Taylor polynomial of
// degree 7 (remainder below 0.347^8 / 8! = 5.3e-9), 2^n from the exponent
// bits; ln2 split into a part exact in float times any |n| <= 126 plus a
// correction. Measured (ad hoc, against double exp on a dense grid of
// [-87, 0]): relative error at most 1.1e-7, about 2 ulp.
inline float ExpNonPositive(float x) {
  constexpr float kLog2e = 1.44269504088896341f;
  constexpr float kLn2Hi = 0.693145751953125f;        // 8 significant bits: n kLn2Hi exact
  constexpr float kLn2Lo = 1.428606820309417232e-6f;  // ln 2 - kLn2Hi
  constexpr float kRoundMagic = 12582912.0f;          // 1.5 * 2^23: adding it rounds
  x = x < -87.0f ? -87.0f : x;
  const float t = x * kLog2e + kRoundMagic;  // x / ln2 rounded, plus 1.5 * 2^23
  const float n = t - kRoundMagic;           // round(x / ln2), exact
  const float r = (x - n * kLn2Hi) - n * kLn2Lo;
  float p = 1.0f / 5040.0f;
  p = p * r + 1.0f / 720.0f;
  p = p * r + 1.0f / 120.0f;
  p = p * r + 1.0f / 24.0f;
  p = p * r + 1.0f / 6.0f;
  p = p * r + 0.5f;
  p = p * r + 1.0f;
  p = p * r + 1.0f;
  // n in [-126, 0] equals bits(t) - bits(kRoundMagic), so the biased exponent
  // n + 127 is in [1, 127] and needs no float-to-int conversion. (For NaN x the
  // result is NaN whatever this factor is.)
  const std::uint32_t biased = std::bit_cast<std::uint32_t>(t) - 0x4B400000u + 127u;
  return p * std::bit_cast<float>(biased << 23);
}

// ln(x) for a positive normal float x (a ratio of two sums in [1, M/2]).
// x = 2^e f with f in [sqrt(1/2), sqrt 2); ln f = 2 atanh(t), t = (f-1)/(f+1),
// |t| <= 0.1716, by its series to t^9 (remainder below 2 t^11 / 11 = 7e-10).
// Measured (ad hoc, against double log on [1/64, 64]): absolute error at most
// 3.2e-7.
inline float LogPositive(float x) {
  constexpr float kSqrt2 = 1.41421356237309505f;
  constexpr float kLn2Hi = 0.693145751953125f;
  constexpr float kLn2Lo = 1.428606820309417232e-6f;
  const std::uint32_t bits = std::bit_cast<std::uint32_t>(x);
  float e = static_cast<float>(static_cast<std::int32_t>(bits >> 23) - 127);
  float f = std::bit_cast<float>((bits & 0x007FFFFFu) | 0x3F800000u);  // [1, 2)
  const bool big = f > kSqrt2;
  f *= big ? 0.5f : 1.0f;
  e += big ? 1.0f : 0.0f;
  const float t = (f - 1.0f) / (f + 1.0f);
  const float t2 = t * t;
  float q = 1.0f / 9.0f;
  q = q * t2 + 1.0f / 7.0f;
  q = q * t2 + 1.0f / 5.0f;
  q = q * t2 + 1.0f / 3.0f;
  q = q * t2 + 1.0f;
  return (e * kLn2Hi + 2.0f * t * q) + e * kLn2Lo;
}

// LLRs o[0..bits-1] from the metrics e[l] of labels l < 2^bits (bit k of a
// label counted from the MSB): max-log L_k = scale (min_{bit=1} e - min_{bit=0}
// e); log-MAP adds ln(sum_{bit=0} exp(scale (m0 - e)) / sum_{bit=1} ...).
inline void LlrsFromMetrics(const float* e, int bits, float scale, bool exact, float* o) {
  const int labels = 1 << bits;
  for (int k = 0; k < bits; ++k) {
    float m0 = kInf, m1 = kInf;
    for (int l = 0; l < labels; ++l) {
      if ((l >> (bits - 1 - k)) & 1) {
        m1 = Min(m1, e[l]);
      } else {
        m0 = Min(m0, e[l]);
      }
    }
    if (!exact) {
      o[k] = (m1 - m0) * scale;
      continue;
    }
    float s0 = 0.0f, s1 = 0.0f;
    for (int l = 0; l < labels; ++l) {
      if ((l >> (bits - 1 - k)) & 1) {
        s1 += ExpNonPositive((m1 - e[l]) * scale);
      } else {
        s0 += ExpNonPositive((m0 - e[l]) * scale);
      }
    }
    o[k] = (m1 - m0) * scale + LogPositive(s0 / s1);
  }
}

// Nearest label of one symbol (or axis sample for kPam).
inline int HardLabel(const DemapKernelArgs& a, const float* y) {
  switch (a.path) {
    case DemapKernelPath::kBpsk:
      return y[0] < 0.0f ? 1 : 0;
    case DemapKernelPath::kQpsk:  // b0 from Im y, b1 from Re y (mapper.h)
      return (y[1] < 0.0f ? 2 : 0) + (y[0] < 0.0f ? 1 : 0);
    case DemapKernelPath::kPam: {
      // The nearest level's index j is the number of thresholds
      // L - 2 - 2i (i = 0..L-2, midpoints of the odd-integer grid) above u.
      const int levels = 1 << a.axis_bits;
      const float u = (1.0f / a.level_scale) * y[0];
      int j = 0;
      for (int i = 0; i < levels - 1; ++i) j += u < static_cast<float>(levels - 2 - 2 * i) ? 1 : 0;
      return Gray(j);
    }
    case DemapKernelPath::kPsk: {
      // Point k sits at angle (2k+1) pi / M; with the boundary lines
      // phi_i = 2 pi i / M (i < M/2) and c = #{i: Im(y e^{-j phi_i}) >= 0},
      // c = k + 1 for angle(y) in [0, pi) and c = M - 1 - k in [pi, 2 pi).
      const int order = 1 << a.bits_per_symbol;
      const float yr = y[0], yi = y[1];
      int c = 0;
      for (int i = 0; i < order / 2; ++i) {
        c += yi * a.boundary_cos[i] - yr * a.boundary_sin[i] >= 0.0f ? 1 : 0;
      }
      const int upper = yi >= 0.0f ? 1 : 0;
      return Gray(upper * (c - 1) + (1 - upper) * (order - 1 - c));
    }
  }
  return 0;
}

}  // namespace demap_detail

inline void DemapSoft(const DemapKernelArgs& a, bool exact, const float* y, std::size_t n,
                      float n0, float* llrs) {
  using namespace demap_detail;  // NOLINT(google-build-using-namespace)
  const float inv_n0 = 1.0f / n0;
  switch (a.path) {
    case DemapKernelPath::kBpsk: {
      const float gain = 4.0f * inv_n0;
      for (std::size_t s = 0; s < n; ++s) llrs[s] = gain * y[2 * s];
      return;
    }
    case DemapKernelPath::kQpsk: {
      const float gain = 2.0f * std::numbers::sqrt2_v<float> * inv_n0;
      for (std::size_t s = 0; s < n; ++s) {
        llrs[2 * s] = gain * y[2 * s + 1];
        llrs[2 * s + 1] = gain * y[2 * s];
      }
      return;
    }
    case DemapKernelPath::kPam: {
      const int p = a.axis_bits;
      const auto pp = static_cast<std::size_t>(p);
      const float s = a.level_scale;
      const float inv_s = 1.0f / s;
      const float scale = s * s * inv_n0;
      if (p == 2 && !exact) {
        // 4-PAM max-log in closed form. Levels c = 3, 1, -1, -3 carry labels
        // 00, 01, 11, 10, so with u = y / s:
        //   bit 0: min(1 + 2u, 9 + 6u) - min(1 - 2u, 9 - 6u) = 8u - 4 clamp(u, -2, 2)
        //   bit 1: (1 - 2|u|) - (9 - 6|u|) = 4|u| - 8
        // and clamp(u, -2, 2) = (|u + 2| - |u - 2|) / 2; in y: thresholds +-2s.
        const float ka = 8.0f * scale * inv_s;
        const float kb = 2.0f * scale * inv_s;
        const float kc = 4.0f * scale * inv_s;
        const float kd = 8.0f * scale;
        const float two_s = 2.0f * s;
        for (std::size_t t = 0; t < 2 * n; ++t) {
          const float v = y[t];
          llrs[2 * t] = ka * v - kb * (std::fabs(v + two_s) - std::fabs(v - two_s));
          llrs[2 * t + 1] = kc * std::fabs(v) - kd;
        }
        return;
      }
      const int levels = 1 << p;
      const float two_inv_s = 2.0f * inv_s;
      float e[kMaxLabels];
      for (std::size_t t = 0; t < 2 * n; ++t) {
        const float u2 = two_inv_s * y[t];
        for (int j = 0; j < levels; ++j) {
          const auto c = static_cast<float>(levels - 1 - 2 * j);
          e[Gray(j)] = c * c - c * u2;
        }
        // 2-PAM: the exact LLR is linear, max-log gives it.
        LlrsFromMetrics(e, p, scale, exact && p > 1, llrs + pp * t);
      }
      return;
    }
    case DemapKernelPath::kPsk: {
      const int b = a.bits_per_symbol;
      const int order = 1 << b;
      const auto bb = static_cast<std::size_t>(b);
      float e[kMaxLabels];
      for (std::size_t s = 0; s < n; ++s) {
        if (b <= 4) {
          const float yr = -2.0f * y[2 * s];
          const float yi = -2.0f * y[2 * s + 1];
          for (int l = 0; l < order; ++l) e[l] = yr * a.point_re[l] + yi * a.point_im[l];
        } else {
          const float yr = y[2 * s];
          const float yi = y[2 * s + 1];
          for (int l = 0; l < order; ++l) {
            e[l] = yr * (-2.0f * a.point_re[l]) + yi * (-2.0f * a.point_im[l]);
          }
        }
        LlrsFromMetrics(e, b, inv_n0, exact, llrs + bb * s);
      }
      return;
    }
  }
}

inline void DemapHard(const DemapKernelArgs& a, const float* y, std::size_t n, float* signs,
                      Bit* bits) {
  using namespace demap_detail;  // NOLINT(google-build-using-namespace)
  // kPam runs over the 2 n axis samples, p bits each.
  const bool pam = a.path == DemapKernelPath::kPam;
  const int b = pam ? a.axis_bits : a.bits_per_symbol;
  const std::size_t items = pam ? 2 * n : n;
  const std::size_t stride = pam ? 1 : 2;
  const auto bb = static_cast<std::size_t>(b);
  for (std::size_t t = 0; t < items; ++t) {
    const int g = HardLabel(a, y + stride * t);
    for (int k = 0; k < b; ++k) {
      const int bit = (g >> (b - 1 - k)) & 1;
      const std::size_t i = bb * t + static_cast<std::size_t>(k);
      if (signs != nullptr) {
        signs[i] = 1.0f - 2.0f * static_cast<float>(bit);
      } else {
        bits[i] = static_cast<Bit>(bit);
      }
    }
  }
}

}  // namespace capgap::reference

#endif  // CAPGAP_BLOCKS_KERNELS_DEMAP_REFERENCE_H_
