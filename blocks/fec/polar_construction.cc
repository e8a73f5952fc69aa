// Polar construction: the reliability recursions (ga, bhattacharyya in the
// log domain; beta in closed form) and the information-set choice.
#include "blocks/fec/polar_construction.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>
#include <string>

#include "blocks/core/energy.h"

namespace capgap {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

// Pieces of phi (header comment), each as ln phi.
constexpr double kX1 = 0.867861;
constexpr double kX2 = 10.0;
double LnPhi1(double x) { return 0.0564 * x * x - 0.48560 * x; }
double LnPhi2(double x) { return -0.4527 * std::pow(x, 0.86) + 0.0218; }
double LnPhi3(double x) {
  return 0.5 * std::log(M_PI / x) - x / 4.0 + std::log1p(-10.0 / (7.0 * x));
}

// ln(a + b - a b) for a = e^la, b = e^lb in [0, 1]: the check-node
// combination of 1 - (1 - a)(1 - b), used by ga (a = phi) and by
// bhattacharyya (a = Z).
double LnCheck(double la, double lb) {
  const double hi = std::max(la, lb);
  const double lo = std::min(la, lb);
  if (lo == -kInf) return hi;
  // a + b - a b = hi (1 + lo/hi - lo) with lo <= hi <= 1: the log1p term is in [0, ln 2].
  return hi + std::log1p(std::exp(lo - hi) - std::exp(lo));
}

}  // namespace

Result<PolarConstruction> ParsePolarConstruction(std::string_view w) {
  if (w == "ga") return PolarConstruction::kGa;
  if (w == "bhattacharyya") return PolarConstruction::kBhattacharyya;
  if (w == "beta") return PolarConstruction::kBeta;
  return Status::Error("unknown polar construction '" + std::string(w) +
                       "' (valid: ga, bhattacharyya, beta)");
}

std::string_view ToString(PolarConstruction c) {
  switch (c) {
    case PolarConstruction::kGa: return "ga";
    case PolarConstruction::kBhattacharyya: return "bhattacharyya";
    case PolarConstruction::kBeta: return "beta";
  }
  return "?";
}

Result<PolarRateMatching> ParsePolarRateMatching(std::string_view w) {
  if (w == "auto") return PolarRateMatching::kAuto;
  if (w == "puncture") return PolarRateMatching::kPuncture;
  if (w == "shorten") return PolarRateMatching::kShorten;
  return Status::Error("unknown rate matching '" + std::string(w) +
                       "' (valid: auto, puncture, shorten)");
}

std::string_view ToString(PolarRateMatching r) {
  switch (r) {
    case PolarRateMatching::kAuto: return "auto";
    case PolarRateMatching::kNone: return "none";
    case PolarRateMatching::kPuncture: return "puncture";
    case PolarRateMatching::kShorten: return "shorten";
  }
  return "?";
}

double PolarLnPhi(double x) {
  if (x <= 0) return 0;
  if (x == kInf) return -kInf;
  if (x < kX1) return LnPhi1(x);
  if (x < kX2) return LnPhi2(x);
  return LnPhi3(x);
}

double PolarInvLnPhi(double y) {
  if (y >= 0) return 0;
  if (y == -kInf) return kInf;
  if (y >= LnPhi1(kX1)) {
    // 0.0564 x^2 - 0.4856 x - y = 0, the root below the vertex (x = 4.3).
    const double a = 0.0564, b = -0.48560;
    return (-b - std::sqrt(b * b + 4 * a * y)) / (2 * a);
  }
  if (y >= LnPhi2(kX2)) return std::pow((0.0218 - y) / 0.4527, 1.0 / 0.86);
  // Third piece: decreasing for x >= 10; Newton from x = -4 y (the exp(-x/4)
  // term dominates), kept >= 10 (the pieces meet within 0.03 in ln phi).
  double x = std::max(kX2, -4.0 * y);
  for (int it = 0; it < 60; ++it) {
    const double f = LnPhi3(x) - y;
    const double c = 10.0 / (7.0 * x);
    const double df = -0.5 / x - 0.25 + (c / x) / (1.0 - c);
    const double next = std::max(kX2, x - f / df);
    if (std::abs(next - x) <= 1e-13 * x) return next;
    x = next;
  }
  return x;
}

std::vector<double> PolarReliabilities(PolarConstruction c, int m, double ecn0_linear,
                                       std::span<const std::uint8_t> coded_state) {
  const std::size_t n = std::size_t{1} << m;
  std::vector<double> v(n);
  if (c == PolarConstruction::kBeta) {
    const double beta = std::pow(2.0, 0.25);
    for (std::size_t i = 0; i < n; ++i) {
      double w = 0, p = 1;
      for (int j = 0; j < m; ++j, p *= beta) {
        if ((i >> j) & 1u) w += p;
      }
      v[i] = w;
    }
    return v;
  }
  // ga: the LLR mean (0 = useless, punctured; inf = perfect, shortened);
  // bhattacharyya: ln Z (0 = useless, -inf = perfect). The check node goes
  // through LnCheck (on ln phi of the means for ga), the variable node adds.
  const bool ga = c == PolarConstruction::kGa;
  const double useless = 0.0;
  const double perfect = ga ? kInf : -kInf;
  const double channel = ga ? 4.0 * ecn0_linear : -ecn0_linear;
  for (std::size_t j = 0; j < n; ++j) {
    v[j] = coded_state[j] == 1 ? useless : coded_state[j] == 2 ? perfect : channel;
  }
  for (std::size_t h = n / 2; h >= 1; h /= 2) {
    for (std::size_t b = 0; b < n; b += 2 * h) {
      for (std::size_t i = b; i < b + h; ++i) {
        const double a = v[i], d = v[i + h];
        v[i] = ga ? PolarInvLnPhi(LnCheck(PolarLnPhi(a), PolarLnPhi(d))) : LnCheck(a, d);
        v[i + h] = a + d;
      }
    }
  }
  if (!ga) {
    for (double& x : v) x = -x;
  }
  return v;
}

std::vector<int> PolarReliabilityOrder(std::span<const double> r) {
  std::vector<int> order(r.size());
  std::iota(order.begin(), order.end(), 0);
  std::stable_sort(order.begin(), order.end(), [&](int a, int b) {
    return r[static_cast<std::size_t>(a)] < r[static_cast<std::size_t>(b)];
  });
  return order;
}

Result<PolarCode> ConstructPolarCode(const PolarCodeSpec& s) {
  const int max_n = 1 << kPolarMaxLog2;
  if (s.length < 5 || s.length > max_n) {
    return Status::Error("length " + std::to_string(s.length) +
                         ": must be in [5, 32768] (mother length N = 8..32768)");
  }
  if (s.message_bits < 1 || s.message_bits > s.length) {
    return Status::Error("information + CRC bits " + std::to_string(s.message_bits) +
                         ": must be in [1, length = " + std::to_string(s.length) + "]");
  }
  PolarCode code;
  code.m = kPolarMinLog2;
  while ((1 << code.m) < s.length) ++code.m;
  code.mother_length = 1 << code.m;
  code.length = s.length;
  code.message_bits = s.message_bits;
  const int n = code.mother_length;
  const int removed = n - s.length;
  PolarRateMatching rm = s.rate_matching;
  if (removed == 0) {
    rm = PolarRateMatching::kNone;
  } else if (rm == PolarRateMatching::kAuto) {
    // 3GPP TS 38.212 §5.4.1.1 (from memory): puncture when K / E <= 7/16.
    rm = 16 * s.message_bits <= 7 * s.length ? PolarRateMatching::kPuncture
                                             : PolarRateMatching::kShorten;
  }
  code.rate_matching = rm;
  std::vector<std::uint8_t> state(static_cast<std::size_t>(n), 0);
  std::vector<std::uint8_t> forced(static_cast<std::size_t>(n), 0);
  for (int j = 0; j < removed; ++j) {
    if (rm == PolarRateMatching::kPuncture) {
      state[static_cast<std::size_t>(j)] = 1;
      forced[static_cast<std::size_t>(j)] = 1;
    } else {
      state[static_cast<std::size_t>(n - 1 - j)] = 2;
      forced[static_cast<std::size_t>(n - 1 - j)] = 1;
    }
  }
  code.reliability = PolarReliabilities(s.construction, code.m, DbToLinear(s.design_ecn0_db), state);
  const std::vector<int> order = PolarReliabilityOrder(code.reliability);
  code.frozen.assign(static_cast<std::size_t>(n), 1);
  int chosen = 0;
  for (auto it = order.rbegin(); it != order.rend() && chosen < s.message_bits; ++it) {
    const auto i = static_cast<std::size_t>(*it);
    if (forced[i]) continue;
    code.frozen[i] = 0;
    ++chosen;
  }
  for (int i = 0; i < n; ++i) {
    if (!code.frozen[static_cast<std::size_t>(i)]) code.info_positions.push_back(i);
  }
  return code;
}

}  // namespace capgap
