// Error rates of uncoded, coherent, Gray-labelled PSK and square QAM on the
// AWGN channel: the theory curve every simulated uncoded point is compared
// with, and the reference an engine uses for "coding gain at BER p".
//
// BPSK/QPSK and square QAM are closed forms (Q and erfc only); the square-QAM
// Gray BER is the exact sum of K. Cho and D. Yoon, IEEE Trans. Commun. 50(7),
// 2002 (their eq. for P_b(k) specialised to I = J = sqrt(M)). M-PSK (M >= 8)
// uses the probability G(phi) that the received phase lies in (phi, pi) when
// the point sits at phase 0 (J. W. Craig, MILCOM 1991):
//   G(phi) = 1/(2 pi) int_0^{pi - phi} exp(-(Es/N0) sin^2 phi / sin^2 t) dt,
// evaluated as exp(-c) / (2 pi) int exp(-c cot^2 t) dt with c = (Es/N0)
// sin^2 phi so that probabilities down to ~1e-300 keep full relative accuracy;
// for c > 1 the substitution v = sqrt(c) cot t turns it into a Gaussian times
// a Cauchy factor of unit width, which adaptive quadrature handles at any SNR.
// Each decision sector's probability is a difference of two G values; the
// exact Gray BER weights sector d by the Hamming distance between the labels
// Gray(k) and Gray(k + d), averaged over all k (the distance depends on k for
// |d| >= 3), divided by m. Integrals use adaptive Gauss-Kronrod (61 points,
// Boost.Math) to a relative tolerance of 1e-13. Boost functions run under an
// errno policy so nothing throws; invalid input gives NaN.
#include "analysis/uncoded_theory.h"

#include <algorithm>
#include <bit>
#include <boost/math/policies/policy.hpp>
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <boost/math/special_functions/erf.hpp>
#include <cmath>
#include <limits>
#include <numbers>
#include <vector>

#include "analysis/bisection.h"
#include "analysis/constellation_bounds.h"
#include "blocks/core/energy.h"
#include "blocks/mapping/mapper.h"

namespace capgap::analysis {
namespace {

using NoThrowPolicy = boost::math::policies::policy<
    boost::math::policies::domain_error<boost::math::policies::errno_on_error>,
    boost::math::policies::overflow_error<boost::math::policies::errno_on_error>,
    boost::math::policies::evaluation_error<boost::math::policies::errno_on_error>>;

constexpr double kPi = std::numbers::pi;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kQuadratureTolerance = 1e-13;
constexpr unsigned kQuadratureMaxDepth = 20;

double Erfc(double x) { return boost::math::erfc(x, NoThrowPolicy()); }

// m = log2(M) for a supported modulation, or 0 when the order is not one the
// theory covers (PSK: M = 2^k >= 2; QAM: M = 4^k >= 4).
int SupportedBitsPerSymbol(const Modulation& modulation) {
  if (modulation.family == ModulationFamily::kGeneric) {
    return ValidateModulation(modulation).ok() ? modulation.bits_per_symbol() : 0;
  }
  const int order = modulation.order;
  if (order < 2 || !std::has_single_bit(static_cast<unsigned>(order))) return 0;
  const int m = std::countr_zero(static_cast<unsigned>(order));
  if (modulation.family == ModulationFamily::kQam && (m % 2 != 0)) return 0;
  return m;
}

// int_lo^hi exp(-c cot^2 t) dt for 0 <= lo < hi <= pi/2 or pi/2 <= lo < hi
// (low SNR form: the integrand is smooth when c is small).
double CotGaussIntegral(double c, double lo, double hi) {
  if (!(hi > lo)) return 0.0;
  if (c == 0.0) return hi - lo;
  auto integrand = [c](double t) {
    const double s = std::sin(t);
    if (s <= 0.0) return 0.0;
    const double cot = std::cos(t) / s;
    return std::exp(-c * cot * cot);
  };
  return boost::math::quadrature::gauss_kronrod<double, 61>::integrate(
      integrand, lo, hi, kQuadratureMaxDepth, kQuadratureTolerance);
}

// The same integral over t in [0, pi - phi] after u = cot t, v = sqrt(c) u:
//   int_{-sqrt(c) cot phi}^{inf} exp(-v^2) / (1 + v^2 / c) dv / sqrt(c).
// At high SNR the t-form peaks sharply at t = pi/2 (width 1/sqrt(c)); in v
// the peak has unit width whatever c is. exp(-v^2) underflows beyond |v| = 27,
// so the range is clipped to [-30, 30]; the piece is split at v = 0.
double CotGaussIntegralScaled(double c, double phi) {
  const double root_c = std::sqrt(c);
  constexpr double kClip = 30.0;
  const double lower = std::max(-root_c * std::cos(phi) / std::sin(phi), -kClip);
  auto integrand = [c](double v) { return std::exp(-v * v) / (1.0 + v * v / c); };
  using boost::math::quadrature::gauss_kronrod;
  double integral = 0.0;
  if (lower < 0.0) {
    integral += gauss_kronrod<double, 61>::integrate(integrand, lower, 0.0, kQuadratureMaxDepth,
                                                     kQuadratureTolerance);
  }
  integral += gauss_kronrod<double, 61>::integrate(integrand, std::max(lower, 0.0), kClip,
                                                   kQuadratureMaxDepth, kQuadratureTolerance);
  return integral / root_c;
}

// G(phi) = P(phase of r in (phi, pi)) for r = sqrt(Es) + n, n ~ CN(0, N0),
// 0 <= phi <= pi (Craig's form, see the file comment).
double PhaseTail(double phi, double esno) {
  if (phi >= kPi) return 0.0;
  const double s = std::sin(phi);
  const double c = esno * s * s;
  const double upper = kPi - phi;
  double integral = 0.0;
  if (c > 1.0) {
    integral = CotGaussIntegralScaled(c, phi);
  } else if (upper <= kPi / 2) {
    integral = CotGaussIntegral(c, 0.0, upper);
  } else {
    // The integrand peaks at t = pi/2; splitting there keeps each piece
    // monotone so the adaptive rule sees the peak at an endpoint.
    integral = CotGaussIntegral(c, 0.0, kPi / 2) + CotGaussIntegral(c, kPi / 2, upper);
  }
  return std::exp(-c) * integral / (2.0 * kPi);
}

// Probabilities of deciding the point at offset d = 0..M-1 (counted along the
// circle) when any M-PSK point is sent, M >= 4.
std::vector<double> PskSectorProbabilities(int order, double esno) {
  const double half_sector = kPi / order;
  // tail[j] = G((2j + 1) pi / M) for j = 0..M/2-1; G(pi) = 0 beyond.
  const int half = order / 2;
  std::vector<double> tail(static_cast<std::size_t>(half) + 1, 0.0);
  for (int j = 0; j < half; ++j) {
    tail[static_cast<std::size_t>(j)] = PhaseTail((2 * j + 1) * half_sector, esno);
  }
  std::vector<double> p(static_cast<std::size_t>(order), 0.0);
  p[0] = 1.0 - 2.0 * tail[0];
  for (int d = 1; d < half; ++d) {
    const double pd = tail[static_cast<std::size_t>(d - 1)] - tail[static_cast<std::size_t>(d)];
    p[static_cast<std::size_t>(d)] = std::max(pd, 0.0);
    p[static_cast<std::size_t>(order - d)] = p[static_cast<std::size_t>(d)];
  }
  // The sector opposite the sent point straddles phase pi.
  p[static_cast<std::size_t>(half)] = 2.0 * tail[static_cast<std::size_t>(half - 1)];
  return p;
}

unsigned Gray(unsigned k) { return k ^ (k >> 1); }

double PskSer(int order, double esno) {
  // Craig: Ps = 2 G(pi / M).
  return 2.0 * PhaseTail(kPi / order, esno);
}

double PskGrayBer(int order, int m, double esno) {
  const std::vector<double> p = PskSectorProbabilities(order, esno);
  const unsigned mask = static_cast<unsigned>(order) - 1u;
  double bit_errors = 0.0;
  for (int d = 1; d < order; ++d) {
    double distance_sum = 0.0;
    for (unsigned k = 0; k < static_cast<unsigned>(order); ++k) {
      const unsigned other = (k + static_cast<unsigned>(d)) & mask;
      distance_sum += std::popcount(Gray(k) ^ Gray(other));
    }
    bit_errors += p[static_cast<std::size_t>(d)] * distance_sum / order;
  }
  return bit_errors / m;
}

// Square M-QAM, L = sqrt(M) levels per axis, Es = 1. The per-axis argument of
// erfc for level distance (2i + 1) * (half spacing) is (2i + 1) * a with
// a = sqrt(3 Es / (2 (M - 1) N0)).
double QamAxisArgument(int order, double esno) {
  return std::sqrt(3.0 * esno / (2.0 * (order - 1)));
}

double QamSer(int order, double esno) {
  const double levels = std::sqrt(static_cast<double>(order));
  const double a = QamAxisArgument(order, esno);
  // P_L = 2 (1 - 1/L) Q(sqrt(3 Es / ((M - 1) N0))) = (1 - 1/L) erfc(a).
  const double p_axis = (1.0 - 1.0 / levels) * Erfc(a);
  // 1 - (1 - P_L)^2 written without cancellation.
  return p_axis * (2.0 - p_axis);
}

double QamGrayBer(int order, int m, double esno) {
  const int levels = 1 << (m / 2);
  const int axis_bits = m / 2;
  const double a = QamAxisArgument(order, esno);
  double sum_over_k = 0.0;
  for (int k = 1; k <= axis_bits; ++k) {
    const long long two_k1 = 1LL << (k - 1);  // 2^(k-1)
    // Upper summation index (1 - 2^-k) L - 1 = L - L / 2^k - 1.
    const int upper = levels - (levels >> k) - 1;
    double pk = 0.0;
    for (int i = 0; i <= upper; ++i) {
      // floor(i 2^(k-1) / L) and floor(i 2^(k-1) / L + 1/2) in integers.
      const long long num = i * two_k1;
      const long long q = num / levels;
      const long long q_half = (2 * num + levels) / (2 * levels);
      const double sign = (q % 2 == 0) ? 1.0 : -1.0;
      const double weight = static_cast<double>(two_k1 - q_half);
      pk += sign * weight * Erfc((2 * i + 1) * a);
    }
    sum_over_k += pk / levels;
  }
  // Both axes carry log2(L) bits each with the same P_b(k).
  return std::max(sum_over_k / axis_bits, 0.0);
}

}  // namespace

double QFunction(double x) { return 0.5 * Erfc(x / std::numbers::sqrt2); }

double InverseQ(double p) {
  if (!(p > 0.0) || !(p < 1.0)) return kNaN;
  return std::numbers::sqrt2 * boost::math::erfc_inv(2.0 * p, NoThrowPolicy());
}

double UncodedSer(const Modulation& modulation, double ebno_db) {
  const int m = SupportedBitsPerSymbol(modulation);
  if (m == 0 || std::isnan(ebno_db)) return kNaN;
  const double esno = DbToLinear(EsnoDbFromEbnoDb(ebno_db, m));
  const int order = modulation.order;
  if (modulation.family == ModulationFamily::kGeneric) {
    return UnionBoundSer(Mapper::Create(modulation).value().points(), esno);
  }
  if (modulation.family == ModulationFamily::kQam) return QamSer(order, esno);
  if (order == 2) return QFunction(std::sqrt(2.0 * esno));
  if (order == 4) {
    const double p = QFunction(std::sqrt(esno));  // per quadrature branch
    return p * (2.0 - p);
  }
  return PskSer(order, esno);
}

double UncodedBer(const Modulation& modulation, double ebno_db) {
  const int m = SupportedBitsPerSymbol(modulation);
  if (m == 0 || std::isnan(ebno_db)) return kNaN;
  const double ebno = DbToLinear(ebno_db);
  const double esno = DbToLinear(EsnoDbFromEbnoDb(ebno_db, m));
  const int order = modulation.order;
  if (modulation.family == ModulationFamily::kGeneric) {
    return UnionBoundBer(Mapper::Create(modulation).value().points(), esno);
  }
  if (modulation.family == ModulationFamily::kQam) {
    return QamGrayBer(order, m, esno);
  }
  if (order == 2 || order == 4) return QFunction(std::sqrt(2.0 * ebno));
  return PskGrayBer(order, m, esno);
}

bool UncodedTheoryIsExact(const Modulation& modulation) {
  return modulation.family != ModulationFamily::kGeneric;
}

double UncodedEbnoDbAtBer(const Modulation& modulation, double ber) {
  if (SupportedBitsPerSymbol(modulation) == 0) return kNaN;
  if (!(ber > 0.0) || !(ber < 0.5)) return kNaN;
  // BER falls monotonically with Eb/N0; widen a bracket [lo, hi] with
  // BER(lo) > ber >= BER(hi), then bisect to 1e-6 dB.
  constexpr double kLowestDb = -100.0;
  constexpr double kHighestDb = 200.0;
  double lo = -10.0;
  while (UncodedBer(modulation, lo) <= ber) {
    lo -= 10.0;
    if (lo < kLowestDb) return kNaN;  // ber too close to 1/2
  }
  double hi = 20.0;
  while (UncodedBer(modulation, hi) > ber) {
    hi += 10.0;
    if (hi > kHighestDb) return kNaN;
  }
  const Bracket b =
      Bisect(lo, hi, 1e-6, [&](double ebno_db) { return UncodedBer(modulation, ebno_db) > ber; });
  return 0.5 * (b.lo + b.hi);
}

}  // namespace capgap::analysis
