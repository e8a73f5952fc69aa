// Scalar reference turbo decoder (turbo_decoder.h).
#include "blocks/fec/turbo_decoder.h"

#include <algorithm>
#include <cmath>
#include <utility>

namespace capgap {
namespace {

// "Minus infinity" of the metrics: finite so that max* of two unreachable
// states stays finite (log1p(exp(0)) is added, no inf - inf).
constexpr float kNeg = -1e30f;

template <bool kExact>
inline float MaxStar(float a, float b) {
  if constexpr (kExact) {
    return std::max(a, b) + std::log1p(std::exp(-std::fabs(a - b)));
  } else {
    return std::max(a, b);
  }
}

}  // namespace

Result<TurboDecoderKind> ParseTurboDecoderKind(std::string_view word) {
  if (word == "max_log_map") return TurboDecoderKind::kMaxLogMap;
  if (word == "log_map") return TurboDecoderKind::kLogMap;
  return Status::Error("valid: max_log_map, log_map");
}

std::string ToString(TurboDecoderKind kind) {
  return kind == TurboDecoderKind::kMaxLogMap ? "max_log_map" : "log_map";
}

double DefaultExtrinsicScale(TurboDecoderKind kind) {
  return kind == TurboDecoderKind::kMaxLogMap ? 0.7 : 1.0;
}

Result<TurboDecoder> TurboDecoder::Create(const TurboCode& code,
                                          const TurboDecoderOptions& options) {
  if (options.max_iterations < 1 || options.max_iterations > kMaxIterations) {
    return Status::Error("max_iterations = " + std::to_string(options.max_iterations) +
                         ": must be in [1, " + std::to_string(kMaxIterations) + "]");
  }
  if (!(options.extrinsic_scale > 0.0f && options.extrinsic_scale <= 1.0f)) {
    return Status::Error("extrinsic_scale = " + std::to_string(options.extrinsic_scale) +
                         ": must be in (0, 1]");
  }
  return TurboDecoder(code, options);
}

TurboDecoder::Workspace TurboDecoder::MakeWorkspace() const {
  Workspace ws;
  const std::size_t k = code_.info_bits();
  const auto m = static_cast<std::size_t>(code_.rsc().memory());
  const auto s = static_cast<std::size_t>(code_.rsc().num_states());
  ws.sys.resize(k);
  ws.par1.resize(k);
  ws.par2.resize(k);
  ws.tail.resize(4 * m);
  ws.sys2.resize(k);
  ws.apriori.resize(k);
  ws.app.resize(k);
  ws.extrinsic.resize(k);
  ws.alpha.resize((k + 1) * s);
  ws.beta.resize(s);
  ws.beta_next.resize(s);
  ws.hard.resize(k);
  ws.hard_prev.resize(k);
  return ws;
}

void TurboDecoder::Siso(std::span<const float> sys, std::span<const float> apriori,
                        std::span<const float> par, std::span<const float> tail_sys,
                        std::span<const float> tail_par, std::span<float> app,
                        Workspace& ws) const {
  if (options_.kind == TurboDecoderKind::kLogMap) {
    SisoImpl<true>(sys, apriori, par, tail_sys, tail_par, app, ws);
  } else {
    SisoImpl<false>(sys, apriori, par, tail_sys, tail_par, app, ws);
  }
}

// Trellis order, fixed so that a vector kernel can reproduce every rounding:
// the new alpha of state n is max* over its two predecessors s = 2j, 2j + 1
// (j = n mod S/2), in that order; beta of state s is max* over its inputs
// u = 0, 1 in that order; the a posteriori max* runs over states in
// ascending order, starting from the state-0 term.
template <bool kExact>
void TurboDecoder::SisoImpl(std::span<const float> sys, std::span<const float> apriori,
                            std::span<const float> par, std::span<const float> tail_sys,
                            std::span<const float> tail_par, std::span<float> app,
                            Workspace& ws) const {
  const RscCode& rsc = code_.rsc();
  const std::size_t k = sys.size();
  const int m = rsc.memory();
  const int ns = rsc.num_states();
  const auto S = static_cast<std::size_t>(ns);
  const int half = ns / 2;
  // gamma of (u, p): sign (1 - 2u) on Ls + La, (1 - 2p) on Lp.
  auto gamma = [](float lsa, float lp, int u, int p) {
    const float gp = 0.5f * (lsa + lp);
    const float gm = 0.5f * (lsa - lp);
    return u == 0 ? (p == 0 ? gp : gm) : (p == 0 ? -gm : -gp);
  };
  float* alpha = ws.alpha.data();
  alpha[0] = 0.0f;
  for (std::size_t s = 1; s < S; ++s) alpha[s] = kNeg;
  for (std::size_t t = 0; t < k; ++t) {
    const float lsa = sys[t] + apriori[t];
    const float lp = par[t];
    const float* a = alpha + t * S;
    float* an = alpha + (t + 1) * S;
    for (int n = 0; n < ns; ++n) {
      const int j = n & (half - 1);
      const int bit = n >> (m - 1);  // a_t of the branch into n
      float v[2];
      for (int b = 0; b < 2; ++b) {
        const int s = 2 * j + b;
        const int u = bit ^ rsc.TailInput(s);
        v[b] = a[s] + gamma(lsa, lp, u, rsc.Parity(s, u));
      }
      an[n] = MaxStar<kExact>(v[0], v[1]);
    }
    const float norm = an[0];
    for (std::size_t s = 0; s < S; ++s) an[s] -= norm;
  }
  // Backward through the tail (input forced: a_t = 0), then the K steps.
  float* beta = ws.beta.data();
  float* bn = ws.beta_next.data();
  bn[0] = 0.0f;
  for (std::size_t s = 1; s < S; ++s) bn[s] = kNeg;
  for (int j = m; j-- > 0;) {
    const float lsa = tail_sys[static_cast<std::size_t>(j)];
    const float lp = tail_par[static_cast<std::size_t>(j)];
    for (int s = 0; s < ns; ++s) {
      const int u = rsc.TailInput(s);
      beta[s] = gamma(lsa, lp, u, rsc.Parity(s, u)) + bn[rsc.NextState(s, u)];
    }
    const float norm = beta[0];
    for (std::size_t s = 0; s < S; ++s) bn[s] = beta[s] - norm;
  }
  for (std::size_t t = k; t-- > 0;) {
    const float lsa = sys[t] + apriori[t];
    const float lp = par[t];
    const float* a = alpha + t * S;
    float m0 = 0.0f, m1 = 0.0f;
    for (int s = 0; s < ns; ++s) {
      float v[2];
      for (int u = 0; u < 2; ++u) {
        v[u] = gamma(lsa, lp, u, rsc.Parity(s, u)) + bn[rsc.NextState(s, u)];
      }
      const float x0 = a[s] + v[0];
      const float x1 = a[s] + v[1];
      m0 = s == 0 ? x0 : MaxStar<kExact>(m0, x0);
      m1 = s == 0 ? x1 : MaxStar<kExact>(m1, x1);
      beta[s] = MaxStar<kExact>(v[0], v[1]);
    }
    app[t] = m0 - m1;
    const float norm = beta[0];
    for (std::size_t s = 0; s < S; ++s) bn[s] = beta[s] - norm;
  }
}

FrameDecodeResult TurboDecoder::Decode(std::span<const float> llrs, std::span<Bit> info,
                                       Workspace& ws) const {
  const std::size_t k = code_.info_bits();
  const auto m = static_cast<std::size_t>(code_.rsc().memory());
  const auto perm = code_.interleaver().permutation();
  const std::span<float> tail(ws.tail);
  TurboCode::Streams streams{ws.sys, ws.par1, ws.par2, tail.subspan(0, m),
                             tail.subspan(m, m), tail.subspan(2 * m, m), tail.subspan(3 * m, m)};
  code_.Depuncture(llrs, streams);
  for (std::size_t t = 0; t < k; ++t) {
    ws.sys2[t] = ws.sys[perm[t]];
    ws.apriori[t] = 0.0f;
  }
  const float scale = options_.extrinsic_scale;
  FrameDecodeResult result;
  std::uint32_t halves = 0;
  // After one half-iteration: compare with the previous decisions, keep the
  // new ones in hard_prev. True when they agree.
  auto settle = [&]() {
    ++halves;
    const bool agree = options_.early_stop && halves > 1 && ws.hard == ws.hard_prev;
    std::swap(ws.hard, ws.hard_prev);
    return agree;
  };
  for (int it = 0; it < options_.max_iterations; ++it) {
    Siso(ws.sys, ws.apriori, ws.par1, streams.tail1_sys, streams.tail1_par, ws.app, ws);
    for (std::size_t t = 0; t < k; ++t) {
      ws.hard[t] = ws.app[t] < 0.0f ? 1 : 0;
      ws.extrinsic[t] = ws.app[t] - ws.sys[t] - ws.apriori[t];
    }
    if (settle()) {
      result.converged = true;
      break;
    }
    for (std::size_t t = 0; t < k; ++t) ws.apriori[t] = scale * ws.extrinsic[perm[t]];
    Siso(ws.sys2, ws.apriori, ws.par2, streams.tail2_sys, streams.tail2_par, ws.app, ws);
    for (std::size_t t = 0; t < k; ++t) {
      ws.hard[perm[t]] = ws.app[t] < 0.0f ? 1 : 0;
      ws.extrinsic[t] = ws.app[t] - ws.sys2[t] - ws.apriori[t];
    }
    if (settle()) {
      result.converged = true;
      break;
    }
    for (std::size_t t = 0; t < k; ++t) ws.apriori[perm[t]] = scale * ws.extrinsic[t];
  }
  result.iterations = (halves + 1) / 2;
  std::copy(ws.hard_prev.begin(), ws.hard_prev.end(), info.begin());
  return result;
}

}  // namespace capgap
