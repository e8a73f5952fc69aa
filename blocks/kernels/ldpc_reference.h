// Scalar one-frame references of the LDPC decoders. Header-only and plain.
//  * LdpcDecodeFixedFrame: the oracle of the fixed-point min-sum kernel of
//    ldpc_kernels.h (int8 or int16), step for step the arithmetic stated
//    there (same rounding, clipping, tie rule and edge order), so every SIMD
//    target must reproduce its decisions, iteration counts and convergence
//    flags bit for bit. ForceScalarKernels(true) / CAPGAP_FORCE_SCALAR route
//    the public kernel here, so it stays after SIMD exists.
//  * LdpcDecodeFloatFrame: the unquantised decoders in float (normalised and
//    offset min-sum, sum-product), flooding or layered, with the same
//    schedule, stopping and decision rules as the fixed-point kernel. This
//    is the decoder LdpcDecoder runs for sum-product and for
//    LdpcArithmetic::kFloat.
//
// Sum-product uses the tanh rule (R. G. Gallager, Low-Density Parity-Check
// Codes, MIT Press, 1963; the form of F. R. Kschischang, B. J. Frey,
// H.-A. Loeliger, IEEE Trans. Inf. Theory 47(2), 2001; from memory):
//   c_new[e_k] = 2 atanh( prod_{j != k} tanh(t_j / 2) ),
// evaluated in double, the leave-one-out products by prefix and suffix
// products (no division, so a zero factor is harmless). Numerical safety:
// t_j is clipped to [-30, 30] before tanh, and the product to
// [-tanh(15), tanh(15)] before atanh, so |c_new| <= 30 (a probability of
// e^-30 ~ 1e-13; atanh's argument stays 1.9e-13 away from 1, where double
// still resolves it to ~1e-3 in the result). Every message and posterior is
// then finite: P = L + sum of at most deg(v) messages of magnitude <= 30.
// Float min-sum caps the check-message magnitudes at kLdpcFloatMinSumCap =
// 1e6 (min1, min2 start there: this is also the message of a degree-1
// check), which keeps P finite however many iterations run.
#ifndef CAPGAP_BLOCKS_KERNELS_LDPC_REFERENCE_H_
#define CAPGAP_BLOCKS_KERNELS_LDPC_REFERENCE_H_

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>

#include "blocks/core/types.h"
#include "blocks/kernels/ldpc_kernels.h"

namespace capgap {

constexpr float kLdpcFloatMinSumCap = 1e6f;
constexpr double kLdpcSumProductClip = 30.0;

namespace reference {

// ---------------------------------------------------------------------------
// Fixed-point oracle (int8 or int16 lanes; values held in int, stored as T).

// Channel quantiser: q = trunc(c + copysign(1/2, c)), c = clamp(x scale,
// +-clip) (round half away from zero).
inline int LdpcQuantiseOne(float x, float scale, int clip) {
  const float lim = static_cast<float>(clip);
  float v = x * scale;
  v = v > lim ? lim : v;
  v = v < -lim ? -lim : v;
  return static_cast<int>(v + std::copysign(0.5f, v));
}

// The magnitude map M of ldpc_kernels.h, x in [0, lane maximum].
inline int LdpcScaleMagnitude(const LdpcFixedArgs& a, int x) {
  const int y = a.offset ? std::max(x - a.offset_q, 0)
                         : (x * a.norm_mul + (1 << (kLdpcNormShift - 1))) >> kLdpcNormShift;
  return std::min(y, a.message_clip);
}

// Workspace of one frame in bytes: q[n], P[n], c[E], t[max_row_degree] of
// the lane type.
inline std::size_t LdpcFixedFrameWorkspaceBytes(const LdpcFixedArgs& a) {
  const LdpcGraph& g = a.graph;
  const std::size_t elems = 2 * static_cast<std::size_t>(g.n) + static_cast<std::size_t>(g.edges) +
                            static_cast<std::size_t>(g.max_row_degree);
  return elems * (a.lane == LdpcLane::kInt8 ? 1 : 2);
}

// True when the decisions (P < 0) of posteriors `p` satisfy every check.
template <typename T>
bool LdpcSyndromeIsZero(const LdpcGraph& g, const T* p) {
  for (int r = 0; r < g.m; ++r) {
    unsigned parity = 0;
    for (int e = g.row_start[r]; e < g.row_start[r + 1]; ++e) {
      parity ^= p[g.edge_variable[e]] < 0 ? 1u : 0u;
    }
    if (parity != 0) return false;
  }
  return true;
}

// One min-sum check update of row r from the posteriors P and the old
// messages c: writes t[0..d) and the new messages; updates P when `layered`.
template <typename T>
void LdpcFixedRow(const LdpcFixedArgs& a, int r, T* p, T* c, T* t) {
  const LdpcGraph& g = a.graph;
  const int e0 = g.row_start[r];
  const int d = g.row_start[r + 1] - e0;
  int min1 = LdpcLaneMax(a.lane), min2 = min1;
  int s = 0;
  for (int k = 0; k < d; ++k) {
    const int e = e0 + k;
    const int tk = int{p[g.edge_variable[e]]} - int{c[e]};
    CAPGAP_DCHECK(std::abs(tk) <= LdpcLaneMax(a.lane));
    t[k] = static_cast<T>(tk);
    const int mag = std::abs(tk);
    min2 = std::max(min1, std::min(min2, mag));
    min1 = std::min(min1, mag);
    s ^= tk;
  }
  const int m1 = LdpcScaleMagnitude(a, min1);
  const int m2 = LdpcScaleMagnitude(a, min2);
  for (int k = 0; k < d; ++k) {
    const int e = e0 + k;
    const int tk = t[k];
    const int mag = std::abs(tk) == min1 ? m2 : m1;
    const int cn = (tk ^ s) < 0 ? -mag : mag;  // sign bit of t_k XOR s
    c[e] = static_cast<T>(cn);
    if (a.layered) p[g.edge_variable[e]] = static_cast<T>(tk + cn);
  }
}

template <typename T>
void LdpcDecodeFixedFrameT(const LdpcFixedArgs& a, const float* llr, Bit* decided, int* iterations,
                           bool* converged, T* ws) {
  const LdpcGraph& g = a.graph;
  CAPGAP_DCHECK(a.channel_clip + g.max_col_degree * a.message_clip <= LdpcLaneMax(a.lane));
  const auto n = static_cast<std::size_t>(g.n);
  T* q = ws;
  T* p = q + n;
  T* c = p + n;
  T* t = c + g.edges;
  for (std::size_t v = 0; v < n; ++v) {
    q[v] = static_cast<T>(LdpcQuantiseOne(llr[v], a.llr_scale, a.channel_clip));
    p[v] = q[v];
  }
  std::fill(c, c + g.edges, T{0});
  int it = 0;
  bool done = a.early_stop && LdpcSyndromeIsZero(g, p);
  while (!done && it < a.max_iterations) {
    ++it;
    for (int r = 0; r < g.m; ++r) LdpcFixedRow(a, r, p, c, t);
    if (!a.layered) {
      for (std::size_t v = 0; v < n; ++v) {
        int acc = q[v];
        for (int j = g.col_start[v]; j < g.col_start[v + 1]; ++j) acc += c[g.col_edge[j]];
        p[v] = static_cast<T>(acc);
      }
    }
    done = a.early_stop && LdpcSyndromeIsZero(g, p);
  }
  *iterations = it;
  *converged = a.early_stop ? done : LdpcSyndromeIsZero(g, p);
  for (std::size_t v = 0; v < n; ++v) decided[v] = p[v] < 0 ? Bit{1} : Bit{0};
}

// Decodes one frame (llr: n channel LLRs) with the arithmetic of
// ldpc_kernels.h. ws: LdpcFixedFrameWorkspaceBytes(args) bytes, aligned for
// the lane type.
inline void LdpcDecodeFixedFrame(const LdpcFixedArgs& a, const float* llr, Bit* decided,
                                 int* iterations, bool* converged, void* ws) {
  if (a.lane == LdpcLane::kInt8) {
    LdpcDecodeFixedFrameT(a, llr, decided, iterations, converged, static_cast<std::int8_t*>(ws));
  } else {
    LdpcDecodeFixedFrameT(a, llr, decided, iterations, converged, static_cast<std::int16_t*>(ws));
  }
}

// ---------------------------------------------------------------------------
// Float references.

struct LdpcFloatArgs {
  LdpcGraph graph;
  LdpcCheckRule rule = LdpcCheckRule::kMinSumNormalized;
  bool layered = true;
  int max_iterations = 1;
  bool early_stop = true;
  float normalization = 0.75f;  // normalised min-sum factor
  float offset = 0.5f;          // offset min-sum, LLR units
};

// Workspace of one frame: floats L[n], P[n], c[E], t[d]; doubles 3 d.
inline std::size_t LdpcFloatFrameWorkspaceFloats(const LdpcGraph& g) {
  return 2 * static_cast<std::size_t>(g.n) + static_cast<std::size_t>(g.edges) +
         static_cast<std::size_t>(g.max_row_degree);
}
inline std::size_t LdpcFloatFrameWorkspaceDoubles(const LdpcGraph& g) {
  return 3 * static_cast<std::size_t>(g.max_row_degree);
}

// Check update of row r in float (see the header comment); fw, bw, th are
// d doubles each (sum-product only).
inline void LdpcFloatRow(const LdpcFloatArgs& a, int r, float* p, float* c, float* t, double* th,
                         double* fw, double* bw) {
  const LdpcGraph& g = a.graph;
  const int e0 = g.row_start[r];
  const int d = g.row_start[r + 1] - e0;
  for (int k = 0; k < d; ++k) t[k] = p[g.edge_variable[e0 + k]] - c[e0 + k];
  if (a.rule == LdpcCheckRule::kSumProduct) {
    const double lim = std::tanh(kLdpcSumProductClip / 2);
    for (int k = 0; k < d; ++k) {
      th[k] = std::tanh(
          std::clamp(static_cast<double>(t[k]), -kLdpcSumProductClip, kLdpcSumProductClip) / 2);
    }
    double acc = 1.0;
    for (int k = 0; k < d; ++k) {
      fw[k] = acc;  // product of th[0..k)
      acc *= th[k];
    }
    acc = 1.0;
    for (int k = d - 1; k >= 0; --k) {
      bw[k] = acc;  // product of th(k..d)
      acc *= th[k];
    }
    for (int k = 0; k < d; ++k) {
      c[e0 + k] = static_cast<float>(2.0 * std::atanh(std::clamp(fw[k] * bw[k], -lim, lim)));
    }
  } else {
    float min1 = kLdpcFloatMinSumCap, min2 = kLdpcFloatMinSumCap;
    bool s = false;
    for (int k = 0; k < d; ++k) {
      const float mag = std::fabs(t[k]);
      min2 = std::max(min1, std::min(min2, mag));
      min1 = std::min(min1, mag);
      s ^= std::signbit(t[k]);
    }
    float m1, m2;
    if (a.rule == LdpcCheckRule::kMinSumNormalized) {
      m1 = a.normalization * min1;
      m2 = a.normalization * min2;
    } else {
      m1 = std::max(min1 - a.offset, 0.0f);
      m2 = std::max(min2 - a.offset, 0.0f);
    }
    for (int k = 0; k < d; ++k) {
      const float mag = std::fabs(t[k]) == min1 ? m2 : m1;
      c[e0 + k] = (std::signbit(t[k]) != s) ? -mag : mag;
    }
  }
  if (a.layered) {
    for (int k = 0; k < d; ++k) p[g.edge_variable[e0 + k]] = t[k] + c[e0 + k];
  }
}

// Decodes one frame in float. posterior (may be null): the final P, n values.
inline void LdpcDecodeFloatFrame(const LdpcFloatArgs& a, const float* llr, Bit* decided,
                                 float* posterior, int* iterations, bool* converged, float* fws,
                                 double* dws) {
  const LdpcGraph& g = a.graph;
  const auto n = static_cast<std::size_t>(g.n);
  float* l = fws;
  float* p = l + n;
  float* c = p + n;
  float* t = c + g.edges;
  const auto d = static_cast<std::size_t>(g.max_row_degree);
  double* th = dws;
  double* fw = th + d;
  double* bw = fw + d;
  std::copy(llr, llr + n, l);
  std::copy(llr, llr + n, p);
  std::fill(c, c + g.edges, 0.0f);
  int it = 0;
  bool done = a.early_stop && LdpcSyndromeIsZero(g, p);
  while (!done && it < a.max_iterations) {
    ++it;
    for (int r = 0; r < g.m; ++r) LdpcFloatRow(a, r, p, c, t, th, fw, bw);
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
  if (posterior != nullptr) std::copy(p, p + n, posterior);
}

}  // namespace reference
}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_LDPC_REFERENCE_H_
