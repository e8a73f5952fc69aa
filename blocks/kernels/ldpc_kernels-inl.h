// Per-target body of the fixed-point min-sum LDPC kernel declared in
// ldpc_kernels.h. Included once per instruction-set target by
// ldpc_kernels.cc (through hwy/foreach_target.h) and the same way by the
// per-target test and the benchmark, which call
// capgap::HWY_NAMESPACE::LdpcDecodeFixedKernel directly. ldpc_reference.h is
// the oracle: the same integer operations in the same order, one frame at a
// time.
//
// Layout. B = Lanes(ScalableTag<T>) lanes (T = int8 or int16), one frame
// per lane. Every per-variable and per-edge quantity is one vector row of B
// lanes:
//   q[v B + l]  channel value, P[v B + l] posterior, c[e B + l] message,
// so the edges of a check are consecutive rows of c and the posteriors are
// read and written as whole rows: no gather, no shuffle, no per-lane branch
// inside an iteration. The workspace is aligned to 64 bytes and every row is
// a whole vector, so these are aligned loads and stores. The working set of
// a layered iteration is (n + E) B sizeof(T) bytes (516 KB for n = 2016,
// E = 6048, int8 on AVX3): it streams from L2.
//
// Check pass. Two sweeps over a row: the first forms t, |t|, min1, min2 and
// the sign parity, the second the messages and (layered) the posteriors.
// Rows of degree 2..10 are fully unrolled with t and |t| in registers (other
// degrees keep t in an L1 scratch row). Per edge that is 2 loads, 2 stores
// and 13 vector operations; M runs twice per row, not per edge, and for
// alpha = 1 - 2^-k (0.75 among them) as shifts instead of a widening
// multiply (measured: the multiply took about a third of the pass). The
// range rule of ldpc_kernels.h keeps every sum inside the lane type, so
// plain adds and subtracts are exact; nothing is clamped. The check pass is
// most of a decode (docs/performance_notes.md, "LDPC min-sum kernel").
//
// Streaming. A call takes any number of frames. Each lane holds one frame and
// counts its own iterations; after every iteration the syndrome is checked
// (early stop) and each lane whose frame stops (zero syndrome, or
// max_iterations) hands out its decisions and result at once. Idle lanes are
// refilled with the next frames once an eighth of the lanes are idle (a
// refill costs a blend over all rows of q, P and c; an eighth measured best)
// or when all are; until then they compute on, unobserved. A frame's
// arithmetic never depends on its lane, its neighbours or when it was loaded,
// so each result is the one the oracle gets for that frame alone. It
// replaced batches that wait for their slowest frame (throughput figures in
// docs/performance_notes.md, "LDPC min-sum kernel").
//
// In and out: each frame's LLRs are quantised contiguously (float lanes,
// demoted to T) into a frame-major block, which a tiled transpose (16 x 16
// bytes or 8 x 8 int16 per 128-bit tile, by rounds of in-block interleaves,
// available on every target with 128-bit vectors) turns into the
// lane-interleaved rows, only for the tiles of lanes being loaded; decisions
// go out through the same transpose when three or more lanes of a 16-lane
// tile stop together, else as one strided column per lane.

// Per-target include guard (Highway's toggle idiom).
#if defined(CAPGAP_BLOCKS_KERNELS_LDPC_KERNELS_INL_H_) == defined(HWY_TARGET_TOGGLE)
#ifdef CAPGAP_BLOCKS_KERNELS_LDPC_KERNELS_INL_H_
#undef CAPGAP_BLOCKS_KERNELS_LDPC_KERNELS_INL_H_
#else
#define CAPGAP_BLOCKS_KERNELS_LDPC_KERNELS_INL_H_
#endif

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <cstring>

#include "blocks/kernels/ldpc_kernels.h"
#include "blocks/kernels/ldpc_reference.h"
#include "hwy/highway.h"

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
namespace hn = hwy::HWY_NAMESPACE;

#if HWY_TARGET != HWY_SCALAR

namespace ldpc_detail {

template <typename T>
struct Wider;
template <>
struct Wider<std::int8_t> {
  using type = std::int16_t;
};
template <>
struct Wider<std::int16_t> {
  using type = std::int32_t;
};

// Pointers into the aligned workspace of the B lanes.
template <typename T>
struct Buffers {
  T* q;  // n rows: channel values
  T* p;  // n rows: posteriors
  T* c;  // E rows: check-to-variable messages
  T* t;  // max_row_degree rows: variable-to-check values of one row
  T* f;  // B * n: frame-major staging of the channel values, then n rows
         // of B: the staged values transposed
};

template <typename T>
HWY_INLINE Buffers<T> Carve(const LdpcGraph& g, std::size_t lanes, void* ws) {
  auto base = reinterpret_cast<std::uintptr_t>(ws);
  base = (base + 63u) & ~std::uintptr_t{63u};
  Buffers<T> b;
  const auto n = static_cast<std::size_t>(g.n);
  b.q = reinterpret_cast<T*>(base);
  b.p = b.q + n * lanes;
  b.c = b.p + n * lanes;
  b.t = b.c + static_cast<std::size_t>(g.edges) * lanes;
  b.f = b.t + static_cast<std::size_t>(g.max_row_degree) * lanes;
  return b;
}

// How M is evaluated (chosen once per call; every way gives exactly the
// formula of ldpc_kernels.h).
enum class MagnitudeRule {
  kOffset,    // min(max(x - offset_q, 0), clip)
  kIdentity,  // alpha = 1 (norm_mul = 256): min(x, clip)
  kShift,     // alpha = 1 - 2^-k (norm_mul = 256 - 2^(8-k)), see below
  kMultiply,  // any other alpha: widening multiply
};

// Constants of one call.
template <class D>
struct RowContext {
  using T = hn::TFromD<D>;
  const LdpcFixedArgs* a;
  Buffers<T> b;
  std::size_t lanes;
  MagnitudeRule rule;
  int shift_k;  // kShift: k
  hn::Vec<D> top, zero, clip, offset, bias;
};

template <class D>
HWY_INLINE RowContext<D> MakeContext(D d, const LdpcFixedArgs& a, const Buffers<hn::TFromD<D>>& b) {
  using T = hn::TFromD<D>;
  RowContext<D> x;
  x.a = &a;
  x.b = b;
  x.lanes = hn::Lanes(d);
  x.shift_k = 0;
  if (a.offset) {
    x.rule = MagnitudeRule::kOffset;
  } else if (a.norm_mul == 1 << kLdpcNormShift) {
    x.rule = MagnitudeRule::kIdentity;
  } else {
    x.rule = MagnitudeRule::kMultiply;
    for (int k = 1; k <= kLdpcNormShift; ++k) {
      if (a.norm_mul == (1 << kLdpcNormShift) - (1 << (kLdpcNormShift - k))) {
        x.rule = MagnitudeRule::kShift;
        x.shift_k = k;
      }
    }
  }
  x.top = hn::Set(d, static_cast<T>(LdpcLaneMax(a.lane)));
  x.zero = hn::Zero(d);
  x.clip = hn::Set(d, static_cast<T>(a.message_clip));
  x.offset = hn::Set(d, static_cast<T>(a.offset_q));
  x.bias = hn::Set(d, static_cast<T>(x.shift_k > 0 ? (1 << (x.shift_k - 1)) - 1 : 0));
  return x;
}

// The magnitude map M of ldpc_kernels.h on x in [0, lane maximum]; runs
// twice per row, not per edge.
//  * kShift: for alpha = 1 - 2^-k, (x (256 - 2^(8-k)) + 128) >> 8 =
//    floor(x - x 2^-k + 1/2) = x - ((x + 2^(k-1) - 1) >> k). Proof: with
//    x = q 2^k + r, 0 <= r < 2^k, both sides are x - q - [r > 2^(k-1)].
//    x + 2^(k-1) - 1 <= 127 + 127 fits the unsigned lane. alpha = 0.75 is
//    k = 2: x - ((x + 1) >> 2), four operations instead of a widening
//    multiply (which took about a third of the check pass when measured).
//  * kMultiply: widened (x norm_mul + 128 <= 32767 * 256 + 128 fits int32,
//    127 * 256 + 128 fits int16).
template <class D>
HWY_INLINE hn::Vec<D> ScaleMagnitude(D d, const RowContext<D>& x, hn::Vec<D> m) {
  using T = hn::TFromD<D>;
  using W = typename Wider<T>::type;
  switch (x.rule) {
    case MagnitudeRule::kOffset:
      return hn::Min(hn::Max(hn::Sub(m, x.offset), x.zero), x.clip);
    case MagnitudeRule::kIdentity:
      return hn::Min(m, x.clip);
    case MagnitudeRule::kShift: {
      const hn::RebindToUnsigned<D> du;
      const auto q = hn::ShiftRightSame(hn::BitCast(du, hn::Add(m, x.bias)), x.shift_k);
      return hn::Min(hn::Sub(m, hn::BitCast(d, q)), x.clip);
    }
    case MagnitudeRule::kMultiply:
      break;
  }
  const hn::Half<D> dh;
  const hn::Repartition<W, D> dw;
  const auto mul = hn::Set(dw, static_cast<W>(x.a->norm_mul));
  const auto rnd = hn::Set(dw, static_cast<W>(1 << (kLdpcNormShift - 1)));
  const auto lo = hn::ShiftRight<kLdpcNormShift>(
      hn::Add(hn::Mul(hn::PromoteTo(dw, hn::LowerHalf(dh, m)), mul), rnd));
  const auto hi = hn::ShiftRight<kLdpcNormShift>(
      hn::Add(hn::Mul(hn::PromoteTo(dw, hn::UpperHalf(dh, m)), mul), rnd));
  return hn::Min(hn::Combine(d, hn::DemoteTo(dh, hi), hn::DemoteTo(dh, lo)), x.clip);
}

// Check update of row r (edges e0 .. e0 + deg - 1). kDeg > 0: deg == kDeg and
// t, |t| stay in registers (fully unrolled); kDeg == 0: any degree, t in the
// scratch rows. kLayered: posteriors written at once.
template <int kDeg, bool kLayered, class D>
HWY_INLINE void UpdateRow(D d, const RowContext<D>& x, int e0, int deg) {
  using T = hn::TFromD<D>;
  using V = hn::Vec<D>;
  constexpr int kSlots = kDeg > 0 ? kDeg : 1;
  const std::size_t lanes = hn::Lanes(d);  // a constant on fixed-width targets
  const int* HWY_RESTRICT ev = x.a->graph.edge_variable + e0;
  T* HWY_RESTRICT c = x.b.c + static_cast<std::size_t>(e0) * lanes;
  T* HWY_RESTRICT scratch = x.b.t;
  const int count = kDeg > 0 ? kDeg : deg;
  V tr[kSlots], mr[kSlots];
  T* pv[kSlots];
  V min1 = x.top, min2 = x.top, s = x.zero;
  for (int k = 0; k < count; ++k) {
    T* row = x.b.p + static_cast<std::size_t>(ev[k]) * lanes;
    const V tk = hn::Sub(hn::Load(d, row), hn::Load(d, c + static_cast<std::size_t>(k) * lanes));
    const V mag = hn::Abs(tk);
    if (kDeg > 0) {
      tr[k] = tk;
      mr[k] = mag;
      pv[k] = row;
    } else {
      hn::Store(tk, d, scratch + static_cast<std::size_t>(k) * lanes);
    }
    min2 = hn::Max(min1, hn::Min(min2, mag));
    min1 = hn::Min(min1, mag);
    s = hn::Xor(s, tk);
  }
  const V m1 = ScaleMagnitude(d, x, min1);
  const V m2 = ScaleMagnitude(d, x, min2);
  for (int k = 0; k < count; ++k) {
    const V tk = kDeg > 0 ? tr[k] : hn::Load(d, scratch + static_cast<std::size_t>(k) * lanes);
    const V mag = kDeg > 0 ? mr[k] : hn::Abs(tk);
    const V out = hn::IfThenElse(hn::Eq(mag, min1), m2, m1);
    // Lt rather than IfNegativeThenElse: Highway 1.0.3's int8
    // IfNegativeThenElse on SSSE3 blends with and/andnot on the raw sign
    // byte, not a full mask, and gives wrong lanes (found by the per-target
    // test).
    const V cn = hn::IfThenElse(hn::Lt(hn::Xor(tk, s), x.zero), hn::Neg(out), out);
    hn::Store(cn, d, c + static_cast<std::size_t>(k) * lanes);
    if (kLayered) {
      T* row = kDeg > 0 ? pv[k] : x.b.p + static_cast<std::size_t>(ev[k]) * lanes;
      hn::Store(hn::Add(tk, cn), d, row);
    }
  }
}

// Check update of every row; rows of degree 2..10 take the unrolled
// register version. The context is copied to a local first: the stores go
// through (signed) char pointers, which may alias anything whose address is
// visible, so constants read through a reference would be reloaded after
// every store.
template <bool kLayered, class D>
HWY_NOINLINE void CheckPass(D d, const RowContext<D>& shared) {
  const RowContext<D> x = shared;
  const LdpcGraph& g = x.a->graph;
  const int m = g.m;
  const int* HWY_RESTRICT row_start = g.row_start;
  for (int r = 0; r < m; ++r) {
    const int e0 = row_start[r];
    const int deg = row_start[r + 1] - e0;
    switch (deg) {
      case 2:
        UpdateRow<2, kLayered>(d, x, e0, deg);
        break;
      case 3:
        UpdateRow<3, kLayered>(d, x, e0, deg);
        break;
      case 4:
        UpdateRow<4, kLayered>(d, x, e0, deg);
        break;
      case 5:
        UpdateRow<5, kLayered>(d, x, e0, deg);
        break;
      case 6:
        UpdateRow<6, kLayered>(d, x, e0, deg);
        break;
      case 7:
        UpdateRow<7, kLayered>(d, x, e0, deg);
        break;
      case 8:
        UpdateRow<8, kLayered>(d, x, e0, deg);
        break;
      case 9:
        UpdateRow<9, kLayered>(d, x, e0, deg);
        break;
      case 10:
        UpdateRow<10, kLayered>(d, x, e0, deg);
        break;
      default:
        UpdateRow<0, kLayered>(d, x, e0, deg);
        break;
    }
  }
}

// Flooding: P[v] = q[v] + messages of v, in column order.
template <class D>
HWY_NOINLINE void VariablePass(D d, const LdpcGraph& g, const Buffers<hn::TFromD<D>>& b) {
  const std::size_t lanes = hn::Lanes(d);
  for (int v = 0; v < g.n; ++v) {
    const std::size_t row = static_cast<std::size_t>(v) * lanes;
    auto acc = hn::Load(d, b.q + row);
    for (int j = g.col_start[v]; j < g.col_start[v + 1]; ++j) {
      acc = hn::Add(acc, hn::Load(d, b.c + static_cast<std::size_t>(g.col_edge[j]) * lanes));
    }
    hn::Store(acc, d, b.p + row);
  }
}

// Lanes whose decisions violate some check.
template <class D>
HWY_INLINE hn::Mask<D> Unsatisfied(D d, const LdpcGraph& g, const Buffers<hn::TFromD<D>>& b) {
  const std::size_t lanes = hn::Lanes(d);
  auto acc = hn::Zero(d);
  for (int r = 0; r < g.m; ++r) {
    auto x = hn::Zero(d);
    for (int e = g.row_start[r]; e < g.row_start[r + 1]; ++e) {
      x = hn::Xor(x, hn::Load(d, b.p + static_cast<std::size_t>(g.edge_variable[e]) * lanes));
    }
    acc = hn::Or(acc, x);
  }
  return hn::Lt(acc, hn::Zero(d));
}

// One round of the tile transpose on R = 16 / sizeof(T) rows: blocks of b
// vectors, in each the pairs (2k, 2k+1) interleaved in units of U.
template <typename U, class V>
HWY_INLINE void TransposeRound(const V* in, V* out, std::size_t rows, std::size_t b) {
  const hn::Full128<std::uint8_t> d8;
  const hn::Full128<U> du;
  for (std::size_t h = 0; h < rows / b; ++h) {
    for (std::size_t k = 0; k < b / 2; ++k) {
      const auto x = hn::BitCast(du, in[b * h + 2 * k]);
      const auto y = hn::BitCast(du, in[b * h + 2 * k + 1]);
      out[b * h + k] = hn::BitCast(d8, hn::InterleaveLower(du, x, y));
      out[b * h + k + b / 2] = hn::BitCast(d8, hn::InterleaveUpper(du, x, y));
    }
  }
}

// out[j * out_stride + i] = in[i * in_stride + j] for i < rows, j < cols
// (T = int8 or int16): R x R tiles, R = 16 / sizeof(T), by log2(R) rounds of
// interleaves in units of 1, 2, 4, 8 elements (after round 1 the unit u of
// vector 8 h + k, for bytes, is (rows 2k, 2k+1; column 8h + u); each round
// doubles the rows per unit and halves the columns per vector in the same
// pattern, ending with vector k = column k, rows 0 .. R-1). The rest element
// by element.
template <typename T>
HWY_INLINE void TransposeTiles(const T* HWY_RESTRICT in, std::size_t in_stride, std::size_t rows,
                               std::size_t cols, T* HWY_RESTRICT out, std::size_t out_stride) {
  constexpr std::size_t kR = 16 / sizeof(T);
  const hn::Full128<std::uint8_t> d8;
  using V = hn::Vec<decltype(d8)>;
  const std::size_t full_rows = rows - rows % kR;
  const std::size_t full_cols = cols - cols % kR;
  for (std::size_t i0 = 0; i0 < full_rows; i0 += kR) {
    for (std::size_t j0 = 0; j0 < full_cols; j0 += kR) {
      V x[kR], y[kR];
      for (std::size_t k = 0; k < kR; ++k) {
        x[k] = hn::LoadU(d8, reinterpret_cast<const std::uint8_t*>(in + (i0 + k) * in_stride + j0));
      }
      std::size_t b = kR;
      bool in_x = true;
      if (sizeof(T) == 1) {
        TransposeRound<std::uint8_t>(x, y, kR, b);
        b /= 2;
        in_x = false;
      }
      for (int unit = 2; unit <= 8; unit *= 2) {
        V* src = in_x ? x : y;
        V* dst = in_x ? y : x;
        if (unit == 2) TransposeRound<std::uint16_t>(src, dst, kR, b);
        if (unit == 4) TransposeRound<std::uint32_t>(src, dst, kR, b);
        if (unit == 8) TransposeRound<std::uint64_t>(src, dst, kR, b);
        b /= 2;
        in_x = !in_x;
      }
      const V* res = in_x ? x : y;
      for (std::size_t k = 0; k < kR; ++k) {
        hn::StoreU(res[k], d8, reinterpret_cast<std::uint8_t*>(out + (j0 + k) * out_stride + i0));
      }
    }
  }
  // Columns beyond the last whole tile (all rows), then rows beyond it.
  for (std::size_t i = 0; i < full_rows; ++i) {
    for (std::size_t j = full_cols; j < cols; ++j) out[j * out_stride + i] = in[i * in_stride + j];
  }
  for (std::size_t i = full_rows; i < rows; ++i) {
    for (std::size_t j = 0; j < cols; ++j) out[j * out_stride + i] = in[i * in_stride + j];
  }
}

// q[i] = LdpcQuantiseOne(x[i], scale, clip) for i < n, stored as T.
template <typename T>
HWY_INLINE void Quantise(const float* HWY_RESTRICT x, std::size_t n, float scale, int clip,
                         T* HWY_RESTRICT q) {
  const hn::ScalableTag<float> df;
  const hn::Rebind<std::int32_t, decltype(df)> di;
  const hn::Rebind<T, decltype(df)> dq;
  const std::size_t lanes = hn::Lanes(df);
  const auto vs = hn::Set(df, scale);
  const auto vmax = hn::Set(df, static_cast<float>(clip));
  const auto vmin = hn::Set(df, -static_cast<float>(clip));
  const auto half = hn::Set(df, 0.5f);
  std::size_t i = 0;
  for (; i + lanes <= n; i += lanes) {
    auto v = hn::Mul(hn::LoadU(df, x + i), vs);
    v = hn::Max(hn::Min(v, vmax), vmin);
    v = hn::Add(v, hn::CopySign(half, v));
    hn::StoreU(hn::DemoteTo(dq, hn::ConvertTo(di, v)), dq, q + i);
  }
  for (; i < n; ++i) q[i] = static_cast<T>(reference::LdpcQuantiseOne(x[i], scale, clip));
}

// Lanes and the frames they hold, for DecodeStream.
struct LaneState {
  static constexpr std::size_t kIdle = ~std::size_t{0};
  std::size_t frame[HWY_MAX_BYTES];  // kIdle: no frame
  int iterations[HWY_MAX_BYTES];
};

// Writes frame results and the decisions of the lanes set in `lanes_bits`
// (bit l of byte l / 8), then marks them idle. Returns how many. A lane's
// decisions are its column of the posterior rows: read with a stride when
// few lanes of a 16-lane tile retire, else the tile's decision bytes are
// transposed (n vector operations for the bit rows, then about n / 4 per
// tile) into the frame-major staging area and copied out.
template <class D>
HWY_INLINE std::size_t Retire(D d, const LdpcFixedArgs& a, const Buffers<hn::TFromD<D>>& b,
                              const std::uint8_t* lanes_bits, bool conv, LaneState& st,
                              Bit* decided, LdpcFrameResult* results) {
  using T = hn::TFromD<D>;
  constexpr std::size_t kTile = 16;  // bytes of decisions per 128-bit tile
  constexpr std::size_t kTransposeFrom = 3;
  const std::size_t lanes = hn::Lanes(d);
  const auto n = static_cast<std::size_t>(a.graph.n);
  const auto retiring = [&](std::size_t l) {
    return ((lanes_bits[l / 8] >> (l % 8)) & 1u) != 0 && st.frame[l] != LaneState::kIdle;
  };
  std::size_t per_tile[HWY_MAX_BYTES / kTile + 1] = {};
  bool any_tile = false;
  for (std::size_t l = 0; l < lanes; ++l) per_tile[l / kTile] += retiring(l) ? 1 : 0;
  for (std::size_t t = 0; t * kTile < lanes; ++t)
    any_tile = any_tile || per_tile[t] >= kTransposeFrom;
  auto* bytes = reinterpret_cast<std::int8_t*>(b.f + lanes * n);  // n rows of `lanes` bytes
  auto* frames8 = reinterpret_cast<std::int8_t*>(b.f);            // `lanes` rows of n bytes
  if (any_tile) {
    const hn::Rebind<std::int8_t, D> d8;
    const auto one = hn::Set(d, T{1});
    for (std::size_t v = 0; v < n; ++v) {
      const auto bit =
          hn::IfThenElse(hn::Lt(hn::Load(d, b.p + v * lanes), hn::Zero(d)), one, hn::Zero(d));
      if constexpr (sizeof(T) == 1) {
        hn::Store(bit, d, bytes + v * lanes);
      } else {
        hn::StoreU(hn::DemoteTo(d8, bit), d8, bytes + v * lanes);
      }
    }
    for (std::size_t t0 = 0; t0 < lanes; t0 += kTile) {
      if (per_tile[t0 / kTile] < kTransposeFrom) continue;
      const std::size_t cols = lanes - t0 < kTile ? lanes - t0 : kTile;
      TransposeTiles(bytes + t0, lanes, n, cols, frames8 + t0 * n, n);
    }
  }
  std::size_t count = 0;
  for (std::size_t l = 0; l < lanes; ++l) {
    if (!retiring(l)) continue;
    const std::size_t f = st.frame[l];
    results[f].iterations = st.iterations[l];
    results[f].converged = conv;
    Bit* HWY_RESTRICT out = decided + f * n;
    if (per_tile[l / kTile] >= kTransposeFrom) {
      std::memcpy(out, frames8 + l * n, n);
    } else {
      const T* HWY_RESTRICT col = b.p + l;
      for (std::size_t v = 0; v < n; ++v) out[v] = col[v * lanes] < 0 ? Bit{1} : Bit{0};
    }
    st.frame[l] = LaneState::kIdle;
    ++count;
  }
  return count;
}

// Loads the next frames into idle lanes (lowest lanes first) and returns a
// mask of the lanes loaded: channel values quantised into the lanes' staging
// rows, the 128-bit tiles of lanes that received a frame transposed into row
// layout, then q and P of those lanes set and their messages cleared (with
// blends, unless every lane was loaded).
template <class D>
HWY_INLINE hn::Mask<D> Load(D d, const LdpcFixedArgs& a, const Buffers<hn::TFromD<D>>& b,
                            const float* llrs, std::size_t frames, std::size_t& next,
                            LaneState& st) {
  using T = hn::TFromD<D>;
  constexpr std::size_t kTile = 16 / sizeof(T);
  const std::size_t lanes = hn::Lanes(d);
  const LdpcGraph& g = a.graph;
  const auto n = static_cast<std::size_t>(g.n);
  const auto edges = static_cast<std::size_t>(g.edges);
  HWY_ALIGN T flag[HWY_MAX_BYTES] = {};
  bool tile_used[HWY_MAX_BYTES / kTile + 1] = {};
  std::size_t loaded_count = 0;
  for (std::size_t l = 0; l < lanes && next < frames; ++l) {
    if (st.frame[l] != LaneState::kIdle) continue;
    st.frame[l] = next;
    st.iterations[l] = 0;
    Quantise(llrs + next * n, n, a.llr_scale, a.channel_clip, b.f + l * n);
    flag[l] = static_cast<T>(-1);
    tile_used[l / kTile] = true;
    ++next;
    ++loaded_count;
  }
  const auto loaded = hn::MaskFromVec(hn::Load(d, flag));
  if (loaded_count == lanes) {
    TransposeTiles(b.f, n, lanes, n, b.q, lanes);
    std::memcpy(b.p, b.q, n * lanes * sizeof(T));
    std::memset(b.c, 0, edges * lanes * sizeof(T));
    return loaded;
  }
  T* rows = b.f + lanes * n;  // n rows of `lanes`
  for (std::size_t t0 = 0; t0 < lanes; t0 += kTile) {
    if (tile_used[t0 / kTile]) TransposeTiles(b.f + t0 * n, n, kTile, n, rows + t0, lanes);
  }
  for (std::size_t v = 0; v < n; ++v) {
    const auto x = hn::Load(d, rows + v * lanes);
    hn::Store(hn::IfThenElse(loaded, x, hn::Load(d, b.q + v * lanes)), d, b.q + v * lanes);
    hn::Store(hn::IfThenElse(loaded, x, hn::Load(d, b.p + v * lanes)), d, b.p + v * lanes);
  }
  const auto zero = hn::Zero(d);
  for (std::size_t e = 0; e < edges; ++e) {
    hn::Store(hn::IfThenElse(loaded, zero, hn::Load(d, b.c + e * lanes)), d, b.c + e * lanes);
  }
  return loaded;
}

// Decodes all `frames` frames as a stream through the lanes: a lane whose
// frame stops (zero syndrome with early stop, or max_iterations) hands its
// results out at once and takes the next frame, so no lane waits for the
// slowest frame. Refills wait until an eighth of the lanes are idle
// (or all are), because each costs a pass over the message rows; which lane
// a frame lands in and when never changes its result.
template <typename T>
HWY_INLINE void DecodeStream(const LdpcFixedArgs& a, const float* llrs, std::size_t frames,
                             Bit* decided, LdpcFrameResult* results, void* workspace) {
  using D = hn::ScalableTag<T>;
  const D d;
  using M = hn::Mask<D>;
  const std::size_t lanes = hn::Lanes(d);
  const LdpcGraph& g = a.graph;
  const auto n = static_cast<std::size_t>(g.n);
  const Buffers<T> b = Carve<T>(g, lanes, workspace);
  const RowContext<D> ctx = MakeContext(d, a, b);

  // Defined contents everywhere (idle lanes then hold the all-zero
  // codeword), so no lane ever computes on uninitialised memory.
  std::fill(b.f, b.f + lanes * n, static_cast<T>(a.channel_clip));
  TransposeTiles(b.f, n, lanes, n, b.q, lanes);
  std::memcpy(b.p, b.q, n * lanes * sizeof(T));
  std::memset(b.c, 0, static_cast<std::size_t>(g.edges) * lanes * sizeof(T));

  LaneState st;
  for (std::size_t l = 0; l < lanes; ++l) st.frame[l] = LaneState::kIdle;
  HWY_ALIGN std::uint8_t bits[(HWY_MAX_BYTES + 7) / 8] = {};
  HWY_ALIGN T flag[HWY_MAX_BYTES] = {};
  std::size_t next = 0, busy = 0;
  const std::size_t refill_at = lanes >= 8 ? lanes / 8 : 1;
  // Fills idle lanes; with early stop, frames whose channel word is a
  // codeword stop at iteration 0 and their lanes are filled again.
  const auto fill = [&] {
    while (next < frames && busy < lanes) {
      const M loaded = Load(d, a, b, llrs, frames, next, st);
      busy += hn::CountTrue(d, loaded);
      if (!a.early_stop) break;
      hn::StoreMaskBits(d, hn::AndNot(Unsatisfied(d, g, b), loaded), bits);
      busy -= Retire(d, a, b, bits, true, st, decided, results);
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
      const bool running = st.frame[l] != LaneState::kIdle;
      st.iterations[l] += running ? 1 : 0;
      const bool maxed = running && st.iterations[l] >= a.max_iterations;
      flag[l] = maxed ? static_cast<T>(-1) : T{0};
      any_maxed = any_maxed || maxed;
    }
    const M maxed = hn::MaskFromVec(hn::Load(d, flag));
    if (a.early_stop) {
      const M unsat = Unsatisfied(d, g, b);
      hn::StoreMaskBits(d, hn::Not(unsat), bits);
      busy -= Retire(d, a, b, bits, true, st, decided, results);
      if (any_maxed) {
        hn::StoreMaskBits(d, maxed, bits);
        busy -= Retire(d, a, b, bits, false, st, decided, results);
      }
    } else if (any_maxed) {
      const M unsat = Unsatisfied(d, g, b);
      hn::StoreMaskBits(d, hn::AndNot(unsat, maxed), bits);
      busy -= Retire(d, a, b, bits, true, st, decided, results);
      hn::StoreMaskBits(d, hn::And(unsat, maxed), bits);
      busy -= Retire(d, a, b, bits, false, st, decided, results);
    }
    if (next < frames && (lanes - busy >= refill_at || busy == 0)) fill();
  }
}

}  // namespace ldpc_detail

HWY_INLINE std::size_t LdpcFixedKernelLanes(LdpcLane lane) {
  return lane == LdpcLane::kInt8 ? hn::Lanes(hn::ScalableTag<std::int8_t>())
                                 : hn::Lanes(hn::ScalableTag<std::int16_t>());
}

// See LdpcDecodeFixed (ldpc_kernels.h): any number of frames, workspace of
// LdpcFixedWorkspaceBytes(args, LdpcFixedKernelLanes(args.lane)) bytes.
// Returns false (doing nothing) if this target does not run the kernel.
HWY_INLINE bool LdpcDecodeFixedKernel(const LdpcFixedArgs& a, const float* llrs, std::size_t frames,
                                      Bit* decided, LdpcFrameResult* results, void* workspace) {
  if (a.lane == LdpcLane::kInt8) {
    ldpc_detail::DecodeStream<std::int8_t>(a, llrs, frames, decided, results, workspace);
  } else {
    ldpc_detail::DecodeStream<std::int16_t>(a, llrs, frames, decided, results, workspace);
  }
  return true;
}

#else  // HWY_TARGET == HWY_SCALAR

HWY_INLINE std::size_t LdpcFixedKernelLanes(LdpcLane) { return 0; }
HWY_INLINE bool LdpcDecodeFixedKernel(const LdpcFixedArgs&, const float*, std::size_t, Bit*,
                                      LdpcFrameResult*, void*) {
  return false;
}

#endif  // HWY_TARGET != HWY_SCALAR

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#endif  // include guard
