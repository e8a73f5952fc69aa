// Fading-channel theory and limits (see fading_theory.h for methods, sources
// and accuracy). The AWGN error-rate structure of analysis/uncoded_theory.cc
// is kept: the same Gaussian-tail terms, each averaged over the fading by the
// MGF of the combined gain instead of evaluated at one SNR.
#include "analysis/fading_theory.h"

#include <algorithm>
#include <bit>
#include <boost/math/distributions/gamma.hpp>
#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <boost/math/interpolators/cardinal_cubic_b_spline.hpp>
#include <boost/math/policies/policy.hpp>
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <boost/math/special_functions/binomial.hpp>
#include <boost/math/special_functions/expint.hpp>
#include <cmath>
#include <limits>
#include <map>
#include <memory>
#include <mutex>
#include <numbers>
#include <tuple>
#include <vector>

#include "analysis/bisection.h"
#include "analysis/capacity.h"
#include "analysis/uncoded_theory.h"
#include "blocks/core/energy.h"

namespace capgap::analysis {
namespace {

using NoThrowPolicy = boost::math::policies::policy<
    boost::math::policies::domain_error<boost::math::policies::errno_on_error>,
    boost::math::policies::overflow_error<boost::math::policies::errno_on_error>,
    boost::math::policies::evaluation_error<boost::math::policies::errno_on_error>,
    boost::math::policies::pole_error<boost::math::policies::errno_on_error>>;
using GammaDist = boost::math::gamma_distribution<double, NoThrowPolicy>;
using NcChi2Dist = boost::math::non_central_chi_squared_distribution<double, NoThrowPolicy>;
using boost::math::quadrature::gauss_kronrod;

constexpr double kPi = std::numbers::pi;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kLog2e = std::numbers::log2e;
constexpr double kCraigTolerance = 1e-12;
constexpr unsigned kCraigMaxDepth = 20;
// The numerical SC MGF: below the table's interpolation error (3e-7).
constexpr double kMgfTolerance = 1e-9;
constexpr double kAverageTolerance = 1e-10;
constexpr unsigned kAverageMaxDepth = 18;
// Integration range of the gain averages: x from 1e-40 (the density times x
// is at most of order x^{1/2} there, m >= 1/2) to the 1 - 1e-30 quantile.
constexpr double kAverageLowestGain = 1e-40;
constexpr double kAverageTailMass = 1e-30;

// m = log2(M) for a modulation the theory covers (PSK: M = 2^k >= 2; QAM:
// M = 4^k >= 4), else 0 (as in uncoded_theory.cc).
// Generic constellations (points as data) have no MGF form here: 0, so
// FadingBer/FadingSer/FadingEbnoDbAtBer give NaN for them on fading channels.
int SupportedBitsPerSymbol(const Modulation& modulation) {
  if (modulation.family == ModulationFamily::kGeneric) return 0;
  const int order = modulation.order;
  if (order < 2 || !std::has_single_bit(static_cast<unsigned>(order))) return 0;
  const int m = std::countr_zero(static_cast<unsigned>(order));
  if (modulation.family == ModulationFamily::kQam && (m % 2 != 0)) return 0;
  return m;
}

// Nakagami-m (and Rayleigh, m = 1) branch: X_l ~ Gamma(m, 1/m). MRC of L
// branches: Gamma(mL, 1/m).
GammaDist BranchGamma(double m) { return GammaDist(m, 1.0 / m); }
GammaDist MrcGamma(double m, int branches) { return GammaDist(m * branches, 1.0 / m); }

// Rician: 2 (1 + K) X_l is non-central chi-square with 2 degrees of freedom
// and non-centrality 2K (|sqrt(2K) e^{j phi} + sqrt(2) w|^2, w ~ CN(0, 1));
// the MRC sum of L branches has 2L degrees of freedom, non-centrality 2LK.
NcChi2Dist RicianChi2(double k, int branches) {
  return NcChi2Dist(2.0 * branches, 2.0 * branches * k);
}

double Clamp01(double p) { return std::min(std::max(p, 0.0), 1.0); }

// e^x E1(x) for x > 0 without overflow: direct below 700, else the
// asymptotic series 1/x sum_k (-1)^k k! / x^k (terms shrink while k < x;
// eight terms leave a relative error below 8! / 700^8 ~ 1e-18).
double ScaledE1(double x) {
  if (x < 700.0) return std::exp(x) * boost::math::expint(1, x, NoThrowPolicy());
  double sum = 0.0, term = 1.0;
  for (int k = 0; k < 8; ++k) {
    sum += term;
    term *= -(k + 1) / x;
  }
  return sum / x;
}

}  // namespace

// ---- CombinedGain ----

// ln M(s) against ln s on a uniform grid, cubic B-spline; beyond the grid's
// top the tail M ~ c s^(-slope) continues the last two points (the law's
// exact power: M(s) ~ E-density at 0 times s^(-mL) for Nakagami, s^(-L) for
// Rician), below its start M = exp(-s E[X]) to first order with E[X] from
// the first point.
class MgfTable {
 public:
  explicit MgfTable(const CombinedGain& g) {
    std::vector<double> log_m;
    for (int i = 0; i < kPoints; ++i) {
      log_m.push_back(std::log(g.MgfIntegral(std::exp(kLogLow + kStep * i))));
    }
    last_ = log_m.back();
    slope_ = (log_m[kPoints - 1] - log_m[kPoints - 2]) / kStep;
    first_rate_ = -log_m.front() / std::exp(kLogLow);  // ~ E[X]
    spline_ = std::make_unique<boost::math::interpolators::cardinal_cubic_b_spline<double>>(
        log_m.begin(), log_m.end(), kLogLow, kStep);
  }
  double Value(double s) const {
    const double t = std::log(s);
    if (t <= kLogLow) return std::exp(-s * first_rate_);
    if (t >= kLogHigh) return std::exp(last_ + slope_ * (t - kLogHigh));
    return std::exp((*spline_)(t));
  }

 private:
  // s from 1e-8 to 1e14, 24 points per decade.
  static constexpr double kLogLow = -8.0 * std::numbers::ln10;
  static constexpr int kPoints = 22 * 24 + 1;
  static constexpr double kStep = std::numbers::ln10 / 24.0;
  static constexpr double kLogHigh = kLogLow + kStep * (kPoints - 1);
  double last_ = 0, slope_ = 0, first_rate_ = 0;
  std::unique_ptr<boost::math::interpolators::cardinal_cubic_b_spline<double>> spline_;
};

CombinedGain CombinedGain::FromSpec(const ChannelSpec& spec) {
  CombinedGain g;
  g.law_ = spec.law;
  g.combining_ = spec.combining;
  g.branches_ = std::max(spec.branches, 1);
  if (spec.law == FadingLaw::kRician) {
    g.k_ = DbToLinear(spec.rician_k_db);
    if (!(g.k_ > 0.0)) g.law_ = FadingLaw::kRayleigh;  // K = 0 is Rayleigh
  }
  if (g.law_ == FadingLaw::kNakagami) g.m_ = spec.nakagami_m;
  if (g.law_ == FadingLaw::kRayleigh) g.m_ = 1.0;
  if (!g.closed_form_mgf()) {
    // One table per (law, K, m, L), built once and shared by all threads
    // (never modified after construction).
    static std::mutex mutex;
    static std::map<std::tuple<int, double, double, int>, std::shared_ptr<const MgfTable>> cache;
    std::lock_guard<std::mutex> lock(mutex);
    auto& slot = cache[{static_cast<int>(g.law_), g.k_, g.m_, g.branches_}];
    if (!slot) slot = std::make_shared<const MgfTable>(g);
    g.table_ = slot;
  }
  return g;
}

bool CombinedGain::closed_form_mgf() const {
  return combining_ == Combining::kMrc || law_ == FadingLaw::kRayleigh ||
         law_ == FadingLaw::kAwgn || branches_ == 1;
}

double CombinedGain::BranchCdf(double x) const {
  if (x <= 0.0) return 0.0;
  switch (law_) {
    case FadingLaw::kAwgn:
      return x >= 1.0 ? 1.0 : 0.0;
    case FadingLaw::kRician:
      return boost::math::cdf(RicianChi2(k_, 1), 2.0 * (1.0 + k_) * x);
    default:
      return boost::math::cdf(BranchGamma(m_), x);
  }
}

double CombinedGain::BranchSurvival(double x) const {
  if (x <= 0.0) return 1.0;
  switch (law_) {
    case FadingLaw::kAwgn:
      return x >= 1.0 ? 0.0 : 1.0;
    case FadingLaw::kRician:
      return boost::math::cdf(boost::math::complement(RicianChi2(k_, 1), 2.0 * (1.0 + k_) * x));
    default:
      return boost::math::cdf(boost::math::complement(BranchGamma(m_), x));
  }
}

double CombinedGain::BranchPdf(double x) const {
  if (x <= 0.0 || law_ == FadingLaw::kAwgn) return 0.0;
  if (law_ == FadingLaw::kRician) {
    const double c = 2.0 * (1.0 + k_);
    return c * boost::math::pdf(RicianChi2(k_, 1), c * x);
  }
  return boost::math::pdf(BranchGamma(m_), x);
}

double CombinedGain::BranchQuantile(double p) const {
  if (law_ == FadingLaw::kAwgn) return 1.0;
  if (law_ == FadingLaw::kRician) {
    return boost::math::quantile(RicianChi2(k_, 1), p) / (2.0 * (1.0 + k_));
  }
  return boost::math::quantile(BranchGamma(m_), p);
}

double CombinedGain::BranchQuantileComplement(double q) const {
  if (law_ == FadingLaw::kAwgn) return 1.0;
  if (law_ == FadingLaw::kRician) {
    return boost::math::quantile(boost::math::complement(RicianChi2(k_, 1), q)) /
           (2.0 * (1.0 + k_));
  }
  return boost::math::quantile(boost::math::complement(BranchGamma(m_), q));
}

double CombinedGain::Mgf(double s) const {
  if (std::isnan(s) || s < 0.0) return kNaN;
  if (s == 0.0) return 1.0;
  if (std::isinf(s)) return 0.0;
  const double l = branches_;
  if (law_ == FadingLaw::kAwgn) {
    return std::exp(-s * (combining_ == Combining::kMrc ? l : 1.0));
  }
  if (combining_ == Combining::kMrc || branches_ == 1) {
    if (law_ == FadingLaw::kRician) {
      // [(1+K)/(1+K+s)]^L exp(-L K s / (1+K+s)) (Simon & Alouini, ch. 5).
      const double d = 1.0 + k_ + s;
      return std::exp(-l * std::log1p(s / (1.0 + k_)) - l * k_ * s / d);
    }
    // (1 + s/m)^(-m L) (Simon & Alouini, ch. 5; m = 1: Rayleigh).
    return std::exp(-m_ * l * std::log1p(s / m_));
  }
  if (law_ == FadingLaw::kRayleigh) {
    // Max of L i.i.d. Exp(1) = sum_k E_k / k (exponential order statistics),
    // so M(s) = prod_{k=1..L} k / (k + s).
    double log_m = 0.0;
    for (int k = 1; k <= branches_; ++k) log_m -= std::log1p(s / k);
    return std::exp(log_m);
  }
  if (table_) return table_->Value(s);
  return MgfIntegral(s);
}

double CombinedGain::MgfIntegral(double s) const {
  if (std::isnan(s) || s < 0.0) return kNaN;
  if (s == 0.0) return 1.0;
  if (std::isinf(s)) return 0.0;
  // By parts, M(s) = int_0^inf e^{-u} F(u/s)^L du, F the CDF of X.
  auto integrand = [this, s](double u) { return std::exp(-u) * Cdf(u / s); };
  return gauss_kronrod<double, 61>::integrate(integrand, 0.0, kInf, kCraigMaxDepth, kMgfTolerance);
}

double CombinedGain::Cdf(double x) const {
  if (std::isnan(x)) return kNaN;
  if (x <= 0.0) return 0.0;
  const double l = branches_;
  if (law_ == FadingLaw::kAwgn) {
    return x >= (combining_ == Combining::kMrc ? l : 1.0) ? 1.0 : 0.0;
  }
  if (combining_ == Combining::kMrc) {
    if (law_ == FadingLaw::kRician) {
      return boost::math::cdf(RicianChi2(k_, branches_), 2.0 * (1.0 + k_) * x);
    }
    return boost::math::cdf(MrcGamma(m_, branches_), x);
  }
  return std::pow(BranchCdf(x), l);  // SC: all branches below x
}

double CombinedGain::Survival(double x) const {
  if (std::isnan(x)) return kNaN;
  if (x <= 0.0) return 1.0;
  const double l = branches_;
  if (law_ == FadingLaw::kAwgn) return 1.0 - Cdf(x);
  if (combining_ == Combining::kMrc) {
    if (law_ == FadingLaw::kRician) {
      return boost::math::cdf(
          boost::math::complement(RicianChi2(k_, branches_), 2.0 * (1.0 + k_) * x));
    }
    return boost::math::cdf(boost::math::complement(MrcGamma(m_, branches_), x));
  }
  // 1 - F^L = -expm1(L log1p(-S)), S the branch survival.
  return -std::expm1(l * std::log1p(-BranchSurvival(x)));
}

double CombinedGain::Pdf(double x) const {
  if (std::isnan(x)) return kNaN;
  if (x <= 0.0 || law_ == FadingLaw::kAwgn) return 0.0;
  if (combining_ == Combining::kMrc) {
    if (law_ == FadingLaw::kRician) {
      const double c = 2.0 * (1.0 + k_);
      return c * boost::math::pdf(RicianChi2(k_, branches_), c * x);
    }
    return boost::math::pdf(MrcGamma(m_, branches_), x);
  }
  // SC: L F^(L-1) f.
  return branches_ * std::pow(BranchCdf(x), branches_ - 1) * BranchPdf(x);
}

double CombinedGain::Quantile(double p) const {
  if (!(p > 0.0) || !(p < 1.0)) return kNaN;
  if (law_ == FadingLaw::kAwgn) return combining_ == Combining::kMrc ? branches_ : 1.0;
  if (combining_ == Combining::kMrc) {
    if (law_ == FadingLaw::kRician) {
      return boost::math::quantile(RicianChi2(k_, branches_), p) / (2.0 * (1.0 + k_));
    }
    return boost::math::quantile(MrcGamma(m_, branches_), p);
  }
  return BranchQuantile(std::pow(p, 1.0 / branches_));  // F^L = p
}

double CombinedGain::QuantileComplement(double q) const {
  if (!(q > 0.0) || !(q < 1.0)) return kNaN;
  if (law_ == FadingLaw::kAwgn) return combining_ == Combining::kMrc ? branches_ : 1.0;
  if (combining_ == Combining::kMrc) {
    if (law_ == FadingLaw::kRician) {
      return boost::math::quantile(boost::math::complement(RicianChi2(k_, branches_), q)) /
             (2.0 * (1.0 + k_));
    }
    return boost::math::quantile(boost::math::complement(MrcGamma(m_, branches_), q));
  }
  // 1 - F^L = q: branch survival S = 1 - (1 - q)^{1/L} = -expm1(log1p(-q)/L).
  return BranchQuantileComplement(-std::expm1(std::log1p(-q) / branches_));
}

double CombinedGain::AverageImpl(double (*call)(const void*, double), const void* f) const {
  if (deterministic()) return call(f, combining_ == Combining::kMrc ? branches_ : 1.0);
  const double t_lo = std::log(kAverageLowestGain);
  const double t_hi = std::log(QuantileComplement(kAverageTailMass));
  if (!std::isfinite(t_hi) || !(t_hi > t_lo)) return kNaN;
  auto integrand = [&](double t) {
    const double x = std::exp(t);
    const double density = Pdf(x);
    if (!(density > 0.0)) return 0.0;
    return call(f, x) * density * x;
  };
  // The mass sits within a few units of t = 0; splitting there keeps the
  // long, nearly empty lower tail from hiding the peak.
  const double mid = std::min(std::max(0.0, t_lo + 1.0), t_hi - 1e-3);
  return gauss_kronrod<double, 61>::integrate(integrand, t_lo, mid, kAverageMaxDepth,
                                              kAverageTolerance) +
         gauss_kronrod<double, 61>::integrate(integrand, mid, t_hi, kAverageMaxDepth,
                                              kAverageTolerance);
}

// ---- Error rates ----

double CraigAverage(const CombinedGain& gain, double a_times_snr, double upper) {
  if (std::isnan(a_times_snr) || std::isnan(upper)) return kNaN;
  if (!(upper > 0.0)) return 0.0;
  auto integrand = [&gain, a_times_snr](double t) {
    const double s = std::sin(t);
    if (!(s > 0.0)) return 0.0;
    return gain.Mgf(a_times_snr / (s * s));
  };
  // The integrand rises monotonically to its peak at t = pi/2; splitting
  // there keeps the peak at an end point of each piece.
  // A tabulated MGF (cubic spline, 3e-7) is only piecewise smooth: asking
  // more than its own accuracy would only subdivide.
  const double tolerance = gain.closed_form_mgf() ? kCraigTolerance : kMgfTolerance;
  auto piece = [&](double lo, double hi) {
    if (!(hi > lo)) return 0.0;
    return gauss_kronrod<double, 61>::integrate(integrand, lo, hi, kCraigMaxDepth, tolerance);
  };
  const double half = kPi / 2;
  const double total = upper <= half ? piece(0.0, upper) : piece(0.0, half) + piece(half, upper);
  return total / kPi;
}

namespace {

unsigned Gray(unsigned k) { return k ^ (k >> 1); }

// Fading-averaged error rates by the MGF method (closed-form MGFs). esno is
// the mean Es/N0 per branch, linear.
double MgfPskSer(const CombinedGain& g, int order, double esno) {
  if (order == 2) return CraigAverage(g, esno, kPi / 2);  // Q(sqrt(2 Es/N0))
  if (order == 4) {
    // 2 Q(sqrt(Es/N0)) - Q^2(sqrt(Es/N0)) (Craig: Q^2 over [0, pi/4]).
    return 2.0 * CraigAverage(g, 0.5 * esno, kPi / 2) - CraigAverage(g, 0.5 * esno, kPi / 4);
  }
  const double s = std::sin(kPi / order);
  return CraigAverage(g, esno * s * s, (order - 1) * kPi / order);
}

// Averaged phase tail G(phi) = (1/2 pi) int_0^{pi - phi} M(gamma sin^2 phi /
// sin^2 t) dt (the AWGN G of uncoded_theory.cc averaged over the fading).
double MgfPhaseTail(const CombinedGain& g, double phi, double esno) {
  if (phi >= kPi) return 0.0;
  const double s = std::sin(phi);
  return 0.5 * CraigAverage(g, esno * s * s, kPi - phi);
}

double MgfPskGrayBer(const CombinedGain& g, int order, int m, double esno) {
  if (order == 2) return CraigAverage(g, esno, kPi / 2);
  if (order == 4) return CraigAverage(g, 0.5 * esno, kPi / 2);
  // Sector probabilities exactly as in uncoded_theory.cc, from averaged tails
  // (linear in the tails, so averaging commutes with the combination).
  const double half_sector = kPi / order;
  const int half = order / 2;
  std::vector<double> tail(static_cast<std::size_t>(half) + 1, 0.0);
  for (int j = 0; j < half; ++j) {
    tail[static_cast<std::size_t>(j)] = MgfPhaseTail(g, (2 * j + 1) * half_sector, esno);
  }
  std::vector<double> p(static_cast<std::size_t>(order), 0.0);
  for (int d = 1; d < half; ++d) {
    const double pd = tail[static_cast<std::size_t>(d - 1)] - tail[static_cast<std::size_t>(d)];
    p[static_cast<std::size_t>(d)] = std::max(pd, 0.0);
    p[static_cast<std::size_t>(order - d)] = p[static_cast<std::size_t>(d)];
  }
  p[static_cast<std::size_t>(half)] = 2.0 * tail[static_cast<std::size_t>(half - 1)];
  const unsigned mask = static_cast<unsigned>(order) - 1u;
  double bit_errors = 0.0;
  for (int d = 1; d < order; ++d) {
    double distance_sum = 0.0;
    for (unsigned k = 0; k < static_cast<unsigned>(order); ++k) {
      distance_sum += std::popcount(Gray(k) ^ Gray((k + static_cast<unsigned>(d)) & mask));
    }
    bit_errors += p[static_cast<std::size_t>(d)] * distance_sum / order;
  }
  return bit_errors / m;
}

double MgfQamSer(const CombinedGain& g, int order, double esno) {
  // 4 (1 - 1/L) Q(x) - 4 (1 - 1/L)^2 Q^2(x), x^2 = 3 Es/((M-1) N0).
  const double c = 1.0 - 1.0 / std::sqrt(static_cast<double>(order));
  const double a = 1.5 * esno / (order - 1);
  return 4.0 * c * CraigAverage(g, a, kPi / 2) - 4.0 * c * c * CraigAverage(g, a, kPi / 4);
}

double MgfQamGrayBer(const CombinedGain& g, int order, int m, double esno) {
  // Cho & Yoon, as QamGrayBer in uncoded_theory.cc; each erfc((2i+1) a') =
  // 2 Q(sqrt(2 (2i+1)^2 a'^2)), a'^2 = 3 Es / (2 (M-1) N0), averaged by MGF.
  const int levels = 1 << (m / 2);
  const int axis_bits = m / 2;
  const double a2 = 1.5 * esno / (order - 1);
  double sum_over_k = 0.0;
  for (int k = 1; k <= axis_bits; ++k) {
    const long long two_k1 = 1LL << (k - 1);
    const int upper = levels - (levels >> k) - 1;
    double pk = 0.0;
    for (int i = 0; i <= upper; ++i) {
      const long long num = i * two_k1;
      const long long q = num / levels;
      const long long q_half = (2 * num + levels) / (2 * levels);
      const double sign = (q % 2 == 0) ? 1.0 : -1.0;
      const double weight = static_cast<double>(two_k1 - q_half);
      const double odd = 2.0 * i + 1.0;
      pk += sign * weight * 2.0 * CraigAverage(g, odd * odd * a2, kPi / 2);
    }
    sum_over_k += pk / levels;
  }
  return std::max(sum_over_k / axis_bits, 0.0);
}

// Shared front end: validation, AWGN special case, and the choice between
// the MGF method and the density average (SC without closed-form MGF).
template <typename Mgf, typename Awgn>
double FadingRate(const Modulation& modulation, const ChannelSpec& channel, double ebno_db,
                  Mgf mgf_rate, Awgn awgn_rate) {
  const int m = SupportedBitsPerSymbol(modulation);
  if (m == 0 || std::isnan(ebno_db) || channel.branches < 1) return kNaN;
  const CombinedGain g = CombinedGain::FromSpec(channel);
  if (g.deterministic()) {
    const double array_gain_db =
        g.combining() == Combining::kMrc ? LinearToDb(static_cast<double>(g.branches())) : 0.0;
    return awgn_rate(ebno_db + array_gain_db);
  }
  const double esno = DbToLinear(EsnoDbFromEbnoDb(ebno_db, m));
  return Clamp01(mgf_rate(g, modulation.order, m, esno));
}

}  // namespace

double FadingBer(const Modulation& modulation, const ChannelSpec& channel, double ebno_db) {
  if (channel.law == FadingLaw::kAwgn && channel.branches == 1) {
    return UncodedBer(modulation, ebno_db);  // the AWGN curve itself
  }
  const bool qam = modulation.family == ModulationFamily::kQam;
  return FadingRate(
      modulation, channel, ebno_db,
      [qam](const CombinedGain& g, int order, int m, double esno) {
        return qam ? MgfQamGrayBer(g, order, m, esno) : MgfPskGrayBer(g, order, m, esno);
      },
      [&modulation](double db) { return UncodedBer(modulation, db); });
}

double FadingSer(const Modulation& modulation, const ChannelSpec& channel, double ebno_db) {
  if (channel.law == FadingLaw::kAwgn && channel.branches == 1) {
    return UncodedSer(modulation, ebno_db);
  }
  const bool qam = modulation.family == ModulationFamily::kQam;
  return FadingRate(
      modulation, channel, ebno_db,
      [qam](const CombinedGain& g, int order, int, double esno) {
        return qam ? MgfQamSer(g, order, esno) : MgfPskSer(g, order, esno);
      },
      [&modulation](double db) { return UncodedSer(modulation, db); });
}

double FadingEbnoDbAtBer(const Modulation& modulation, const ChannelSpec& channel, double ber) {
  if (SupportedBitsPerSymbol(modulation) == 0 || !(ber > 0.0) || !(ber < 0.5)) return kNaN;
  auto above = [&](double ebno_db) { return FadingBer(modulation, channel, ebno_db) > ber; };
  double lo = -10.0;
  while (!above(lo)) {
    lo -= 10.0;
    if (lo < -100.0) return kNaN;
  }
  double hi = 20.0;
  while (above(hi)) {
    hi += 10.0;
    if (hi > 300.0) return kNaN;
  }
  const Bracket b = Bisect(lo, hi, 1e-6, above);
  return 0.5 * (b.lo + b.hi);
}

double BpskRayleighMrcBerClosedForm(double ebno_linear, int branches) {
  if (!(ebno_linear >= 0.0) || branches < 1) return kNaN;
  const double mu = std::sqrt(ebno_linear / (1.0 + ebno_linear));
  // (1 - mu)/2 = 1 / (2 (1 + g) (1 + mu)) without cancellation at high SNR.
  const double lower = 0.5 / ((1.0 + ebno_linear) * (1.0 + mu));
  const double upper = 0.5 * (1.0 + mu);
  double sum = 0.0, power = 1.0;
  for (int k = 0; k < branches; ++k) {
    sum += boost::math::binomial_coefficient<double>(static_cast<unsigned>(branches - 1 + k),
                                                     static_cast<unsigned>(k)) *
           power;
    power *= upper;
  }
  return std::pow(lower, branches) * sum;
}

// ---- Ergodic capacities ----

double RayleighErgodicCapacityClosedForm(double snr_linear) {
  if (!(snr_linear >= 0.0)) return kNaN;
  if (snr_linear == 0.0) return 0.0;
  return kLog2e * ScaledE1(1.0 / snr_linear);
}

double ErgodicGaussianCapacity(const ChannelSpec& channel, double esno_db) {
  if (std::isnan(esno_db) || channel.branches < 1) return kNaN;
  const double snr = DbToLinear(esno_db);
  const CombinedGain g = CombinedGain::FromSpec(channel);
  return g.Average([snr](double x) { return std::log1p(snr * x) * kLog2e; });
}

namespace {

// AWGN CM or BICM capacity of a constellation, tabulated against Es/N0 (dB)
// and interpolated (see the file comment of fading_theory.h).
class CapacityTable {
 public:
  CapacityTable(std::span<const cf32> points, bool bicm) {
    m_ = std::countr_zero(points.size());
    std::vector<double> values;
    for (double db = kLowDb; db <= kHighDb + 1e-9; db += kStepDb) {
      const double c = bicm ? BicmCapacity(points, db) : ConstrainedCapacity(points, db);
      values.push_back(c);
      // Saturated: keep a few more points so the spline ends flat.
      if (m_ - c < 1e-12 && values.size() > 8) {
        for (int i = 0; i < 4; ++i) values.push_back(m_);
        break;
      }
    }
    ok_ = values.size() >= 8;
    for (double v : values) ok_ = ok_ && std::isfinite(v);
    if (!ok_) return;
    high_db_ = kLowDb + kStepDb * static_cast<double>(values.size() - 1);
    low_value_ = values.front();
    high_value_ = values.back();
    spline_ = std::make_unique<boost::math::interpolators::cardinal_cubic_b_spline<double>>(
        values.begin(), values.end(), kLowDb, kStepDb);
  }
  bool ok() const { return ok_; }
  double m() const { return m_; }
  // Capacity at linear Es/N0.
  double operator()(double esno) const {
    if (!(esno > 0.0)) return 0.0;
    const double db = LinearToDb(esno);
    if (db <= kLowDb) return low_value_ * esno / DbToLinear(kLowDb);
    if (db >= high_db_) return high_value_;
    return std::min(std::max((*spline_)(db), 0.0), static_cast<double>(m_));
  }

 private:
  static constexpr double kLowDb = -40.0;
  static constexpr double kHighDb = 80.0;
  static constexpr double kStepDb = 0.25;
  int m_ = 0;
  bool ok_ = false;
  double high_db_ = 0, low_value_ = 0, high_value_ = 0;
  std::unique_ptr<boost::math::interpolators::cardinal_cubic_b_spline<double>> spline_;
};

bool ValidPoints(std::span<const cf32> points) {
  return points.size() >= 2 && std::has_single_bit(points.size());
}

double ErgodicTableCapacity(const CapacityTable& table, const ChannelSpec& channel,
                            double esno_db) {
  if (!table.ok() || std::isnan(esno_db) || channel.branches < 1) return kNaN;
  const double snr = DbToLinear(esno_db);
  const CombinedGain g = CombinedGain::FromSpec(channel);
  return g.Average([&table, snr](double x) { return table(snr * x); });
}

// Mean Eb/N0 (dB) where capacity(Es/N0 = rho Eb/N0) reaches rho, searching
// up from `lo` (where the capacity is known to be below rho).
template <typename Capacity>
double MinEbnoDb(double rho, double lo, const Capacity& capacity) {
  auto below = [&](double ebno_db) { return capacity(EsnoDbFromEbnoDb(ebno_db, rho)) < rho; };
  while (!below(lo)) {
    lo -= 5.0;
    if (lo < -200.0) return kNaN;
  }
  double hi = lo + 5.0;
  while (below(hi)) {
    lo = hi;
    hi += 5.0;
    if (hi > 300.0) return kInf;
  }
  const Bracket b = Bisect(lo, hi, 1e-6, below);
  return 0.5 * (b.lo + b.hi);
}

// Upper bound on E[X]: L (exact for MRC; SC's mean is below it).
double GainMeanBound(const ChannelSpec& channel) { return std::max(channel.branches, 1); }

}  // namespace

double ErgodicConstrainedCapacity(std::span<const cf32> points, const ChannelSpec& channel,
                                  double esno_db) {
  if (!ValidPoints(points)) return kNaN;
  return ErgodicTableCapacity(CapacityTable(points, false), channel, esno_db);
}

double ErgodicBicmCapacity(std::span<const cf32> points, const ChannelSpec& channel,
                           double esno_db) {
  if (!ValidPoints(points)) return kNaN;
  return ErgodicTableCapacity(CapacityTable(points, true), channel, esno_db);
}

double ErgodicShannonMinEbnoDb(const ChannelSpec& channel, double rho) {
  if (!(rho > 0.0) || channel.branches < 1) return kNaN;
  // Jensen: E log2(1 + g X) <= log2(1 + g E[X]), so below the AWGN limit
  // lowered by E[X] <= L the capacity is below rho.
  const double lo = ShannonMinEbnoDb(rho) - LinearToDb(GainMeanBound(channel)) - 0.01;
  return MinEbnoDb(rho, lo,
                   [&](double esno_db) { return ErgodicGaussianCapacity(channel, esno_db); });
}

namespace {

double ErgodicTableMinEbnoDb(std::span<const cf32> points, const ChannelSpec& channel, double rho,
                             bool bicm) {
  if (!(rho > 0.0) || !ValidPoints(points) || channel.branches < 1) return kNaN;
  if (rho >= std::countr_zero(points.size())) return kInf;
  const CapacityTable table(points, bicm);
  if (!table.ok()) return kNaN;
  // C_CM <= log2(1 + gamma) pointwise: the Gaussian ergodic limit is below.
  const double lo = ErgodicShannonMinEbnoDb(channel, rho) - 0.01;
  if (std::isnan(lo)) return kNaN;
  return MinEbnoDb(rho, lo,
                   [&](double esno_db) { return ErgodicTableCapacity(table, channel, esno_db); });
}

}  // namespace

double ErgodicConstrainedMinEbnoDb(std::span<const cf32> points, const ChannelSpec& channel,
                                   double rho) {
  return ErgodicTableMinEbnoDb(points, channel, rho, false);
}

double ErgodicBicmMinEbnoDb(std::span<const cf32> points, const ChannelSpec& channel, double rho) {
  return ErgodicTableMinEbnoDb(points, channel, rho, true);
}

// ---- Outage ----

double GaussianOutageThresholdEsnoDb(double rho) {
  if (!(rho > 0.0)) return kNaN;
  return LinearToDb(std::expm1(rho * std::numbers::ln2));
}

double OutageThresholdEsnoDb(std::span<const cf32> points, double rho) {
  if (!(rho > 0.0) || !ValidPoints(points)) return kNaN;
  const double ebno_db = ConstrainedMinEbnoDb(points, rho);
  if (std::isinf(ebno_db)) return kInf;
  return EsnoDbFromEbnoDb(ebno_db, rho);
}

double OutageProbabilityAtThreshold(const ChannelSpec& channel, double threshold_esno_db,
                                    double rho, double ebno_db) {
  if (!(rho > 0.0) || std::isnan(threshold_esno_db) || std::isnan(ebno_db) ||
      channel.branches < 1) {
    return kNaN;
  }
  if (std::isinf(threshold_esno_db)) return threshold_esno_db > 0 ? 1.0 : 0.0;
  const double mean_esno_db = EsnoDbFromEbnoDb(ebno_db, rho);
  // P(gamma_bar X < gamma_th) = F_X(gamma_th / gamma_bar).
  return CombinedGain::FromSpec(channel).Cdf(DbToLinear(threshold_esno_db - mean_esno_db));
}

double OutageProbabilityGaussian(const ChannelSpec& channel, double rho, double ebno_db) {
  return OutageProbabilityAtThreshold(channel, GaussianOutageThresholdEsnoDb(rho), rho, ebno_db);
}

double OutageProbabilityConstrained(std::span<const cf32> points, const ChannelSpec& channel,
                                    double rho, double ebno_db) {
  return OutageProbabilityAtThreshold(channel, OutageThresholdEsnoDb(points, rho), rho, ebno_db);
}

double OutageEbnoDbAtProbability(const ChannelSpec& channel, double threshold_esno_db, double rho,
                                 double p) {
  if (!(p > 0.0) || !(p < 1.0) || !(rho > 0.0) || std::isnan(threshold_esno_db)) return kNaN;
  if (std::isinf(threshold_esno_db)) return threshold_esno_db;
  const double x = CombinedGain::FromSpec(channel).Quantile(p);
  if (!(x > 0.0)) return kNaN;
  // gamma_bar = gamma_th / x_p, in Eb/N0.
  return EbnoDbFromEsnoDb(threshold_esno_db - LinearToDb(x), rho);
}

}  // namespace capgap::analysis
