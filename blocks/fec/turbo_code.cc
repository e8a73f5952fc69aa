// Turbo code: RSC constituent trellis, QPP and S-random interleavers,
// encoder with termination and puncturing (turbo_code.h).
#include "blocks/fec/turbo_code.h"

#include <bit>
#include <cmath>
#include <utility>

namespace capgap {
namespace {

int OddWeight(std::uint32_t v) { return std::popcount(v) & 1; }

std::string Octal(std::uint32_t v) {
  std::string s;
  do {
    s.insert(s.begin(), static_cast<char>('0' + (v & 7u)));
    v >>= 3;
  } while (v != 0);
  return s;
}

}  // namespace

Result<RscCode> RscCode::Create(std::uint32_t feedback, std::uint32_t feedforward) {
  const std::string prefix = "polynomials " + Octal(feedback) + "," + Octal(feedforward) + ": ";
  const std::uint32_t highest = std::max(feedback, feedforward);
  const int m = highest == 0 ? 0 : static_cast<int>(std::bit_width(highest)) - 1;
  if (m < kMinMemory || m > kMaxMemory) {
    return Status::Error(prefix + "memory " + std::to_string(m) +
                         " (highest bit of the larger polynomial): must be in [2, 4], i.e. octal "
                         "values 4..37");
  }
  if (((feedback >> m) & 1u) == 0) {
    return Status::Error(prefix + "the feedback polynomial needs the D^0 term (its bit " +
                         std::to_string(m) + ", the most significant of memory " +
                         std::to_string(m) + ")");
  }
  const std::uint32_t mask = (1u << m) - 1u;
  if ((feedback & mask) == 0) {
    return Status::Error(prefix + "the feedback polynomial has only its D^0 term: the code "
                                  "would not be recursive");
  }
  if (feedforward == 0) return Status::Error(prefix + "the feedforward polynomial is zero");
  RscCode c;
  c.feedback_ = feedback;
  c.feedforward_ = feedforward;
  c.m_ = m;
  for (int s = 0; s < (1 << m); ++s) {
    const int fb = OddWeight(feedback & mask & static_cast<std::uint32_t>(s));
    c.tail_input_[static_cast<std::size_t>(s)] = static_cast<std::uint8_t>(fb);
    for (int u = 0; u < 2; ++u) {
      const int a = u ^ fb;
      const auto reg = static_cast<std::uint32_t>((a << m) | s);
      c.next_[Index(s, u)] = static_cast<std::uint8_t>(reg >> 1);
      c.parity_[Index(s, u)] = static_cast<std::uint8_t>(OddWeight(feedforward & reg));
    }
  }
  return c;
}

int RscCode::Encode(std::span<const Bit> info, std::span<Bit> parity) const {
  CAPGAP_DCHECK(parity.size() == info.size());
  int s = 0;
  for (std::size_t t = 0; t < info.size(); ++t) {
    const int u = info[t];
    parity[t] = static_cast<Bit>(Parity(s, u));
    s = NextState(s, u);
  }
  return s;
}

int RscCode::Terminate(int state, std::span<Bit> tail_sys, std::span<Bit> tail_par) const {
  CAPGAP_DCHECK(tail_sys.size() == static_cast<std::size_t>(m_));
  CAPGAP_DCHECK(tail_par.size() == static_cast<std::size_t>(m_));
  for (std::size_t j = 0; j < static_cast<std::size_t>(m_); ++j) {
    const int u = TailInput(state);
    tail_sys[j] = static_cast<Bit>(u);
    tail_par[j] = static_cast<Bit>(Parity(state, u));
    state = NextState(state, u);
  }
  return state;
}

Result<TurboInterleaverKind> ParseTurboInterleaverKind(std::string_view word) {
  if (word == "qpp") return TurboInterleaverKind::kQpp;
  if (word == "s_random") return TurboInterleaverKind::kSRandom;
  return Status::Error("valid: qpp, s_random");
}

std::string ToString(TurboInterleaverKind kind) {
  return kind == TurboInterleaverKind::kQpp ? "qpp" : "s_random";
}

namespace {
// 3GPP TS 36.212 Table 5.1.3-3 (values from memory): K, f1, f2.
struct QppEntry {
  std::uint32_t k, f1, f2;
};
constexpr QppEntry kQppTable[] = {{40, 3, 10}, {1024, 31, 64}, {6144, 263, 480}};
}  // namespace

std::array<std::uint32_t, 2> QppTableCoefficients(std::uint32_t k) {
  for (const QppEntry& e : kQppTable) {
    if (e.k == k) return {e.f1, e.f2};
  }
  return {0, 0};
}

std::string QppTableSizes() {
  std::string out;
  for (const QppEntry& e : kQppTable) {
    if (!out.empty()) out += ", ";
    out += std::to_string(e.k);
  }
  return out;
}

bool IsPermutation(std::span<const std::uint32_t> perm) {
  std::vector<std::uint8_t> seen(perm.size(), 0);
  for (std::uint32_t v : perm) {
    if (v >= perm.size() || seen[v]) return false;
    seen[v] = 1;
  }
  return true;
}

Result<TurboInterleaver> TurboInterleaver::Create(const TurboInterleaverSpec& spec,
                                                  std::uint32_t k, PhiloxKey key) {
  TurboInterleaver il;
  il.perm_.resize(k);
  if (spec.kind == TurboInterleaverKind::kQpp) {
    std::uint32_t f1 = spec.qpp_f1, f2 = spec.qpp_f2;
    if (f1 == 0 && f2 == 0) {
      const auto t = QppTableCoefficients(k);
      f1 = t[0];
      f2 = t[1];
      if (f1 == 0) {
        return Status::Error("qpp interleaver: no table entry for K = " + std::to_string(k) +
                             " (shipped: " + QppTableSizes() +
                             "); give qpp_f1 and qpp_f2, or use s_random");
      }
    }
    il.f1_ = f1;
    il.f2_ = f2;
    // pi(t) = (f1 t + f2 t^2) mod K, in 64-bit arithmetic (K < 2^24).
    const std::uint64_t kk = k;
    for (std::uint64_t t = 0; t < kk; ++t) {
      il.perm_[t] = static_cast<std::uint32_t>((f1 % kk * t + f2 % kk * (t * t % kk)) % kk);
    }
    if (!IsPermutation(il.perm_)) {
      return Status::Error("qpp interleaver: f1 = " + std::to_string(f1) + ", f2 = " +
                           std::to_string(f2) + " is not a permutation polynomial for K = " +
                           std::to_string(k) +
                           " (f1 must be coprime to K and f2 hold every prime factor of K)");
    }
    return il;
  }
  std::uint32_t s = spec.spread;
  if (s == 0) s = static_cast<std::uint32_t>(std::floor(std::sqrt(static_cast<double>(k) / 2.0)));
  s = std::max<std::uint32_t>(s, 1);
  il.spread_ = s;
  std::vector<std::uint32_t>& cand = il.perm_;
  for (std::uint32_t attempt = 0; attempt < kMaxSRandomAttempts; ++attempt) {
    RngStream stream(key, kTurboInterleaverPointIndex, attempt, Substream::kCode);
    for (std::uint32_t i = 0; i < k; ++i) cand[i] = i;
    for (std::uint32_t i = k; i-- > 1;) {
      const auto j = static_cast<std::uint32_t>(stream.NextU64() % (i + 1u));
      std::swap(cand[i], cand[j]);
    }
    // Does value v keep the spread at position q against the positions
    // [q - s + 1, q + s - 1] already filled (those below `filled`)?
    auto fits = [&](std::uint32_t v, std::uint32_t q, std::uint32_t filled) {
      const std::uint32_t lo = q >= s - 1 ? q - (s - 1) : 0;
      const std::uint32_t hi = std::min(filled, q + s);
      for (std::uint32_t r = lo; r < hi; ++r) {
        if (r == q) continue;
        const std::uint32_t w = cand[r];
        if ((v > w ? v - w : w - v) < s) return false;
      }
      return true;
    };
    bool ok = true;
    for (std::uint32_t i = 0; i < k && ok; ++i) {
      bool found = false;
      for (std::uint32_t j = i; j < k && !found; ++j) {
        if (fits(cand[j], i, i)) {
          std::swap(cand[i], cand[j]);
          found = true;
        }
      }
      // Dead end: repair by a swap with an earlier position q (at least S
      // before i): a remaining candidate goes to q, q's value to i. The scan
      // starts at a random q so that the repair does not favour the front.
      if (!found && i >= s) {
        const std::uint32_t span = i - s + 1;  // q in [0, span)
        const auto start = static_cast<std::uint32_t>(stream.NextU64() % span);
        for (std::uint32_t j = i; j < k && !found; ++j) {
          for (std::uint32_t n = 0; n < span && !found; ++n) {
            const std::uint32_t q = (start + n) % span;
            if (fits(cand[q], i, i) && fits(cand[j], q, i)) {
              const std::uint32_t v = cand[j];
              cand[j] = cand[i];
              cand[i] = cand[q];
              cand[q] = v;
              found = true;
            }
          }
        }
      }
      ok = found;
    }
    if (ok) return il;
  }
  return Status::Error("s_random interleaver: no permutation of K = " + std::to_string(k) +
                       " with spread S = " + std::to_string(s) + " found in " +
                       std::to_string(kMaxSRandomAttempts) +
                       " attempts; choose a smaller s_random_spread (S below sqrt(K/2) "
                       "usually succeeds)");
}

Result<TurboCode> TurboCode::Create(const RscCode& rsc, TurboInterleaver interleaver,
                                    const PuncturePattern& puncture) {
  const std::size_t k = interleaver.permutation().size();
  if (k < 8) return Status::Error("K = " + std::to_string(k) + ": must be >= 8");
  TurboCode c(rsc, std::move(interleaver));
  c.k_ = k;
  if (!puncture.empty()) {
    if (puncture.rows.size() != 3) {
      return Status::Error("puncture pattern '" + ToString(puncture) + "': needs 3 rows (x, z1, "
                           "z2), has " + std::to_string(puncture.rows.size()));
    }
    c.puncture_ = puncture;
  }
  std::size_t kept = 0;
  for (std::size_t t = 0; t < k; ++t) {
    for (int r = 0; r < 3; ++r) kept += c.Kept(r, t) ? 1u : 0u;
  }
  c.coded_ = kept + c.tail_bits();
  if (c.coded_ <= k) {
    return Status::Error("puncture pattern '" + ToString(puncture) + "': leaves " +
                         std::to_string(c.coded_) + " coded bits for K = " + std::to_string(k) +
                         " information bits (rate must stay below 1)");
  }
  return c;
}

void TurboCode::Encode(std::span<const Bit> info, std::span<Bit> coded,
                       std::span<Bit> scratch) const {
  CAPGAP_DCHECK(info.size() == k_ && coded.size() == coded_ && scratch.size() >= 3 * k_);
  const auto perm = interleaver_.permutation();
  std::span<Bit> interleaved = scratch.subspan(0, k_);
  std::span<Bit> par1 = scratch.subspan(k_, k_);
  std::span<Bit> par2 = scratch.subspan(2 * k_, k_);
  for (std::size_t t = 0; t < k_; ++t) interleaved[t] = info[perm[t]];
  const int end1 = rsc_.Encode(info, par1);
  const int end2 = rsc_.Encode(interleaved, par2);
  std::size_t o = 0;
  for (std::size_t t = 0; t < k_; ++t) {
    if (Kept(0, t)) coded[o++] = info[t];
    if (Kept(1, t)) coded[o++] = par1[t];
    if (Kept(2, t)) coded[o++] = par2[t];
  }
  const auto m = static_cast<std::size_t>(rsc_.memory());
  Bit tail[4][RscCode::kMaxMemory];
  rsc_.Terminate(end1, std::span<Bit>(tail[0], m), std::span<Bit>(tail[1], m));
  rsc_.Terminate(end2, std::span<Bit>(tail[2], m), std::span<Bit>(tail[3], m));
  for (int e = 0; e < 2; ++e) {
    for (std::size_t j = 0; j < m; ++j) {
      coded[o++] = tail[2 * e][j];
      coded[o++] = tail[2 * e + 1][j];
    }
  }
  CAPGAP_DCHECK(o == coded_);
}

void TurboCode::Depuncture(std::span<const float> llrs, const Streams& out) const {
  CAPGAP_DCHECK(llrs.size() == coded_);
  std::size_t o = 0;
  for (std::size_t t = 0; t < k_; ++t) {
    out.sys[t] = Kept(0, t) ? llrs[o++] : 0.0f;
    out.par1[t] = Kept(1, t) ? llrs[o++] : 0.0f;
    out.par2[t] = Kept(2, t) ? llrs[o++] : 0.0f;
  }
  const auto m = static_cast<std::size_t>(rsc_.memory());
  for (std::size_t j = 0; j < m; ++j) {
    out.tail1_sys[j] = llrs[o++];
    out.tail1_par[j] = llrs[o++];
  }
  for (std::size_t j = 0; j < m; ++j) {
    out.tail2_sys[j] = llrs[o++];
    out.tail2_par[j] = llrs[o++];
  }
}

}  // namespace capgap
