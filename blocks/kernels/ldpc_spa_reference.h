// Scalar one-frame oracle of the float32 sum-product decoder
// (LdpcFloatRule::kSumProduct32 of ldpc_float_kernels.h), with the
// polynomial exp2 and log2 it uses. Header-only and plain. Every SIMD target
// of ldpc_float_kernels.cc performs the same float operations in the same
// order per lane, so decisions, iteration counts and convergence flags agree
// bit for bit; ForceScalarKernels(true) / CAPGAP_FORCE_SCALAR run this code.
// Every multiply-add that the kernel fuses is written std::fma here (one
// rounding, IEEE 754 fusedMultiplyAdd), every other product and sum is
// separate; translation units that use it are compiled with
// -ffp-contract=off so that the compiler fuses nothing else. The vector
// kernel of this rule therefore runs only on targets with a native fused
// multiply-add (Highway's HWY_NATIVE_FMA: AVX2, AVX3, NEON, SVE, ...); on the
// others (SSE4, SSSE3, EMU128) this oracle runs (measured: the fused
// multiply-adds made the kernel 1.3x faster).
//
// Check-node rule (sum-product, R. G. Gallager, Low-Density Parity-Check
// Codes, MIT Press, 1963), computed in the probability domain without
// cancellation. Messages and posteriors are held in bits (log2 units):
// the channel LLR is multiplied by log2(e) on entry (decisions only look at
// signs, so the unit is invisible outside). For a row with inputs
// t_j = P[v_j] - c[e_j]:
//   x_j = min(|t_j|, kLdpcSpaClip)  (43 bits, about 29.8 in natural LLR
//         units: a probability of 2^-43)
//   e_j = 2^-x_j in [2^-43, 1]      (LdpcSpaExp2)
//   each edge is the pair (a, b) = (1, e_j) (unnormalised probabilities of
//   parity 0 and 1), pairs combine as the parity of a sum:
//     (a1, b1) o (a2, b2) = (fma(a1, a2, b1 b2), fma(a1, b2, b1 a2))
//   (every term positive: no cancellation, relative error a few ulp per
//   step; a >= 1 and b >= max e_j >= 2^-43 throughout, and a <= 2^(d-1),
//   so nothing under- or overflows for degrees <= kLdpcSpaMaxRowDegree);
//   the leave-one-out pair of edge k, (A_k, B_k), combines the prefix
//   F_k = pairs 0..k-1 (F_1 = (1, e_0), F_{k+1} = (fma(F_b, e_k, F_a),
//   fma(F_a, e_k, F_b))) with the suffix G_k built the same way from the
//   end;
//   k = 0 takes G_0, k = d-1 takes F_{d-1} alone;
//   |c_new[e_k]| = log2(max(A_k / B_k, 1))   (LdpcSpaLog2; >= 0 exactly)
//   sign of c_new[e_k] = sign bit of t_k XOR the sign bits of all t_j,
//   which is the tanh rule 2 atanh(prod_{j != k} tanh(t_j / 2)) in bits.
//   A check of degree 1 sends +kLdpcSpaClip.
// Layered: P[v_k] = t_k + c_new[e_k]; flooding: P[v] = L[v] + sum of its
// messages in column order. |P| <= |L| + deg(v) (kLdpcSpaClip + 1e-5).
//
// exp2 and log2 (polynomials fitted by least squares on Chebyshev points,
// coefficients rounded to float; errors measured over the whole range in
// tests/blocks/kernels/ldpc_spa_reference_test.cc):
//   LdpcSpaExp2(y), y in [-43, 0]: n = round(y) by adding and subtracting
//     1.5 2^23 (round to nearest even), f = y - n in [-1/2, 1/2],
//     2^f ~ 1 + f Q4(f) (Horner with fma), then n added to the exponent
//     field;
//     relative error <= 1e-5.
//   LdpcSpaLog2(r), r >= 1 finite: r = 2^k m with m in [sqrt(1/2), sqrt(2))
//     by integer operations on the bit pattern, log2(m) ~ x Q6(x) with
//     x = m - 1 (Horner with fma), result fma(x, Q6(x), k); absolute error
//     <= 1e-5 bits.
#ifndef CAPGAP_BLOCKS_KERNELS_LDPC_SPA_REFERENCE_H_
#define CAPGAP_BLOCKS_KERNELS_LDPC_SPA_REFERENCE_H_

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstddef>
#include <cstdint>

#include "blocks/core/types.h"
#include "blocks/kernels/ldpc_float_kernels.h"
#include "blocks/kernels/ldpc_kernels.h"
#include "blocks/kernels/ldpc_reference.h"

namespace capgap {

constexpr float kLdpcSpaLog2e = 1.44269504f;         // log2(e), rounded to float
constexpr float kLdpcSpaClip = 43.0f;                // largest |t| used, in bits
constexpr float kLdpcSpaRoundMagic = 12582912.0f;    // 1.5 2^23
constexpr std::uint32_t kLdpcSpaLog2Split = 0x3f3504f3u;  // bit pattern of sqrt(1/2)
constexpr std::uint32_t kLdpcSpaSignBit = 0x80000000u;
// 2^f ~ 1 + f (c0 + f (c1 + f (c2 + f c3))), f in [-1/2, 1/2].
constexpr float kLdpcSpaExp2C0 = 0.693136752f;
constexpr float kLdpcSpaExp2C1 = 0.240223482f;
constexpr float kLdpcSpaExp2C2 = 0.0558383428f;
constexpr float kLdpcSpaExp2C3 = 0.00966637395f;
// log2(1 + x) ~ x (d0 + x (d1 + ... + x d5)), x in [sqrt(1/2) - 1, sqrt(2) - 1].
constexpr float kLdpcSpaLog2D0 = 1.44270182f;
constexpr float kLdpcSpaLog2D1 = -0.721208453f;
constexpr float kLdpcSpaLog2D2 = 0.479793876f;
constexpr float kLdpcSpaLog2D3 = -0.366413265f;
constexpr float kLdpcSpaLog2D4 = 0.318407118f;
constexpr float kLdpcSpaLog2D5 = -0.206858128f;

namespace reference {

// 2^y for y in [-kLdpcSpaClip, 0] (see the header comment).
inline float LdpcSpaExp2(float y) {
  const float r = y + kLdpcSpaRoundMagic;
  const float n = r - kLdpcSpaRoundMagic;
  const float f = y - n;
  float q = kLdpcSpaExp2C3;
  q = std::fma(q, f, kLdpcSpaExp2C2);
  q = std::fma(q, f, kLdpcSpaExp2C1);
  q = std::fma(q, f, kLdpcSpaExp2C0);
  const float p = std::fma(q, f, 1.0f);
  // The low bits of r hold n (two's complement, offset by the magic's
  // pattern 0x4b400000, whose bits vanish in the shift): n << 23 is added
  // to p's exponent field.
  const std::uint32_t shift = std::bit_cast<std::uint32_t>(r) << 23;
  return std::bit_cast<float>(std::bit_cast<std::uint32_t>(p) + shift);
}

// log2(r) for finite r >= 1 (see the header comment); >= +0.
inline float LdpcSpaLog2(float r) {
  const std::uint32_t u = std::bit_cast<std::uint32_t>(r);
  const std::uint32_t k = (u - kLdpcSpaLog2Split) >> 23;
  const float m = std::bit_cast<float>(u - (k << 23));
  const float x = m - 1.0f;
  float q = kLdpcSpaLog2D5;
  q = std::fma(q, x, kLdpcSpaLog2D4);
  q = std::fma(q, x, kLdpcSpaLog2D3);
  q = std::fma(q, x, kLdpcSpaLog2D2);
  q = std::fma(q, x, kLdpcSpaLog2D1);
  q = std::fma(q, x, kLdpcSpaLog2D0);
  return std::fma(x, q, static_cast<float>(static_cast<std::int32_t>(k)));
}

// Sign bit of a XOR the sign bits in s, on magnitude m >= +0.
inline float LdpcSpaSigned(float m, float t, std::uint32_t s) {
  const std::uint32_t sign = (std::bit_cast<std::uint32_t>(t) ^ s) & kLdpcSpaSignBit;
  return std::bit_cast<float>(std::bit_cast<std::uint32_t>(m) | sign);
}

// Floats of one frame's workspace: L[n], P[n], c[E], and t, e, F_a, F_b of
// one row (4 max_row_degree).
inline std::size_t LdpcSpaFrameWorkspaceFloats(const LdpcGraph& g) {
  return 2 * static_cast<std::size_t>(g.n) + static_cast<std::size_t>(g.edges) +
         4 * static_cast<std::size_t>(g.max_row_degree);
}

// The check update of row r (header comment); scratch: 4 max_row_degree.
inline void LdpcSpaRow(const LdpcFloatKernelArgs& a, int r, float* p, float* c, float* scratch) {
  const LdpcGraph& g = a.graph;
  const int e0 = g.row_start[r];
  const int d = g.row_start[r + 1] - e0;
  const auto dd = static_cast<std::size_t>(g.max_row_degree);
  float* t = scratch;
  float* e = t + dd;
  float* fa = e + dd;
  float* fb = fa + dd;
  std::uint32_t s = 0;
  for (int k = 0; k < d; ++k) {
    t[k] = p[g.edge_variable[e0 + k]] - c[e0 + k];
    s ^= std::bit_cast<std::uint32_t>(t[k]);
    const float y = std::bit_cast<float>(std::bit_cast<std::uint32_t>(t[k]) | kLdpcSpaSignBit);
    e[k] = LdpcSpaExp2(std::max(y, -kLdpcSpaClip));
  }
  const auto emit = [&](int k, float big, float small) {
    const float m = LdpcSpaLog2(std::max(big / small, 1.0f));
    c[e0 + k] = LdpcSpaSigned(m, t[k], s);
    if (a.layered) p[g.edge_variable[e0 + k]] = t[k] + c[e0 + k];
  };
  if (d == 1) {
    c[e0] = LdpcSpaSigned(kLdpcSpaClip, t[0], s);
    if (a.layered) p[g.edge_variable[e0]] = t[0] + c[e0];
    return;
  }
  fa[1] = 1.0f;
  fb[1] = e[0];
  for (int k = 1; k + 1 < d; ++k) {
    fa[k + 1] = std::fma(fb[k], e[k], fa[k]);
    fb[k + 1] = std::fma(fa[k], e[k], fb[k]);
  }
  emit(d - 1, fa[d - 1], fb[d - 1]);
  float ga = 1.0f, gb = e[d - 1];
  for (int k = d - 2; k >= 1; --k) {
    emit(k, std::fma(fa[k], ga, fb[k] * gb), std::fma(fa[k], gb, fb[k] * ga));
    const float na = std::fma(gb, e[k], ga);
    const float nb = std::fma(ga, e[k], gb);
    ga = na;
    gb = nb;
  }
  emit(0, ga, gb);
}

// Decodes one frame (llr: n channel LLRs, natural units) with the float32
// sum-product rule. ws: LdpcSpaFrameWorkspaceFloats(graph) floats.
// REQUIRES: a.rule == kSumProduct32, max_row_degree <= kLdpcSpaMaxRowDegree.
inline void LdpcDecodeSpaFrame(const LdpcFloatKernelArgs& a, const float* llr, Bit* decided,
                               int* iterations, bool* converged, float* ws) {
  const LdpcGraph& g = a.graph;
  CAPGAP_DCHECK(g.max_row_degree <= kLdpcSpaMaxRowDegree);
  const auto n = static_cast<std::size_t>(g.n);
  float* l = ws;
  float* p = l + n;
  float* c = p + n;
  float* scratch = c + g.edges;
  for (std::size_t v = 0; v < n; ++v) {
    l[v] = llr[v] * kLdpcSpaLog2e;
    p[v] = l[v];
  }
  std::fill(c, c + g.edges, 0.0f);
  int it = 0;
  bool done = a.early_stop && LdpcSyndromeIsZero(g, p);
  while (!done && it < a.max_iterations) {
    ++it;
    for (int r = 0; r < g.m; ++r) LdpcSpaRow(a, r, p, c, scratch);
    if (!a.layered) {
      for (std::size_t v = 0; v < n; ++v) {
        float acc = l[v];
        for (int j = g.col_start[v]; j < g.col_start[v + 1]; ++j) acc += c[g.col_edge[j]];
        p[v] = acc;
      }
    }
    done = a.early_stop && LdpcSyndromeIsZero(g, p);
  }
  *iterations = it;
  *converged = a.early_stop ? done : LdpcSyndromeIsZero(g, p);
  for (std::size_t v = 0; v < n; ++v) decided[v] = p[v] < 0 ? Bit{1} : Bit{0};
}

}  // namespace reference
}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_LDPC_SPA_REFERENCE_H_
