// Per-target body of the SC polar decoder with frames across lanes
// (polar_sc_kernels.h), included once per instruction set by
// polar_sc_kernels.cc and by the per-target test.
//
// Layout: element i of a node holds one float (LLR) or one uint32 (decision)
// per frame, W = Lanes(float) frames side by side, so every node update of
// the recursion is one vector operation per element whatever the node size
// (the small nodes near the leaves, which dominate scalar SC, are as wide as
// the big ones). Decisions are stored as the float sign bit (0 or
// 0x80000000): g(a, b, u) = b + (a with its sign flipped by u) is one XOR and
// one add, partial sums are XORs.
//
// Arithmetic is the scalar decoder's (polar_decoder.cc) operation by
// operation: f = min(|a|, |b|) with the sign bit of a XOR b; g as above; leaf decision 1 iff L < 0; the repetition node's sum in
// the recursion's order. The fast nodes decide per lane as the scalar ones
// do; where the scalar decoder would fall back to the recursion in some lane
// (a rate-1 or SPC node input with an LLR 0, an SPC tie), all lanes take the
// recursion, whose decisions equal the fast node's in the other lanes. So
// the decisions are those of plain SC in every lane, bit for bit.

// Per-target include guard (Highway's toggle idiom).
#if defined(CAPGAP_BLOCKS_KERNELS_POLAR_SC_KERNELS_INL_H_) == defined(HWY_TARGET_TOGGLE)
#ifdef CAPGAP_BLOCKS_KERNELS_POLAR_SC_KERNELS_INL_H_
#undef CAPGAP_BLOCKS_KERNELS_POLAR_SC_KERNELS_INL_H_
#else
#define CAPGAP_BLOCKS_KERNELS_POLAR_SC_KERNELS_INL_H_
#endif

#include <cstddef>
#include <cstdint>
#include <cstring>

#include "blocks/kernels/polar_sc_kernels.h"
#include "hwy/highway.h"

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {
namespace hn = hwy::HWY_NAMESPACE;

class PolarScLanes {
 public:
  using D = hn::ScalableTag<float>;
  using DU = hn::RebindToUnsigned<D>;
  using DI = hn::RebindToSigned<D>;
  using V = hn::Vec<D>;
  using VU = hn::Vec<DU>;

  PolarScLanes(const PolarScTree& tree, float* llr, std::uint32_t* u)
      : t_(tree), w_(hn::Lanes(D())), llr_(llr), u_(u) {}

  std::size_t lanes() const { return w_; }

  // in: N * W interleaved LLRs; x: N * W decisions (sign bits).
  void Decode(const float* in, std::uint32_t* x) { Node(t_.m, 0, in, x); }

 private:
  V Load(const float* p, std::size_t i) const { return hn::LoadU(d_, p + i * w_); }
  VU LoadB(const std::uint32_t* p, std::size_t i) const { return hn::LoadU(du_, p + i * w_); }
  void Store(V v, float* p, std::size_t i) const { hn::StoreU(v, d_, p + i * w_); }
  void StoreB(VU v, std::uint32_t* p, std::size_t i) const { hn::StoreU(v, du_, p + i * w_); }
  VU Hard(V l) const {
    return hn::And(hn::BitCast(du_, hn::VecFromMask(d_, hn::Lt(l, hn::Zero(d_)))),
                   hn::Set(du_, 0x80000000u));
  }
  // u = x G on a block of `size` elements (involution), by vector XORs.
  void Transform(std::uint32_t* p, std::size_t size) const {
    for (std::size_t h = 1; h < size; h *= 2) {
      for (std::size_t b = 0; b < size; b += 2 * h) {
        for (std::size_t i = b; i < b + h; ++i) {
          StoreB(hn::Xor(LoadB(p, i), LoadB(p, i + h)), p, i);
        }
      }
    }
  }

  void Node(int s, std::size_t leaf, const float* in, std::uint32_t* out) {
    if (s == 0) {
      const VU b = t_.frozen[leaf] ? hn::Zero(du_) : Hard(Load(in, 0));
      StoreB(b, out, 0);
      StoreB(b, u_, leaf);
      return;
    }
    const std::size_t size = std::size_t{1} << s;
    const std::size_t h = size / 2;
    const std::uint8_t kind = t_.kind[(std::size_t{1} << (t_.m - s)) + (leaf >> s)];
    if (kind == kPolarNodeRate0) {
      std::memset(out, 0, size * w_ * sizeof(std::uint32_t));
      std::memset(u_ + leaf * w_, 0, size * w_ * sizeof(std::uint32_t));
      return;
    }
    if (kind == kPolarNodeRate1 || kind == kPolarNodeSpc) {
      auto zero = hn::Eq(Load(in, 0), hn::Zero(d_));
      auto least = hn::Abs(Load(in, 0));
      VU parity = Hard(Load(in, 0));
      for (std::size_t i = 1; i < size; ++i) {
        const V l = Load(in, i);
        zero = hn::Or(zero, hn::Eq(l, hn::Zero(d_)));
        least = hn::Min(least, hn::Abs(l));
        parity = hn::Xor(parity, Hard(l));
      }
      bool fast = hn::AllFalse(d_, zero);
      if (fast && kind == kPolarNodeSpc) {
        // Lanes with odd parity need a unique least |L|.
        auto ties = hn::Zero(di_);
        for (std::size_t i = 0; i < size; ++i) {
          const auto eq = hn::VecFromMask(d_, hn::Eq(hn::Abs(Load(in, i)), least));
          ties = hn::Sub(ties, hn::BitCast(di_, eq));  // eq lanes are -1
        }
        const auto odd = hn::RebindMask(di_, hn::Ne(parity, hn::Zero(du_)));
        fast = hn::AllFalse(di_, hn::And(odd, hn::Gt(ties, hn::Set(di_, 1))));
      }
      if (fast) {
        for (std::size_t i = 0; i < size; ++i) {
          const V l = Load(in, i);
          VU b = Hard(l);
          if (kind == kPolarNodeSpc) {
            const VU flip = hn::BitCast(du_, hn::VecFromMask(d_, hn::Eq(hn::Abs(l), least)));
            b = hn::Xor(b, hn::And(flip, parity));
          }
          StoreB(b, out, i);
        }
        std::memcpy(u_ + leaf * w_, out, size * w_ * sizeof(std::uint32_t));
        Transform(u_ + leaf * w_, size);
        return;
      }
    } else if (kind == kPolarNodeRepetition) {
      float* t = llr_ + h * w_;  // level s - 1 scratch
      for (std::size_t i = 0; i < h; ++i) Store(hn::Add(Load(in, i + h), Load(in, i)), t, i);
      for (std::size_t q = h / 2; q >= 1; q /= 2) {
        for (std::size_t i = 0; i < q; ++i) Store(hn::Add(Load(t, i + q), Load(t, i)), t, i);
      }
      const VU b = Hard(Load(t, 0));
      for (std::size_t i = 0; i < size; ++i) StoreB(b, out, i);
      std::memset(u_ + leaf * w_, 0, (size - 1) * w_ * sizeof(std::uint32_t));
      StoreB(b, u_, leaf + size - 1);
      return;
    }
    // The children write their decisions straight into the two halves of
    // `out`, which are then combined in place (no copies).
    float* child = llr_ + h * w_;
    for (std::size_t i = 0; i < h; ++i) {
      const V a = Load(in, i), b = Load(in, i + h);
      const V m = hn::Min(hn::Abs(a), hn::Abs(b));
      Store(hn::Or(m, hn::And(hn::Xor(a, b), hn::BitCast(d_, hn::Set(du_, 0x80000000u)))), child,
            i);
    }
    Node(s - 1, leaf, child, out);
    for (std::size_t i = 0; i < h; ++i) {
      const V a = Load(in, i), b = Load(in, i + h);
      Store(hn::Add(b, hn::BitCast(d_, hn::Xor(hn::BitCast(du_, a), LoadB(out, i)))), child, i);
    }
    std::uint32_t* right = out + h * w_;
    Node(s - 1, leaf + h, child, right);
    for (std::size_t i = 0; i < h; ++i) StoreB(hn::Xor(LoadB(out, i), LoadB(right, i)), out, i);
  }

  D d_;
  DU du_;
  DI di_;
  PolarScTree t_;
  std::size_t w_;
  float* llr_;
  std::uint32_t* u_;
};

inline std::size_t PolarScLanesKernel() { return hn::Lanes(hn::ScalableTag<float>()); }

// Decodes `frames` frames (frame-major LLRs, N each) in groups of W lanes
// and writes, frame-major, the decisions at `count` positions: out[f * count
// + j] = (from_x ? x : u)[positions[j]] of frame f, one bit per byte (the
// message of a polar code is u or x at its information positions; only
// those leave the lane layout). scratch: PolarScScratch floats
// (polar_sc_kernels.h).
inline void PolarScDecodeKernel(const PolarScTree& tree, const float* llr, std::size_t frames,
                                const int* positions, std::size_t count, bool from_x,
                                Bit* out, float* scratch) {
  const std::size_t n = std::size_t{1} << tree.m;
  const std::size_t w = PolarScLanesKernel();
  float* in = scratch;
  float* levels = in + n * w;
  auto* x = reinterpret_cast<std::uint32_t*>(levels + n * w);
  std::uint32_t* u = x + n * w;
  PolarScLanes dec(tree, levels, u);
  const std::uint32_t* src_bits = from_x ? x : u;
  for (std::size_t f0 = 0; f0 < frames; f0 += w) {
    const std::size_t group = frames - f0 < w ? frames - f0 : w;
    // Into the lane layout by gathers: lane l reads frame f0 + l (unused
    // lanes repeat the group's first frame; any valid LLRs do).
    const hn::ScalableTag<float> d;
    const hn::RebindToSigned<decltype(d)> di;
    const auto lane_index = hn::Iota(di, 0);
    const auto offsets = hn::IfThenElseZero(hn::Lt(lane_index, hn::Set(di, static_cast<std::int32_t>(group))),
                                            hn::Mul(lane_index, hn::Set(di, static_cast<std::int32_t>(n))));
    const float* base = llr + f0 * n;
    for (std::size_t i = 0; i < n; ++i) hn::StoreU(hn::GatherIndex(d, base + i, offsets), d, in + i * w);
    dec.Decode(in, x);
    // Out of the lane layout: one lane bit mask per wanted position (w <=
    // 64), stored over the input and level areas (2 N w floats >= 8 count
    // bytes, both dead now), then each frame's bits read sequentially.
    auto* masks = reinterpret_cast<std::uint64_t*>(in);
    for (std::size_t j = 0; j < count; ++j) {
      const auto v = hn::BitCast(di, hn::LoadU(hn::RebindToUnsigned<decltype(d)>(),
                                              src_bits + static_cast<std::size_t>(positions[j]) * w));
      std::uint64_t bits = 0;
      hn::StoreMaskBits(di, hn::Lt(v, hn::Zero(di)), reinterpret_cast<std::uint8_t*>(&bits));
      masks[j] = bits;
    }
    for (std::size_t lane = 0; lane < group; ++lane) {
      Bit* o = out + (f0 + lane) * count;
      for (std::size_t j = 0; j < count; ++j) o[j] = static_cast<Bit>((masks[j] >> lane) & 1u);
    }
  }
}

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();

#endif  // per-target include guard
