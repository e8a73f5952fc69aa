// Density-evolution thresholds: edge distributions, the Gaussian-
// approximation recursion with an accurate phi, and quantized density
// evolution of the sum-product decoder, both with a bisection on sigma.
//
// phi. With the symmetry p(-u) = exp(-u) p(u) of U ~ N(x, 2x),
//   phi(x) = E[2 / (1 + e^U)] = integral_0^inf 4 / (1 + e^u) p(u) du
//          = exp(-x/4) (4 pi x)^(-1/2) I(x),
//   I(x) = integral_0^inf 2 sech(u/2) exp(-u^2 / (4x)) du,
// whose integrand is positive and bounded (no cancellation, no underflow).
// ln phi is tabulated once as 24-term Chebyshev series on [0, 1/4], [1/4, 1/2]
// and octaves up to 2048, I(x) at the nodes by Gauss-Legendre panels
// (Boost.Math); building the table takes about a millisecond. The inverse is
// a second Chebyshev series per segment (x as a function of ln phi) polished
// by one Newton step. Beyond 2048 the asymptotic series
//   phi(x) = sqrt(pi/x) exp(-x/4) sum_k (-1)^k pi^(2k) |E_2k| / (k! (4x)^k)
// (E_2k the Euler numbers; from expanding exp(-u^2/(4x)) in I(x) and the
// moments integral_0^inf v^(2k) sech v dv = (pi/2)^(2k+1) |E_2k|) is used with
// seven terms; the first omitted term is below 2e-16 there. Its leading term
// is the large-x form quoted by Chung, Richardson and Urbanke.
//
// Gaussian approximation (Chung, Richardson, Urbanke 2001, irregular form):
// with channel mean m0 = 2/sigma^2 and check-to-variable mean mu (mu = 0 at
// the start),
//   s = sum_i lambda_i phi(m0 + (i-1) mu),
//   mu' = sum_j rho_j phi^-1(1 - (1 - s)^(j-1)),
// evaluated in the log domain (log-sum-exp for s, expm1/log1p for the power).
// The sequence mu increases; sigma decodes when mu reaches kGaSuccessMean
// (error probability of such a message Q(sqrt(mu/2)) < 1e-12) and fails when
// mu stops growing (relative step < kGaStallFraction) or after
// kGaMaxIterations. The threshold moves by less than 1e-6 in sigma when the
// success mean is changed from 20 to 2000 or the stall fraction from 1e-13
// to 1e-7 ((3,6) and the RSU-4 ensemble of the tests).
//
// Quantized DE. Messages are pmfs on k * step, |k| <= M = llr_max / step,
// held in sign-magnitude form (mass at +k, mass at -k, mass at 0). The
// channel pmf integrates N(2/sigma^2, 4/sigma^2) over [k - 1/2, k + 1/2] step,
// the tails going to the end points. Check node: the pairwise rule
//   R(a, b) = 2 atanh(tanh(a/2) tanh(b/2))
//           = sign(a) sign(b) [min + ln(1 + e^-(|a|+|b|)) - ln(1 + e^-||a|-|b||)]
// rounded to the grid (the discretized rule of Chung, Forney, Richardson,
// Urbanke), applied over d-1 inputs as a balanced tree R(R^(n/2), R^(n-n/2))
// with the powers shared between check degrees. For fixed smaller magnitude
// i, the rounded magnitude T(i, j), j >= i, is non-decreasing in j and equals
// i from j - i ~ ln(2/step)/step on, so it takes only the values T(i, i)..i
// (about ln 2 / step + 1 of them): the table stores where each value's run
// of j starts, and the mass of each run comes from suffix sums of the other
// input. A pairwise operation costs O(M ln 2 / step), not O(M^2). Variable
// node: channel plus d-1 check messages for all degrees at once in the
// Fourier domain (double precision, Eigen's FFT module: the project's FFTW
// plans are single precision, too coarse here; an FFT of size >= 2 d_max M + 1
// has no wrap-around), the sum saturated to +-M afterwards. Both updates are
// renormalised to total mass 1: the mass m maps to m^((dv-1)(dc-1)) per
// iteration, so rounding errors in it would grow geometrically. Error
// probability: mass below 0 plus half the mass at 0 of the variable-to-check
// pmf. Saturation bounds the reliability of correct messages, which leaves an
// error floor of roughly exp(-llr_max/2) for ensembles with degree-2 variable
// nodes near their stability limit (RSU-4 at sigma = 0.9116: 5e-7 with
// llr_max = 25, 4e-8 with 30); the default target 1e-6 stays above it.
//
// Bisection. An ensemble cannot decode above the capacity sigma of its design
// rate (BinaryInputMinEbnoDb), nor above the stability limit
// lambda_2 rho'(1) exp(-1/(2 sigma^2)) < 1 (Richardson, Shokrollahi, Urbanke
// 2001), so the bracket's upper end is the smaller of the two; if the
// ensemble decodes at its stability limit, that limit is the threshold. The
// bound matters: an error-probability target cannot tell a tiny fixed point
// from zero, and without it quantized DE "decodes" the RSU-4 ensemble of the
// tests up to sigma = 0.9143, above its stability limit 0.9116.
//
// Accuracy vs cost of the quantized threshold (llr_max 30, target 1e-6,
// stall 1e-5, sigma tolerance 1e-4; CPU time, Release, one core of a shared
// machine, so +-30 %):
//   step     (3,6) sigma   Eb/N0 dB   time     (4,8) sigma   Eb/N0 dB   time
//   0.1      0.88056       1.1048     0.2 s    0.83727       1.5427     0.3 s
//   0.05     0.88078       1.1027     0.5 s    0.83755       1.5398     0.6 s
//   0.025    0.88085       1.1020     1.5 s    0.83763       1.5390     1.6 s
//   0.0125   0.88085       1.1020     4.7 s    0.83763       1.5390     4.7 s
// against sigma* = 0.8809 (1.1015 dB) and 0.8376 (1.5400 dB) published in
// RSU 2001. The stall fraction 1e-5 gives the same (3,6) threshold as 1e-8 in
// 60 % of the time; 1e-4 lowers it by 0.0007 dB.
#include "analysis/density_evolution.h"

#include <algorithm>
#include <array>
#include <boost/math/quadrature/gauss.hpp>
#include <cmath>
#include <complex>
#include <cstdio>
#include <limits>
#include <numbers>
#include <unsupported/Eigen/FFT>

#include "analysis/bisection.h"
#include "analysis/capacity.h"

namespace capgap::analysis {
namespace {

constexpr double kPi = std::numbers::pi;
constexpr double kSumTolerance = 1e-9;

// ------------------------------------------------------------------ phi --

constexpr int kChebyshevTerms = 24;
constexpr double kPhiTableMax = 2048.0;

struct ChebyshevSegment {
  double a = 0.0;
  double b = 0.0;
  double log_phi_a = 0.0;  // ln phi at the ends, for the inverse
  double log_phi_b = 0.0;
  std::array<double, kChebyshevTerms> c{};
  std::array<double, kChebyshevTerms> dc{};       // series of d ln phi / dt
  std::array<double, kChebyshevTerms> inverse{};  // x as a series in ln phi
};

// ln phi(x) for x > 0 by quadrature (see the file comment): 30-point
// Gauss-Legendre on 8 equal panels of [0, B], B = min(80, 20 sqrt(x)); the
// neglected tail is below exp(-40) relative (sech decay) or exp(-100)
// (Gaussian factor).
double LogPhiByQuadrature(double x) {
  constexpr int kPanels = 8;
  const double upper = std::min(80.0, 20.0 * std::sqrt(x));
  auto integrand = [x](double u) {
    return 2.0 / std::cosh(0.5 * u) * std::exp(-u * u / (4.0 * x));
  };
  double integral = 0.0;
  for (int p = 0; p < kPanels; ++p) {
    integral += boost::math::quadrature::gauss<double, 30>::integrate(
        integrand, upper * p / kPanels, upper * (p + 1) / kPanels);
  }
  return -0.25 * x - 0.5 * std::log(4.0 * kPi * x) + std::log(integral);
}

// Asymptotic series: returns ln phi(x) and, in *derivative, d ln phi / dx.
double LogPhiAsymptotic(double x, double* derivative) {
  // Terms pi^(2k) |E_2k| / (k! 4^k) x^-k, k = 0..6, with the Euler numbers
  // |E_2k| = 1, 1, 5, 61, 1385, 50521, 2702765 (from memory; the test checks
  // ln phi(3000) against a 400-digit integration of the definition).
  static constexpr std::array<double, 7> kEuler = {1.0, 1.0, 5.0, 61.0, 1385.0, 50521.0, 2702765.0};
  double sum = 0.0;
  double dsum = 0.0;
  double coefficient = 1.0;  // pi^(2k) / (k! 4^k)
  double power = 1.0;        // x^-k
  for (std::size_t k = 0; k < kEuler.size(); ++k) {
    const double sign = (k % 2 == 0) ? 1.0 : -1.0;
    const double term = sign * coefficient * kEuler[k] * power;
    sum += term;
    dsum -= static_cast<double>(k) * term / x;
    coefficient *= kPi * kPi / (4.0 * static_cast<double>(k + 1));
    power /= x;
  }
  if (derivative != nullptr) *derivative = -0.25 - 0.5 / x + dsum / sum;
  return -0.25 * x + 0.5 * std::log(kPi / x) + std::log(sum);
}

double Clenshaw(const std::array<double, kChebyshevTerms>& c, double t) {
  double b1 = 0.0;
  double b2 = 0.0;
  for (std::size_t j = kChebyshevTerms - 1; j >= 1; --j) {
    const double b0 = 2.0 * t * b1 - b2 + c[j];
    b2 = b1;
    b1 = b0;
  }
  return t * b1 - b2 + 0.5 * c[0];
}

double EvalChebyshev(const ChebyshevSegment& s, double x) {
  return Clenshaw(s.c, (2.0 * x - s.a - s.b) / (s.b - s.a));
}

double EvalChebyshevDerivative(const ChebyshevSegment& s, double x) {
  return Clenshaw(s.dc, (2.0 * x - s.a - s.b) / (s.b - s.a)) * 2.0 / (s.b - s.a);
}

// Safeguarded Newton for EvalChebyshev(seg, x) = log_y from x in [lo, hi]
// (ln phi decreases, so f > 0 puts the root above x), at most `steps` steps.
double NewtonRefine(const ChebyshevSegment& seg, double log_y, double x, double lo, double hi,
                    int steps) {
  for (int k = 0; k < steps; ++k) {
    const double f = EvalChebyshev(seg, x) - log_y;
    if (f > 0.0) {
      lo = x;
    } else if (f < 0.0) {
      hi = x;
    } else {
      return x;
    }
    double next = x - f / EvalChebyshevDerivative(seg, x);
    if (!(next >= lo && next <= hi)) next = 0.5 * (lo + hi);
    if (std::abs(next - x) <= 4e-16 * x + 1e-300) return next;
    x = next;
  }
  return x;
}

// Newton for log_phi(x) = log_y with x kept >= floor, from x, for a
// log_phi(x, &derivative) that returns ln phi(x) and sets d ln phi / dx;
// stops when a step moves x by at most rel_tol x, or after `steps` steps.
template <typename LogPhi>
double NewtonAboveFloor(LogPhi&& log_phi, double log_y, double x, double floor, int steps,
                        double rel_tol) {
  for (int k = 0; k < steps; ++k) {
    double derivative = 0.0;
    const double f = log_phi(x, &derivative) - log_y;
    const double next = std::max(floor, x - f / derivative);
    if (std::abs(next - x) <= rel_tol * x) return next;
    x = next;
  }
  return x;
}

// Root in the segment from linear interpolation of its end values.
double NewtonInverse(const ChebyshevSegment& seg, double log_y, int steps) {
  double x = seg.a + (seg.b - seg.a) * (log_y - seg.log_phi_a) / (seg.log_phi_b - seg.log_phi_a);
  return NewtonRefine(seg, log_y, std::clamp(x, seg.a, seg.b), seg.a, seg.b, steps);
}

struct PhiTable {
  std::vector<ChebyshevSegment> segments;
};

PhiTable BuildPhiTable() {
  std::vector<double> breaks = {0.0, 0.25, 0.5};
  while (breaks.back() < kPhiTableMax) breaks.push_back(2.0 * breaks.back());
  PhiTable table;
  for (std::size_t s = 0; s + 1 < breaks.size(); ++s) {
    ChebyshevSegment seg;
    seg.a = breaks[s];
    seg.b = breaks[s + 1];
    std::array<double, kChebyshevTerms> values{};
    constexpr double n = kChebyshevTerms;
    for (int k = 0; k < kChebyshevTerms; ++k) {
      const double t = std::cos(kPi * (k + 0.5) / n);
      values[static_cast<std::size_t>(k)] =
          LogPhiByQuadrature(0.5 * (seg.a + seg.b) + 0.5 * (seg.b - seg.a) * t);
    }
    for (int j = 0; j < kChebyshevTerms; ++j) {
      double acc = 0.0;
      for (int k = 0; k < kChebyshevTerms; ++k) {
        acc += values[static_cast<std::size_t>(k)] * std::cos(kPi * j * (k + 0.5) / n);
      }
      seg.c[static_cast<std::size_t>(j)] = 2.0 * acc / n;
    }
    // Derivative series: d_(j-1) = d_(j+1) + 2 j c_j (same c_0/2 convention).
    for (std::size_t j = kChebyshevTerms - 1; j >= 1; --j) {
      const double above = j + 1 < kChebyshevTerms ? seg.dc[j + 1] : 0.0;
      seg.dc[j - 1] = above + 2.0 * static_cast<double>(j) * seg.c[j];
    }
    table.segments.push_back(seg);
  }
  for (ChebyshevSegment& seg : table.segments) {
    seg.log_phi_a = seg.a == 0.0 ? 0.0 : EvalChebyshev(seg, seg.a);
    seg.log_phi_b = EvalChebyshev(seg, seg.b);
    // The inverse x(ln phi) on [log_phi_b, log_phi_a], fitted to Newton
    // solutions at the Chebyshev nodes.
    std::array<double, kChebyshevTerms> values{};
    constexpr double n = kChebyshevTerms;
    for (int k = 0; k < kChebyshevTerms; ++k) {
      const double t = std::cos(kPi * (k + 0.5) / n);
      const double g =
          0.5 * (seg.log_phi_a + seg.log_phi_b) + 0.5 * (seg.log_phi_a - seg.log_phi_b) * t;
      values[static_cast<std::size_t>(k)] = NewtonInverse(seg, g, 60);
    }
    for (int j = 0; j < kChebyshevTerms; ++j) {
      double acc = 0.0;
      for (int k = 0; k < kChebyshevTerms; ++k) {
        acc += values[static_cast<std::size_t>(k)] * std::cos(kPi * j * (k + 0.5) / n);
      }
      seg.inverse[static_cast<std::size_t>(j)] = 2.0 * acc / n;
    }
  }
  return table;
}

const PhiTable& GetPhiTable() {
  static const PhiTable table = BuildPhiTable();  // thread-safe initialisation
  return table;
}

// ---------------------------------------------- degree distribution data --

struct Degree {
  int degree;
  double fraction;
};

std::vector<Degree> NonZero(const std::vector<double>& coefficients) {
  std::vector<Degree> out;
  for (std::size_t d = 0; d < coefficients.size(); ++d) {
    if (coefficients[d] > 0.0) out.push_back({static_cast<int>(d), coefficients[d]});
  }
  return out;
}

double Lambda2(const EdgeDistribution& e) { return e.lambda.size() > 2 ? e.lambda[2] : 0.0; }

double RhoPrimeAtOne(const EdgeDistribution& e) {
  double sum = 0.0;
  for (std::size_t d = 2; d < e.rho.size(); ++d) sum += e.rho[d] * static_cast<double>(d - 1);
  return sum;
}

// Largest sigma with lambda_2 rho'(1) exp(-1/(2 sigma^2)) < 1 (infinite when
// lambda_2 rho'(1) <= 1).
double StabilitySigma(const EdgeDistribution& e) {
  const double product = Lambda2(e) * RhoPrimeAtOne(e);
  if (product <= 1.0) return std::numeric_limits<double>::infinity();
  return std::sqrt(1.0 / (2.0 * std::log(product)));
}

double CapacitySigma(double rate) {
  const double ebno_linear = std::pow(10.0, BinaryInputMinEbnoDb(rate) / 10.0);
  return std::sqrt(1.0 / (2.0 * rate * ebno_linear));
}

double EbnoDb(double rate, double sigma) {
  return 10.0 * std::log10(1.0 / (2.0 * rate * sigma * sigma));
}

std::string Format(const char* format, auto... args) {
  char buffer[512];
  std::snprintf(buffer, sizeof buffer, format, args...);
  return buffer;
}

Status ValidateRate(double rate) {
  if (!(rate > 0.0 && rate <= 1.0))
    return Status::Error(Format("rate = %g: must be in (0, 1]", rate));
  return Status::Ok();
}

// Bisection on sigma for a monotone predicate decodes(sigma). The upper end
// is min(capacity sigma, stability sigma). Returns the largest sigma found to
// decode, with *stability_limited set when that is the stability limit.
template <typename Decodes>
Result<double> BisectThreshold(const EdgeDistribution& e, double tolerance, Decodes&& decodes,
                               bool* stability_limited) {
  const double capacity_sigma = CapacitySigma(DesignRate(e));
  const double stability_sigma = StabilitySigma(e);
  double hi = std::min(capacity_sigma, stability_sigma);
  *stability_limited = false;
  if (decodes(hi)) {
    if (stability_sigma < capacity_sigma) {
      *stability_limited = true;
      return hi;
    }
    return Status::Error(
        Format("density evolution decodes at the capacity sigma %.6f of design rate %.6f: the "
               "discretization is too coarse to be trusted",
               capacity_sigma, DesignRate(e)));
  }
  double lo = hi;
  for (int k = 0;; ++k) {
    lo *= 0.85;
    if (decodes(lo)) break;
    hi = lo;
    if (k == 40) {
      return Status::Error(Format("density evolution fails even at sigma = %.3g", lo));
    }
  }
  return Bisect(lo, hi, tolerance, decodes).lo;
}

// A threshold by BisectThreshold as a ThresholdResult: the description is
// `method_text` followed by the bisection tolerance and, when it applies,
// the stability-limit note.
template <typename Decodes>
Result<ThresholdResult> ThresholdByBisection(const EdgeDistribution& e, double rate,
                                             double tolerance, DeMethod method,
                                             const std::string& method_text, Decodes&& decodes) {
  bool stability_limited = false;
  Result<double> sigma = BisectThreshold(e, tolerance, decodes, &stability_limited);
  if (!sigma.ok()) return sigma.status();
  ThresholdResult result;
  result.sigma = sigma.value();
  result.ebno_db = EbnoDb(rate, result.sigma);
  result.method = method;
  result.description =
      method_text + Format("; bisection on sigma to %g%s", tolerance,
                           stability_limited ? "; threshold = stability limit" : "");
  return result;
}

// ----------------------------------------------- Gaussian approximation --

constexpr double kGaSuccessMean = 100.0;
constexpr int kGaMaxIterations = 200000;
constexpr double kGaStallFraction = 1e-9;

// The closed-form fit of Chung, Richardson, Urbanke 2001 (their eq. for
// phi; constants from memory):
//   phi(x) ~ exp(-0.4527 x^0.86 + 0.0218)          0 < x < 10,
//   phi(x) ~ sqrt(pi/x) exp(-x/4) (1 - 10/(7x))     x >= 10.
// The two pieces do not meet at 10 (0.03848 vs 0.03943); the inverse takes
// the small-x branch for y >= 0.03848 and the large-x branch below.
constexpr double kFitA = 0.4527;
constexpr double kFitB = 0.86;
constexpr double kFitC = 0.0218;
constexpr double kFitBreak = 10.0;

double LogPhiFitLarge(double x, double* derivative) {
  const double g = 1.0 - 10.0 / (7.0 * x);
  if (derivative != nullptr) *derivative = -0.25 - 0.5 / x + 10.0 / (7.0 * x * x) / g;
  return 0.5 * std::log(kPi / x) - 0.25 * x + std::log(g);
}

double LogPhiFit(double x) {
  if (!(x > 0.0)) return 0.0;
  if (x < kFitBreak) return -kFitA * std::pow(x, kFitB) + kFitC;
  return LogPhiFitLarge(x, nullptr);
}

double PhiFitInverseLog(double log_y) {
  if (!(log_y < 0.0)) return 0.0;
  const double log_small_end = -kFitA * std::pow(kFitBreak, kFitB) + kFitC;
  if (log_y >= log_small_end) return std::pow((kFitC - log_y) / kFitA, 1.0 / kFitB);
  return NewtonAboveFloor(LogPhiFitLarge, log_y, std::max(kFitBreak, -4.0 * log_y), kFitBreak,
                          100, 1e-14);
}

// ln(1 - (1 - s)^n) for s = exp(log_s) in (0, 1], n >= 1.
double LogOneMinusPower(double log_s, int n) {
  if (log_s < -700.0) return std::log(static_cast<double>(n)) + log_s;  // s < 1e-304
  const double t = static_cast<double>(n) * std::log1p(-std::exp(log_s));
  return std::log(-std::expm1(t));
}

template <typename LogPhi, typename PhiInverseLog>
bool GaDecodes(const std::vector<Degree>& lambda, const std::vector<Degree>& rho, double sigma,
               LogPhi log_phi, PhiInverseLog phi_inverse_log) {
  const double m0 = 2.0 / (sigma * sigma);
  std::vector<double> terms(lambda.size());
  double mu = 0.0;
  for (int iteration = 0; iteration < kGaMaxIterations; ++iteration) {
    double largest = -std::numeric_limits<double>::infinity();
    for (std::size_t i = 0; i < lambda.size(); ++i) {
      terms[i] = std::log(lambda[i].fraction) +
                 log_phi(m0 + static_cast<double>(lambda[i].degree - 1) * mu);
      largest = std::max(largest, terms[i]);
    }
    double sum = 0.0;
    for (double t : terms) sum += std::exp(t - largest);
    const double log_s = std::min(largest + std::log(sum), 0.0);
    double next = 0.0;
    for (const Degree& r : rho) {
      next += r.fraction * phi_inverse_log(LogOneMinusPower(log_s, r.degree - 1));
    }
    if (next >= kGaSuccessMean) return true;
    if (next - mu <= kGaStallFraction * next) return false;
    mu = next;
  }
  return false;
}

// ------------------------------------------------------ quantized DE --

// FFTs of at most 2^22 points (about 170 MB of buffers).
constexpr double kMaxFftPoints = 1 << 21;

// pos[k]: mass at +k step (pos[0]: mass at 0); neg[k]: mass at -k step
// (neg[0] unused, 0).
struct SignMagnitudePmf {
  std::vector<double> pos;
  std::vector<double> neg;
};

class QuantizedDensityEvolution {
 public:
  QuantizedDensityEvolution(const EdgeDistribution& e, const QuantizedDeOptions& options)
      : options_(options),
        lambda_(NonZero(e.lambda)),
        rho_(NonZero(e.rho)),
        m_(static_cast<int>(std::lround(options.llr_max / options.llr_step))) {
    BuildCheckTable();
    const int max_var_degree = lambda_.back().degree;
    // Channel + (d-1) check messages span [-d M, d M]: no wrap-around.
    nfft_ = 1;
    while (nfft_ < 2 * max_var_degree * m_ + 1) nfft_ *= 2;
    fft_.SetFlag(Eigen::FFT<double>::HalfSpectrum);
    const std::size_t mag = static_cast<std::size_t>(m_) + 1;
    powers_.resize(static_cast<std::size_t>(rho_.back().degree));
    have_.assign(powers_.size(), 0);
    for (SignMagnitudePmf* p : {&channel_, &v_, &u_}) {
      p->pos.assign(mag, 0.0);
      p->neg.assign(mag, 0.0);
    }
    for (SignMagnitudePmf& p : powers_) {
      p.pos.assign(mag, 0.0);
      p.neg.assign(mag, 0.0);
    }
    suffix_a_pos_.assign(mag + 1, 0.0);
    suffix_a_neg_.assign(mag + 1, 0.0);
    suffix_b_pos_.assign(mag + 1, 0.0);
    suffix_b_neg_.assign(mag + 1, 0.0);
    time_.assign(static_cast<std::size_t>(nfft_), 0.0);
    const std::size_t bins = static_cast<std::size_t>(nfft_ / 2 + 1);
    spectrum_u_.assign(bins, {});
    spectrum_channel_.assign(bins, {});
    spectrum_power_.assign(bins, {});
    spectrum_sum_.assign(bins, {});
  }

  bool Decodes(double sigma) {
    SetChannel(sigma);
    v_ = channel_;
    double previous = ErrorProbability(v_);
    for (int iteration = 1; iteration <= options_.max_iterations; ++iteration) {
      if (options_.stop && options_.stop->load(std::memory_order_relaxed)) return false;
      CheckNodeUpdate();
      const double pe = VariableNodeUpdate();
      if (pe <= options_.target_error_probability) return true;
      if (previous - pe < options_.stall_fraction * pe) return false;
      previous = pe;
    }
    return false;
  }

 private:
  // R(x, y) for 0 <= x <= y, in LLR units.
  static double CheckRule(double x, double y) {
    return x + std::log1p(std::exp(-(x + y))) - std::log1p(std::exp(-(y - x)));
  }

  // For each smaller magnitude i, T(i, j) (j >= i) is non-decreasing in j
  // and ends at i: record where each value k in [T(i, i), i] starts.
  void BuildCheckTable() {
    const double step = options_.llr_step;
    const std::size_t m = static_cast<std::size_t>(m_);
    run_offset_.assign(m + 2, 0);
    lowest_.assign(m + 1, 0);
    run_start_.clear();
    for (std::size_t i = 1; i <= m; ++i) {
      auto rounded = [&](std::size_t j) {
        const double r = CheckRule(static_cast<double>(i) * step, static_cast<double>(j) * step);
        return static_cast<std::size_t>(std::floor(r / step + 0.5));
      };
      const std::size_t lowest = std::min(rounded(i), i);
      lowest_[i] = lowest;
      run_offset_[i] = run_start_.size();
      std::size_t j = i;
      for (std::size_t k = lowest; k <= i; ++k) {
        while (j <= m && rounded(j) < k) ++j;
        run_start_.push_back(j);  // first j >= i with T(i, j) >= k (M + 1 if none)
      }
      run_start_.push_back(m + 1);  // end of the last run
    }
    run_offset_[m + 1] = run_start_.size();
  }

  void SetChannel(double sigma) {
    const double mean = 2.0 / (sigma * sigma);
    const double sd = std::sqrt(2.0 * mean);
    const double step = options_.llr_step;
    // P(L < t) and P(L > t), each accurate in its own tail.
    auto below = [&](double t) {
      return 0.5 * std::erfc(-(t - mean) / (sd * std::numbers::sqrt2));
    };
    auto above = [&](double t) { return 0.5 * std::erfc((t - mean) / (sd * std::numbers::sqrt2)); };
    auto mass = [&](int k) {
      if (k == -m_) return below((k + 0.5) * step);
      if (k == m_) return above((k - 0.5) * step);
      const double lo = (k - 0.5) * step;
      const double hi = (k + 0.5) * step;
      return hi <= mean ? below(hi) - below(lo) : above(lo) - above(hi);
    };
    std::fill(time_.begin(), time_.end(), 0.0);
    for (int k = -m_; k <= m_; ++k) {
      const double p = mass(k);
      if (k >= 0) {
        channel_.pos[static_cast<std::size_t>(k)] = p;
      } else {
        channel_.neg[static_cast<std::size_t>(-k)] = p;
      }
      time_[Wrap(k)] = p;
    }
    fft_.fwd(spectrum_channel_.data(), time_.data(), nfft_);
  }

  std::size_t Wrap(int v) const { return static_cast<std::size_t>(v >= 0 ? v : nfft_ + v); }

  static double ErrorProbability(const SignMagnitudePmf& p) {
    double sum = 0.5 * p.pos[0];
    for (std::size_t k = 1; k < p.neg.size(); ++k) sum += p.neg[k];
    return sum;
  }

  static void Suffix(const std::vector<double>& x, std::vector<double>& s) {
    s.back() = 0.0;
    for (std::size_t k = x.size(); k-- > 1;) s[k] = s[k + 1] + x[k];
    s[0] = s[1] + x[0];
  }

  // out = R(a, b) (distribution of the rounded pairwise check rule).
  void CheckPair(const SignMagnitudePmf& a, const SignMagnitudePmf& b, SignMagnitudePmf& out) {
    std::fill(out.pos.begin(), out.pos.end(), 0.0);
    std::fill(out.neg.begin(), out.neg.end(), 0.0);
    Suffix(a.pos, suffix_a_pos_);
    Suffix(a.neg, suffix_a_neg_);
    Suffix(b.pos, suffix_b_pos_);
    Suffix(b.neg, suffix_b_neg_);
    const double total_a = suffix_a_pos_[0] + suffix_a_neg_[1];
    const double total_b = suffix_b_pos_[0] + suffix_b_neg_[1];
    double* same = out.pos.data();  // sign(a) = sign(b): positive result
    double* diff = out.neg.data();
    const std::size_t m = static_cast<std::size_t>(m_);
    // |a| = i <= |b| = j: the run of j giving magnitude k is
    // [starts[k - lowest], starts[k - lowest + 1]); its b mass by suffix sums.
    for (std::size_t i = 1; i <= m; ++i) {
      const double ap = a.pos[i];
      const double an = a.neg[i];
      if (ap == 0.0 && an == 0.0) continue;
      const std::size_t* starts = run_start_.data() + run_offset_[i];
      for (std::size_t k = lowest_[i], r = 0; k <= i; ++k, ++r) {
        const std::size_t lo = starts[r];
        const std::size_t hi = starts[r + 1];
        if (lo >= hi) continue;
        const double bp = suffix_b_pos_[lo] - suffix_b_pos_[hi];
        const double bn = suffix_b_neg_[lo] - suffix_b_neg_[hi];
        same[k] += ap * bp + an * bn;
        diff[k] += ap * bn + an * bp;
      }
    }
    // |b| = j < |a| = i (i = j was counted above).
    for (std::size_t j = 1; j <= m; ++j) {
      const double bp = b.pos[j];
      const double bn = b.neg[j];
      if (bp == 0.0 && bn == 0.0) continue;
      const std::size_t* starts = run_start_.data() + run_offset_[j];
      for (std::size_t k = lowest_[j], r = 0; k <= j; ++k, ++r) {
        const std::size_t lo = std::max(starts[r], j + 1);
        const std::size_t hi = starts[r + 1];
        if (lo >= hi) continue;
        const double ap = suffix_a_pos_[lo] - suffix_a_pos_[hi];
        const double an = suffix_a_neg_[lo] - suffix_a_neg_[hi];
        same[k] += ap * bp + an * bn;
        diff[k] += ap * bn + an * bp;
      }
    }
    // Either input at 0 gives 0; rounded results 0 of either sign too.
    const double a0 = a.pos[0];
    const double b0 = b.pos[0];
    out.pos[0] = same[0] + diff[0] + a0 * total_b + b0 * total_a - a0 * b0;
    out.neg[0] = 0.0;
  }

  // powers_[n] = R^n(v_), the check rule over n inputs, built as
  // R(R^(n/2), R^(n - n/2)) with memoisation: (3,6) needs 3 pairwise
  // operations, not 4, and fewer rounding stages.
  const SignMagnitudePmf& Power(std::size_t n) {
    if (!have_[n]) {
      if (n == 1) {
        powers_[1] = v_;
      } else {
        const std::size_t half = n / 2;
        Power(half);
        Power(n - half);
        CheckPair(powers_[half], powers_[n - half], powers_[n]);
      }
      have_[n] = 1;
    }
    return powers_[n];
  }

  // u_ = sum_d rho_d R^(d-1)(v_).
  void CheckNodeUpdate() {
    std::fill(u_.pos.begin(), u_.pos.end(), 0.0);
    std::fill(u_.neg.begin(), u_.neg.end(), 0.0);
    std::fill(have_.begin(), have_.end(), 0);
    for (const Degree& r : rho_) {
      const SignMagnitudePmf& p = Power(static_cast<std::size_t>(r.degree - 1));
      for (std::size_t k = 0; k < u_.pos.size(); ++k) {
        u_.pos[k] += r.fraction * p.pos[k];
        u_.neg[k] += r.fraction * p.neg[k];
      }
    }
    Normalize(u_);
  }

  // v_ = channel (+) sum_d lambda_d u_^(+)(d-1), saturated; returns P(error).
  double VariableNodeUpdate() {
    std::fill(time_.begin(), time_.end(), 0.0);
    time_[0] = u_.pos[0];
    for (int k = 1; k <= m_; ++k) {
      time_[Wrap(k)] = u_.pos[static_cast<std::size_t>(k)];
      time_[Wrap(-k)] = u_.neg[static_cast<std::size_t>(k)];
    }
    fft_.fwd(spectrum_u_.data(), time_.data(), nfft_);
    std::fill(spectrum_sum_.begin(), spectrum_sum_.end(), std::complex<double>());
    std::fill(spectrum_power_.begin(), spectrum_power_.end(), std::complex<double>(1.0, 0.0));
    int power_degree = 0;
    for (const Degree& l : lambda_) {
      while (power_degree < l.degree - 1) {
        for (std::size_t f = 0; f < spectrum_power_.size(); ++f)
          spectrum_power_[f] *= spectrum_u_[f];
        ++power_degree;
      }
      for (std::size_t f = 0; f < spectrum_sum_.size(); ++f) {
        spectrum_sum_[f] += l.fraction * spectrum_power_[f];
      }
    }
    for (std::size_t f = 0; f < spectrum_sum_.size(); ++f) spectrum_sum_[f] *= spectrum_channel_[f];
    fft_.inv(time_.data(), spectrum_sum_.data(), nfft_);
    std::fill(v_.pos.begin(), v_.pos.end(), 0.0);
    std::fill(v_.neg.begin(), v_.neg.end(), 0.0);
    const int reach = lambda_.back().degree * m_;
    for (int v = -reach; v <= reach; ++v) {
      const double p = std::max(time_[Wrap(v)], 0.0);  // FFT rounding can dip below 0
      const std::size_t k = static_cast<std::size_t>(std::min(std::abs(v), m_));
      if (v >= 0) {
        v_.pos[k] += p;
      } else {
        v_.neg[k] += p;
      }
    }
    Normalize(v_);
    return ErrorProbability(v_);
  }

  // Total mass m maps to m^((dv-1)(dc-1)) per iteration, so rounding errors
  // in the mass would grow geometrically: every update is renormalised.
  static void Normalize(SignMagnitudePmf& p) {
    double total = 0.0;
    for (std::size_t k = 0; k < p.pos.size(); ++k) total += p.pos[k] + p.neg[k];
    const double scale = 1.0 / total;
    for (std::size_t k = 0; k < p.pos.size(); ++k) {
      p.pos[k] *= scale;
      p.neg[k] *= scale;
    }
  }

  QuantizedDeOptions options_;
  std::vector<Degree> lambda_;
  std::vector<Degree> rho_;
  int m_;
  int nfft_ = 0;
  // Check table in runs: for smaller magnitude i, T(i, j) = k for j in
  // [run_start_[run_offset_[i] + k - lowest_[i]], next entry), k = lowest_[i]..i.
  std::vector<std::size_t> run_offset_;
  std::vector<std::size_t> lowest_;
  std::vector<std::size_t> run_start_;
  SignMagnitudePmf channel_, v_, u_;
  std::vector<SignMagnitudePmf> powers_;  // index 1 .. max check degree - 1
  std::vector<char> have_;
  std::vector<double> suffix_a_pos_, suffix_a_neg_, suffix_b_pos_, suffix_b_neg_;
  Eigen::FFT<double> fft_;
  std::vector<double> time_;
  std::vector<std::complex<double>> spectrum_u_, spectrum_channel_, spectrum_power_, spectrum_sum_;
};

Status ValidateOptions(const QuantizedDeOptions& o) {
  if (!(o.llr_step > 0.0) || !std::isfinite(o.llr_step)) {
    return Status::Error(Format("QuantizedDeOptions.llr_step = %g: must be > 0", o.llr_step));
  }
  if (!(o.llr_max >= 4.0 * o.llr_step) || !(o.llr_max / o.llr_step <= 65536.0)) {
    return Status::Error(
        Format("QuantizedDeOptions.llr_max = %g: must be between 4 and 65536 times llr_step (%g)",
               o.llr_max, o.llr_step));
  }
  if (o.max_iterations < 1) {
    return Status::Error(
        Format("QuantizedDeOptions.max_iterations = %d: must be >= 1", o.max_iterations));
  }
  if (!(o.target_error_probability > 0.0 && o.target_error_probability < 0.5)) {
    return Status::Error(
        Format("QuantizedDeOptions.target_error_probability = %g: must be in (0, 0.5)",
               o.target_error_probability));
  }
  if (!(o.stall_fraction >= 0.0 && o.stall_fraction < 1.0)) {
    return Status::Error(
        Format("QuantizedDeOptions.stall_fraction = %g: must be in [0, 1)", o.stall_fraction));
  }
  if (!(o.sigma_tolerance > 0.0) || !std::isfinite(o.sigma_tolerance)) {
    return Status::Error(
        Format("QuantizedDeOptions.sigma_tolerance = %g: must be > 0", o.sigma_tolerance));
  }
  return Status::Ok();
}

Status ValidateSide(const std::vector<double>& c, const char* name) {
  double sum = 0.0;
  bool any = false;
  for (std::size_t d = 0; d < c.size(); ++d) {
    if (!std::isfinite(c[d]) || c[d] < 0.0) {
      return Status::Error(Format("%s[%zu] = %g: must be finite and >= 0", name, d, c[d]));
    }
    if (d < 2 && c[d] != 0.0) {
      return Status::Error(Format("%s[%zu] = %g: degrees below 2 must be 0", name, d, c[d]));
    }
    sum += c[d];
    any = any || c[d] > 0.0;
  }
  if (!any || std::abs(sum - 1.0) > kSumTolerance) {
    return Status::Error(Format("%s sums to %.12g: must sum to 1", name, sum));
  }
  return Status::Ok();
}

Status ValidateCounts(std::span<const int> counts, const char* name, long long* edges) {
  *edges = 0;
  for (std::size_t d = 0; d < counts.size(); ++d) {
    if (counts[d] < 0)
      return Status::Error(Format("%s[%zu] = %d: must be >= 0", name, d, counts[d]));
    if (d < 2 && counts[d] != 0) {
      return Status::Error(
          Format("%s[%zu] = %d: nodes of degree below 2 are not supported", name, d, counts[d]));
    }
    *edges += static_cast<long long>(d) * counts[d];
  }
  if (*edges == 0) return Status::Error(Format("%s: no edges", name));
  return Status::Ok();
}

std::vector<double> EdgeFractions(std::span<const int> counts, long long edges) {
  std::size_t size = counts.size();
  while (size > 0 && counts[size - 1] == 0) --size;
  std::vector<double> out(size, 0.0);
  for (std::size_t d = 0; d < size; ++d) {
    out[d] = static_cast<double>(d) * counts[d] / static_cast<double>(edges);
  }
  return out;
}

}  // namespace

// ------------------------------------------------------------ public API --

double LogGaussianApproxPhi(double x) {
  if (!(x > 0.0)) return 0.0;
  if (x >= kPhiTableMax) return LogPhiAsymptotic(x, nullptr);
  const std::vector<ChebyshevSegment>& segments = GetPhiTable().segments;
  std::size_t s = 0;
  while (x > segments[s].b) ++s;
  return std::min(EvalChebyshev(segments[s], x), 0.0);
}

double GaussianApproxPhi(double x) { return std::exp(LogGaussianApproxPhi(x)); }

double GaussianApproxPhiInverseLog(double log_y) {
  if (!(log_y < 0.0)) return 0.0;
  const std::vector<ChebyshevSegment>& segments = GetPhiTable().segments;
  if (log_y <= segments.back().log_phi_b) {
    // Newton on the asymptotic series, from the leading term's root.
    return NewtonAboveFloor(LogPhiAsymptotic, log_y, std::max(kPhiTableMax, -4.0 * log_y),
                            kPhiTableMax, 50, 1e-15);
  }
  std::size_t s = 0;
  while (log_y < segments[s].log_phi_b) ++s;
  const ChebyshevSegment& seg = segments[s];
  // Fitted inverse, then one safeguarded Newton step for full precision.
  const double t = (2.0 * log_y - seg.log_phi_a - seg.log_phi_b) / (seg.log_phi_a - seg.log_phi_b);
  const double x0 = std::clamp(Clenshaw(seg.inverse, t), seg.a, seg.b);
  return NewtonRefine(seg, log_y, x0, seg.a, seg.b, 1);
}

Result<EdgeDistribution> EdgeDistributionFromNodeCounts(
    std::span<const int> variable_nodes_by_degree, std::span<const int> check_nodes_by_degree) {
  long long variable_edges = 0;
  long long check_edges = 0;
  if (Status s =
          ValidateCounts(variable_nodes_by_degree, "variable_nodes_by_degree", &variable_edges);
      !s.ok()) {
    return s;
  }
  if (Status s = ValidateCounts(check_nodes_by_degree, "check_nodes_by_degree", &check_edges);
      !s.ok()) {
    return s;
  }
  if (variable_edges != check_edges) {
    return Status::Error(Format(
        "variable nodes have %lld edges, check nodes %lld: the two sides must count the same edges",
        variable_edges, check_edges));
  }
  EdgeDistribution e;
  e.lambda = EdgeFractions(variable_nodes_by_degree, variable_edges);
  e.rho = EdgeFractions(check_nodes_by_degree, check_edges);
  return e;
}

Result<EdgeDistribution> RegularEdgeDistribution(int variable_degree, int check_degree) {
  if (variable_degree < 2 || check_degree < 2) {
    return Status::Error(Format("regular (%d, %d) ensemble: both degrees must be >= 2",
                                variable_degree, check_degree));
  }
  EdgeDistribution e;
  e.lambda.assign(static_cast<std::size_t>(variable_degree) + 1, 0.0);
  e.rho.assign(static_cast<std::size_t>(check_degree) + 1, 0.0);
  e.lambda.back() = 1.0;
  e.rho.back() = 1.0;
  return e;
}

Status ValidateEdgeDistribution(const EdgeDistribution& e) {
  if (Status s = ValidateSide(e.lambda, "lambda"); !s.ok()) return s;
  if (Status s = ValidateSide(e.rho, "rho"); !s.ok()) return s;
  const double rate = DesignRate(e);
  if (!(rate > 0.0)) return Status::Error(Format("design rate %.6g: must be > 0", rate));
  return Status::Ok();
}

double DesignRate(const EdgeDistribution& e) {
  double var = 0.0;
  double chk = 0.0;
  for (std::size_t d = 1; d < e.lambda.size(); ++d) var += e.lambda[d] / static_cast<double>(d);
  for (std::size_t d = 1; d < e.rho.size(); ++d) chk += e.rho[d] / static_cast<double>(d);
  return 1.0 - chk / var;
}

std::string ToString(DeMethod method) {
  switch (method) {
    case DeMethod::kGaussianApproximation:
      return "gaussian_approximation";
    case DeMethod::kQuantized:
      return "quantized";
  }
  return "unknown";
}

Result<ThresholdResult> GaussianApproxThreshold(const EdgeDistribution& distribution, double rate,
                                                const GaussianApproxOptions& options) {
  if (Status s = ValidateEdgeDistribution(distribution); !s.ok()) return s;
  if (Status s = ValidateRate(rate); !s.ok()) return s;
  if (!(options.sigma_tolerance > 0.0) || !std::isfinite(options.sigma_tolerance)) {
    return Status::Error(
        Format("GaussianApproxOptions.sigma_tolerance = %g: must be > 0", options.sigma_tolerance));
  }
  const std::vector<Degree> lambda = NonZero(distribution.lambda);
  const std::vector<Degree> rho = NonZero(distribution.rho);
  auto decodes = [&](double s) {
    if (options.closed_form_phi) return GaDecodes(lambda, rho, s, LogPhiFit, PhiFitInverseLog);
    return GaDecodes(lambda, rho, s, LogGaussianApproxPhi, GaussianApproxPhiInverseLog);
  };
  return ThresholdByBisection(
      distribution, rate, options.sigma_tolerance, DeMethod::kGaussianApproximation,
      Format("Gaussian approximation of sum-product density evolution (Chung, Richardson, Urbanke "
             "2001), phi %s; decodes when the mean check-to-variable LLR reaches %g within %d "
             "iterations",
             options.closed_form_phi ? "by the paper's closed-form fit" : "by quadrature",
             kGaSuccessMean, kGaMaxIterations),
      decodes);
}

Result<ThresholdResult> QuantizedThreshold(const EdgeDistribution& distribution, double rate,
                                           const QuantizedDeOptions& options) {
  if (Status s = ValidateEdgeDistribution(distribution); !s.ok()) return s;
  if (Status s = ValidateRate(rate); !s.ok()) return s;
  if (Status s = ValidateOptions(options); !s.ok()) return s;
  const double fft_points = 2.0 * static_cast<double>(distribution.lambda.size() - 1) *
                            std::round(options.llr_max / options.llr_step);
  if (fft_points > kMaxFftPoints) {
    return Status::Error(
        Format("quantized DE with maximum variable degree %zu and %g grid steps needs an FFT of %g "
               "points: more than %g; use a coarser llr_step",
               distribution.lambda.size() - 1, std::round(options.llr_max / options.llr_step),
               fft_points, kMaxFftPoints));
  }
  QuantizedDensityEvolution de(distribution, options);
  Result<ThresholdResult> result = ThresholdByBisection(
      distribution, rate, options.sigma_tolerance, DeMethod::kQuantized,
      Format("quantized sum-product density evolution (Richardson, Shokrollahi, Urbanke 2001; "
             "Chung, Forney, Richardson, Urbanke 2001): LLR step %g, range +-%g, message error "
             "probability <= %g within %d iterations",
             options.llr_step, options.llr_max, options.target_error_probability,
             options.max_iterations),
      [&](double s) { return de.Decodes(s); });
  // A stop makes every later sigma "fail", so the bisection ends at once.
  if (options.stop && options.stop->load(std::memory_order_relaxed)) {
    return Status::Stopped("quantized density evolution: stopped");
  }
  return result;
}

}  // namespace capgap::analysis
