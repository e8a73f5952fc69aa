// SC and SCL decoders: the same recursion over the code tree (left child
// f, right child g, partial sums combined on the way up); SCL keeps one set
// of level arrays per path with lazy copying.
#include "blocks/fec/polar_decoder.h"

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstring>
#include <limits>
#include <string>

#include "blocks/fec/polar_encoder.h"

namespace capgap {
namespace {

// min(|a|, |b|) with the sign bit of a XOR b (the form the SIMD kernel
// computes too). It differs from "negate when exactly one is < 0" only in
// the sign of a zero result (a or b is +-0), which no decision reads: L < 0
// is false for both zeros, |.| and == 0 ignore the sign, and a signed zero
// added to a nonzero value leaves it unchanged.
inline float F(float a, float b) {
  const float m = std::min(std::abs(a), std::abs(b));
  const std::uint32_t sign =
      (std::bit_cast<std::uint32_t>(a) ^ std::bit_cast<std::uint32_t>(b)) & 0x80000000u;
  return std::bit_cast<float>(std::bit_cast<std::uint32_t>(m) | sign);
}
// b + (1 - 2u) a with the sign of a flipped by u (branchless; b + (-a) is
// b - a exactly in IEEE arithmetic, so the result is the same bit for bit).
inline float G(float a, float b, Bit u) {
  return b + std::bit_cast<float>(std::bit_cast<std::uint32_t>(a) ^
                                  (static_cast<std::uint32_t>(u) << 31));
}
inline Bit HardDecision(float l) { return l < 0 ? Bit{1} : Bit{0}; }

std::size_t Sz(int x) { return static_cast<std::size_t>(x); }

}  // namespace

// ---------------------------------------------------------------- SC

PolarScDecoder::PolarScDecoder(const PolarCode& code, bool fast_nodes)
    : m_(code.m), frozen_(code.frozen), kind_(Sz(2) << code.m, kPlain) {
  if (!fast_nodes) return;
  const int n = 1 << m_;
  for (int s = 1; s <= m_; ++s) {
    const int size = 1 << s;
    for (int leaf = 0; leaf < n; leaf += size) {
      int frozen = 0;
      for (int i = leaf; i < leaf + size; ++i) frozen += frozen_[Sz(i)];
      NodeKind k = kPlain;
      if (frozen == size) {
        k = kRate0;
      } else if (frozen == 0) {
        k = kRate1;
      } else if (frozen == size - 1 && !frozen_[Sz(leaf + size - 1)]) {
        k = kRepetition;
      } else if (frozen == 1 && frozen_[Sz(leaf)]) {
        k = kSpc;
      }
      kind_[(Sz(1) << (m_ - s)) + Sz(leaf >> s)] = k;
    }
  }
}

int PolarScDecoder::spc_nodes() const {
  int count = 0;
  for (std::size_t i = 2; i < kind_.size(); ++i) {
    count += kind_[i] == kSpc && kind_[i / 2] != kSpc;
  }
  return count;
}

PolarScDecoder::Workspace PolarScDecoder::MakeWorkspace() const {
  Workspace ws;
  ws.llr.assign(Sz(1 << m_), 0.0f);
  ws.beta.assign(Sz(1 << m_), 0);
  return ws;
}

void PolarScDecoder::Node(int s, int leaf, const float* in, Bit* out, Bit* u_hat,
                          Workspace& ws) const {
  if (s == 0) {
    const Bit u = frozen_[Sz(leaf)] ? Bit{0} : HardDecision(in[0]);
    out[0] = u;
    u_hat[leaf] = u;
    return;
  }
  const int size = 1 << s;
  const int h = size / 2;
  switch (kind_[(Sz(1) << (m_ - s)) + Sz(leaf >> s)]) {
    case kRate0:
      std::memset(out, 0, Sz(size));
      std::memset(u_hat + leaf, 0, Sz(size));
      return;
    case kRate1: {
      bool zero = false;
      for (int i = 0; i < size; ++i) zero |= in[i] == 0.0f;
      if (zero) break;
      for (int i = 0; i < size; ++i) out[i] = HardDecision(in[i]);
      std::memcpy(u_hat + leaf, out, Sz(size));
      PolarTransform(std::span<Bit>(u_hat + leaf, Sz(size)));  // u = x G (involution)
      return;
    }
    case kRepetition: {
      // The last leaf's LLR: g with zero partial sums at every level is
      // in[i + h] + in[i], applied by halves (the recursion's order).
      float* t = ws.llr.data() + h;  // level s - 1 scratch, size h
      for (int i = 0; i < h; ++i) t[i] = in[i + h] + in[i];
      for (int w = h / 2; w >= 1; w /= 2) {
        for (int i = 0; i < w; ++i) t[i] = t[i + w] + t[i];
      }
      const Bit u = HardDecision(t[0]);
      std::memset(out, u, Sz(size));
      std::memset(u_hat + leaf, 0, Sz(size - 1));
      u_hat[leaf + size - 1] = u;
      return;
    }
    case kSpc: {
      // Wagner's rule: hard decisions, and if their parity is odd the least
      // reliable one flipped. Taken only when no LLR is 0 and, with odd
      // parity, the smallest |LLR| is unique; otherwise the recursion.
      Bit parity = 0;
      bool zero = false;
      int arg = 0, ties = 0;
      float least = std::numeric_limits<float>::infinity();
      for (int i = 0; i < size; ++i) {
        const float a = std::abs(in[i]);
        zero |= a == 0.0f;
        parity ^= HardDecision(in[i]);
        if (a < least) {
          least = a;
          arg = i;
          ties = 0;
        } else if (a == least) {
          ++ties;
        }
      }
      if (zero || (parity && ties > 0)) break;
      for (int i = 0; i < size; ++i) out[i] = HardDecision(in[i]);
      out[arg] ^= parity;
      std::memcpy(u_hat + leaf, out, Sz(size));
      PolarTransform(std::span<Bit>(u_hat + leaf, Sz(size)));
      return;
    }
    default:
      break;
  }
  float* child = ws.llr.data() + h;
  Bit* child_beta = ws.beta.data() + h;
  for (int i = 0; i < h; ++i) child[i] = F(in[i], in[i + h]);
  Node(s - 1, leaf, child, child_beta, u_hat, ws);
  for (int i = 0; i < h; ++i) out[i] = child_beta[i];
  for (int i = 0; i < h; ++i) child[i] = G(in[i], in[i + h], out[i]);
  Node(s - 1, leaf + h, child, child_beta, u_hat, ws);
  for (int i = 0; i < h; ++i) {
    out[i] ^= child_beta[i];
    out[i + h] = child_beta[i];
  }
}

void PolarScDecoder::Decode(std::span<const float> llr, std::span<Bit> u_hat, std::span<Bit> x_hat,
                            Workspace& ws) const {
  CAPGAP_DCHECK(llr.size() == Sz(1 << m_));
  Node(m_, 0, llr.data(), x_hat.data(), u_hat.data(), ws);
}

// ---------------------------------------------------------------- SCL

namespace {

using Ws = PolarSclDecoder::Workspace;

// Level s arrays of the pools start at list (2^s - 1) arrays' worth.
std::size_t LevelOffset(const Ws& w, int s) { return Sz(w.list_) * (Sz(1 << s) - 1); }

float* LlrArray(Ws& w, int s, int idx) {
  return w.llr_pool_.data() + LevelOffset(w, s) + Sz(idx) * Sz(1 << s);
}
Bit* BetaArray(Ws& w, int s, int idx) {
  return w.beta_pool_.data() + LevelOffset(w, s) + Sz(idx) * Sz(1 << s);
}
int& LlrIdx(Ws& w, int p, int s) { return w.llr_idx_[Sz(p * (w.m_ + 1) + s)]; }
int& BetaIdx(Ws& w, int p, int s) { return w.beta_idx_[Sz(p * (w.m_ + 1) + s)]; }

int PopArray(std::vector<int>& stack, std::vector<int>& count, int list, int s) {
  return stack[Sz(s * list + --count[Sz(s)])];
}
void PushArray(std::vector<int>& stack, std::vector<int>& count, int list, int s, int idx) {
  stack[Sz(s * list + count[Sz(s)]++)] = idx;
}

void Release(std::vector<int>& ref, std::vector<int>& stack, std::vector<int>& count, int list,
             int s, int idx) {
  if (--ref[Sz(s * list + idx)] == 0) PushArray(stack, count, list, s, idx);
}

// Path p's array at level s, made private first if it is shared (contents
// copied when `keep`).
[[gnu::always_inline]] inline float* WriteLlr(Ws& w, int p, int s) {
  int& idx = LlrIdx(w, p, s);
  int& ref = w.llr_ref_[Sz(s * w.list_ + idx)];
  if (ref > 1) {
    --ref;
    idx = PopArray(w.llr_free_, w.llr_free_n_, w.list_, s);
    w.llr_ref_[Sz(s * w.list_ + idx)] = 1;
  }
  return LlrArray(w, s, idx);
}
[[gnu::always_inline]] inline Bit* WriteBeta(Ws& w, int p, int s, bool keep) {
  int& idx = BetaIdx(w, p, s);
  int& ref = w.beta_ref_[Sz(s * w.list_ + idx)];
  if (ref > 1) {
    --ref;
    const int old = idx;
    idx = PopArray(w.beta_free_, w.beta_free_n_, w.list_, s);
    w.beta_ref_[Sz(s * w.list_ + idx)] = 1;
    if (keep) std::memcpy(BetaArray(w, s, idx), BetaArray(w, s, old), Sz(1 << s));
  }
  return BetaArray(w, s, idx);
}

int Clone(Ws& w, int p) {
  const int q = w.slot_free_[Sz(--w.slot_free_n_)];
  for (int s = 0; s <= w.m_; ++s) {
    if (s < w.m_) {
      const int i = LlrIdx(w, q, s) = LlrIdx(w, p, s);
      ++w.llr_ref_[Sz(s * w.list_ + i)];
    }
    const int j = BetaIdx(w, q, s) = BetaIdx(w, p, s);
    ++w.beta_ref_[Sz(s * w.list_ + j)];
  }
  w.metric_[Sz(q)] = w.metric_[Sz(p)];
  return q;
}

void Kill(Ws& w, int p) {
  for (int s = 0; s <= w.m_; ++s) {
    if (s < w.m_) Release(w.llr_ref_, w.llr_free_, w.llr_free_n_, w.list_, s, LlrIdx(w, p, s));
    Release(w.beta_ref_, w.beta_free_, w.beta_free_n_, w.list_, s, BetaIdx(w, p, s));
  }
  w.slot_free_[Sz(w.slot_free_n_++)] = p;
}

}  // namespace

std::span<const Bit> PolarSclDecoder::Workspace::Codeword(int rank) const {
  const int p = rank_[Sz(rank)];
  const int s = m_;
  const int idx = beta_idx_[Sz(p * (m_ + 1) + s)];
  const std::size_t n = Sz(1 << s);
  return {beta_pool_.data() + Sz(list_) * (n - 1) + Sz(idx) * n, n};
}

float PolarSclDecoder::Workspace::Metric(int rank) const { return metric_[Sz(rank_[Sz(rank)])]; }

PolarSclDecoder::PolarSclDecoder(const PolarCode& code, int list_size, bool fast_nodes)
    : m_(code.m), list_(list_size), frozen_(code.frozen), kind_(Sz(2) << code.m, 0) {
  if (!fast_nodes) return;
  const int n = 1 << m_;
  for (int s = 1; s <= m_; ++s) {
    const int size = 1 << s;
    for (int leaf = 0; leaf < n; leaf += size) {
      int frozen = 0;
      for (int i = leaf; i < leaf + size; ++i) frozen += frozen_[Sz(i)];
      std::uint8_t k = 0;
      if (frozen == size) {
        k = 1;
      } else if (frozen == size - 1 && !frozen_[Sz(leaf + size - 1)]) {
        k = 2;
      }
      kind_[(Sz(1) << (m_ - s)) + Sz(leaf >> s)] = k;
    }
  }
}

Result<PolarSclDecoder> PolarSclDecoder::Create(const PolarCode& code, int list_size,
                                                bool fast_nodes) {
  if (list_size < 1 || list_size > kMaxListSize) {
    return Status::Error("list size " + std::to_string(list_size) + ": must be in [1, 32]");
  }
  return PolarSclDecoder(code, list_size, fast_nodes);
}

namespace {

// Leaf LLRs of a subtree of `size` inputs when every decision in it is 0:
// left half f, right half g(a, b, 0) = b + a, recursively (the operations of
// the SC recursion). scratch: `size` floats.
void ZeroDecisionLeaves(const float* in, int size, float* leaves, float* scratch) {
  if (size == 1) {
    leaves[0] = in[0];
    return;
  }
  const int h = size / 2;
  for (int i = 0; i < h; ++i) scratch[i] = F(in[i], in[i + h]);
  ZeroDecisionLeaves(scratch, h, leaves, scratch + h);
  for (int i = 0; i < h; ++i) scratch[i] = G(in[i], in[i + h], 0);
  ZeroDecisionLeaves(scratch, h, leaves + h, scratch + h);
}

}  // namespace

PolarSclDecoder::Workspace PolarSclDecoder::MakeWorkspace() const {
  Workspace w;
  w.m_ = m_;
  w.list_ = list_;
  const std::size_t n = Sz(1 << m_), l = Sz(list_), levels = Sz(m_ + 1);
  w.llr_pool_.assign(l * n, 0.0f);
  w.beta_pool_.assign(l * (2 * n - 1), 0);
  w.llr_idx_.assign(l * levels, 0);
  w.beta_idx_.assign(l * levels, 0);
  w.llr_ref_.assign(l * levels, 0);
  w.beta_ref_.assign(l * levels, 0);
  w.llr_free_.assign(l * levels, 0);
  w.beta_free_.assign(l * levels, 0);
  w.llr_free_n_.assign(levels, 0);
  w.beta_free_n_.assign(levels, 0);
  w.slot_free_.assign(l, 0);
  w.active_.assign(l, 0);
  w.metric_.assign(l, 0.0f);
  w.order_.assign(2 * l, 0);
  w.cand_metric_.assign(2 * l, 0.0f);
  w.keep_.assign(2 * l, 0);
  w.next_active_.assign(l, 0);
  w.rank_.assign(l, 0);
  w.zero_scratch_.assign(2 * n, 0.0f);
  return w;
}

void PolarSclDecoder::Leaf(int leaf, Workspace& w) const {
  const int n = w.active_count_;
  if (frozen_[Sz(leaf)]) {
    for (int k = 0; k < n; ++k) {
      const int p = w.active_[Sz(k)];
      const float l = LlrArray(w, 0, LlrIdx(w, p, 0))[0];
      if (l < 0) w.metric_[Sz(p)] -= l;
      WriteBeta(w, p, 0, false)[0] = 0;
    }
    return;
  }
  // Candidate c = 2 k + b: path active_[k] extended by bit b.
  for (int k = 0; k < n; ++k) {
    const int p = w.active_[Sz(k)];
    const float l = LlrArray(w, 0, LlrIdx(w, p, 0))[0];
    const float pm = w.metric_[Sz(p)];
    w.cand_metric_[Sz(2 * k)] = l < 0 ? pm - l : pm;
    w.cand_metric_[Sz(2 * k + 1)] = l < 0 ? pm : pm + l;
  }
  const int c = 2 * n;
  if (c <= list_) {
    std::fill_n(w.keep_.begin(), c, std::uint8_t{1});
  } else {
    // The L smallest under the strict total order (metric, candidate
    // index) form a unique set: a candidate is kept when fewer than L
    // candidates precede it. Counting is branch-free and, for c <= 64,
    // cheaper than a selection algorithm.
    const float* cm = w.cand_metric_.data();
    for (int a = 0; a < c; ++a) {
      const float ma = cm[a];
      int before = 0;
      for (int b = 0; b < a; ++b) before += cm[b] <= ma;
      for (int b = a + 1; b < c; ++b) before += cm[b] < ma;
      w.keep_[Sz(a)] = before < list_;
    }
  }
  for (int k = 0; k < n; ++k) {
    if (!w.keep_[Sz(2 * k)] && !w.keep_[Sz(2 * k + 1)]) Kill(w, w.active_[Sz(k)]);
  }
  int next = 0;
  for (int k = 0; k < n; ++k) {
    const int p = w.active_[Sz(k)];
    const bool k0 = w.keep_[Sz(2 * k)] != 0, k1 = w.keep_[Sz(2 * k + 1)] != 0;
    if (!k0 && !k1) continue;
    if (k0 && k1) {
      const int q = Clone(w, p);
      w.metric_[Sz(p)] = w.cand_metric_[Sz(2 * k)];
      WriteBeta(w, p, 0, false)[0] = 0;
      w.metric_[Sz(q)] = w.cand_metric_[Sz(2 * k + 1)];
      WriteBeta(w, q, 0, false)[0] = 1;
      w.next_active_[Sz(next++)] = p;
      w.next_active_[Sz(next++)] = q;
    } else {
      const int b = k1 ? 1 : 0;
      w.metric_[Sz(p)] = w.cand_metric_[Sz(2 * k + b)];
      WriteBeta(w, p, 0, false)[0] = static_cast<Bit>(b);
      w.next_active_[Sz(next++)] = p;
    }
  }
  std::copy_n(w.next_active_.begin(), next, w.active_.begin());
  w.active_count_ = next;
}

void PolarSclDecoder::Node(int s, int leaf, const float* channel, Workspace& w) const {
  if (s == 0) {
    Leaf(leaf, w);
    return;
  }
  const int h = 1 << (s - 1);
  auto in = [&](int p) -> const float* {
    return s == m_ ? channel : LlrArray(w, s, LlrIdx(w, p, s));
  };
  const std::uint8_t kind = kind_[(Sz(1) << (m_ - s)) + Sz(leaf >> s)];
  if (kind != 0) {
    const int size = 2 * h;
    float* leaves = w.zero_scratch_.data();
    float* scratch = leaves + size;
    for (int k = 0; k < w.active_count_; ++k) {
      const int p = w.active_[Sz(k)];
      ZeroDecisionLeaves(in(p), size, leaves, scratch);
      const int frozen = kind == 1 ? size : size - 1;
      float& metric = w.metric_[Sz(p)];
      for (int i = 0; i < frozen; ++i) {
        if (leaves[i] < 0) metric -= leaves[i];
      }
      if (kind == 1) {
        std::memset(WriteBeta(w, p, s, false), 0, Sz(size));
      } else {
        WriteLlr(w, p, 0)[0] = leaves[size - 1];
      }
    }
    if (kind == 1) return;
    Leaf(leaf + size - 1, w);  // may clone and drop paths
    for (int k = 0; k < w.active_count_; ++k) {
      const int p = w.active_[Sz(k)];
      const Bit u = BetaArray(w, 0, BetaIdx(w, p, 0))[0];
      std::memset(WriteBeta(w, p, s, false), u, Sz(size));
    }
    return;
  }
  for (int k = 0; k < w.active_count_; ++k) {
    const int p = w.active_[Sz(k)];
    const float* a = in(p);
    float* child = WriteLlr(w, p, s - 1);
    for (int i = 0; i < h; ++i) child[i] = F(a[i], a[i + h]);
  }
  Node(s - 1, leaf, channel, w);
  for (int k = 0; k < w.active_count_; ++k) {
    const int p = w.active_[Sz(k)];
    const Bit* left = BetaArray(w, s - 1, BetaIdx(w, p, s - 1));
    Bit* out = WriteBeta(w, p, s, false);
    std::memcpy(out, left, Sz(h));
    const float* a = in(p);
    float* child = WriteLlr(w, p, s - 1);
    for (int i = 0; i < h; ++i) child[i] = G(a[i], a[i + h], out[i]);
  }
  Node(s - 1, leaf + h, channel, w);
  for (int k = 0; k < w.active_count_; ++k) {
    const int p = w.active_[Sz(k)];
    const Bit* right = BetaArray(w, s - 1, BetaIdx(w, p, s - 1));
    Bit* out = WriteBeta(w, p, s, true);
    for (int i = 0; i < h; ++i) {
      out[i] ^= right[i];
      out[i + h] = right[i];
    }
  }
}

void PolarSclDecoder::Decode(std::span<const float> llr, Workspace& w) const {
  CAPGAP_DCHECK(llr.size() == Sz(1 << m_));
  // Reset: every array free, one path (slot 0) holding one array per level.
  for (int s = 0; s <= m_; ++s) {
    w.llr_free_n_[Sz(s)] = 0;
    w.beta_free_n_[Sz(s)] = 0;
    for (int j = list_ - 1; j >= 0; --j) {
      w.llr_ref_[Sz(s * list_ + j)] = 0;
      w.beta_ref_[Sz(s * list_ + j)] = 0;
      PushArray(w.llr_free_, w.llr_free_n_, list_, s, j);
      PushArray(w.beta_free_, w.beta_free_n_, list_, s, j);
    }
  }
  w.slot_free_n_ = 0;
  for (int p = list_ - 1; p >= 1; --p) w.slot_free_[Sz(w.slot_free_n_++)] = p;
  for (int s = 0; s <= m_; ++s) {
    const int i = LlrIdx(w, 0, s) = PopArray(w.llr_free_, w.llr_free_n_, list_, s);
    w.llr_ref_[Sz(s * list_ + i)] = 1;
    const int j = BetaIdx(w, 0, s) = PopArray(w.beta_free_, w.beta_free_n_, list_, s);
    w.beta_ref_[Sz(s * list_ + j)] = 1;
  }
  w.active_[0] = 0;
  w.active_count_ = 1;
  w.metric_[0] = 0;
  Node(m_, 0, llr.data(), w);
  const int n = w.active_count_;
  for (int k = 0; k < n; ++k) w.order_[Sz(k)] = k;
  std::sort(w.order_.begin(), w.order_.begin() + n, [&](int a, int b) {
    const float ma = w.metric_[Sz(w.active_[Sz(a)])], mb = w.metric_[Sz(w.active_[Sz(b)])];
    return ma < mb || (ma == mb && a < b);
  });
  for (int r = 0; r < n; ++r) w.rank_[Sz(r)] = w.active_[Sz(w.order_[Sz(r)])];
}

}  // namespace capgap
