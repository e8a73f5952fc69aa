// Per-target body of the FIR kernels declared in fir_kernels.h. Included once
// per instruction-set target by fir_kernels.cc (through hwy/foreach_target.h)
// and the same way by the per-target test, which calls the entry points at
// the end of this file directly. fir_reference.h is the oracle.
//
// Samples stay complex interleaved (re, im) in memory, as the mapper, channel
// and demapper keep them: a float vector of F lanes holds c = F / 2 complex
// samples, and a real tap multiplies a sample through a (h, h) pair of lanes.
// Splitting re / im into two arrays would save nothing here (real taps act
// on re and im alike) and would cost a shuffle pass on input and output.
//
// Interpolator (out[dS + p] = sum_i h[iS + p] x[d - i]). An output vector is
// c consecutive output samples starting at sample n0 = dS + r (r = n0 mod S).
// Its lane t takes tap h[iS + r + t] times symbol x[d - i], so each term i is
// ONE complex broadcast of x[d - i] (a 64-bit broadcast load) times one
// unaligned load of c consecutive taps from the padded (h, h) array of the
// plan, fused into one multiply-add; taps outside [0, L) are the plan's zero
// padding, which lets vectors run a common range of i. Three cases:
//  * c a multiple of S (S = 1, 2, 4, 8 on AVX-512): every vector has r = 0
//    and the same tap vectors, loaded once per term for 8 output vectors.
//    (ceil(L/S) + c/S - 1) / (c/S) multiply-adds per symbol, e.g. 6 for
//    L = 41, S = 4 on AVX-512 (the minimum is 2 L S / F = 5.1);
//  * S a multiple of c (S = 16 on AVX-512, 8 on AVX2): the S / c vectors of a
//    symbol (residues 0, c, ...) share one broadcast per term, 8 vectors (of
//    8 / (S/c) symbols, or 8 residues of one symbol) per block; no wasted
//    lanes;
//  * otherwise (S = 3, 5, 6, ...): each vector advances its own (symbol,
//    residue) without division and loads its own taps over the term range
//    covering every residue the call visits; ~2x the cost per tap of the
//    other two (two loads per multiply-add, most of them line-splitting).
//
// Decimator (out[k] = sum_m g[m] in[kS - m]). Output k is a dot product of
// its window of P input samples, in[kS - P + 1 .. kS], with the reversed taps
// (zero-padded at the front to P >= L, so no output reads past its own last
// sample). Two layouts, chosen per (target, S) when the plan's table is built:
//  * segmented, when 2S divides F and m = F / (2S) >= 2 (S = 1, 2, 4 on
//    AVX-512): consecutive windows are 2S floats apart, so ONE unaligned load
//    of F floats holds the S-sample segment j of m consecutive outputs'
//    windows at once; the tap vector j is segment j of the reversed taps
//    repeated m times. P = ceil(L/S) S, ceil(L/S) multiply-adds per m outputs:
//    5.5 per output for L = 41, S = 4 on AVX-512 (no lanes wasted on padding
//    beyond ceil(L/S) S);
//  * dot, otherwise (S = 8, 16, 3, ... on AVX-512): vector j holds window
//    samples [j c, (j + 1) c) of one output, P = ceil(L/c) c, m = 1.
// Either way a vector accumulates m outputs' partial sums, S (segmented) or c
// (dot) complex lanes per output, and U = c / m such vectors (one group, c
// outputs) are reduced together into one vector of c outputs by log2 U merge
// levels; each level adds two vectors' partial sums pairwise and halves the
// lanes per output: 256-bit halves (ConcatLowerLower / ConcatUpperUpper), then
// 128-bit blocks within halves (OddEvenBlocks + SwapAdjacentBlocks, 512-bit
// only), then 64-bit lanes within blocks (InterleaveLower / InterleaveUpper).
// About 1.4 shuffle-or-add per output for S = 4 on AVX-512 instead of a full
// horizontal sum per output. Groups are reduced in the order evens-then-odds,
// which leaves the dot layout's outputs in natural order; the segmented one
// comes out transposed (m x U) and one 64-bit lane permutation fixes it.
//
// Loads. With one load per multiply-add the decimator is bound by the load
// ports, not the FMA units: its windows start at every S-sample offset, so
// most F-float loads split a cache line. Where the registers allow (AVX-512:
// S = 4, 8, 16; AVX2: S = 4), DecimateBlockRotating loads each input vector
// of a block once and shifts it through a register window (see there), which
// roughly halves the time per sample (docs/performance_notes.md, "FIR
// decimator kernel").
//
// Accumulators. A multiply-add has a latency of ~4 cycles and x86 cores issue
// 1-2 per cycle, so 8 independent accumulator chains are kept in flight in
// both kernels (8 output vectors; 8 / U groups of the decimator); the last
// vectors of a call run one at a time, and a final partial vector is computed
// whole into a stack buffer and its valid lanes copied. Every output sees the
// same operations in the same order wherever it falls in a vector, a group or
// a call (the interpolator's extra terms are exact zeros; the decimator's merge
// levels treat all lanes alike, and the rotating and plain blocks do the same
// sums in the same order), so results do not depend on how a stream is cut
// into calls.
#if defined(CAPGAP_BLOCKS_KERNELS_FIR_KERNELS_INL_H_) == defined(HWY_TARGET_TOGGLE)
#ifdef CAPGAP_BLOCKS_KERNELS_FIR_KERNELS_INL_H_
#undef CAPGAP_BLOCKS_KERNELS_FIR_KERNELS_INL_H_
#else
#define CAPGAP_BLOCKS_KERNELS_FIR_KERNELS_INL_H_
#endif

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <cstring>

#include "blocks/kernels/fir_kernels.h"
#include "blocks/kernels/fir_reference.h"
#include "hwy/highway.h"

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
namespace hn = hwy::HWY_NAMESPACE;

#if HWY_TARGET != HWY_SCALAR

namespace fir_detail {

using DF = hn::ScalableTag<float>;
using VF = hn::Vec<DF>;
constexpr std::size_t kFloats = hn::MaxLanes(DF());
constexpr std::size_t kComplex = kFloats / 2;
static_assert(kComplex >= 2 && kComplex <= kFirMaxComplexLanes, "vector width");
constexpr std::size_t kChains = 8;  // independent accumulators in flight

// (re, im) of *p in every complex lane: one 64-bit broadcast load.
HWY_INLINE VF BroadcastComplex(DF d, const cf32* p) {
  const hn::Repartition<std::uint64_t, DF> du;
  std::uint64_t bits;
  std::memcpy(&bits, p, sizeof(bits));
  return hn::BitCast(d, hn::Set(du, bits));
}

// ------------------------------------------------------------ interpolator

// kCount output vectors n0 + u c (u < kCount), all with residue 0: acc[u] =
// sum_{t < terms} x0[u step - t] * tap0[t 2S ..]. tap0 points at the taps of
// term ilo, x0 at symbol d0 - ilo.
template <std::size_t kCount>
HWY_INLINE void InterpolateSharedResidue(DF d, const float* HWY_RESTRICT tap0,
                                         std::size_t tap_step, const cf32* x0,
                                         std::size_t sym_step, std::size_t terms, VF* acc) {
  for (std::size_t u = 0; u < kCount; ++u) acc[u] = hn::Zero(d);
  for (std::size_t t = 0; t < terms; ++t) {
    const VF h = hn::LoadU(d, tap0 + t * tap_step);
    const cf32* xt = x0 - t;
    for (std::size_t u = 0; u < kCount; ++u) {
      acc[u] = hn::MulAdd(BroadcastComplex(d, xt + u * sym_step), h, acc[u]);
    }
  }
}

// c divides S (R = S / c vectors per symbol, residues 0, c, ..., S - c): the
// kR vectors at residues r0 + r c of kSym consecutive symbols d0 + j share
// their tap vectors (per term i) and their broadcasts (per symbol and term).
// acc[j kR + r] = sum_{i < q} x[d0 + j - i] * taps at (i S + r0 + r c);
// `taps` points at residue r0, `x` at symbol d0.
template <std::size_t kR, std::size_t kSym>
HWY_INLINE void InterpolatePhases(DF d, const float* HWY_RESTRICT taps, std::size_t s,
                                  const cf32* x, std::size_t q, VF* acc) {
  for (std::size_t a = 0; a < kR * kSym; ++a) acc[a] = hn::Zero(d);
  for (std::size_t i = 0; i < q; ++i) {
    VF t[kR];
    for (std::size_t r = 0; r < kR; ++r) t[r] = hn::LoadU(d, taps + 2 * (i * s + r * kComplex));
    for (std::size_t j = 0; j < kSym; ++j) {
      const VF b = BroadcastComplex(d, x + j - i);
      for (std::size_t r = 0; r < kR; ++r) acc[j * kR + r] = hn::MulAdd(b, t[r], acc[j * kR + r]);
    }
  }
}

// Every symbol's vectors at residues r0 + r c, r < kR.
template <std::size_t kR>
void InterpolatePhaseChunk(DF d, const float* hd, std::size_t s, std::size_t q, const cf32* x,
                           std::size_t n, std::size_t r0, float* o) {
  constexpr std::size_t kSym = kR >= kChains ? 1 : kChains / kR;
  VF acc[kR * kSym];
  std::size_t d0 = 0;
  for (; d0 + kSym <= n; d0 += kSym) {
    InterpolatePhases<kR, kSym>(d, hd + 2 * r0, s, x + d0, q, acc);
    for (std::size_t j = 0; j < kSym; ++j) {
      for (std::size_t r = 0; r < kR; ++r) {
        hn::StoreU(acc[j * kR + r], d, o + 2 * ((d0 + j) * s + r0 + r * kComplex));
      }
    }
  }
  for (; d0 < n; ++d0) {
    InterpolatePhases<kR, 1>(d, hd + 2 * r0, s, x + d0, q, acc);
    for (std::size_t r = 0; r < kR; ++r) {
      hn::StoreU(acc[r], d, o + 2 * (d0 * s + r0 + r * kComplex));
    }
  }
}

inline void InterpolateByPhases(DF d, const float* hd, std::size_t s, std::size_t q, const cf32* x,
                                std::size_t n, float* o) {
  const std::size_t vectors = s / kComplex;  // per symbol
  std::size_t v = 0;
  for (; vectors - v >= 8; v += 8) InterpolatePhaseChunk<8>(d, hd, s, q, x, n, v * kComplex, o);
  const std::size_t r0 = v * kComplex;
  switch (vectors - v) {
    case 1: return InterpolatePhaseChunk<1>(d, hd, s, q, x, n, r0, o);
    case 2: return InterpolatePhaseChunk<2>(d, hd, s, q, x, n, r0, o);
    case 3: return InterpolatePhaseChunk<3>(d, hd, s, q, x, n, r0, o);
    case 4: return InterpolatePhaseChunk<4>(d, hd, s, q, x, n, r0, o);
    case 5: return InterpolatePhaseChunk<5>(d, hd, s, q, x, n, r0, o);
    case 6: return InterpolatePhaseChunk<6>(d, hd, s, q, x, n, r0, o);
    case 7: return InterpolatePhaseChunk<7>(d, hd, s, q, x, n, r0, o);
    default: return;
  }
}

// Neither of c, S divides the other: kCount vectors with their own symbol
// sym[u] and residue res[u], all over the same term range [ilo, ilo + terms).
template <std::size_t kCount>
HWY_INLINE void InterpolateGeneral(DF d, const float* HWY_RESTRICT hd, std::ptrdiff_t s,
                                   const cf32* x, const std::ptrdiff_t* sym,
                                   const std::ptrdiff_t* res, std::ptrdiff_t ilo,
                                   std::ptrdiff_t terms, VF* acc) {
  for (std::size_t u = 0; u < kCount; ++u) acc[u] = hn::Zero(d);
  for (std::ptrdiff_t i = ilo; i < ilo + terms; ++i) {
    for (std::size_t u = 0; u < kCount; ++u) {
      const VF h = hn::LoadU(d, hd + 2 * (i * s + res[u]));
      acc[u] = hn::MulAdd(BroadcastComplex(d, x + sym[u] - i), h, acc[u]);
    }
  }
}

inline void Interpolate(const FirInterpolatorPlan& plan, const cf32* x, std::size_t n,
                        cf32* out) {
  const DF d;
  const auto s = static_cast<std::size_t>(plan.factor);
  const auto taps = static_cast<std::size_t>(plan.tap_count);
  const std::size_t q = (taps + s - 1) / s;  // taps per phase
  const std::size_t total = n * s;           // output samples
  const float* hd = plan.padded.data() + 2 * plan.pad;  // hd[2 m] = hd[2 m + 1] = h[m]
  float* o = reinterpret_cast<float*>(out);
  if (s % kComplex == 0 && s > kComplex) return InterpolateByPhases(d, hd, s, q, x, n, o);
  VF acc[kChains];
  HWY_ALIGN float buf[kFloats];
  std::size_t n0 = 0;
  if (kComplex % s == 0) {
    const std::size_t step = kComplex / s;    // symbols per vector
    const std::size_t terms = q + step - 1;  // i in [1 - step, q - 1]
    const float* tap0 = hd - 2 * (step - 1) * s;
    const cf32* x0 = x + (step - 1);
    for (; n0 + kChains * kComplex <= total; n0 += kChains * kComplex) {
      InterpolateSharedResidue<kChains>(d, tap0, 2 * s, x0 + n0 / s, step, terms, acc);
      for (std::size_t u = 0; u < kChains; ++u) hn::StoreU(acc[u], d, o + 2 * n0 + u * kFloats);
    }
    for (; n0 < total; n0 += kComplex) {
      InterpolateSharedResidue<1>(d, tap0, 2 * s, x0 + n0 / s, step, terms, acc);
      if (n0 + kComplex <= total) {
        hn::StoreU(acc[0], d, o + 2 * n0);
      } else {
        hn::Store(acc[0], d, buf);
        std::memcpy(o + 2 * n0, buf, 2 * (total - n0) * sizeof(float));
      }
    }
    return;
  }
  // Residues visited are multiples of g = gcd(c, S); the term range covering
  // them all is i in [-floor((c - 1 + S - g) / S), q - 1] (zero taps outside
  // each vector's own range). Symbol and residue advance without division.
  const auto ss = static_cast<std::ptrdiff_t>(s);
  const auto c = static_cast<std::ptrdiff_t>(kComplex);
  std::ptrdiff_t g = ss, b = c;
  while (b != 0) {
    const std::ptrdiff_t t = g % b;
    g = b;
    b = t;
  }
  const std::ptrdiff_t ilo = -((c - 1 + ss - g) / ss);
  const std::ptrdiff_t terms = static_cast<std::ptrdiff_t>(q) - ilo;
  std::ptrdiff_t sym[kChains], res[kChains];
  std::ptrdiff_t cur_sym = 0, cur_res = 0;  // of vector n0 / c
  auto advance = [&] {
    cur_res += c;
    while (cur_res >= ss) {
      cur_res -= ss;
      ++cur_sym;
    }
  };
  for (; n0 + kChains * kComplex <= total; n0 += kChains * kComplex) {
    for (std::size_t u = 0; u < kChains; ++u) {
      sym[u] = cur_sym;
      res[u] = cur_res;
      advance();
    }
    InterpolateGeneral<kChains>(d, hd, ss, x, sym, res, ilo, terms, acc);
    for (std::size_t u = 0; u < kChains; ++u) hn::StoreU(acc[u], d, o + 2 * n0 + u * kFloats);
  }
  for (; n0 < total; n0 += kComplex) {
    sym[0] = cur_sym;
    res[0] = cur_res;
    advance();
    InterpolateGeneral<1>(d, hd, ss, x, sym, res, ilo, terms, acc);
    if (n0 + kComplex <= total) {
      hn::StoreU(acc[0], d, o + 2 * n0);
    } else {
      hn::Store(acc[0], d, buf);
      std::memcpy(o + 2 * n0, buf, 2 * (total - n0) * sizeof(float));
    }
  }
}

// --------------------------------------------------------------- decimator

// One merge level (see the file comment): a and b hold partial sums in
// segments of kSeg complex lanes per output; the result holds both vectors'
// outputs in segments of kSeg / 2, a's and b's alternating.
template <std::size_t kSeg>
HWY_INLINE VF Merge(DF d, VF a, VF b) {
  if constexpr (kSeg == 2) {
    const hn::Repartition<double, DF> dd;
    const auto ad = hn::BitCast(dd, a), bd = hn::BitCast(dd, b);
    return hn::Add(hn::BitCast(d, hn::InterleaveLower(dd, ad, bd)),
                   hn::BitCast(d, hn::InterleaveUpper(dd, ad, bd)));
  } else if constexpr (kSeg == kComplex) {
    return hn::Add(hn::ConcatLowerLower(d, b, a), hn::ConcatUpperUpper(d, b, a));
  } else {
    static_assert(kSeg == 4 && kComplex == 8, "block level exists for 512-bit vectors only");
    return hn::Add(hn::OddEvenBlocks(b, a), hn::SwapAdjacentBlocks(hn::OddEvenBlocks(a, b)));
  }
}

// Reduces kCount vectors v[0], v[stride], ..., whose outputs hold kSeg
// kCount / 2 lanes each, to one vector with one lane per output: reduce the
// even-indexed and the odd-indexed halves, then merge them (the root merges
// segments of kSeg = 2 lanes, its children of 4, ...).
template <std::size_t kCount, std::size_t kSeg>
HWY_INLINE VF Reduce(DF d, const VF* v, std::size_t stride) {
  if constexpr (kCount == 1) {
    return v[0];
  } else {
    return Merge<kSeg>(d, Reduce<kCount / 2, 2 * kSeg>(d, v, 2 * stride),
                       Reduce<kCount / 2, 2 * kSeg>(d, v + stride, 2 * stride));
  }
}

// kGroups groups of kU vectors: vector u of group g accumulates the windows
// of outputs g c + u m .. + m - 1 (window of output k at w + k 2S floats).
template <std::size_t kU, std::size_t kGroups>
HWY_INLINE void DecimateBlock(DF d, const float* HWY_RESTRICT table, std::size_t tap_vectors,
                              const float* w, const std::size_t* offset, std::size_t stride,
                              VF* acc) {
  constexpr std::size_t kA = kU * kGroups;
  for (std::size_t a = 0; a < kA; ++a) acc[a] = hn::Zero(d);
  for (std::size_t j = 0; j < tap_vectors; ++j) {
    const VF t = hn::LoadU(d, table + j * kFloats);
    const float* q = w + j * stride;
    for (std::size_t a = 0; a < kA; ++a) acc[a] = hn::MulAdd(hn::LoadU(d, q + offset[a]), t, acc[a]);
  }
}

// DecimateBlock with each input vector loaded once. Both layouts put
// accumulator a's vector j at slot a M + j of the block, a slot being one
// vector-load step (2S floats segmented, F floats dot) and M = m (segmented)
// or 2S / F (dot, S a multiple of c). So win[rho][a] = slot(a M + j) for the
// steps j = rho (mod M), and after every M steps each set moves down by one
// accumulator and loads one new vector: (kA - 1) M + tap_vectors loads per
// block instead of kA tap_vectors, which keeps the kernel off the load ports
// (most of these unaligned loads split a cache line). Needs kA (M + 1) + 1
// vector registers: AVX-512 only. Same sums in the same order as
// DecimateBlock.
template <std::size_t kU, std::size_t kGroups, std::size_t kM>
HWY_INLINE void DecimateBlockRotating(DF d, const float* HWY_RESTRICT table,
                                      std::size_t tap_vectors, const float* w, std::size_t slot,
                                      VF* acc) {
  constexpr std::size_t kA = kU * kGroups;
  VF win[kM][kA];
  for (std::size_t r = 0; r < kM; ++r) {
    for (std::size_t a = 0; a < kA; ++a) win[r][a] = hn::LoadU(d, w + (a * kM + r) * slot);
  }
  for (std::size_t a = 0; a < kA; ++a) acc[a] = hn::Zero(d);
  const float* next = w + kA * kM * slot;  // first slot not loaded yet
  std::size_t j = 0;
  for (; j + kM <= tap_vectors; j += kM) {
    for (std::size_t r = 0; r < kM; ++r) {
      const VF t = hn::LoadU(d, table + (j + r) * kFloats);
      for (std::size_t a = 0; a < kA; ++a) acc[a] = hn::MulAdd(win[r][a], t, acc[a]);
    }
    if (j + kM < tap_vectors) {
      for (std::size_t r = 0; r < kM; ++r) {
        for (std::size_t a = 0; a + 1 < kA; ++a) win[r][a] = win[r][a + 1];
        win[r][kA - 1] = hn::LoadU(d, next + r * slot);
      }
      next += kM * slot;
    }
  }
  // Remaining steps (< kM); r stays a compile-time index so that win[][]
  // lives in registers (a run-time index would put it on the stack).
  for (std::size_t r = 0; r < kM; ++r) {
    if (j + r >= tap_vectors) break;
    const VF t = hn::LoadU(d, table + (j + r) * kFloats);
    for (std::size_t a = 0; a < kA; ++a) acc[a] = hn::MulAdd(win[r][a], t, acc[a]);
  }
}

// kM > 0: the main blocks run DecimateBlockRotating<kU, kGroups, kM>.
template <std::size_t kU, std::size_t kM = 0, std::size_t kGroupsRot = 1>
void DecimateU(const FirDecimatorPlan& plan, const cf32* in, std::size_t n_out, cf32* out) {
  constexpr std::size_t kGroups = kM > 0 ? kGroupsRot : (kU >= kChains ? 1 : kChains / kU);
  constexpr std::size_t kA = kU * kGroups;
  const DF d;
  const hn::Repartition<double, DF> dd;
  const auto s = static_cast<std::size_t>(plan.factor);
  const std::size_t m = plan.outputs_per_vector;  // kComplex / kU
  const std::size_t stride = m > 1 ? 2 * s : kFloats;
  const std::size_t tap_vectors = plan.table.size() / kFloats;
  const float* table = plan.table.data();
  const float* w = reinterpret_cast<const float*>(in) - 2 * (plan.padded_taps - 1);
  std::size_t offset[kA];
  for (std::size_t g = 0; g < kGroups; ++g) {
    for (std::size_t u = 0; u < kU; ++u) offset[g * kU + u] = (g * kComplex + u * m) * 2 * s;
  }
  // Output q of a group sits at lane (q mod m) kU + q / m after Reduce.
  HWY_ALIGN std::int64_t perm[kComplex];
  for (std::size_t q = 0; q < kComplex; ++q) {
    perm[q] = static_cast<std::int64_t>((q % m) * kU + q / m);
  }
  const auto indices = hn::SetTableIndices(dd, perm);
  auto finish = [&](const VF* group) {
    const VF r = Reduce<kU, 2>(d, group, 1);
    if (m == 1) return r;
    return hn::BitCast(d, hn::TableLookupLanes(hn::BitCast(dd, r), indices));
  };
  float* o = reinterpret_cast<float*>(out);
  VF acc[kA];
  HWY_ALIGN float buf[kFloats];
  std::size_t k0 = 0;
  for (; k0 + kGroups * kComplex <= n_out; k0 += kGroups * kComplex) {
    if constexpr (kM > 0) {
      DecimateBlockRotating<kU, kGroups, kM>(d, table, tap_vectors, w + 2 * k0 * s, stride, acc);
    } else {
      DecimateBlock<kU, kGroups>(d, table, tap_vectors, w + 2 * k0 * s, offset, stride, acc);
    }
    for (std::size_t g = 0; g < kGroups; ++g) {
      hn::StoreU(finish(acc + g * kU), d, o + 2 * (k0 + g * kComplex));
    }
  }
  for (; k0 < n_out; k0 += kComplex) {
    DecimateBlock<kU, 1>(d, table, tap_vectors, w + 2 * k0 * s, offset, stride, acc);
    const VF r = finish(acc);
    if (k0 + kComplex <= n_out) {
      hn::StoreU(r, d, o + 2 * k0);
    } else {
      hn::Store(r, d, buf);
      std::memcpy(o + 2 * k0, buf, 2 * (n_out - k0) * sizeof(float));
    }
  }
}

inline void BuildDecimatorTable(FirDecimatorPlan& plan) {
  const auto s = static_cast<std::size_t>(plan.factor);
  const auto taps = static_cast<std::size_t>(plan.tap_count);
  const bool segmented = kFloats % (2 * s) == 0 && kFloats / (2 * s) >= 2;
  const std::size_t m = segmented ? kFloats / (2 * s) : 1;
  const std::size_t chunk = segmented ? s : kComplex;  // taps per vector and output
  const std::size_t p = (taps + chunk - 1) / chunk * chunk;
  const std::size_t vectors = p / chunk;
  plan.table.assign(vectors * kFloats, 0.0f);
  for (std::size_t j = 0; j < vectors; ++j) {
    for (std::size_t f = 0; f < kFloats; ++f) {
      const std::size_t t = j * chunk + (f / 2) % chunk;  // position in the window
      const std::size_t tap = p - 1 - t;                  // g index it multiplies
      plan.table[j * kFloats + f] = tap < taps ? plan.taps[tap] : 0.0f;
    }
  }
  plan.vector_floats = kFloats;
  plan.padded_taps = p;
  plan.outputs_per_vector = m;
}

inline void Decimate(const FirDecimatorPlan& plan, const cf32* in, std::size_t n_out, cf32* out) {
  const auto s = static_cast<std::size_t>(plan.factor);
  const std::size_t m = plan.outputs_per_vector;
  // The rotating blocks where they fit the registers and pay (AVX-512 S = 4,
  // 8, 16; AVX2 S = 4); not for S = 2, where they measured slower
  // (docs/performance_notes.md, "FIR decimator kernel").
  if constexpr (kFloats == 16) {
    if (m == 2) return DecimateU<4, 2, 2>(plan, in, n_out, out);           // S = 4
    if (m == 1 && s == 8) return DecimateU<8, 1, 1>(plan, in, n_out, out);   // slot = output
    if (m == 1 && s == 16) return DecimateU<8, 2, 1>(plan, in, n_out, out);  // 2 slots
  }
  if constexpr (kFloats == 8) {
    if (m == 1 && s == 4) return DecimateU<4, 1, 2>(plan, in, n_out, out);  // slot = output
  }
  switch (kComplex / m) {
    case 1: return DecimateU<1>(plan, in, n_out, out);
    case 2: return DecimateU<2>(plan, in, n_out, out);
    case 4:
      if constexpr (kComplex >= 4) return DecimateU<4>(plan, in, n_out, out);
      break;
    case 8:
      if constexpr (kComplex >= 8) return DecimateU<8>(plan, in, n_out, out);
      break;
    case 16:
      if constexpr (kComplex >= 16) return DecimateU<16>(plan, in, n_out, out);
      break;
    default: break;
  }
  reference::FirDecimate(plan.taps, plan.factor, in, n_out, out);
}

}  // namespace fir_detail

#endif  // HWY_TARGET != HWY_SCALAR

// ------------------------------------------------------------- entry points

// Floats per vector of this target's kernels; 0 on the one-lane SCALAR target,
// whose calls run the reference.
inline std::size_t FirKernelFloats() {
#if HWY_TARGET == HWY_SCALAR
  return 0;
#else
  return fir_detail::kFloats;
#endif
}

// Fills plan.table and its layout fields for this target (plan.taps and
// plan.factor set). SCALAR: clears the table (vector_floats = 0).
inline void FirBuildDecimatorTableKernel(FirDecimatorPlan& plan) {
#if HWY_TARGET == HWY_SCALAR
  plan.table.clear();
  plan.vector_floats = 0;
  plan.padded_taps = static_cast<std::size_t>(plan.tap_count);
  plan.outputs_per_vector = 1;
#else
  fir_detail::BuildDecimatorTable(plan);
#endif
}

inline void FirInterpolateKernel(const FirInterpolatorPlan& plan, const cf32* x, std::size_t n,
                                 cf32* out) {
#if HWY_TARGET == HWY_SCALAR
  reference::FirInterpolate(plan.taps, plan.factor, x, n, out);
#else
  fir_detail::Interpolate(plan, x, n, out);
#endif
}

// A table built by another target (vector_floats differs) runs the reference.
inline void FirDecimateKernel(const FirDecimatorPlan& plan, const cf32* in, std::size_t n_out,
                              cf32* out) {
#if HWY_TARGET != HWY_SCALAR
  if (plan.vector_floats == fir_detail::kFloats) {
    fir_detail::Decimate(plan, in, n_out, out);
    return;
  }
#endif
  reference::FirDecimate(plan.taps, plan.factor, in, n_out, out);
}

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#endif  // per-target include guard
