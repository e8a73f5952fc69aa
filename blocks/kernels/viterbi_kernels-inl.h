// Per-target body of the Viterbi ACS kernel declared in viterbi_kernels.h.
// Included once per instruction-set target by viterbi_kernels.cc (through
// hwy/foreach_target.h) and the same way by the per-target test, which calls
// capgap::HWY_NAMESPACE::ViterbiAcsKernel directly. viterbi_reference.h is
// the oracle: the same int16 saturating operations in the same order.
//
// Layout. States go across int16 lanes: a vector holds N consecutive
// destination states j0 .. j0+N-1 of the lower half (and, in a second
// vector, j0+H .. of the upper half). Their predecessors 2j and 2j+1 are the
// even and odd lanes of the 2N consecutive old metrics, split by
// ConcatEven/ConcatOdd (one or two shuffles each on x86), so metrics stay in
// natural state order in memory and no gather is needed. The branch metrics
// are sign-vector products with the broadcast LLRs (vpmullw on +-1; the sign
// tables are loaded, they do not fit the registers for K = 9). The decision
// masks go out with StoreMaskBits, N/8 bytes each, which is why a target is
// used only when its lane count N >= 8 (K >= 5): K = 3, 4 run the oracle.
// The tag is capped at H lanes (CappedTag), so K = 5, 6 use 128/256-bit
// vectors on wider targets. n (2..4) and K are template parameters so that
// the per-step LLR broadcasts stay in registers and the group loop unrolls.
// int16 lanes: 32 states per AVX-512 vector, so K = 7 (64 states) is two
// vectors of old metrics and one group per step.

// Per-target include guard (Highway's toggle idiom).
#if defined(CAPGAP_BLOCKS_KERNELS_VITERBI_KERNELS_INL_H_) == defined(HWY_TARGET_TOGGLE)
#ifdef CAPGAP_BLOCKS_KERNELS_VITERBI_KERNELS_INL_H_
#undef CAPGAP_BLOCKS_KERNELS_VITERBI_KERNELS_INL_H_
#else
#define CAPGAP_BLOCKS_KERNELS_VITERBI_KERNELS_INL_H_
#endif

#include <cstddef>
#include <cstdint>
#include <cstring>

#include "blocks/kernels/viterbi_kernels.h"
#include "blocks/kernels/viterbi_reference.h"
#include "hwy/highway.h"

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
namespace hn = hwy::HWY_NAMESPACE;

#if HWY_TARGET != HWY_SCALAR

namespace viterbi_detail {

// Branch metrics of the four combinations for lanes j0.. (see the header).
template <int kN, class D, class V>
HWY_INLINE void BranchMetrics(D d, const std::int16_t* HWY_RESTRICT signs, std::size_t h,
                              std::size_t j0, const V* qv, V* bm) {
  for (int c = 0; c < 4; ++c) {
    V sum = hn::Mul(hn::LoadU(d, signs + static_cast<std::size_t>(c * kN) * h + j0), qv[0]);
    for (int i = 1; i < kN; ++i) {
      sum = hn::Add(
          sum, hn::Mul(hn::LoadU(d, signs + static_cast<std::size_t>(c * kN + i) * h + j0), qv[i]));
    }
    bm[c] = sum;
  }
}

template <int K, int kN>
HWY_NOINLINE void AcsLoop(const std::int16_t* HWY_RESTRICT signs, std::int16_t* metrics,
                          const std::int16_t* HWY_RESTRICT q, std::size_t steps,
                          std::uint8_t* HWY_RESTRICT decisions) {
  constexpr std::size_t kS = std::size_t{1} << (K - 1);
  constexpr std::size_t kH = kS / 2;
  constexpr std::size_t kRow = kS / 8;
  const hn::CappedTag<std::int16_t, kH> d;
  using V = decltype(hn::Zero(d));
  const std::size_t lanes = hn::Lanes(d);
  if (lanes == kH) {
    // One group: the S metrics live in two registers across steps (the new
    // lower/upper halves are exactly the next step's first/second vector of
    // old metrics), and the sign vectors are hoisted; the loop-carried chain
    // is renormalise -> ConcatEven/Odd -> add -> max.
    V lo = hn::LoadU(d, metrics);
    V hi = hn::LoadU(d, metrics + kH);
    V sg[4][kN];
    for (int c = 0; c < 4; ++c) {
      for (int i = 0; i < kN; ++i) sg[c][i] = hn::LoadU(d, signs + static_cast<std::size_t>(c * kN + i) * kH);
    }
    for (std::size_t t = 0; t < steps; ++t) {
      const std::int16_t* qt = q + t * kN;
      V bm[4];
      for (int c = 0; c < 4; ++c) {
        V sum = hn::Mul(sg[c][0], hn::Set(d, qt[0]));
        for (int i = 1; i < kN; ++i) sum = hn::Add(sum, hn::Mul(sg[c][i], hn::Set(d, qt[i])));
        bm[c] = sum;
      }
      if (t % kViterbiRenormPeriod == 0) {
        const V ref = hn::Set(d, hn::GetLane(lo));
        lo = hn::SaturatedSub(lo, ref);
        hi = hn::SaturatedSub(hi, ref);
      }
      const V ev = hn::ConcatEven(d, hi, lo);
      const V od = hn::ConcatOdd(d, hi, lo);
      const V m0 = hn::SaturatedAdd(ev, bm[0]);
      const V m1 = hn::SaturatedAdd(od, bm[1]);
      const V m2 = hn::SaturatedAdd(ev, bm[2]);
      const V m3 = hn::SaturatedAdd(od, bm[3]);
      std::uint8_t* HWY_RESTRICT dec = decisions + t * kRow;
      hn::StoreMaskBits(d, hn::Gt(m1, m0), dec);
      hn::StoreMaskBits(d, hn::Gt(m3, m2), dec + kH / 8);
      lo = hn::Max(m0, m1);
      hi = hn::Max(m2, m3);
    }
    hn::StoreU(lo, d, metrics);
    hn::StoreU(hi, d, metrics + kH);
    return;
  }
  HWY_ALIGN std::int16_t buf[2][kS];
  std::memcpy(buf[0], metrics, sizeof(buf[0]));
  for (std::size_t t = 0; t < steps; ++t) {
    const std::int16_t* HWY_RESTRICT old = buf[t & 1];
    std::int16_t* HWY_RESTRICT nw = buf[(t & 1) ^ 1];
    std::uint8_t* HWY_RESTRICT dec = decisions + t * kRow;
    const std::int16_t* qt = q + t * kN;
    const V ref = hn::Set(d, t % kViterbiRenormPeriod == 0 ? old[0] : std::int16_t{0});
    V qv[kN];
    for (int i = 0; i < kN; ++i) qv[i] = hn::Set(d, qt[i]);
    for (std::size_t j0 = 0; j0 < kH; j0 += lanes) {
      const V lo = hn::SaturatedSub(hn::Load(d, old + 2 * j0), ref);
      const V hi = hn::SaturatedSub(hn::Load(d, old + 2 * j0 + lanes), ref);
      const V ev = hn::ConcatEven(d, hi, lo);
      const V od = hn::ConcatOdd(d, hi, lo);
      V bm[4];
      BranchMetrics<kN>(d, signs, kH, j0, qv, bm);
      const V m0 = hn::SaturatedAdd(ev, bm[0]);
      const V m1 = hn::SaturatedAdd(od, bm[1]);
      const V m2 = hn::SaturatedAdd(ev, bm[2]);
      const V m3 = hn::SaturatedAdd(od, bm[3]);
      hn::Store(hn::Max(m0, m1), d, nw + j0);
      hn::Store(hn::Max(m2, m3), d, nw + kH + j0);
      hn::StoreMaskBits(d, hn::Gt(m1, m0), dec + j0 / 8);
      hn::StoreMaskBits(d, hn::Gt(m3, m2), dec + (kH + j0) / 8);
    }
  }
  std::memcpy(metrics, buf[steps & 1], sizeof(buf[0]));
}

template <int K>
bool AcsForK(int n, const std::int16_t* signs, std::int16_t* metrics, const std::int16_t* q,
             std::size_t steps, std::uint8_t* decisions) {
  switch (n) {
    case 2: AcsLoop<K, 2>(signs, metrics, q, steps, decisions); return true;
    case 3: AcsLoop<K, 3>(signs, metrics, q, steps, decisions); return true;
    case 4: AcsLoop<K, 4>(signs, metrics, q, steps, decisions); return true;
    default: return false;
  }
}

}  // namespace viterbi_detail

// See ViterbiQuantise in viterbi_kernels.h; the tail uses the scalar
// reference formula, which the vector body reproduces exactly (the clamp
// keeps the sum within float's exact integers, and truncation is cvttps2dq).
HWY_INLINE void ViterbiQuantiseKernel(const float* x, std::size_t n, float scale,
                                      std::int16_t* q) {
  const hn::ScalableTag<float> df;
  const hn::Rebind<std::int32_t, decltype(df)> di;
  const hn::Rebind<std::int16_t, decltype(df)> dh;
  const std::size_t lanes = hn::Lanes(df);
  const auto vs = hn::Set(df, scale);
  const auto vmax = hn::Set(df, static_cast<float>(kViterbiMaxQ));
  const auto vmin = hn::Set(df, -static_cast<float>(kViterbiMaxQ));
  const auto half = hn::Set(df, 0.5f);
  std::size_t i = 0;
  for (; i + lanes <= n; i += lanes) {
    auto v = hn::Mul(hn::LoadU(df, x + i), vs);
    v = hn::Max(hn::Min(v, vmax), vmin);
    v = hn::Add(v, hn::CopySign(half, v));
    hn::StoreU(hn::DemoteTo(dh, hn::ConvertTo(di, v)), dh, q + i);
  }
  for (; i < n; ++i) q[i] = reference::QuantiseOne(x[i], scale);
}

// Lanes this target would use for K (0 if it does not handle K).
HWY_INLINE std::size_t ViterbiKernelLanes(int k) {
  if (k < 5 || k > 9) return 0;
  const std::size_t h = std::size_t{1} << (k - 2);
  const hn::ScalableTag<std::int16_t> d;
  const std::size_t lanes = hn::Lanes(d) < h ? hn::Lanes(d) : h;
  return lanes >= 8 ? lanes : 0;
}

// Returns false (doing nothing) if this target does not handle the code.
HWY_INLINE bool ViterbiAcsKernel(const ViterbiAcsArgs& args, std::int16_t* metrics,
                                 const std::int16_t* q, std::size_t steps,
                                 std::uint8_t* decisions) {
  if (ViterbiKernelLanes(args.constraint_length) == 0) return false;
  const int n = args.num_outputs;
  switch (args.constraint_length) {
    case 5: return viterbi_detail::AcsForK<5>(n, args.signs, metrics, q, steps, decisions);
    case 6: return viterbi_detail::AcsForK<6>(n, args.signs, metrics, q, steps, decisions);
    case 7: return viterbi_detail::AcsForK<7>(n, args.signs, metrics, q, steps, decisions);
    case 8: return viterbi_detail::AcsForK<8>(n, args.signs, metrics, q, steps, decisions);
    case 9: return viterbi_detail::AcsForK<9>(n, args.signs, metrics, q, steps, decisions);
    default: return false;
  }
}

#else  // HWY_TARGET == HWY_SCALAR

HWY_INLINE void ViterbiQuantiseKernel(const float* x, std::size_t n, float scale,
                                      std::int16_t* q) {
  reference::ViterbiQuantise(x, n, scale, q);
}

HWY_INLINE std::size_t ViterbiKernelLanes(int) { return 0; }
HWY_INLINE bool ViterbiAcsKernel(const ViterbiAcsArgs&, std::int16_t*, const std::int16_t*,
                                 std::size_t, std::uint8_t*) {
  return false;
}

#endif  // HWY_TARGET != HWY_SCALAR

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#endif  // include guard
