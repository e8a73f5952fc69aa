// Per-target body of the float LDPC kernel declared in ldpc_float_kernels.h
// (normalised / offset min-sum and float32 sum-product, one frame per float
// lane). Included once per instruction-set target by ldpc_float_kernels.cc
// (through hwy/foreach_target.h) and the same way by the per-target test and
// the benchmark, which call capgap::HWY_NAMESPACE::LdpcDecodeFloatLanesKernel
// directly. The oracles (ldpc_reference.h for min-sum, ldpc_spa_reference.h
// for sum-product) perform the same float operations in the same order per
// lane, fused multiply-adds where the oracle writes std::fma (sum-product
// only, on targets with a native one); including files are compiled with
// -ffp-contract=off.
//
// Layout: rows of B = Lanes(ScalableTag<float>) floats, L[n], P[n], c[E], then
// scratch rows for one check (t, e, F_a, F_b: 4 max_row_degree rows), all in
// a 64-byte aligned workspace. A check's edges are consecutive rows of c and
// its posteriors whole rows of P, so every access is an aligned vector load
// or store. Rows of degree 3..8 keep their per-edge values (t, and for
// sum-product e and the prefix pairs) in registers, fully unrolled; other
// degrees keep them in the scratch rows (L1). The unrolling gained about
// 10 %: the pass is bound by vector arithmetic, not by loads and stores
// (docs/performance_notes.md, "LDPC float lane kernel").
//
// Streaming: after every iteration the lanes whose frames stop hand out
// their decisions and take the next frames at once, all of them in one pass
// over the rows (row by row, so each row's cache line is touched once for
// every lane that changes; lane by lane, a column at a time, took a fifth of
// a 10-iteration decode in ldpc_bench).

// Per-target include guard (Highway's toggle idiom).
#if defined(CAPGAP_BLOCKS_KERNELS_LDPC_FLOAT_KERNELS_INL_H_) == defined(HWY_TARGET_TOGGLE)
#ifdef CAPGAP_BLOCKS_KERNELS_LDPC_FLOAT_KERNELS_INL_H_
#undef CAPGAP_BLOCKS_KERNELS_LDPC_FLOAT_KERNELS_INL_H_
#else
#define CAPGAP_BLOCKS_KERNELS_LDPC_FLOAT_KERNELS_INL_H_
#endif

#include <cstddef>
#include <cstdint>
#include <cstring>

#include "blocks/kernels/ldpc_float_kernels.h"
#include "blocks/kernels/ldpc_reference.h"
#include "blocks/kernels/ldpc_spa_reference.h"
#include "hwy/highway.h"

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
namespace hn = hwy::HWY_NAMESPACE;

#if HWY_TARGET != HWY_SCALAR

namespace ldpc_float_detail {

// Pointers into the aligned workspace of the B lanes.
struct Buffers {
  float* l;  // n rows: channel values (bits for sum-product)
  float* p;  // n rows: posteriors
  float* c;  // E rows: check-to-variable messages
  float* t;  // max_row_degree rows each: t, e, F_a, F_b of one check
  float* e;
  float* fa;
  float* fb;
};

inline Buffers Carve(const LdpcGraph& g, std::size_t lanes, void* ws) {
  auto base = reinterpret_cast<std::uintptr_t>(ws);
  base = (base + 63u) & ~std::uintptr_t{63u};
  const auto n = static_cast<std::size_t>(g.n);
  const auto dd = static_cast<std::size_t>(g.max_row_degree) * lanes;
  Buffers b;
  b.l = reinterpret_cast<float*>(base);
  b.p = b.l + n * lanes;
  b.c = b.p + n * lanes;
  b.t = b.c + static_cast<std::size_t>(g.edges) * lanes;
  b.e = b.t + dd;
  b.fa = b.e + dd;
  b.fb = b.fa + dd;
  return b;
}

// LdpcSpaExp2 of ldpc_spa_reference.h, lane by lane, the same operations.
template <class D>
HWY_INLINE hn::Vec<D> Exp2(D d, hn::Vec<D> y) {
  const hn::RebindToUnsigned<D> du;
  const auto magic = hn::Set(d, kLdpcSpaRoundMagic);
  const auto r = hn::Add(y, magic);
  const auto n = hn::Sub(r, magic);
  const auto f = hn::Sub(y, n);
  auto q = hn::Set(d, kLdpcSpaExp2C3);
  q = hn::MulAdd(q, f, hn::Set(d, kLdpcSpaExp2C2));
  q = hn::MulAdd(q, f, hn::Set(d, kLdpcSpaExp2C1));
  q = hn::MulAdd(q, f, hn::Set(d, kLdpcSpaExp2C0));
  const auto p = hn::MulAdd(q, f, hn::Set(d, 1.0f));
  const auto shift = hn::ShiftLeft<23>(hn::BitCast(du, r));
  return hn::BitCast(d, hn::Add(hn::BitCast(du, p), shift));
}

// LdpcSpaLog2 of ldpc_spa_reference.h (r >= 1 finite), the same operations.
template <class D>
HWY_INLINE hn::Vec<D> Log2(D d, hn::Vec<D> r) {
  const hn::RebindToUnsigned<D> du;
  const hn::RebindToSigned<D> di;
  const auto u = hn::BitCast(du, r);
  const auto k = hn::ShiftRight<23>(hn::Sub(u, hn::Set(du, kLdpcSpaLog2Split)));
  const auto m = hn::BitCast(d, hn::Sub(u, hn::ShiftLeft<23>(k)));
  const auto x = hn::Sub(m, hn::Set(d, 1.0f));
  auto q = hn::Set(d, kLdpcSpaLog2D5);
  q = hn::MulAdd(q, x, hn::Set(d, kLdpcSpaLog2D4));
  q = hn::MulAdd(q, x, hn::Set(d, kLdpcSpaLog2D3));
  q = hn::MulAdd(q, x, hn::Set(d, kLdpcSpaLog2D2));
  q = hn::MulAdd(q, x, hn::Set(d, kLdpcSpaLog2D1));
  q = hn::MulAdd(q, x, hn::Set(d, kLdpcSpaLog2D0));
  return hn::MulAdd(x, q, hn::ConvertTo(d, hn::BitCast(di, k)));
}

// Constants of one call. Copied to a local in the pass (the stores go
// through float pointers that may alias the context).
template <class D>
struct Context {
  const LdpcFloatKernelArgs* a;
  Buffers b;
  hn::Vec<D> sign, cap, alpha, beta, zero, one, neg_clip, clip;
};

template <class D>
HWY_INLINE Context<D> MakeContext(D d, const LdpcFloatKernelArgs& a, const Buffers& b) {
  const hn::RebindToUnsigned<D> du;
  Context<D> x;
  x.a = &a;
  x.b = b;
  x.sign = hn::BitCast(d, hn::Set(du, kLdpcSpaSignBit));
  x.cap = hn::Set(d, kLdpcFloatMinSumCap);
  x.alpha = hn::Set(d, a.normalization);
  x.beta = hn::Set(d, a.offset);
  x.zero = hn::Zero(d);
  x.one = hn::Set(d, 1.0f);
  x.neg_clip = hn::Set(d, -kLdpcSpaClip);
  x.clip = hn::Set(d, kLdpcSpaClip);
  return x;
}

// Per-edge values of one check: kDeg > 0 holds them in registers (the row
// has exactly kDeg edges and every loop over them unrolls); kDeg == 0 in the
// scratch row `base` (any degree).
template <int kDeg, class D>
struct EdgeValues {
  using V = hn::Vec<D>;
  V v[kDeg];
  EdgeValues(float*, std::size_t) {}
  HWY_INLINE V Get(D, int k) const { return v[k]; }
  HWY_INLINE void Put(D, int k, V x) { v[k] = x; }
};
template <class D>
struct EdgeValues<0, D> {
  using V = hn::Vec<D>;
  float* HWY_RESTRICT base;
  std::size_t lanes;
  EdgeValues(float* b, std::size_t l) : base(b), lanes(l) {}
  HWY_INLINE V Get(D d, int k) const {
    return hn::Load(d, base + static_cast<std::size_t>(k) * lanes);
  }
  HWY_INLINE void Put(D d, int k, V x) {
    hn::Store(x, d, base + static_cast<std::size_t>(k) * lanes);
  }
};

// Min-sum check update of a row (LdpcFloatRow of ldpc_reference.h):
// min2 = max(min1, min(min2, |t|)), min1 = min(min1, |t|) from the cap; the
// sign of every message from the XOR of the sign bits.
template <int kDeg, bool kLayered, bool kOffset, class D>
HWY_INLINE void MinSumRow(D d, const Context<D>& x, int e0, int deg) {
  using V = hn::Vec<D>;
  const std::size_t lanes = hn::Lanes(d);
  const int count = kDeg > 0 ? kDeg : deg;
  const int* HWY_RESTRICT ev = x.a->graph.edge_variable + e0;
  float* HWY_RESTRICT c = x.b.c + static_cast<std::size_t>(e0) * lanes;
  EdgeValues<kDeg, D> t(x.b.t, lanes);
  V min1 = x.cap, min2 = x.cap, s = x.zero;
  for (int k = 0; k < count; ++k) {
    const std::size_t o = static_cast<std::size_t>(k) * lanes;
    const V tk =
        hn::Sub(hn::Load(d, x.b.p + static_cast<std::size_t>(ev[k]) * lanes), hn::Load(d, c + o));
    t.Put(d, k, tk);
    const V mag = hn::Abs(tk);
    min2 = hn::Max(min1, hn::Min(min2, mag));
    min1 = hn::Min(min1, mag);
    s = hn::Xor(s, tk);
  }
  V m1, m2;
  if (kOffset) {
    m1 = hn::Max(hn::Sub(min1, x.beta), x.zero);
    m2 = hn::Max(hn::Sub(min2, x.beta), x.zero);
  } else {
    m1 = hn::Mul(x.alpha, min1);
    m2 = hn::Mul(x.alpha, min2);
  }
  for (int k = 0; k < count; ++k) {
    const std::size_t o = static_cast<std::size_t>(k) * lanes;
    const V tk = t.Get(d, k);
    const V mag = hn::IfThenElse(hn::Eq(hn::Abs(tk), min1), m2, m1);
    const V cn = hn::Or(mag, hn::And(hn::Xor(tk, s), x.sign));
    hn::Store(cn, d, c + o);
    if (kLayered) hn::Store(hn::Add(tk, cn), d, x.b.p + static_cast<std::size_t>(ev[k]) * lanes);
  }
}

// Float32 sum-product check update of a row (LdpcSpaRow of
// ldpc_spa_reference.h). The suffix pairs run backwards alongside the
// outputs, so only t, e and the prefix pairs are kept per edge.
template <int kDeg, bool kLayered, class D>
HWY_INLINE void SpaRow(D d, const Context<D>& x, int e0, int deg) {
  using V = hn::Vec<D>;
  const std::size_t lanes = hn::Lanes(d);
  const int count = kDeg > 0 ? kDeg : deg;
  const int* HWY_RESTRICT ev = x.a->graph.edge_variable + e0;
  float* HWY_RESTRICT c = x.b.c + static_cast<std::size_t>(e0) * lanes;
  const auto row = [lanes](int k) { return static_cast<std::size_t>(k) * lanes; };
  EdgeValues<kDeg, D> t(x.b.t, lanes), e(x.b.e, lanes), fa(x.b.fa, lanes), fb(x.b.fb, lanes);
  V s = x.zero;
  for (int k = 0; k < count; ++k) {
    const V tk = hn::Sub(hn::Load(d, x.b.p + row(ev[k])), hn::Load(d, c + row(k)));
    t.Put(d, k, tk);
    s = hn::Xor(s, tk);
    e.Put(d, k, Exp2(d, hn::Max(hn::Or(tk, x.sign), x.neg_clip)));
  }
  const auto emit = [&](int k, V big, V small) {
    const V m = Log2(d, hn::Max(hn::Div(big, small), x.one));
    const V tk = t.Get(d, k);
    const V cn = hn::Or(m, hn::And(hn::Xor(tk, s), x.sign));
    hn::Store(cn, d, c + row(k));
    if (kLayered) hn::Store(hn::Add(tk, cn), d, x.b.p + row(ev[k]));
  };
  if (count == 1) {
    const V tk = t.Get(d, 0);
    const V cn = hn::Or(x.clip, hn::And(hn::Xor(tk, s), x.sign));
    hn::Store(cn, d, c);
    if (kLayered) hn::Store(hn::Add(tk, cn), d, x.b.p + row(ev[0]));
    return;
  }
  V a = x.one, b = e.Get(d, 0);
  fa.Put(d, 1, a);
  fb.Put(d, 1, b);
  for (int k = 1; k + 1 < count; ++k) {
    const V ek = e.Get(d, k);
    const V na = hn::MulAdd(b, ek, a);
    const V nb = hn::MulAdd(a, ek, b);
    a = na;
    b = nb;
    fa.Put(d, k + 1, a);
    fb.Put(d, k + 1, b);
  }
  emit(count - 1, a, b);
  V ga = x.one, gb = e.Get(d, count - 1);
  for (int k = count - 2; k >= 1; --k) {
    const V fak = fa.Get(d, k);
    const V fbk = fb.Get(d, k);
    emit(k, hn::MulAdd(fak, ga, hn::Mul(fbk, gb)), hn::MulAdd(fak, gb, hn::Mul(fbk, ga)));
    const V ek = e.Get(d, k);
    const V na = hn::MulAdd(gb, ek, ga);
    const V nb = hn::MulAdd(ga, ek, gb);
    ga = na;
    gb = nb;
  }
  emit(0, ga, gb);
}

template <int kDeg, bool kLayered, class D>
HWY_INLINE void UpdateRow(D d, const Context<D>& x, LdpcFloatRule rule, int e0, int deg) {
  switch (rule) {
    case LdpcFloatRule::kMinSumNormalized:
      MinSumRow<kDeg, kLayered, false>(d, x, e0, deg);
      break;
    case LdpcFloatRule::kMinSumOffset:
      MinSumRow<kDeg, kLayered, true>(d, x, e0, deg);
      break;
    case LdpcFloatRule::kSumProduct32:
      SpaRow<kDeg, kLayered>(d, x, e0, deg);
      break;
  }
}

// Check update of every row; rows of degree 3..8 (the (3,6) codes, the
// rate-1/2 QC codes) take the unrolled register version.
template <bool kLayered, class D>
HWY_NOINLINE void CheckPass(D d, const Context<D>& shared) {
  const Context<D> x = shared;
  const LdpcGraph& g = x.a->graph;
  const int* HWY_RESTRICT row_start = g.row_start;
  const LdpcFloatRule rule = x.a->rule;
  for (int r = 0; r < g.m; ++r) {
    const int e0 = row_start[r];
    const int deg = row_start[r + 1] - e0;
    switch (deg) {
      case 3:
        UpdateRow<3, kLayered>(d, x, rule, e0, deg);
        break;
      case 4:
        UpdateRow<4, kLayered>(d, x, rule, e0, deg);
        break;
      case 5:
        UpdateRow<5, kLayered>(d, x, rule, e0, deg);
        break;
      case 6:
        UpdateRow<6, kLayered>(d, x, rule, e0, deg);
        break;
      case 7:
        UpdateRow<7, kLayered>(d, x, rule, e0, deg);
        break;
      case 8:
        UpdateRow<8, kLayered>(d, x, rule, e0, deg);
        break;
      default:
        UpdateRow<0, kLayered>(d, x, rule, e0, deg);
        break;
    }
  }
}

// Flooding: P[v] = L[v] + messages of v, in column order.
template <class D>
HWY_NOINLINE void VariablePass(D d, const LdpcGraph& g, const Buffers& b) {
  const std::size_t lanes = hn::Lanes(d);
  for (int v = 0; v < g.n; ++v) {
    const std::size_t row = static_cast<std::size_t>(v) * lanes;
    auto acc = hn::Load(d, b.l + row);
    for (int j = g.col_start[v]; j < g.col_start[v + 1]; ++j) {
      acc = hn::Add(acc, hn::Load(d, b.c + static_cast<std::size_t>(g.col_edge[j]) * lanes));
    }
    hn::Store(acc, d, b.p + row);
  }
}

// Lanes whose decisions (P < 0) violate some check.
template <class D>
HWY_INLINE hn::Mask<D> Unsatisfied(D d, const LdpcGraph& g, const Buffers& b) {
  const hn::RebindToUnsigned<D> du;
  const std::size_t lanes = hn::Lanes(d);
  const auto zero = hn::Zero(d);
  auto acc = hn::Zero(du);
  for (int r = 0; r < g.m; ++r) {
    auto x = hn::Zero(du);
    for (int e = g.row_start[r]; e < g.row_start[r + 1]; ++e) {
      const auto pv = hn::Load(d, b.p + static_cast<std::size_t>(g.edge_variable[e]) * lanes);
      x = hn::Xor(x, hn::BitCast(du, hn::VecFromMask(d, hn::Lt(pv, zero))));
    }
    acc = hn::Or(acc, x);
  }
  return hn::RebindMask(d, hn::Ne(acc, hn::Zero(du)));
}

struct LaneState {
  static constexpr std::size_t kIdle = ~std::size_t{0};
  std::size_t frame[HWY_MAX_BYTES / 4];
  int iterations[HWY_MAX_BYTES / 4];
};

// The lanes in `list` (count of them) take frames: L and P of those lanes
// set (scaled to bits for sum-product, as the oracle does), their messages
// cleared. Row by row, so each row's cache line is written once for all
// lanes; when every lane is loaded the messages are cleared with memset,
// else blended with a mask of the loaded lanes.
template <class D>
HWY_INLINE void LoadLanes(D d, const LdpcFloatKernelArgs& a, const Buffers& b, const float* llrs,
                          const std::size_t* list, std::size_t count, const LaneState& st) {
  const std::size_t lanes = hn::Lanes(d);
  const auto n = static_cast<std::size_t>(a.graph.n);
  const auto edges = static_cast<std::size_t>(a.graph.edges);
  const bool bits = a.rule == LdpcFloatRule::kSumProduct32;
  const float* src[HWY_MAX_BYTES / 4];
  for (std::size_t i = 0; i < count; ++i) src[i] = llrs + st.frame[list[i]] * n;
  for (std::size_t v = 0; v < n; ++v) {
    float* HWY_RESTRICT lrow = b.l + v * lanes;
    float* HWY_RESTRICT prow = b.p + v * lanes;
    for (std::size_t i = 0; i < count; ++i) {
      const float x = bits ? src[i][v] * kLdpcSpaLog2e : src[i][v];
      lrow[list[i]] = x;
      prow[list[i]] = x;
    }
  }
  if (count == lanes) {
    std::memset(b.c, 0, edges * lanes * sizeof(float));
    return;
  }
  const hn::RebindToSigned<D> di;
  HWY_ALIGN std::int32_t flag[HWY_MAX_BYTES / 4] = {};
  for (std::size_t i = 0; i < count; ++i) flag[list[i]] = -1;
  const auto loaded = hn::RebindMask(d, hn::Lt(hn::Load(di, flag), hn::Zero(di)));
  const auto zero = hn::Zero(d);
  for (std::size_t e = 0; e < edges; ++e) {
    hn::Store(hn::IfThenElse(loaded, zero, hn::Load(d, b.c + e * lanes)), d, b.c + e * lanes);
  }
}

// The lanes in `list` are done: decisions out (row by row), results
// written, lanes idle.
template <class D>
HWY_INLINE void RetireLanes(D d, const LdpcFloatKernelArgs& a, const Buffers& b,
                            const std::size_t* list, const bool* converged, std::size_t count,
                            LaneState& st, Bit* decided, LdpcFrameResult* results) {
  if (count == 0) return;
  const std::size_t lanes = hn::Lanes(d);
  const auto n = static_cast<std::size_t>(a.graph.n);
  Bit* dst[HWY_MAX_BYTES / 4];
  for (std::size_t i = 0; i < count; ++i) {
    const std::size_t l = list[i];
    const std::size_t f = st.frame[l];
    results[f].iterations = st.iterations[l];
    results[f].converged = converged[i];
    dst[i] = decided + f * n;
    st.frame[l] = LaneState::kIdle;
  }
  for (std::size_t v = 0; v < n; ++v) {
    const float* HWY_RESTRICT prow = b.p + v * lanes;
    for (std::size_t i = 0; i < count; ++i) dst[i][v] = prow[list[i]] < 0.0f ? Bit{1} : Bit{0};
  }
}

// Decodes all `frames` frames as a stream through the lanes.
template <class D>
HWY_INLINE void DecodeStream(D d, const LdpcFloatKernelArgs& a, const float* llrs,
                             std::size_t frames, Bit* decided, LdpcFrameResult* results,
                             void* workspace) {
  const std::size_t lanes = hn::Lanes(d);
  const LdpcGraph& g = a.graph;
  const auto n = static_cast<std::size_t>(g.n);
  const Buffers b = Carve(g, lanes, workspace);
  const Context<D> ctx = MakeContext(d, a, b);
  // Defined contents everywhere (idle lanes hold the all-zero codeword with
  // LLR 1), so no lane ever computes on uninitialised memory.
  for (std::size_t i = 0; i < n * lanes; ++i) b.l[i] = b.p[i] = 1.0f;
  std::memset(b.c, 0, static_cast<std::size_t>(g.edges) * lanes * sizeof(float));

  LaneState st;
  for (std::size_t l = 0; l < lanes; ++l) {
    st.frame[l] = LaneState::kIdle;
    st.iterations[l] = 0;
  }
  HWY_ALIGN std::uint8_t bits[(HWY_MAX_BYTES / 4 + 7) / 8] = {};
  const auto bit = [&](std::size_t l) { return ((bits[l / 8] >> (l % 8)) & 1u) != 0; };
  std::size_t list[HWY_MAX_BYTES / 4];
  bool conv[HWY_MAX_BYTES / 4];
  std::size_t next = 0, busy = 0;
  // Fills idle lanes; with early stop, frames whose channel word is a
  // codeword stop at iteration 0 and their lanes are filled again.
  const auto fill = [&] {
    while (next < frames && busy < lanes) {
      std::size_t count = 0;
      for (std::size_t l = 0; l < lanes && next < frames; ++l) {
        if (st.frame[l] != LaneState::kIdle) continue;
        st.frame[l] = next++;
        st.iterations[l] = 0;
        list[count++] = l;
      }
      LoadLanes(d, a, b, llrs, list, count, st);
      busy += count;
      if (!a.early_stop) break;
      hn::StoreMaskBits(d, Unsatisfied(d, g, b), bits);
      std::size_t done = 0;
      for (std::size_t i = 0; i < count; ++i) {
        if (!bit(list[i])) {
          list[done] = list[i];
          conv[done++] = true;
        }
      }
      RetireLanes(d, a, b, list, conv, done, st, decided, results);
      busy -= done;
    }
  };
  fill();
  while (busy > 0) {
    if (a.layered) {
      CheckPass<true>(d, ctx);
    } else {
      CheckPass<false>(d, ctx);
      VariablePass(d, g, b);
    }
    bool any_maxed = false;
    for (std::size_t l = 0; l < lanes; ++l) {
      if (st.frame[l] == LaneState::kIdle) continue;
      ++st.iterations[l];
      any_maxed = any_maxed || st.iterations[l] >= a.max_iterations;
    }
    if (a.early_stop || any_maxed) {
      hn::StoreMaskBits(d, Unsatisfied(d, g, b), bits);
      std::size_t done = 0;
      for (std::size_t l = 0; l < lanes; ++l) {
        if (st.frame[l] == LaneState::kIdle) continue;
        const bool satisfied = !bit(l);
        const bool maxed = st.iterations[l] >= a.max_iterations;
        if ((a.early_stop && satisfied) || maxed) {
          list[done] = l;
          conv[done++] = satisfied;
        }
      }
      RetireLanes(d, a, b, list, conv, done, st, decided, results);
      busy -= done;
    }
    fill();
  }
}

}  // namespace ldpc_float_detail

// Lanes of the kernel for `rule` on this target; 0 when the oracle runs
// instead (float32 sum-product needs a native fused multiply-add, see
// ldpc_spa_reference.h).
HWY_INLINE std::size_t LdpcFloatKernelLanes(LdpcFloatRule rule) {
  if (rule == LdpcFloatRule::kSumProduct32 && !HWY_NATIVE_FMA) return 0;
  return hn::Lanes(hn::ScalableTag<float>());
}

// See LdpcDecodeFloatLanes (ldpc_float_kernels.h): any number of frames,
// workspace of LdpcFloatWorkspaceBytes(args, LdpcFloatKernelLanes(rule))
// bytes. Returns false (doing nothing) if this target does not run the
// kernel for the rule.
HWY_INLINE bool LdpcDecodeFloatLanesKernel(const LdpcFloatKernelArgs& a, const float* llrs,
                                           std::size_t frames, Bit* decided,
                                           LdpcFrameResult* results, void* workspace) {
  if (LdpcFloatKernelLanes(a.rule) == 0) return false;
  ldpc_float_detail::DecodeStream(hn::ScalableTag<float>(), a, llrs, frames, decided, results,
                                  workspace);
  return true;
}

#else  // HWY_TARGET == HWY_SCALAR

HWY_INLINE std::size_t LdpcFloatKernelLanes(LdpcFloatRule) { return 0; }
HWY_INLINE bool LdpcDecodeFloatLanesKernel(const LdpcFloatKernelArgs&, const float*, std::size_t,
                                           Bit*, LdpcFrameResult*, void*) {
  return false;
}

#endif  // HWY_TARGET != HWY_SCALAR

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#endif  // include guard
