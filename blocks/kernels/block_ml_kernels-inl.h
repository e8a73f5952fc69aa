// Per-target body of the exhaustive ML block decoder declared in
// block_ml_kernels.h. Included once per instruction-set target by
// block_ml_kernels.cc (through hwy/foreach_target.h) and the same way by the
// per-target test and the benchmark, which call
// capgap::HWY_NAMESPACE::BlockMlDecodeKernel directly. block_ml_reference.h
// is the oracle.
//
// Layout (see block_ml_kernels.h for why it is exact): B float lanes, one
// codeword per lane. Per frame the n vectors s_i = L_i XOR low_mask[i] are
// formed once in the workspace (n B floats: 1.5 KiB for n = 24 on AVX3, so
// they stay in L1). A block b of B codewords then costs, per bit i, one
// broadcast of its sign word high_mask[b][i], one XOR and one add: the
// metrics of U = 8 blocks are accumulated together, so eight independent add
// chains hide the add latency (one chain of n dependent adds per block would
// leave the adder idle 3 cycles in 4), and s_i is loaded once for the eight.
// After a block's n adds the running per-lane maximum and its codeword index
// are updated with a strict compare (blocks run in increasing order, so each
// lane keeps the lowest index of its maximum); the lanes are reduced at the
// end of the frame with the same tie rule.

// Per-target include guard (Highway's toggle idiom).
#if defined(CAPGAP_BLOCKS_KERNELS_BLOCK_ML_KERNELS_INL_H_) == defined(HWY_TARGET_TOGGLE)
#ifdef CAPGAP_BLOCKS_KERNELS_BLOCK_ML_KERNELS_INL_H_
#undef CAPGAP_BLOCKS_KERNELS_BLOCK_ML_KERNELS_INL_H_
#else
#define CAPGAP_BLOCKS_KERNELS_BLOCK_ML_KERNELS_INL_H_
#endif

#include <cstddef>
#include <cstdint>
#include <limits>

#include "blocks/kernels/block_ml_kernels.h"
#include "hwy/highway.h"

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
namespace hn = hwy::HWY_NAMESPACE;

#if HWY_TARGET != HWY_SCALAR

namespace block_ml_detail {

// U consecutive blocks b .. b+U-1: metrics, then the running maximum.
template <std::size_t U, class D>
HWY_INLINE void Blocks(D d, const float* HWY_RESTRICT s, const std::uint32_t* HWY_RESTRICT high,
                       std::size_t n, std::size_t b, hn::Vec<D>& best,
                       hn::Vec<hn::RebindToSigned<D>>& best_j) {
  const hn::RebindToUnsigned<D> du;
  const hn::RebindToSigned<D> di;
  const std::size_t lanes = hn::Lanes(d);
  hn::Vec<D> acc[U];
  for (std::size_t u = 0; u < U; ++u) acc[u] = hn::Zero(d);
  const std::uint32_t* h = high + b * n;
  for (std::size_t i = 0; i < n; ++i) {
    const hn::Vec<D> x = hn::Load(d, s + i * lanes);
    for (std::size_t u = 0; u < U; ++u) {
      acc[u] = hn::Add(acc[u], hn::Xor(x, hn::BitCast(d, hn::Set(du, h[u * n + i]))));
    }
  }
  const auto iota = hn::Iota(di, 0);
  for (std::size_t u = 0; u < U; ++u) {
    const auto gt = hn::Gt(acc[u], best);
    best = hn::IfThenElse(gt, acc[u], best);
    const auto j = hn::Add(iota, hn::Set(di, static_cast<std::int32_t>((b + u) * lanes)));
    best_j = hn::IfThenElse(hn::RebindMask(di, gt), j, best_j);
  }
}

}  // namespace block_ml_detail

inline std::size_t BlockMlKernelLanes() { return hn::Lanes(hn::ScalableTag<float>()); }

// Decides `frames` frames (see BlockMlDecode); false if the tables were not
// built for this target's lane count (the caller then runs the oracle).
inline bool BlockMlDecodeKernel(const BlockMlView& v, const float* llrs, std::size_t frames,
                                std::uint32_t* out, void* workspace) {
  const hn::ScalableTag<float> d;
  const hn::RebindToUnsigned<decltype(d)> du;
  const hn::RebindToSigned<decltype(d)> di;
  const std::size_t lanes = hn::Lanes(d);
  if (v.lanes != lanes || v.low_masks == nullptr || v.high_masks == nullptr) return false;
  constexpr std::size_t kMaxLanes = HWY_MAX_BYTES / sizeof(float);
  if (lanes > kMaxLanes) return false;

  auto base = reinterpret_cast<std::uintptr_t>(workspace);
  base = (base + 63u) & ~std::uintptr_t{63u};
  float* HWY_RESTRICT s = reinterpret_cast<float*>(base);
  const auto n = static_cast<std::size_t>(v.n);
  const std::size_t blocks = (std::size_t{1} << v.k) >> v.low_bits;
  constexpr std::size_t kUnroll = 8;

  for (std::size_t f = 0; f < frames; ++f) {
    const float* llr = llrs + f * n;
    for (std::size_t i = 0; i < n; ++i) {
      const auto low = hn::BitCast(d, hn::LoadU(du, v.low_masks + i * lanes));
      hn::Store(hn::Xor(hn::Set(d, llr[i]), low), d, s + i * lanes);
    }
    auto best = hn::Set(d, -std::numeric_limits<float>::infinity());
    auto best_j = hn::Zero(di);
    std::size_t b = 0;
    for (; b + kUnroll <= blocks; b += kUnroll) {
      block_ml_detail::Blocks<kUnroll>(d, s, v.high_masks, n, b, best, best_j);
    }
    for (; b < blocks; ++b) block_ml_detail::Blocks<1>(d, s, v.high_masks, n, b, best, best_j);

    // Across lanes, the oracle's rule: the largest metric, lowest index.
    HWY_ALIGN float lane_best[kMaxLanes];
    HWY_ALIGN std::int32_t lane_j[kMaxLanes];
    hn::Store(best, d, lane_best);
    hn::Store(best_j, di, lane_j);
    float m = -std::numeric_limits<float>::infinity();
    std::uint32_t j = 0;
    for (std::size_t l = 0; l < lanes; ++l) {
      const auto lj = static_cast<std::uint32_t>(lane_j[l]);
      if (lane_best[l] > m || (lane_best[l] == m && lj < j)) {
        m = lane_best[l];
        j = lj;
      }
    }
    out[f] = j;
  }
  return true;
}

#else  // HWY_TARGET == HWY_SCALAR

inline std::size_t BlockMlKernelLanes() { return 0; }
inline bool BlockMlDecodeKernel(const BlockMlView&, const float*, std::size_t, std::uint32_t*,
                                void*) {
  return false;
}

#endif  // HWY_TARGET != HWY_SCALAR

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#endif  // per-target include guard
