// Demapper kernels. Every loop is written for the auto-vectoriser: one item
// (an axis sample or a symbol) per iteration, plain float arrays, no
// data-dependent branches, and the constellation size a template parameter so
// that every inner loop unrolls and the label sets are compile-time constants.
//
// Dispatch: the entry kernels (SoftKernel, SignKernel, BitKernel) are compiled
// three times with GCC's target_clones (baseline x86-64, AVX2, x86-64-v4 with
// AVX-512) and the loader picks the best one the CPU supports, once per
// process; every helper is always_inline so the whole loop nest is compiled
// for the chosen instruction set. Floating-point contraction is off for this
// file (the pragma below), so no clone uses FMA and all clones compute the
// same IEEE operations in the same order per value: the LLRs are bit-identical
// on every CPU. Other compilers, other CPUs and CAPGAP_FORCE_SCALAR builds get
// the single baseline version.
//
// Square QAM works on the received samples as one flat float array: axis
// sample t = 2 s + a (a = 0 for Re, 1 for Im of symbol s) yields the p LLRs
// llrs[p t .. p t + p - 1], which is exactly the layout m = 2p bits per symbol,
// I bits first. Levels are handled on the odd-integer grid c_j = L - 1 - 2j
// (u = y / s): |y - s c|^2 = s^2 (u^2 - 2 u c + c^2), and the u^2 term is common
// to every level, so the per-level metric is e = c^2 - 2 u c and an LLR is
// (s^2 / N0) times a difference of metrics.
//
// M-PSK (M >= 8) uses |y - x|^2 = |y|^2 + 1 - 2 Re(y conj x) and keeps
// e_l = -2 Re(y conj x_l), so an LLR is (1 / N0) times a difference of metrics.
// 8- and 16-PSK run per symbol like QAM; 32- and 64-PSK in chunks (see
// PskSoftChunked).
//
// Both fill a metric array indexed by label and share the max-log and log-MAP
// reductions below.
#include "blocks/mapping/demapper.h"

#include <algorithm>
#include <bit>
#include <cctype>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <numbers>
#include <string>
#include <type_traits>

// After the includes: applies to the functions of this file only.
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC optimize("fp-contract=off")
#endif

// ThreadSanitizer builds get the baseline only: the ifunc resolvers of
// target_clones run during relocation, before the TSan runtime is ready, and
// crash there.
#if defined(__GNUC__) && !defined(__clang__) && defined(__x86_64__) && defined(__ELF__) && \
    !defined(CAPGAP_FORCE_SCALAR) && !defined(__SANITIZE_THREAD__)
#define CAPGAP_DEMAP_CLONES __attribute__((target_clones("default", "avx2", "arch=x86-64-v4")))
#else
#define CAPGAP_DEMAP_CLONES
#endif
#if defined(__GNUC__)
#define CAPGAP_DEMAP_INLINE inline __attribute__((always_inline))
#define CAPGAP_LAMBDA_INLINE __attribute__((always_inline))
#else
#define CAPGAP_DEMAP_INLINE inline
#define CAPGAP_LAMBDA_INLINE
#endif

namespace capgap {
namespace {

constexpr float kInf = std::numeric_limits<float>::infinity();

constexpr int Gray(int k) { return k ^ (k >> 1); }

// a < b ? a : b, the form the vectoriser turns into a packed min.
CAPGAP_DEMAP_INLINE float Min(float a, float b) { return b < a ? b : a; }

// c ? a : b by bit masks. Used where one side is a constant: a plain ?: would
// let constant propagation fold the rest of the computation into that side,
// leaving a branch around trapping float arithmetic that if-conversion then
// refuses, and the loop would not vectorise.
CAPGAP_DEMAP_INLINE float Select(bool c, float a, float b) {
  const std::uint32_t mask = 0u - static_cast<std::uint32_t>(c);
  return std::bit_cast<float>((std::bit_cast<std::uint32_t>(a) & mask) |
                              (std::bit_cast<std::uint32_t>(b) & ~mask));
}

// exp(x) for x <= 0, branch-free. x is clamped to -87 (exp(-87) = 1.6e-38 is
// still a normal float, so 2^n below never needs a denormal); in the LLRs such
// terms are at most e^-87 of their sum's largest term, which is 1. Method:
// x = n ln2 + r, n = round(x / ln2), |r| <= ln2 / 2, exp(r) by its Taylor
// polynomial of degree 7 (remainder below 0.347^8 / 8! = 5.3e-9), 2^n from the
// exponent bits. ln2 is split into a part exact in float times any |n| <= 126
// plus a correction. Measured (ad hoc, against double exp on a dense grid of
// [-87, 0]): relative error at most 1.1e-7, about 2 ulp. demapper_test checks
// the resulting LLRs against double precision.
CAPGAP_DEMAP_INLINE float ExpNonPositive(float x) {
  constexpr float kLog2e = 1.44269504088896341f;
  constexpr float kLn2Hi = 0.693145751953125f;        // 8 significant bits: n kLn2Hi exact
  constexpr float kLn2Lo = 1.428606820309417232e-6f;  // ln 2 - kLn2Hi
  constexpr float kRoundMagic = 12582912.0f;          // 1.5 * 2^23: adding it rounds
  x = Select(x < -87.0f, -87.0f, x);
  const float n = (x * kLog2e + kRoundMagic) - kRoundMagic;  // round to nearest integer
  const float r = (x - n * kLn2Hi) - n * kLn2Lo;
  float p = 1.0f / 5040.0f;
  p = p * r + 1.0f / 720.0f;
  p = p * r + 1.0f / 120.0f;
  p = p * r + 1.0f / 24.0f;
  p = p * r + 1.0f / 6.0f;
  p = p * r + 0.5f;
  p = p * r + 1.0f;
  p = p * r + 1.0f;
  // n in [-126, 0]: the biased exponent n + 127 is in [1, 127].
  const auto biased = static_cast<std::uint32_t>(static_cast<std::int32_t>(n) + 127);
  return p * std::bit_cast<float>(biased << 23);
}

// ln(x) for a positive normal float x (here a ratio of two sums of
// exponentials, each in [1, M/2]). x = 2^e f with f in [sqrt(1/2), sqrt 2);
// ln f = 2 atanh(t), t = (f-1)/(f+1), |t| <= 0.1716, by its series to t^9
// (remainder below 2 t^11 / 11 = 7e-10). Measured (ad hoc, against double log
// on [1/64, 64]): absolute error at most 3.2e-7.
CAPGAP_DEMAP_INLINE float LogPositive(float x) {
  constexpr float kSqrt2 = 1.41421356237309505f;
  constexpr float kLn2Hi = 0.693145751953125f;
  constexpr float kLn2Lo = 1.428606820309417232e-6f;
  const std::uint32_t bits = std::bit_cast<std::uint32_t>(x);
  float e = static_cast<float>(static_cast<std::int32_t>(bits >> 23) - 127);
  float f = std::bit_cast<float>((bits & 0x007FFFFFu) | 0x3F800000u);  // [1, 2)
  const bool big = f > kSqrt2;
  f *= Select(big, 0.5f, 1.0f);
  e += Select(big, 1.0f, 0.0f);
  const float t = (f - 1.0f) / (f + 1.0f);
  const float t2 = t * t;
  float q = 1.0f / 9.0f;
  q = q * t2 + 1.0f / 7.0f;
  q = q * t2 + 1.0f / 5.0f;
  q = q * t2 + 1.0f / 3.0f;
  q = q * t2 + 1.0f;
  return (e * kLn2Hi + 2.0f * t * q) + e * kLn2Lo;
}

// Runs `core(t, o, stride)` for items t = 0..n-1; core writes item t's kOut
// outputs to o[0], o[stride], ..., o[(kOut-1) stride]. For kOut = 1, 2, 4, 8
// they go straight to out[kOut t + k] (the vectoriser handles interleaved
// store groups of power-of-two size); otherwise it does not, so a chunk is
// written bit-major into a local buffer (unit-stride stores) and then
// interleaved by a plain copy loop.
template <int kOut, typename Out, typename Core>
CAPGAP_DEMAP_INLINE void ForEachItem(std::size_t n, Out* out, Core core) {
  constexpr auto kK = static_cast<std::size_t>(kOut);
  if constexpr (kOut == 1 || kOut == 2 || kOut == 4 || kOut == 8) {
    for (std::size_t t = 0; t < n; ++t) core(t, out + t * kK, std::size_t{1});
  } else {
    constexpr std::size_t kStage = 64;
    alignas(64) Out stage[kK * kStage];
    for (std::size_t base = 0; base < n; base += kStage) {
      const std::size_t count = std::min(kStage, n - base);
      for (std::size_t t = 0; t < count; ++t) core(base + t, stage + t, kStage);
      Out* o = out + base * kK;
      for (std::size_t t = 0; t < count; ++t) {
        for (std::size_t k = 0; k < kK; ++k) o[t * kK + k] = stage[k * kStage + t];
      }
    }
  }
}

// ------------------------------------------------ reductions over a label set
// e[l] is the metric (squared distance up to a common offset, in units where
// `scale` turns it into a log-likelihood) of label l = 0..2^B-1; bit k of an
// LLR is 0 for the MSB. Label sets are compile-time constants after unrolling.

template <int B>
CAPGAP_DEMAP_INLINE void BitMinima(const float* e, int k, float& m0, float& m1) {
  constexpr int N = 1 << B;
  m0 = kInf;
  m1 = kInf;
#pragma GCC unroll 64
  for (int l = 0; l < N; ++l) {
    if ((l >> (B - 1 - k)) & 1) {
      m1 = Min(m1, e[l]);
    } else {
      m0 = Min(m0, e[l]);
    }
  }
}

// Max-log: L_k = scale (min_{l: bit k = 1} e_l - min_{l: bit k = 0} e_l).
template <int B>
CAPGAP_DEMAP_INLINE void MaxLogFromMetrics(const float* e, float scale, float* o,
                                           std::size_t stride) {
#pragma GCC unroll 8
  for (int k = 0; k < B; ++k) {
    float m0, m1;
    BitMinima<B>(e, k, m0, m1);
    o[static_cast<std::size_t>(k) * stride] = (m1 - m0) * scale;
  }
}

// Log-MAP: L_k = ln sum_{bit=0} exp(-scale e_l) - ln sum_{bit=1} exp(-scale e_l),
// each sum shifted by its own smallest metric, so its largest term is 1 and it
// lies in [1, N/2]: nothing under- or overflows, and the ratio of the two sums
// is a normal float.
template <int B>
CAPGAP_DEMAP_INLINE void LogMapFromMetrics(const float* e, float scale, float* o,
                                           std::size_t stride) {
  constexpr int N = 1 << B;
#pragma GCC unroll 8
  for (int k = 0; k < B; ++k) {
    float m0, m1;
    BitMinima<B>(e, k, m0, m1);
    float s0 = 0.0f, s1 = 0.0f;
#pragma GCC unroll 64
    for (int l = 0; l < N; ++l) {
      if ((l >> (B - 1 - k)) & 1) {
        s1 += ExpNonPositive((m1 - e[l]) * scale);
      } else {
        s0 += ExpNonPositive((m0 - e[l]) * scale);
      }
    }
    o[static_cast<std::size_t>(k) * stride] = (m1 - m0) * scale + LogPositive(s0 / s1);
  }
}

// ---------------------------------------------------------------- square QAM
// Metrics of the L = 2^P levels of one axis sample, indexed by axis label
// (level j, counted from the most positive, has label Gray(j)); u2 = 2 y / s.
template <int P>
CAPGAP_DEMAP_INLINE void PamMetrics(float u2, float* e) {
  constexpr int L = 1 << P;
#pragma GCC unroll 32
  for (int j = 0; j < L; ++j) {
    const float c = static_cast<float>(L - 1 - 2 * j);
    e[Gray(j)] = c * c - c * u2;
  }
}

template <int P>
CAPGAP_DEMAP_INLINE void PamMaxLog(const float* z, std::size_t n, float inv_s, float scale,
                                   float* out) {
  const float two_inv_s = 2.0f * inv_s;
  ForEachItem<P>(n, out, [=](std::size_t t, float* o, std::size_t stride) CAPGAP_LAMBDA_INLINE {
    float e[std::size_t{1} << P];
    PamMetrics<P>(two_inv_s * z[t], e);
    MaxLogFromMetrics<P>(e, scale, o, stride);
  });
}

template <int P>
CAPGAP_DEMAP_INLINE void PamLogMap(const float* z, std::size_t n, float inv_s, float scale,
                                   float* out) {
  const float two_inv_s = 2.0f * inv_s;
  ForEachItem<P>(n, out, [=](std::size_t t, float* o, std::size_t stride) CAPGAP_LAMBDA_INLINE {
    float e[std::size_t{1} << P];
    PamMetrics<P>(two_inv_s * z[t], e);
    LogMapFromMetrics<P>(e, scale, o, stride);
  });
}

// 4-PAM (16-QAM) max-log in closed form, the same function as PamMaxLog<2>.
// Levels c = 3, 1, -1, -3 carry labels 00, 01, 11, 10, so with u = y / s:
//   bit 0: min(1 + 2u, 9 + 6u) - min(1 - 2u, 9 - 6u) = 8u - 4 clamp(u, -2, 2)
//   bit 1: (1 - 2|u|) - (9 - 6|u|) = 4|u| - 8
// (each min picks its first term while |u| <= 2). clamp(u, -2, 2) =
// (|u + 2| - |u - 2|) / 2 needs no comparison. In y: thresholds at +-2s.
CAPGAP_DEMAP_INLINE void Pam4MaxLog(const float* z, std::size_t n, float s, float scale,
                                    float* out) {
  const float inv_s = 1.0f / s;
  const float a = 8.0f * scale * inv_s;
  const float b = 2.0f * scale * inv_s;
  const float c = 4.0f * scale * inv_s;
  const float d = 8.0f * scale;
  const float two_s = 2.0f * s;
  for (std::size_t t = 0; t < n; ++t) {
    const float y = z[t];
    out[2 * t] = a * y - b * (std::fabs(y + two_s) - std::fabs(y - two_s));
    out[2 * t + 1] = c * std::fabs(y) - d;
  }
}

// Per-axis slicer: the nearest level's index j is the number of decision
// thresholds u_i = L - 2 - 2i (i = 0..L-2, midpoints of the odd-integer grid)
// above u; counting them needs no clamp or float-to-int conversion and
// vectorises. Bits of Gray(j); `Emit` turns a bit into the stored value.
template <int P, typename Out, typename Emit>
CAPGAP_DEMAP_INLINE void PamHard(const float* z, std::size_t n, float inv_s, Out* out, Emit emit) {
  constexpr int L = 1 << P;
  ForEachItem<P>(n, out, [=](std::size_t t, Out* o, std::size_t stride) CAPGAP_LAMBDA_INLINE {
    const float u = inv_s * z[t];
    int j = 0;
#pragma GCC unroll 32
    for (int i = 0; i < L - 1; ++i) j += u < static_cast<float>(L - 2 - 2 * i) ? 1 : 0;
    const int g = Gray(j);
#pragma GCC unroll 8
    for (int k = 0; k < P; ++k) {
      o[static_cast<std::size_t>(k) * stride] = emit((g >> (P - 1 - k)) & 1);
    }
  });
}

// ------------------------------------------------------------- BPSK and QPSK
CAPGAP_DEMAP_INLINE void BpskLinear(const float* y, std::size_t n, float gain, float* out) {
  for (std::size_t s = 0; s < n; ++s) out[s] = gain * y[2 * s];
}
// QPSK labels (mapper.h): b0 from Im y, b1 from Re y.
CAPGAP_DEMAP_INLINE void QpskLinear(const float* y, std::size_t n, float gain, float* out) {
  for (std::size_t s = 0; s < n; ++s) {
    out[2 * s] = gain * y[2 * s + 1];
    out[2 * s + 1] = gain * y[2 * s];
  }
}
template <typename Out, typename Emit>
CAPGAP_DEMAP_INLINE void BpskHard(const float* y, std::size_t n, Out* out, Emit emit) {
  for (std::size_t s = 0; s < n; ++s) out[s] = emit(y[2 * s] < 0.0f ? 1 : 0);
}
template <typename Out, typename Emit>
CAPGAP_DEMAP_INLINE void QpskHard(const float* y, std::size_t n, Out* out, Emit emit) {
  for (std::size_t s = 0; s < n; ++s) {
    out[2 * s] = emit(y[2 * s + 1] < 0.0f ? 1 : 0);
    out[2 * s + 1] = emit(y[2 * s] < 0.0f ? 1 : 0);
  }
}

// ------------------------------------------------------- M-PSK, M = 2^B >= 8
template <int B>
CAPGAP_DEMAP_INLINE void PskMetrics(const float* y, std::size_t t, const float* xr, const float* xi,
                                    float* e) {
  constexpr int N = 1 << B;
  const float yr = -2.0f * y[2 * t];
  const float yi = -2.0f * y[2 * t + 1];
#pragma GCC unroll 64
  for (int l = 0; l < N; ++l) e[l] = yr * xr[l] + yi * xi[l];
}

template <int B>
CAPGAP_DEMAP_INLINE void PskMaxLog(const float* y, std::size_t n, const float* xr, const float* xi,
                                   float inv_n0, float* out) {
  ForEachItem<B>(n, out, [=](std::size_t t, float* o, std::size_t stride) CAPGAP_LAMBDA_INLINE {
    float e[std::size_t{1} << B];
    PskMetrics<B>(y, t, xr, xi, e);
    MaxLogFromMetrics<B>(e, inv_n0, o, stride);
  });
}

template <int B>
CAPGAP_DEMAP_INLINE void PskLogMap(const float* y, std::size_t n, const float* xr, const float* xi,
                                   float inv_n0, float* out) {
  ForEachItem<B>(n, out, [=](std::size_t t, float* o, std::size_t stride) CAPGAP_LAMBDA_INLINE {
    float e[std::size_t{1} << B];
    PskMetrics<B>(y, t, xr, xi, e);
    LogMapFromMetrics<B>(e, inv_n0, o, stride);
  });
}

// 32- and 64-PSK: fully unrolled per-symbol code would be large (M B terms)
// and slow to compile, and gains nothing, so these run in chunks of kChunk
// symbols laid out as structure of arrays: one row of kChunk metrics per
// label, and every inner loop runs over the chunk with unit stride. A short
// last chunk is zero-padded; the padding columns are never stored.
constexpr int kChunk = 64;
template <int B>
CAPGAP_DEMAP_INLINE void PskSoftChunked(const float* y, std::size_t n, const float* xr,
                                        const float* xi, float inv_n0, bool exact, float* out) {
  constexpr int N = 1 << B;
  alignas(64) float e[static_cast<std::size_t>(N * kChunk)];
  alignas(64) float yr[kChunk], yi[kChunk];
  alignas(64) float best0[kChunk], best1[kChunk], sum0[kChunk], sum1[kChunk];
  for (std::size_t base = 0; base < n; base += kChunk) {
    const std::size_t count = std::min<std::size_t>(kChunk, n - base);
    const float* yc = y + 2 * base;
    if (count == kChunk) {
      for (int s = 0; s < kChunk; ++s) {
        yr[s] = yc[2 * s];
        yi[s] = yc[2 * s + 1];
      }
    } else {
      std::fill(yr, yr + kChunk, 0.0f);
      std::fill(yi, yi + kChunk, 0.0f);
      for (std::size_t s = 0; s < count; ++s) {
        yr[s] = yc[2 * s];
        yi[s] = yc[2 * s + 1];
      }
    }
    for (int l = 0; l < N; ++l) {
      const float xr2 = -2.0f * xr[l];
      const float xi2 = -2.0f * xi[l];
      float* row = e + l * kChunk;
      for (int s = 0; s < kChunk; ++s) row[s] = yr[s] * xr2 + yi[s] * xi2;
    }
    for (int k = 0; k < B; ++k) {
      std::fill(best0, best0 + kChunk, kInf);
      std::fill(best1, best1 + kChunk, kInf);
      for (int l = 0; l < N; ++l) {
        float* best = ((l >> (B - 1 - k)) & 1) ? best1 : best0;
        const float* row = e + l * kChunk;
        for (int s = 0; s < kChunk; ++s) best[s] = Min(best[s], row[s]);
      }
      if (exact) {
        std::fill(sum0, sum0 + kChunk, 0.0f);
        std::fill(sum1, sum1 + kChunk, 0.0f);
        for (int l = 0; l < N; ++l) {
          const bool one = ((l >> (B - 1 - k)) & 1) != 0;
          float* sum = one ? sum1 : sum0;
          const float* best = one ? best1 : best0;
          const float* row = e + l * kChunk;
          for (int s = 0; s < kChunk; ++s) sum[s] += ExpNonPositive((best[s] - row[s]) * inv_n0);
        }
        for (int s = 0; s < kChunk; ++s) {
          best0[s] = (best1[s] - best0[s]) * inv_n0 + LogPositive(sum0[s] / sum1[s]);
        }
      } else {
        for (int s = 0; s < kChunk; ++s) best0[s] = (best1[s] - best0[s]) * inv_n0;
      }
      float* o = out + base * static_cast<std::size_t>(B) + static_cast<std::size_t>(k);
      for (std::size_t s = 0; s < count; ++s) o[s * static_cast<std::size_t>(B)] = best0[s];
    }
  }
}

// Sector decision. Point k sits at angle (2k+1) pi / M, so the nearest point is
// the k with angle(y) in [2 pi k / M, 2 pi (k+1) / M). With the M/2 boundary
// lines phi_i = 2 pi i / M (i = 0..M/2-1) and c = #{i: Im(y e^{-j phi_i}) >= 0}
// (y on the counter-clockwise side of boundary i): for angle(y) in [0, pi),
// c = k + 1; for [pi, 2 pi), c = M - 1 - k. Boundary 0 (Im y >= 0) tells the
// half. Label Gray(k).
template <int B, typename Out, typename Emit>
CAPGAP_DEMAP_INLINE void PskHard(const float* y, std::size_t n, const float* bcos,
                                 const float* bsin, Out* out, Emit emit) {
  constexpr int N = 1 << B;
  ForEachItem<B>(n, out, [=](std::size_t t, Out* o, std::size_t stride) CAPGAP_LAMBDA_INLINE {
    const float yr = y[2 * t];
    const float yi = y[2 * t + 1];
    int c = 0;
#pragma GCC unroll 32
    for (int i = 0; i < N / 2; ++i) c += yi * bcos[i] - yr * bsin[i] >= 0.0f ? 1 : 0;
    const int upper = yi >= 0.0f ? 1 : 0;
    const int k = upper * (c - 1) + (1 - upper) * (N - 1 - c);
    const int g = Gray(k);
#pragma GCC unroll 8
    for (int b = 0; b < B; ++b) {
      o[static_cast<std::size_t>(b) * stride] = emit((g >> (B - 1 - b)) & 1);
    }
  });
}

struct EmitBit {
  CAPGAP_DEMAP_INLINE Bit operator()(int bit) const { return static_cast<Bit>(bit); }
};
struct EmitSign {  // bit 0 -> +1, bit 1 -> -1
  CAPGAP_DEMAP_INLINE float operator()(int bit) const {
    return 1.0f - 2.0f * static_cast<float>(bit);
  }
};

// Runs f(std::integral_constant<int, B>) for B = `bits` in [kLo, kHi].
template <int kLo, int kHi, typename F>
CAPGAP_DEMAP_INLINE void WithBits(int bits, F f) {
  if constexpr (kLo <= kHi) {
    if (bits == kLo) {
      f(std::integral_constant<int, kLo>{});
    } else {
      WithBits<kLo + 1, kHi>(bits, f);
    }
  } else {
    CAPGAP_DCHECK(false);  // Create() admits no other size
  }
}

// ------------------------------------------------------------ entry kernels
// What a kernel call needs from the Demapper (whose members are private).
constexpr int kPathBpsk = 0, kPathQpsk = 1, kPathPam = 2, kPathPsk = 3;
struct KernelArgs {
  int path;
  int bits_per_symbol;
  int axis_bits;
  float level_scale;
  const float* point_re;
  const float* point_im;
  const float* boundary_cos;
  const float* boundary_sin;
};

// Soft output; `exact` selects log-MAP, otherwise max-log.
template <typename Out, typename Emit>
CAPGAP_DEMAP_INLINE void HardBody(const KernelArgs& a, const float* y, std::size_t n, Out* out,
                                  Emit emit) {
  switch (a.path) {
    case kPathBpsk:
      BpskHard(y, n, out, emit);
      break;
    case kPathQpsk:
      QpskHard(y, n, out, emit);
      break;
    case kPathPam:
      WithBits<1, 5>(a.axis_bits, [&](auto p) CAPGAP_LAMBDA_INLINE {
        PamHard<decltype(p)::value>(y, 2 * n, 1.0f / a.level_scale, out, emit);
      });
      break;
    default:
      WithBits<3, 6>(a.bits_per_symbol, [&](auto b) CAPGAP_LAMBDA_INLINE {
        PskHard<decltype(b)::value>(y, n, a.boundary_cos, a.boundary_sin, out, emit);
      });
      break;
  }
}

CAPGAP_DEMAP_CLONES
void SoftKernel(const KernelArgs& a, bool exact, const float* y, std::size_t n, float n0,
                float* out) {
  const float inv_n0 = 1.0f / n0;
  switch (a.path) {
    case kPathBpsk:  // L = 4 Re y / N0 (exact)
      BpskLinear(y, n, 4.0f * inv_n0, out);
      break;
    case kPathQpsk:  // L = 4 (1/sqrt 2) y / N0 per axis (exact)
      QpskLinear(y, n, 2.0f * std::numbers::sqrt2_v<float> * inv_n0, out);
      break;
    case kPathPam: {
      const float inv_s = 1.0f / a.level_scale;
      const float scale = a.level_scale * a.level_scale * inv_n0;
      if (a.axis_bits == 1) {  // 2-PAM: the exact LLR is linear, 4 y s / N0
        PamMaxLog<1>(y, 2 * n, inv_s, scale, out);
      } else if (!exact && a.axis_bits == 2) {
        Pam4MaxLog(y, 2 * n, a.level_scale, scale, out);
      } else {
        WithBits<2, 5>(a.axis_bits, [&](auto p) CAPGAP_LAMBDA_INLINE {
          constexpr int kP = decltype(p)::value;
          if (exact) {
            PamLogMap<kP>(y, 2 * n, inv_s, scale, out);
          } else {
            PamMaxLog<kP>(y, 2 * n, inv_s, scale, out);
          }
        });
      }
      break;
    }
    default:
      WithBits<3, 6>(a.bits_per_symbol, [&](auto b) CAPGAP_LAMBDA_INLINE {
        constexpr int kB = decltype(b)::value;
        if constexpr (kB >= 5) {
          PskSoftChunked<kB>(y, n, a.point_re, a.point_im, inv_n0, exact, out);
        } else if (exact) {
          PskLogMap<kB>(y, n, a.point_re, a.point_im, inv_n0, out);
        } else {
          PskMaxLog<kB>(y, n, a.point_re, a.point_im, inv_n0, out);
        }
      });
      break;
  }
}

// kHard's +-1 "LLRs".
CAPGAP_DEMAP_CLONES
void SignKernel(const KernelArgs& a, const float* y, std::size_t n, float* out) {
  HardBody(a, y, n, out, EmitSign{});
}

CAPGAP_DEMAP_CLONES
void BitKernel(const KernelArgs& a, const float* y, std::size_t n, Bit* out) {
  HardBody(a, y, n, out, EmitBit{});
}

std::string Lowercase(std::string_view word) {
  std::string out(word);
  for (char& ch : out) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
  return out;
}

}  // namespace

Result<DemapMethod> ParseDemapMethod(std::string_view word) {
  const std::string w = Lowercase(word);
  if (w == "hard") return DemapMethod::kHard;
  if (w == "maxlog") return DemapMethod::kMaxLog;
  if (w == "logmap") return DemapMethod::kLogMap;
  return Status::Error("unknown demap method '" + std::string(word) +
                       "'; valid: " + DemapMethodChoices());
}

std::string ToString(DemapMethod method) {
  switch (method) {
    case DemapMethod::kHard:
      return "hard";
    case DemapMethod::kMaxLog:
      return "maxlog";
    case DemapMethod::kLogMap:
      return "logmap";
  }
  return "unknown";
}

std::string DemapMethodChoices() { return "hard, maxlog, logmap"; }

Result<Demapper> Demapper::Create(const Mapper& mapper, DemapMethod method) {
  if (method != DemapMethod::kHard && method != DemapMethod::kMaxLog &&
      method != DemapMethod::kLogMap) {
    return Status::Error("demapper: unknown method " + std::to_string(static_cast<int>(method)));
  }
  if (Status status = ValidateModulation(mapper.modulation()); !status.ok()) {
    return Status::Error("demapper: " + status.message());
  }
  Demapper d;
  d.method_ = method;
  d.modulation_ = mapper.modulation();
  d.bits_per_symbol_ = mapper.bits_per_symbol();
  d.points_.assign(mapper.points().begin(), mapper.points().end());
  d.pam_levels_.assign(mapper.pam_levels().begin(), mapper.pam_levels().end());
  const int order = d.modulation_.order;
  if (d.modulation_.family == ModulationFamily::kQam) {
    d.path_ = Path::kPam;
    d.axis_bits_ = d.bits_per_symbol_ / 2;
    // The largest level, L - 1 on the odd-integer grid, has axis label 0.
    d.level_scale_ = d.pam_levels_[0] / static_cast<float>((1 << d.axis_bits_) - 1);
  } else if (order == 2) {
    d.path_ = Path::kBpsk;
  } else if (order == 4) {
    d.path_ = Path::kQpsk;
  } else {
    d.path_ = Path::kPsk;
    for (const cf32& x : d.points_) {
      d.point_re_.push_back(x.real());
      d.point_im_.push_back(x.imag());
    }
    for (int i = 0; i < order / 2; ++i) {
      const double phi = 2.0 * std::numbers::pi * i / order;
      d.boundary_cos_.push_back(static_cast<float>(std::cos(phi)));
      d.boundary_sin_.push_back(static_cast<float>(std::sin(phi)));
    }
  }
  return d;
}

void Demapper::Demap(std::span<const cf32> received, float n0, std::span<float> llrs) const {
  CAPGAP_DCHECK(llrs.size() == static_cast<std::size_t>(bits_per_symbol_) * received.size());
  CAPGAP_DCHECK(n0 > 0.0f);
  static_assert(
      static_cast<int>(Path::kBpsk) == kPathBpsk && static_cast<int>(Path::kQpsk) == kPathQpsk &&
      static_cast<int>(Path::kPam) == kPathPam && static_cast<int>(Path::kPsk) == kPathPsk);
  const KernelArgs args{
      static_cast<int>(path_), bits_per_symbol_, axis_bits_,           level_scale_,
      point_re_.data(),        point_im_.data(), boundary_cos_.data(), boundary_sin_.data()};
  // std::complex<float> is array-compatible with float[2] ([complex.numbers]).
  const float* y = reinterpret_cast<const float*>(received.data());
  if (method_ == DemapMethod::kHard) {
    SignKernel(args, y, received.size(), llrs.data());
  } else {
    SoftKernel(args, method_ == DemapMethod::kLogMap, y, received.size(), n0, llrs.data());
  }
}

void Demapper::HardDecide(std::span<const cf32> received, std::span<Bit> bits) const {
  CAPGAP_DCHECK(bits.size() == static_cast<std::size_t>(bits_per_symbol_) * received.size());
  const KernelArgs args{
      static_cast<int>(path_), bits_per_symbol_, axis_bits_,           level_scale_,
      point_re_.data(),        point_im_.data(), boundary_cos_.data(), boundary_sin_.data()};
  BitKernel(args, reinterpret_cast<const float*>(received.data()), received.size(), bits.data());
}

void LlrToBits(std::span<const float> llrs, std::span<Bit> bits) {
  CAPGAP_DCHECK(llrs.size() == bits.size());
  const float* l = llrs.data();
  Bit* b = bits.data();
  const std::size_t n = llrs.size();
  for (std::size_t i = 0; i < n; ++i) b[i] = l[i] < 0.0f ? Bit{1} : Bit{0};
}

}  // namespace capgap
