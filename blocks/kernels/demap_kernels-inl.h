// Per-target demap kernels (Google Highway; included once per target by
// demap_kernels.cc and its test through hwy/foreach_target.h). Each repeats,
// per output value, exactly the float operations of demap_reference.h in the
// same order, vectorised across items (symbols, or axis samples for QAM), so
// the results are bit-identical to the oracle: Mul and Add are never fused
// (the including files are compiled with -ffp-contract=off), the running
// minimum keeps the oracle's "b < a ? b : a" on ties and NaN, and exp/log are
// the oracle's polynomials.
//
// Layout: items are processed a vector at a time; symbols are loaded with
// LoadInterleaved2 into split re/im vectors (the metrics need both parts of
// the same symbol in the same lane). An item's B outputs are stored
// interleaved (StoreInterleaved2/3/4 for B <= 4; for B = 5, 6 through a
// bit-major stage and a copy loop). The last partial vector runs on a
// zero-padded copy of its inputs, and only its real outputs are copied out.
// The metrics of one vector of items are kept in an array of vectors (up to
// 64 for 64-PSK, which the compiler spills to the stack): every reduction then
// reads them in label order, as the oracle does.
#if defined(CAPGAP_BLOCKS_KERNELS_DEMAP_KERNELS_INL_H_) == defined(HWY_TARGET_TOGGLE)
#ifdef CAPGAP_BLOCKS_KERNELS_DEMAP_KERNELS_INL_H_
#undef CAPGAP_BLOCKS_KERNELS_DEMAP_KERNELS_INL_H_
#else
#define CAPGAP_BLOCKS_KERNELS_DEMAP_KERNELS_INL_H_
#endif

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <numbers>
#include <type_traits>

#include "blocks/kernels/demap_kernels.h"
#include "blocks/kernels/demap_reference.h"
#include "hwy/highway.h"

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {
namespace hn = hwy::HWY_NAMESPACE;

#if HWY_TARGET != HWY_SCALAR
namespace demap_simd {

using DF = hn::ScalableTag<float>;
using DI = hn::RebindToSigned<DF>;
using DU = hn::RebindToUnsigned<DF>;
using VF = hn::Vec<DF>;
using VI = hn::Vec<DI>;

constexpr int Gray(int k) { return k ^ (k >> 1); }

// b < a ? b : a, lane by lane (the oracle's Min). x86 MINPS(b, a) returns a
// unless b < a, which is exactly that, ties and NaN included.
HWY_INLINE VF MinOf(VF a, VF b) {
#if HWY_ARCH_X86 && HWY_TARGET <= HWY_SSSE3
  return hn::Min(b, a);
#else
  return hn::IfThenElse(hn::Lt(b, a), b, a);
#endif
}

// reference::demap_detail::ExpNonPositive, lane by lane.
HWY_INLINE VF ExpNonPositive(DF df, VF x) {
  const DU du;
  x = hn::IfThenElse(hn::Lt(x, hn::Set(df, -87.0f)), hn::Set(df, -87.0f), x);
  const VF magic = hn::Set(df, 12582912.0f);
  const VF t = hn::Add(hn::Mul(x, hn::Set(df, 1.44269504088896341f)), magic);
  const VF n = hn::Sub(t, magic);
  const VF r = hn::Sub(hn::Sub(x, hn::Mul(n, hn::Set(df, 0.693145751953125f))),
                       hn::Mul(n, hn::Set(df, 1.428606820309417232e-6f)));
  VF p = hn::Set(df, 1.0f / 5040.0f);
  p = hn::Add(hn::Mul(p, r), hn::Set(df, 1.0f / 720.0f));
  p = hn::Add(hn::Mul(p, r), hn::Set(df, 1.0f / 120.0f));
  p = hn::Add(hn::Mul(p, r), hn::Set(df, 1.0f / 24.0f));
  p = hn::Add(hn::Mul(p, r), hn::Set(df, 1.0f / 6.0f));
  p = hn::Add(hn::Mul(p, r), hn::Set(df, 0.5f));
  p = hn::Add(hn::Mul(p, r), hn::Set(df, 1.0f));
  p = hn::Add(hn::Mul(p, r), hn::Set(df, 1.0f));
  const auto biased = hn::Add(hn::Sub(hn::BitCast(du, t), hn::Set(du, 0x4B400000u)),
                              hn::Set(du, 127u));
  return hn::Mul(p, hn::BitCast(df, hn::ShiftLeft<23>(biased)));
}

// reference::demap_detail::LogPositive, lane by lane.
HWY_INLINE VF LogPositive(DF df, VF x) {
  const DU du;
  const DI di;
  const VF one = hn::Set(df, 1.0f);
  const auto bits = hn::BitCast(du, x);
  VF e = hn::ConvertTo(
      df, hn::Sub(hn::BitCast(di, hn::ShiftRight<23>(bits)), hn::Set(di, 127)));
  VF f = hn::BitCast(df, hn::Or(hn::And(bits, hn::Set(du, 0x007FFFFFu)), hn::Set(du, 0x3F800000u)));
  const auto big = hn::Gt(f, hn::Set(df, 1.41421356237309505f));
  f = hn::Mul(f, hn::IfThenElse(big, hn::Set(df, 0.5f), one));
  e = hn::Add(e, hn::IfThenElse(big, one, hn::Zero(df)));
  const VF t = hn::Div(hn::Sub(f, one), hn::Add(f, one));
  const VF t2 = hn::Mul(t, t);
  VF q = hn::Set(df, 1.0f / 9.0f);
  q = hn::Add(hn::Mul(q, t2), hn::Set(df, 1.0f / 7.0f));
  q = hn::Add(hn::Mul(q, t2), hn::Set(df, 1.0f / 5.0f));
  q = hn::Add(hn::Mul(q, t2), hn::Set(df, 1.0f / 3.0f));
  q = hn::Add(hn::Mul(q, t2), one);
  return hn::Add(hn::Add(hn::Mul(e, hn::Set(df, 0.693145751953125f)),
                         hn::Mul(hn::Mul(hn::Set(df, 2.0f), t), q)),
                 hn::Mul(e, hn::Set(df, 1.428606820309417232e-6f)));
}

// reference::demap_detail::LlrsFromMetrics for a vector of items.
template <int B, bool kExact>
HWY_INLINE void LlrsFromMetrics(DF df, const VF* e, VF scale, VF* o) {
  constexpr int N = 1 << B;
  const VF inf = hn::Set(df, reference::demap_detail::kInf);
  if constexpr (kExact && B == 2) {
    // Two labels per bit value (4-PAM, the axes of 16-QAM). The oracle's
    // sum over a pair is (0 + exp((m - e_a) s)) + exp((m - e_b) s) with
    // m = min(e_a, e_b): one term is exp(+-0) = 1 exactly (ExpNonPositive
    // returns 1 for a zero argument) and the other is exp((m - max) s), and
    // float addition commutes, so 1 + exp((min - max) s) is the same float
    // with one exponential instead of two.
    const VF one = hn::Set(df, 1.0f);
    for (int k = 0; k < B; ++k) {
      // Labels with bit k = 0 and = 1 (bit k counted from the MSB).
      const int a0 = 0, b0 = k == 0 ? 1 : 2;
      const int a1 = k == 0 ? 2 : 1, b1 = 3;
      const VF m0 = MinOf(MinOf(inf, e[a0]), e[b0]);
      const VF m1 = MinOf(MinOf(inf, e[a1]), e[b1]);
      const VF s0 = hn::Add(one, ExpNonPositive(df, hn::Mul(hn::Sub(m0, hn::Max(e[a0], e[b0])), scale)));
      const VF s1 = hn::Add(one, ExpNonPositive(df, hn::Mul(hn::Sub(m1, hn::Max(e[a1], e[b1])), scale)));
      o[k] = hn::Add(hn::Mul(hn::Sub(m1, m0), scale), LogPositive(df, hn::Div(s0, s1)));
    }
    return;
  }
  for (int k = 0; k < B; ++k) {
    VF m0 = inf, m1 = inf;
    for (int l = 0; l < N; ++l) {
      if ((l >> (B - 1 - k)) & 1) {
        m1 = MinOf(m1, e[l]);
      } else {
        m0 = MinOf(m0, e[l]);
      }
    }
    VF llr = hn::Mul(hn::Sub(m1, m0), scale);
    if constexpr (kExact) {
      VF s0 = hn::Zero(df), s1 = hn::Zero(df);
      for (int l = 0; l < N; ++l) {
        if ((l >> (B - 1 - k)) & 1) {
          s1 = hn::Add(s1, ExpNonPositive(df, hn::Mul(hn::Sub(m1, e[l]), scale)));
        } else {
          s0 = hn::Add(s0, ExpNonPositive(df, hn::Mul(hn::Sub(m0, e[l]), scale)));
        }
      }
      llr = hn::Add(llr, LogPositive(df, hn::Div(s0, s1)));
    }
    o[k] = llr;
  }
}

// Stores the B outputs of each of the vector's items, item-major.
template <int B, typename T, class D>
HWY_INLINE void StoreItems(D d, const hn::Vec<D>* v, T* HWY_RESTRICT out) {
  if constexpr (B == 1) {
    hn::StoreU(v[0], d, out);
  } else if constexpr (B == 2) {
    hn::StoreInterleaved2(v[0], v[1], d, out);
  } else if constexpr (B == 3) {
    hn::StoreInterleaved3(v[0], v[1], v[2], d, out);
  } else if constexpr (B == 4) {
    hn::StoreInterleaved4(v[0], v[1], v[2], v[3], d, out);
  } else {
    constexpr std::size_t kMax = hn::MaxLanes(d);
    const std::size_t lanes = hn::Lanes(d);
    HWY_ALIGN T stage[B * kMax];
    for (int k = 0; k < B; ++k) hn::Store(v[k], d, stage + static_cast<std::size_t>(k) * lanes);
    for (std::size_t t = 0; t < lanes; ++t) {
      for (int k = 0; k < B; ++k) {
        out[t * B + static_cast<std::size_t>(k)] = stage[static_cast<std::size_t>(k) * lanes + t];
      }
    }
  }
}

// Runs body(in, out) on each full vector of the n items (kIn input floats and
// kOut outputs of type T per item), then on a zero-padded copy of the rest.
template <int kIn, int kOut, typename T, class D, class Body>
HWY_INLINE void ForEachVector(D df, const float* HWY_RESTRICT in, std::size_t n,
                              T* HWY_RESTRICT out, Body body) {
  const std::size_t lanes = hn::Lanes(df);
  std::size_t t = 0;
  for (; t + lanes <= n; t += lanes) body(in + kIn * t, out + kOut * t);
  if (t == n) return;
  constexpr std::size_t kMax = hn::MaxLanes(df);
  HWY_ALIGN float in_pad[kIn * kMax] = {};
  HWY_ALIGN T out_pad[kOut * kMax];
  const std::size_t rest = n - t;
  std::copy(in + kIn * t, in + kIn * n, in_pad);
  body(in_pad, out_pad);
  std::copy(out_pad, out_pad + kOut * rest, out + kOut * t);
}

// ----------------------------------------------------------------- soft
template <int P, bool kExact>
HWY_INLINE void PamSoft(DF df, const float* z, std::size_t n, float inv_s, float scale,
                        float* out) {
  constexpr int L = 1 << P;
  const VF two_inv_s = hn::Set(df, 2.0f * inv_s);
  const VF vscale = hn::Set(df, scale);
  ForEachVector<1, P>(df, z, n, out, [&](const float* in, float* o) HWY_ATTR {
    const VF u2 = hn::Mul(two_inv_s, hn::LoadU(df, in));
    VF e[L];
    for (int j = 0; j < L; ++j) {
      const auto c = static_cast<float>(L - 1 - 2 * j);
      e[Gray(j)] = hn::Sub(hn::Set(df, c * c), hn::Mul(hn::Set(df, c), u2));
    }
    VF llr[P];
    LlrsFromMetrics<P, kExact>(df, e, vscale, llr);
    StoreItems<P>(df, llr, o);
  });
}

HWY_INLINE void Pam4MaxLog(DF df, const float* z, std::size_t n, float s, float scale,
                           float* out) {
  const float inv_s = 1.0f / s;
  const VF ka = hn::Set(df, 8.0f * scale * inv_s);
  const VF kb = hn::Set(df, 2.0f * scale * inv_s);
  const VF kc = hn::Set(df, 4.0f * scale * inv_s);
  const VF kd = hn::Set(df, 8.0f * scale);
  const VF two_s = hn::Set(df, 2.0f * s);
  ForEachVector<1, 2>(df, z, n, out, [&](const float* in, float* o) HWY_ATTR {
    const VF v = hn::LoadU(df, in);
    const VF b0 = hn::Sub(hn::Mul(ka, v),
                          hn::Mul(kb, hn::Sub(hn::Abs(hn::Add(v, two_s)), hn::Abs(hn::Sub(v, two_s)))));
    const VF b1 = hn::Sub(hn::Mul(kc, hn::Abs(v)), kd);
    hn::StoreInterleaved2(b0, b1, df, o);
  });
}

template <int B, bool kExact>
HWY_INLINE void PskSoft(DF df, const float* y, std::size_t n, const float* xr, const float* xi,
                        float inv_n0, float* out) {
  constexpr int N = 1 << B;
  const VF scale = hn::Set(df, inv_n0);
  const VF minus2 = hn::Set(df, -2.0f);
  ForEachVector<2, B>(df, y, n, out, [&](const float* in, float* o) HWY_ATTR {
    VF yr, yi;
    hn::LoadInterleaved2(df, in, yr, yi);
    VF e[N];
    if constexpr (B <= 4) {  // (-2 Re y) Re x + (-2 Im y) Im x
      yr = hn::Mul(minus2, yr);
      yi = hn::Mul(minus2, yi);
      for (int l = 0; l < N; ++l) {
        e[l] = hn::Add(hn::Mul(yr, hn::Set(df, xr[l])), hn::Mul(yi, hn::Set(df, xi[l])));
      }
    } else {  // Re y (-2 Re x) + Im y (-2 Im x)
      for (int l = 0; l < N; ++l) {
        e[l] = hn::Add(hn::Mul(yr, hn::Set(df, -2.0f * xr[l])),
                       hn::Mul(yi, hn::Set(df, -2.0f * xi[l])));
      }
    }
    VF llr[B];
    LlrsFromMetrics<B, kExact>(df, e, scale, llr);
    StoreItems<B>(df, llr, o);
  });
}

// Runs f(std::integral_constant<int, B>) for B = `bits` in [kLo, kHi].
template <int kLo, int kHi, typename F>
HWY_INLINE void WithBits(int bits, F f) {
  if constexpr (kLo <= kHi) {
    if (bits == kLo) {
      f(std::integral_constant<int, kLo>{});
    } else {
      WithBits<kLo + 1, kHi>(bits, f);
    }
  }
}

// ----------------------------------------------------------------- hard
// The hard decisions are few integer and mask operations per item, bound by
// the vector shuffle/mask port; 256-bit vectors were measured faster than
// 512-bit ones for them (tests/bench/demap_bench), so they cap the width.
using DH = hn::CappedTag<float, 8>;

// Nearest labels of a vector of items (reference::demap_detail::HardLabel).
template <class D>
HWY_INLINE hn::Vec<hn::RebindToSigned<D>> PamLabels(D df, hn::Vec<D> u, int levels) {
  const hn::RebindToSigned<D> di;
  auto j = hn::Zero(di);
  for (int i = 0; i < levels - 1; ++i) {
    const auto below = hn::Lt(u, hn::Set(df, static_cast<float>(levels - 2 - 2 * i)));
    j = hn::Sub(j, hn::VecFromMask(di, hn::RebindMask(di, below)));  // mask lanes are -1
  }
  return hn::Xor(j, hn::ShiftRight<1>(j));
}

template <class D>
HWY_INLINE hn::Vec<hn::RebindToSigned<D>> PskLabels(D df, hn::Vec<D> yr, hn::Vec<D> yi,
                                                    const DemapKernelArgs& a) {
  const hn::RebindToSigned<D> di;
  const int order = 1 << a.bits_per_symbol;
  auto c = hn::Zero(di);
  for (int i = 0; i < order / 2; ++i) {
    const auto side = hn::Sub(hn::Mul(yi, hn::Set(df, a.boundary_cos[i])),
                              hn::Mul(yr, hn::Set(df, a.boundary_sin[i])));
    c = hn::Sub(c, hn::VecFromMask(di, hn::RebindMask(di, hn::Ge(side, hn::Zero(df)))));
  }
  const auto upper = hn::RebindMask(di, hn::Ge(yi, hn::Zero(df)));
  const auto k =
      hn::IfThenElse(upper, hn::Sub(c, hn::Set(di, 1)), hn::Sub(hn::Set(di, order - 1), c));
  return hn::Xor(k, hn::ShiftRight<1>(k));
}

// 1 where y < 0, else 0.
template <class D>
HWY_INLINE hn::Vec<hn::RebindToSigned<D>> Negative(D df, hn::Vec<D> y) {
  const hn::RebindToSigned<D> di;
  return hn::Neg(hn::VecFromMask(di, hn::RebindMask(di, hn::Lt(y, hn::Zero(df)))));
}

// Stores the B label bits of each lane's label g (MSB first) as +-1 floats
// or as 0/1 bytes (Bit is one byte; the byte path assumes little endian, as
// every Highway x86 and Arm target is). The float is built from its bits: the label bit moved to
// the sign of 1.0f, which is exactly the oracle's 1 - 2 bit.
template <int B, typename T, class D>
HWY_INLINE void StoreLabelBits(D df, hn::Vec<hn::RebindToSigned<D>> g, T* HWY_RESTRICT out) {
  const hn::RebindToSigned<D> di;
  if constexpr (std::is_same_v<T, float>) {
    hn::Vec<D> v[B];
    for (int k = 0; k < B; ++k) {
      const auto sign = hn::And(hn::ShiftLeftSame(g, 31 - (B - 1 - k)),
                                hn::Set(di, static_cast<std::int32_t>(0x80000000u)));
      v[k] = hn::BitCast(df, hn::Or(sign, hn::Set(di, 0x3F800000)));
    }
    StoreItems<B>(df, v, out);
  } else if constexpr (B <= 4) {
    // The item's B bytes packed into one 32-bit lane (bit k to byte k, little
    // endian), then stored B bytes per item.
    auto word = hn::Zero(di);
    for (int k = 0; k < B; ++k) {
      word = hn::Or(word, hn::ShiftLeftSame(hn::And(hn::ShiftRightSame(g, B - 1 - k),
                                                    hn::Set(di, 1)),
                                            8 * k));
    }
    if constexpr (B == 4) {
      hn::StoreU(word, di, reinterpret_cast<std::int32_t*>(out));
    } else if constexpr (B == 2) {
      const hn::Rebind<std::uint16_t, D> d16;
      hn::StoreU(hn::DemoteTo(d16, word), d16, reinterpret_cast<std::uint16_t*>(out));
    } else if constexpr (B == 1) {
      const hn::Rebind<std::uint8_t, D> d8;
      hn::StoreU(hn::DemoteTo(d8, word), d8, reinterpret_cast<std::uint8_t*>(out));
    } else {  // B = 3: 4-byte stores that overlap the next item, the last one 3 bytes
      constexpr std::size_t kMax = hn::MaxLanes(df);
      HWY_ALIGN std::int32_t stage[kMax];
      hn::Store(word, di, stage);
      const std::size_t last = hn::Lanes(df) - 1;
      for (std::size_t t = 0; t < last; ++t) std::memcpy(out + 3 * t, stage + t, 4);
      std::memcpy(out + 3 * last, stage + last, 3);
    }
  } else {
    const hn::Rebind<T, D> d8;
    hn::Vec<decltype(d8)> v[B];
    for (int k = 0; k < B; ++k) {
      v[k] = hn::DemoteTo(d8, hn::And(hn::ShiftRightSame(g, B - 1 - k), hn::Set(di, 1)));
    }
    StoreItems<B>(d8, v, out);
  }
}

template <typename T>
HWY_INLINE void HardKernel(const DemapKernelArgs& a, const float* y, std::size_t n, T* out) {
  const DH df;
  using V = hn::Vec<DH>;
  switch (a.path) {
    case DemapKernelPath::kBpsk:
      ForEachVector<2, 1>(df, y, n, out, [&](const float* in, T* o) HWY_ATTR {
        V yr, yi;
        hn::LoadInterleaved2(df, in, yr, yi);
        StoreLabelBits<1>(df, Negative(df, yr), o);
      });
      return;
    case DemapKernelPath::kQpsk:  // b0 from Im y, b1 from Re y
      ForEachVector<2, 2>(df, y, n, out, [&](const float* in, T* o) HWY_ATTR {
        V yr, yi;
        hn::LoadInterleaved2(df, in, yr, yi);
        const auto b0 = Negative(df, yi);
        StoreLabelBits<2>(df, hn::Add(hn::Add(b0, b0), Negative(df, yr)), o);
      });
      return;
    case DemapKernelPath::kPam: {
      const V inv_s = hn::Set(df, 1.0f / a.level_scale);
      WithBits<1, 5>(a.axis_bits, [&](auto p) HWY_ATTR {
        constexpr int kP = decltype(p)::value;
        ForEachVector<1, kP>(df, y, 2 * n, out, [&](const float* in, T* o) HWY_ATTR {
          StoreLabelBits<kP>(df, PamLabels(df, hn::Mul(inv_s, hn::LoadU(df, in)), 1 << kP), o);
        });
      });
      return;
    }
    case DemapKernelPath::kPsk:
      WithBits<3, 6>(a.bits_per_symbol, [&](auto b) HWY_ATTR {
        constexpr int kB = decltype(b)::value;
        ForEachVector<2, kB>(df, y, n, out, [&](const float* in, T* o) HWY_ATTR {
          V yr, yi;
          hn::LoadInterleaved2(df, in, yr, yi);
          StoreLabelBits<kB>(df, PskLabels(df, yr, yi, a), o);
        });
      });
      return;
  }
}

}  // namespace demap_simd
#endif  // HWY_TARGET != HWY_SCALAR

// Entry points (demap_kernels.h). The one-lane HWY_SCALAR target, if compiled,
// runs the oracle. Internal linkage: every file that includes this header
// compiles its own copy, so the linker can never substitute a copy built with
// other floating-point flags.
HWY_MAYBE_UNUSED static void DemapSoftKernel(const DemapKernelArgs& a, bool exact, const float* y,
                                      std::size_t n, float n0, float* out) {
#if HWY_TARGET == HWY_SCALAR
  reference::DemapSoft(a, exact, y, n, n0, out);
#else
  using namespace demap_simd;  // NOLINT(google-build-using-namespace)
  const DF df;
  const float inv_n0 = 1.0f / n0;
  switch (a.path) {
    case DemapKernelPath::kBpsk: {  // L = 4 Re y / N0
      const VF gain = hn::Set(df, 4.0f * inv_n0);
      ForEachVector<2, 1>(df, y, n, out, [&](const float* in, float* o) HWY_ATTR {
        VF yr, yi;
        hn::LoadInterleaved2(df, in, yr, yi);
        hn::StoreU(hn::Mul(gain, yr), df, o);
      });
      return;
    }
    case DemapKernelPath::kQpsk: {  // b0 from Im y, b1 from Re y
      const VF gain = hn::Set(df, 2.0f * std::numbers::sqrt2_v<float> * inv_n0);
      ForEachVector<2, 2>(df, y, n, out, [&](const float* in, float* o) HWY_ATTR {
        VF yr, yi;
        hn::LoadInterleaved2(df, in, yr, yi);
        hn::StoreInterleaved2(hn::Mul(gain, yi), hn::Mul(gain, yr), df, o);
      });
      return;
    }
    case DemapKernelPath::kPam: {
      const float s = a.level_scale;
      const float inv_s = 1.0f / s;
      const float scale = s * s * inv_n0;
      if (a.axis_bits == 2 && !exact) {
        Pam4MaxLog(df, y, 2 * n, s, scale, out);
      } else {
        WithBits<1, 5>(a.axis_bits, [&](auto p) HWY_ATTR {
          constexpr int kP = decltype(p)::value;
          // 2-PAM: the exact LLR is linear, max-log gives it.
          if (exact && kP > 1) {
            PamSoft<kP, true>(df, y, 2 * n, inv_s, scale, out);
          } else {
            PamSoft<kP, false>(df, y, 2 * n, inv_s, scale, out);
          }
        });
      }
      return;
    }
    case DemapKernelPath::kPsk:
      WithBits<3, 6>(a.bits_per_symbol, [&](auto b) HWY_ATTR {
        constexpr int kB = decltype(b)::value;
        if (exact) {
          PskSoft<kB, true>(df, y, n, a.point_re, a.point_im, inv_n0, out);
        } else {
          PskSoft<kB, false>(df, y, n, a.point_re, a.point_im, inv_n0, out);
        }
      });
      return;
  }
#endif
}

HWY_MAYBE_UNUSED static void DemapHardKernel(const DemapKernelArgs& a, const float* y,
                                             std::size_t n, float* signs, Bit* bits) {
#if HWY_TARGET == HWY_SCALAR
  reference::DemapHard(a, y, n, signs, bits);
#else
  if (signs != nullptr) {
    demap_simd::HardKernel(a, y, n, signs);
  } else {
    demap_simd::HardKernel(a, y, n, bits);
  }
#endif
}

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();

#endif  // include guard
