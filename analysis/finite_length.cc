// Finite-length limits (analysis/finite_length.h): information-density
// moments by Gauss-Hermite quadrature, the normal approximation, the RCUs
// bound by importance sampling and the equal-power meta-converse through the
// non-central chi-square distribution (Boost.Math).
#include "analysis/finite_length.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <random>

#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <boost/math/quadrature/gauss_kronrod.hpp>

#include "analysis/bisection.h"
#include "analysis/fading_theory.h"
#include "analysis/gauss_hermite.h"

namespace capgap::analysis {
namespace {

constexpr double kPi = 3.14159265358979323846;
constexpr double kLog2e = 1.4426950408889634074;
constexpr double kNan = std::numeric_limits<double>::quiet_NaN();

// ln(1 + exp(a)) without overflow.
double Softplus(double a) { return a > 0 ? a + std::log1p(std::exp(-a)) : std::log1p(std::exp(a)); }

double QFunction(double x) { return 0.5 * std::erfc(x / std::sqrt(2.0)); }

const GaussHermiteRule& Rule(int nodes) {
  // Built once per size on first use (thread-safe static initialisation).
  static const GaussHermiteRule r200 = MakeGaussHermiteRule(200);
  static const GaussHermiteRule r64 = MakeGaussHermiteRule(64);
  return nodes == 200 ? r200 : r64;
}

// Binary-input letter: information density of x = +1 at output y, noise
// variance 1/snr (by symmetry the density of x = -1 at -y is the same).
double BinaryDensity(double y, double snr) { return 1.0 - kLog2e * Softplus(-2.0 * y * snr); }

// Moments of the PAM letter (uniform over `levels`) with per-dimension noise
// variance n0 / 2.
CapacityDispersion PamMoments(const std::vector<double>& levels, double n0) {
  const GaussHermiteRule& rule = Rule(200);
  const double scale = std::sqrt(n0);
  const double log2_l = std::log2(static_cast<double>(levels.size()));
  double m1 = 0, m2 = 0;
  for (const double a : levels) {
    for (std::size_t j = 0; j < rule.nodes.size(); ++j) {
      const double noise = scale * rule.nodes[j];
      const double y = a + noise;
      // log-sum-exp of -((y - a')^2 - noise^2) / n0 over a'.
      double mx = -std::numeric_limits<double>::infinity();
      for (const double b : levels) mx = std::max(mx, -((y - b) * (y - b) - noise * noise) / n0);
      double s = 0;
      for (const double b : levels) s += std::exp(-((y - b) * (y - b) - noise * noise) / n0 - mx);
      const double i = log2_l - kLog2e * (mx + std::log(s));
      m1 += rule.weights[j] * i;
      m2 += rule.weights[j] * i * i;
    }
  }
  const double norm = std::sqrt(kPi) * static_cast<double>(levels.size());
  m1 /= norm;
  m2 /= norm;
  return {m1, std::max(0.0, m2 - m1 * m1)};
}

// Distinct values of `v` (tolerance 1e-6), sorted.
std::vector<double> Distinct(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  std::vector<double> out;
  for (const double x : v) {
    if (out.empty() || x - out.back() > 1e-6) out.push_back(x);
  }
  return out;
}

bool EqualEnergy(std::span<const cf32> points) {
  const double e0 = std::norm(points[0]);
  for (const cf32& p : points) {
    if (std::fabs(std::norm(p) - e0) > 1e-5) return false;
  }
  return true;
}

bool IsBinaryModel(std::span<const cf32> points) {
  // BPSK (+-1 real) and Gray QPSK (two BPSK axes) are the binary-input
  // channel bit by bit.
  if (points.size() == 2) return true;
  if (points.size() != 4) return false;
  return Distinct({points[0].real(), points[1].real(), points[2].real(), points[3].real()}).size() ==
             2 &&
         EqualEnergy(points);
}

double DbToLinear(double db) { return std::pow(10.0, db / 10.0); }


}  // namespace

CapacityDispersion BinaryInputAwgn(double snr) {
  const GaussHermiteRule& rule = Rule(200);
  const double sigma = 1.0 / std::sqrt(snr);
  double m1 = 0, m2 = 0;
  for (std::size_t j = 0; j < rule.nodes.size(); ++j) {
    const double i = BinaryDensity(1.0 + sigma * std::sqrt(2.0) * rule.nodes[j], snr);
    m1 += rule.weights[j] * i;
    m2 += rule.weights[j] * i * i;
  }
  m1 /= std::sqrt(kPi);
  m2 /= std::sqrt(kPi);
  return {m1, std::max(0.0, m2 - m1 * m1)};
}

CapacityDispersion GaussianInputAwgn(double snr) {
  const double p = snr;
  return {0.5 * std::log2(1.0 + p), p * (p + 2.0) / (2.0 * (p + 1.0) * (p + 1.0)) * kLog2e * kLog2e};
}

CapacityDispersion ConstellationAwgn(std::span<const cf32> points, double esno) {
  const double n0 = 1.0 / esno;
  std::vector<double> re, im;
  for (const cf32& p : points) {
    re.push_back(p.real());
    im.push_back(p.imag());
  }
  const std::vector<double> levels_i = Distinct(re), levels_q = Distinct(im);
  if (levels_i.size() * levels_q.size() == points.size()) {
    // Product set: uniform over it is uniform and independent per axis, and
    // the axes see independent noise, so the densities add.
    const CapacityDispersion a = PamMoments(levels_i, n0);
    const CapacityDispersion b =
        levels_q.size() > 1 ? PamMoments(levels_q, n0) : CapacityDispersion{0, 0};
    return {a.capacity + b.capacity, a.dispersion + b.dispersion};
  }
  const GaussHermiteRule& rule = Rule(64);
  const double scale = std::sqrt(n0);
  const double log2_m = std::log2(static_cast<double>(points.size()));
  double m1 = 0, m2 = 0;
  std::vector<double> e(points.size());
  for (const cf32& x : points) {
    for (std::size_t a = 0; a < rule.nodes.size(); ++a) {
      for (std::size_t b = 0; b < rule.nodes.size(); ++b) {
        const double w = rule.weights[a] * rule.weights[b];
        const double nr = scale * rule.nodes[a], ni = scale * rule.nodes[b];
        const double yr = x.real() + nr, yi = x.imag() + ni;
        double mx = -std::numeric_limits<double>::infinity();
        for (std::size_t j = 0; j < points.size(); ++j) {
          const double dr = yr - points[j].real(), di = yi - points[j].imag();
          e[j] = -((dr * dr + di * di) - (nr * nr + ni * ni)) / n0;
          mx = std::max(mx, e[j]);
        }
        double s = 0;
        for (const double v : e) s += std::exp(v - mx);
        const double i = log2_m - kLog2e * (mx + std::log(s));
        m1 += w * i;
        m2 += w * i * i;
      }
    }
  }
  const double norm = kPi * static_cast<double>(points.size());
  m1 /= norm;
  m2 /= norm;
  return {m1, std::max(0.0, m2 - m1 * m1)};
}

double NormalApproximationFer(double n, double k, const CapacityDispersion& cd) {
  const double margin = n * cd.capacity + 0.5 * std::log2(n) - k;
  if (!(cd.dispersion > 0)) return margin > 0 ? 0.0 : 1.0;
  return QFunction(margin / std::sqrt(n * cd.dispersion));
}

namespace {

// Sampler of one binary-input output letter (x = +1, noise variance 1/snr)
// from the exponentially tilted density q(y) ~ p(y) 2^(-theta i(y)),
// tabulated on kCells cells over [-1 - 12 sigma, 1 + 12 sigma] (piecewise
// constant, uniform within a cell), with the log of the likelihood ratio
// p(y) / q(y) of the tabulated density, so the estimate is unbiased for the
// sampler actually used. theta = 0 is the channel itself; theta = 1 is the
// output distribution of uniform input, which the tilts lie between.
class TiltedLetter {
 public:
  static constexpr int kCells = 8192;
  // `s`: the letter is the generalized density i_s(y) = 1 - log2(1 +
  // exp(-2 s y snr)) of the RCUs bound (s = 1: the information density).
  TiltedLetter(double snr, double s, double theta)
      : snr_(snr), s_snr_(s * snr), sigma_(1.0 / std::sqrt(snr)) {
    lo_ = -1.0 - 12.0 * sigma_;
    width_ = (2.0 + 24.0 * sigma_) / kCells;
    std::vector<double> log_mass(kCells);
    double mx = -std::numeric_limits<double>::infinity();
    for (int c = 0; c < kCells; ++c) {
      const double y = lo_ + (c + 0.5) * width_;
      log_mass[static_cast<std::size_t>(c)] = LogP(y) - theta * std::log(2.0) * BinaryDensity(y, s_snr_);
      mx = std::max(mx, log_mass[static_cast<std::size_t>(c)]);
    }
    cdf_.resize(kCells);
    log_density_.resize(kCells);
    double total = 0, mean = 0;
    for (int c = 0; c < kCells; ++c) {
      const double m = std::exp(log_mass[static_cast<std::size_t>(c)] - mx);
      total += m;
      mean += m * BinaryDensity(lo_ + (c + 0.5) * width_, s_snr_);
      cdf_[static_cast<std::size_t>(c)] = total;
    }
    for (int c = 0; c < kCells; ++c) {
      cdf_[static_cast<std::size_t>(c)] /= total;
      // log of the sampling density in cell c: mass / (total * width).
      log_density_[static_cast<std::size_t>(c)] =
          log_mass[static_cast<std::size_t>(c)] - mx - std::log(total * width_);
    }
    mean_ = mean / total;
    // Guide table: guide_[g] is the first cell whose CDF reaches g / kCells,
    // so a draw scans about one cell instead of a binary search.
    guide_.resize(kCells + 1);
    std::size_t c = 0;
    for (int g = 0; g <= kCells; ++g) {
      const double u = static_cast<double>(g) / kCells;
      while (c + 1 < static_cast<std::size_t>(kCells) && cdf_[c] < u) ++c;
      guide_[static_cast<std::size_t>(g)] = static_cast<std::uint32_t>(c);
    }
  }
  double mean_density() const { return mean_; }  // E_q[i], bit
  // One output from two uniforms in (0, 1); adds i(y) and ln p(y)/q(y).
  void Draw(double u_cell, double u_within, double* info, double* log_weight) const {
    // The first cell with cdf >= u_cell (as a binary search would give).
    std::size_t c = guide_[static_cast<std::size_t>(u_cell * kCells)];
    while (c + 1 < static_cast<std::size_t>(kCells) && cdf_[c] < u_cell) ++c;
    const double y = lo_ + (static_cast<double>(c) + u_within) * width_;
    *info += BinaryDensity(y, s_snr_);
    *log_weight += LogP(y) - log_density_[c];
  }

 private:
  double LogP(double y) const {
    const double z = (y - 1.0) / sigma_;
    return -0.5 * z * z - std::log(sigma_ * std::sqrt(2.0 * kPi));
  }
  double snr_, s_snr_, sigma_, lo_ = 0, width_ = 0, mean_ = 0;
  std::vector<double> cdf_, log_density_;
  std::vector<std::uint32_t> guide_;
};

}  // namespace

RcuEstimate BinaryInputRcus(int n, double k, double snr, double s, int samples,
                            std::uint64_t seed) {
  // log2(M - 1) with M = 2^k.
  const double gamma = k + std::log2(-std::expm1(-k * std::log(2.0)));
  // Tilt so that the sum of the densities centres on gamma, where
  // min(1, 2^(gamma - S)) changes form (theta = 0 when the rate is above
  // capacity: the bound is then near 1 and plain sampling is efficient).
  double theta = 0;
  if (TiltedLetter(snr, s, 0.0).mean_density() * n > gamma) {
    if (TiltedLetter(snr, s, 1.0).mean_density() * n >= gamma) {
      theta = 1.0;
    } else {
      theta = Bisect(0.0, 1.0, 1e-4, [&](double t) {
                return TiltedLetter(snr, s, t).mean_density() * n > gamma;
              }).lo;
    }
  }
  const TiltedLetter letter(snr, s, theta);
  std::mt19937_64 rng(seed);
  const auto uniform = [&] {  // (0, 1), 53 bits
    return (static_cast<double>(rng() >> 11) + 0.5) * (1.0 / 9007199254740992.0);
  };
  double sum = 0, sum2 = 0;
  for (int s = 0; s < samples; ++s) {
    double info = 0, log_weight = 0;
    for (int j = 0; j < n; ++j) {
      const double u1 = uniform();
      letter.Draw(u1, uniform(), &info, &log_weight);
    }
    const double log_f = std::min(0.0, (gamma - info) * std::log(2.0));
    const double v = std::exp(log_f + log_weight);
    sum += v;
    sum2 += v * v;
  }
  const double mean = sum / samples;
  const double var = std::max(0.0, sum2 / samples - mean * mean) / samples;
  return {std::min(1.0, mean), mean > 0 ? std::sqrt(var) / mean : 0.0};
}

double EqualPowerConverseLog2M(int n, double snr, double eps) {
  // PPV meta-converse with Q_Y = N(0, (1 + P) I): for a codeword on the power
  // sphere, ln dP/dQ = a - b W with a = n/2 ln(1 + P) + n/2, b = P / (2 (1 +
  // P)) and W ~ noncentral chi-square(n, n/P) under P (derivation: rotate the
  // codeword onto the first axis and complete the square). The
  // Neyman-Pearson test at P-probability 1 - eps accepts W <= w; its Q-
  // probability is beta = e^-a int_0^w e^(b t) f_P(t) dt (change of measure),
  // evaluated in the log domain so that beta ~ 2^-k does not underflow.
  using boost::math::non_central_chi_squared;
  const double nd = n, p = snr;
  const non_central_chi_squared dist(nd, nd / p);
  const double w = boost::math::quantile(boost::math::complement(dist, eps));
  const double a = 0.5 * nd * std::log1p(p) + 0.5 * nd;
  const double b = p / (2.0 * (1.0 + p));
  const auto log_g = [&](double t) {
    const double f = boost::math::pdf(dist, t);
    return f > 0 ? b * t + std::log(f) : -std::numeric_limits<double>::infinity();
  };
  const double top = log_g(w);
  // The integrand rises towards w (its peak lies about n beyond the mean,
  // the quantile only a few standard deviations); integrate back from w over
  // 60 e-foldings of its slope there, and never past 0.
  const double h = 1e-3 * std::sqrt(2.0 * (nd + 2.0 * nd / p));
  const double slope = std::max((top - log_g(w - h)) / h, 1e-3);
  const double lo = std::max(0.0, w - 60.0 / slope);
  const double integral = boost::math::quadrature::gauss_kronrod<double, 61>::integrate(
      [&](double t) { return std::exp(log_g(t) - top); }, lo, w, 8, 1e-10);
  const double log_beta = -a + top + std::log(integral);
  return -log_beta * kLog2e;
}

double EqualPowerConverseFer(int n, double k, double snr) {
  // log2 M of the bound grows with eps; find where it reaches k.
  const double hi_eps = 1.0 - 1e-9;
  if (EqualPowerConverseLog2M(n, snr, hi_eps) < k) return 1.0;
  const double lo_log = -15.0;
  if (EqualPowerConverseLog2M(n, snr, std::pow(10.0, lo_log)) >= k) return 0.0;
  const Bracket br = Bisect(lo_log, std::log10(hi_eps), 2e-3, [&](double le) {
    return EqualPowerConverseLog2M(n, snr, std::pow(10.0, le)) < k;
  });
  return std::pow(10.0, 0.5 * (br.lo + br.hi));
}

RcuEstimate BinaryInputConverseFer(int n, double k, double snr, int samples,
                                   std::uint64_t seed) {
  // Meta-converse with Q_Y the output of i.i.d. uniform input: the log-
  // likelihood ratio of x (any codeword, by symmetry) against Q is the sum S
  // of the letters i(x_j; y_j) (bits). The Neyman-Pearson test accepting
  // S >= t has type-I error eps(t) = P[S < t] and beta(t) = Q[S >= t] =
  // E_P[2^-S 1{S >= t}]; the smallest FER with k bits is eps(t*) where
  // -log2 beta(t*) = k. One sample set, tilted to centre S on k (where t*
  // lies up to lower-order terms), gives both as weighted sums.
  double theta = 0;
  if (TiltedLetter(snr, 1.0, 0.0).mean_density() * n > k) {
    theta = TiltedLetter(snr, 1.0, 1.0).mean_density() * n >= k
                ? 1.0
                : Bisect(0.0, 1.0, 1e-4, [&](double t) {
                    return TiltedLetter(snr, 1.0, t).mean_density() * n > k;
                  }).lo;
  }
  const TiltedLetter letter(snr, 1.0, theta);
  std::mt19937_64 rng(seed);
  const auto uniform = [&] {
    return (static_cast<double>(rng() >> 11) + 0.5) * (1.0 / 9007199254740992.0);
  };
  struct Block {
    double info, log_weight;
  };
  std::vector<Block> blocks(static_cast<std::size_t>(samples));
  for (Block& b : blocks) {
    b.info = 0;
    b.log_weight = 0;
    for (int j = 0; j < n; ++j) {
      const double u1 = uniform();
      letter.Draw(u1, uniform(), &b.info, &b.log_weight);
    }
  }
  std::sort(blocks.begin(), blocks.end(),
            [](const Block& a, const Block& b) { return a.info < b.info; });
  // ln beta at t = blocks[i].info: log-sum-exp of ln w - S ln 2 over j >= i.
  const double ln_n = std::log(static_cast<double>(samples));
  std::vector<double> ln_beta(blocks.size() + 1, -std::numeric_limits<double>::infinity());
  for (std::size_t i = blocks.size(); i-- > 0;) {
    const double v = blocks[i].log_weight - blocks[i].info * std::log(2.0);
    const double a = ln_beta[i + 1];
    ln_beta[i] = a > v ? a + std::log1p(std::exp(v - a)) : v + std::log1p(std::exp(a - v));
  }
  // First threshold whose beta is at most 2^-k; eps = P-mass below it.
  double eps = 0, eps2 = 0;
  for (std::size_t i = 0; i < blocks.size(); ++i) {
    if (-(ln_beta[i] - ln_n) * kLog2e >= k) {
      const double mean = eps / samples;
      const double var = std::max(0.0, eps2 / samples - mean * mean) / samples;
      return {std::min(1.0, mean), mean > 0 ? std::sqrt(var) / mean : 0.0};
    }
    const double w = std::exp(blocks[i].log_weight);
    eps += w;
    eps2 += w * w;
  }
  return {1.0, 0.0};
}

namespace {

// Uniform PAM input (levels, each used with probability 1 / L) on the real
// AWGN channel with noise variance sigma^2: the exponentially tilted output
// sampler of the RCU and the meta-converse for non-binary inputs (binary
// input +-1 is the case L = 2). For each level a the table holds q_a(y) ~
// p(y|a) 2^(-theta i(a;y)), i(a;y) = log2 p(y|a) / p(y), p(y) the output of
// uniform input, piecewise constant on kCells cells over [min level - 12
// sigma, max level + 12 sigma]; the likelihood ratio p(y|a) / q_a(y) uses
// the tabulated density, so the estimates are unbiased for the sampler used.
class TiltedPam {
 public:
  static constexpr int kCells = 8192;
  TiltedPam(const PamChannel& ch, double theta)
      : levels_(ch.levels), sigma_(std::sqrt(ch.noise_variance)) {
    const auto [mn, mx] = std::minmax_element(levels_.begin(), levels_.end());
    lo_ = *mn - 12.0 * sigma_;
    width_ = (*mx - *mn + 24.0 * sigma_) / kCells;
    const std::size_t cells = kCells;
    tables_.resize(levels_.size());
    mean_ = 0;
    for (std::size_t a = 0; a < levels_.size(); ++a) {
      Table& t = tables_[a];
      std::vector<double> log_mass(cells);
      double top = -std::numeric_limits<double>::infinity();
      for (std::size_t c = 0; c < cells; ++c) {
        const double y = lo_ + (static_cast<double>(c) + 0.5) * width_;
        log_mass[c] = LogP(y, a) - theta * std::log(2.0) * Info(y, a);
        top = std::max(top, log_mass[c]);
      }
      t.cdf.resize(cells);
      t.log_density.resize(cells);
      double total = 0, mean = 0;
      for (std::size_t c = 0; c < cells; ++c) {
        const double m = std::exp(log_mass[c] - top);
        total += m;
        mean += m * Info(lo_ + (static_cast<double>(c) + 0.5) * width_, a);
        t.cdf[c] = total;
      }
      for (std::size_t c = 0; c < cells; ++c) {
        t.cdf[c] /= total;
        t.log_density[c] = log_mass[c] - top - std::log(total * width_);
      }
      t.mean = mean / total;
      mean_ += t.mean / static_cast<double>(levels_.size());
      t.guide.resize(cells + 1);
      std::size_t c = 0;
      for (std::size_t g = 0; g <= cells; ++g) {
        const double u = static_cast<double>(g) / kCells;
        while (c + 1 < cells && t.cdf[c] < u) ++c;
        t.guide[g] = static_cast<std::uint32_t>(c);
      }
    }
  }
  std::size_t size() const { return levels_.size(); }
  double mean_density() const { return mean_; }  // E_q[i] over uniform levels, bit
  double mean_density(std::size_t a) const { return tables_[a].mean; }
  // One output of level a from two uniforms in (0, 1): returns y, adds
  // ln p(y|a) / q_a(y) to *log_weight.
  double Draw(std::size_t a, double u_cell, double u_within, double* log_weight) const {
    const Table& t = tables_[a];
    std::size_t c = t.guide[static_cast<std::size_t>(u_cell * kCells)];
    while (c + 1 < static_cast<std::size_t>(kCells) && t.cdf[c] < u_cell) ++c;
    const double y = lo_ + (static_cast<double>(c) + u_within) * width_;
    *log_weight += LogP(y, a) - t.log_density[c];
    return y;
  }
  // z[b] = ln p(y|b) - ln p(y|a) for every level b; returns i(a;y) in bits.
  double Differences(double y, std::size_t a, double* z) const {
    const double inv = 1.0 / (2.0 * sigma_ * sigma_);
    const double da = (y - levels_[a]) * (y - levels_[a]);
    double top = -std::numeric_limits<double>::infinity();
    for (std::size_t b = 0; b < levels_.size(); ++b) {
      const double db = (y - levels_[b]) * (y - levels_[b]);
      z[b] = (da - db) * inv;
      top = std::max(top, z[b]);
    }
    double s = 0;
    for (std::size_t b = 0; b < levels_.size(); ++b) s += std::exp(z[b] - top);
    return std::log2(static_cast<double>(levels_.size())) - kLog2e * (top + std::log(s));
  }
  double Info(double y, std::size_t a) const {
    double z[64];
    return Differences(y, a, z);
  }

 private:
  struct Table {
    std::vector<double> cdf, log_density;
    std::vector<std::uint32_t> guide;
    double mean = 0;
  };
  double LogP(double y, std::size_t a) const {
    const double z = (y - levels_[a]) / sigma_;
    return -0.5 * z * z - std::log(sigma_ * std::sqrt(2.0 * kPi));
  }
  std::vector<double> levels_;
  double sigma_, lo_ = 0, width_ = 0, mean_ = 0;
  std::vector<Table> tables_;
};

// The tilt theta in [0, 1] that centres the sum of n letters' densities on
// `centre` bits (0 when even the channel itself falls short: the bound is
// then near 1 and plain sampling is efficient).
double CentringTilt(const PamChannel& ch, int n, double centre) {
  if (TiltedPam(ch, 0.0).mean_density() * n <= centre) return 0.0;
  if (TiltedPam(ch, 1.0).mean_density() * n >= centre) return 1.0;
  return Bisect(0.0, 1.0, 1e-4, [&](double t) {
           return TiltedPam(ch, t).mean_density() * n > centre;
         }).lo;
}

// ln of Q(w) / phi(w) - 1/w + 1/u for w > 0 (the Lugannani-Rice bracket),
// the Mills ratio by erfc below w = 25 and by its asymptotic series above
// (terms to w^-9: relative error below 1e-12 there).
double LugannaniRiceBracket(double w, double u) {
  double mills_minus_inv;
  if (w < 25.0) {
    const double phi = std::exp(-0.5 * w * w) / std::sqrt(2.0 * kPi);
    mills_minus_inv = QFunction(w) / phi - 1.0 / w;
  } else {
    const double w2 = 1.0 / (w * w);
    mills_minus_inv = (-1.0 + w2 * (3.0 + w2 * (-15.0 + w2 * 105.0))) * w2 / w;
  }
  return mills_minus_inv + 1.0 / u;
}

struct Cgf {
  double k0, k1, k2;  // K(t), K'(t), K''(t)
};

// CGF of S = sum_j Z_j, Z_j = z[j L + b] with b uniform over L levels.
Cgf SumCgf(std::span<const double> z, std::size_t levels, double t) {
  Cgf c{0, 0, 0};
  const double log_l = std::log(static_cast<double>(levels));
  for (std::size_t j = 0; j < z.size(); j += levels) {
    double top = -std::numeric_limits<double>::infinity();
    for (std::size_t b = 0; b < levels; ++b) top = std::max(top, t * z[j + b]);
    double s0 = 0, s1 = 0, s2 = 0;
    for (std::size_t b = 0; b < levels; ++b) {
      const double e = std::exp(t * z[j + b] - top);
      s0 += e;
      s1 += e * z[j + b];
      s2 += e * z[j + b] * z[j + b];
    }
    const double m = s1 / s0;
    c.k0 += top + std::log(s0) - log_l;
    c.k1 += m;
    c.k2 += std::max(0.0, s2 / s0 - m * m);
  }
  return c;
}

}  // namespace

double LogPairwiseErrorSaddlepoint(std::span<const double> z, std::size_t levels,
                                   double* hint) {
  // Saddlepoint: K'(t) = 0. K is convex; K'(0) is the mean of S.
  const Cgf at0 = SumCgf(z, levels, 0.0);
  if (at0.k2 <= 0) return at0.k1 >= 0 ? 0.0 : -std::numeric_limits<double>::infinity();
  if (std::fabs(at0.k1) < 1e-9 * std::sqrt(at0.k2)) return std::log(0.5);
  // S <= sum_j max_b z_jb, and each max is >= 0 (z of the letter itself is
  // 0). When every letter's maximum is 0 only choices tying each letter
  // reach S = 0: the probability is the product of the tie fractions, and
  // K' has no root (it tends to 0 from below).
  double smax = 0, log_ties = 0;
  for (std::size_t j = 0; j < z.size(); j += levels) {
    const double m = *std::max_element(z.begin() + static_cast<std::ptrdiff_t>(j),
                                       z.begin() + static_cast<std::ptrdiff_t>(j + levels));
    smax += m;
    std::size_t ties = 0;
    for (std::size_t b = 0; b < levels; ++b) if (z[j + b] >= m - 1e-12) ++ties;
    log_ties += std::log(static_cast<double>(ties) / static_cast<double>(levels));
  }
  if (smax <= 1e-12) return log_ties;
  if (at0.k1 < 0) {
    // Positive root (the usual case): Newton from the hint (the previous
    // block's root: neighbouring blocks have similar roots), safeguarded by
    // the bracket [a, b] the signs of K' establish (b = inf until found).
    double a = 0, b = std::numeric_limits<double>::infinity();
    double t = hint && *hint > 0 ? *hint : 1.0;
    Cgf c{};
    for (int it = 0; it < 200; ++it) {
      c = SumCgf(z, levels, t);
      if (c.k1 < 0) a = t; else b = t;
      double next = c.k2 > 0 ? t - c.k1 / c.k2 : (std::isinf(b) ? 2 * t : 0.5 * (a + b));
      if (!(next > a && next < b)) next = std::isinf(b) ? 2 * t : 0.5 * (a + b);
      const bool done = std::fabs(next - t) <= 1e-10 * t;
      t = next;
      if (done || t > 1e12) break;
    }
    if (t > 1e12) return std::min(0.0, c.k0);  // no root in reach: Chernoff
    c = SumCgf(z, levels, t);
    if (hint) *hint = t;
    const double w = std::sqrt(std::max(0.0, -2.0 * c.k0));
    const double u = t * std::sqrt(c.k2);
    if (w < 1e-6) return std::log(0.5);
    if (u < 1e-9) return std::min(0.0, c.k0);
    const double bracket = LugannaniRiceBracket(w, u);
    if (bracket > 0) return -0.5 * w * w - 0.5 * std::log(2.0 * kPi) + std::log(bracket);
    return c.k0;
  }
  // Negative root (mean > 0): bracket by doubling, then safeguarded Newton.
  double lo = 0, hi = -1.0;
  Cgf c = SumCgf(z, levels, hi);
  for (int i = 0; i < 60 && (c.k1 < 0) == (at0.k1 < 0); ++i) {
    lo = hi;
    hi *= 2;
    c = SumCgf(z, levels, hi);
  }
  if ((c.k1 < 0) == (at0.k1 < 0)) return c.k0;  // no root in reach: Chernoff at hi
  // Safeguarded Newton inside [lo, hi] (or [hi, lo] for a negative root).
  double a = std::min(lo, hi), b = std::max(lo, hi);
  double t = 0.5 * (a + b);
  for (int it = 0; it < 100; ++it) {
    c = SumCgf(z, levels, t);
    if (c.k1 < 0) a = t; else b = t;
    double next = c.k2 > 0 ? t - c.k1 / c.k2 : 0.5 * (a + b);
    if (!(next > a && next < b)) next = 0.5 * (a + b);
    if (std::fabs(next - t) <= 1e-12 * std::max(1.0, std::fabs(t)) || b - a < 1e-14) {
      t = next;
      break;
    }
    t = next;
  }
  c = SumCgf(z, levels, t);
  const double w = (t > 0 ? 1.0 : -1.0) * std::sqrt(std::max(0.0, -2.0 * c.k0));
  const double u = t * std::sqrt(c.k2);
  if (std::fabs(w) < 1e-6) return std::log(0.5);
  if (std::fabs(u) < 1e-9) return std::min(0.0, c.k0);
  if (w > 0) {
    const double bracket = LugannaniRiceBracket(w, u);
    if (bracket > 0) return -0.5 * w * w - 0.5 * std::log(2.0 * kPi) + std::log(bracket);
    return c.k0;  // outside the approximation's range: Chernoff
  }
  // t < 0: P[S >= 0] = 1 - P[S < 0] with the same formula on the other side.
  const double phi = std::exp(-0.5 * w * w) / std::sqrt(2.0 * kPi);
  return std::log(std::min(1.0, QFunction(w) + phi * (1.0 / u - 1.0 / w)));
}

RcuEstimate PamRcu(const PamChannel& ch, int n, double k, int samples, std::uint64_t seed) {
  const std::size_t levels = ch.levels.size();
  const double gamma = k + std::log2(-std::expm1(-k * std::log(2.0)));  // log2(M - 1)
  const TiltedPam table(ch, CentringTilt(ch, n, gamma));
  std::mt19937_64 rng(seed);
  const auto uniform = [&] {
    return (static_cast<double>(rng() >> 11) + 0.5) * (1.0 / 9007199254740992.0);
  };
  std::vector<double> z(static_cast<std::size_t>(n) * levels);
  double sum = 0, sum2 = 0, hint = 1.0;
  for (int s = 0; s < samples; ++s) {
    double log_weight = 0;
    for (std::size_t j = 0; j < static_cast<std::size_t>(n); ++j) {
      const std::size_t a =
          levels == 2 ? (rng() >> 63) : static_cast<std::size_t>(uniform() * static_cast<double>(levels));
      const double u1 = uniform();
      const double y = table.Draw(a, u1, uniform(), &log_weight);
      table.Differences(y, a, &z[j * levels]);
    }
    const double log_pe = LogPairwiseErrorSaddlepoint(z, levels, &hint);
    const double log_f = std::min(0.0, gamma * std::log(2.0) + log_pe);
    const double v = std::exp(log_f + log_weight);
    sum += v;
    sum2 += v * v;
  }
  const double mean = sum / samples;
  const double var = std::max(0.0, sum2 / samples - mean * mean) / samples;
  return {std::min(1.0, mean), mean > 0 ? std::sqrt(var) / mean : 0.0};
}

RcuEstimate BinaryInputRcu(int n, double k, double snr, int samples, std::uint64_t seed) {
  return PamRcu(PamChannel{{-1.0, 1.0}, 1.0 / snr}, n, k, samples, seed);
}

RcuEstimate PamConverseFer(const PamChannel& ch, int n, double k, int samples,
                           std::uint64_t seed) {
  // As BinaryInputConverseFer, for the codeword that uses the levels in
  // turn (letter j has level j mod L: every level equally often, up to one).
  const std::size_t levels = ch.levels.size();
  const TiltedPam table(ch, CentringTilt(ch, n, k));
  std::mt19937_64 rng(seed);
  const auto uniform = [&] {
    return (static_cast<double>(rng() >> 11) + 0.5) * (1.0 / 9007199254740992.0);
  };
  struct Block {
    double info, log_weight;
  };
  std::vector<Block> blocks(static_cast<std::size_t>(samples));
  double z[64];
  for (Block& b : blocks) {
    b.info = 0;
    b.log_weight = 0;
    for (std::size_t j = 0; j < static_cast<std::size_t>(n); ++j) {
      const std::size_t a = j % levels;
      const double u1 = uniform();
      const double y = table.Draw(a, u1, uniform(), &b.log_weight);
      b.info += table.Differences(y, a, z);
    }
  }
  std::sort(blocks.begin(), blocks.end(),
            [](const Block& a, const Block& b) { return a.info < b.info; });
  const double ln_n = std::log(static_cast<double>(samples));
  std::vector<double> ln_beta(blocks.size() + 1, -std::numeric_limits<double>::infinity());
  for (std::size_t i = blocks.size(); i-- > 0;) {
    const double v = blocks[i].log_weight - blocks[i].info * std::log(2.0);
    const double a = ln_beta[i + 1];
    ln_beta[i] = a > v ? a + std::log1p(std::exp(v - a)) : v + std::log1p(std::exp(a - v));
  }
  double eps = 0, eps2 = 0;
  for (std::size_t i = 0; i < blocks.size(); ++i) {
    if (-(ln_beta[i] - ln_n) * kLog2e >= k) {
      const double mean = eps / samples;
      const double var = std::max(0.0, eps2 / samples - mean * mean) / samples;
      return {std::min(1.0, mean), mean > 0 ? std::sqrt(var) / mean : 0.0};
    }
    const double w = std::exp(blocks[i].log_weight);
    eps += w;
    eps2 += w * w;
  }
  return {1.0, 0.0};
}

GainQuadrature GainQuadrature::FromGain(const CombinedGain& gain) {
  GainQuadrature q;
  if (gain.deterministic()) {
    q.x = {gain.combining() == Combining::kMrc ? static_cast<double>(gain.branches()) : 1.0};
    q.w = {1.0};
    return q;
  }
  constexpr int kNodes = 4000;
  const double t_lo = std::log(1e-12), t_hi = std::log(gain.QuantileComplement(1e-15));
  const double dt = (t_hi - t_lo) / (kNodes - 1);
  double total = 0;
  for (int i = 0; i < kNodes; ++i) {
    const double x = std::exp(t_lo + dt * i);
    const double w = gain.Pdf(x) * x * dt * (i == 0 || i == kNodes - 1 ? 0.5 : 1.0);
    if (!(w > 0) || !std::isfinite(w)) continue;
    q.x.push_back(x);
    q.w.push_back(w);
    total += w;
  }
  for (double& w : q.w) w /= total;
  return q;
}

CapacityDispersion FastFadingDensity(const std::function<CapacityDispersion(double)>& awgn,
                                     const GainQuadrature& gain, double mean_esno) {
  double c1 = 0, c2 = 0, v = 0;
  for (std::size_t i = 0; i < gain.x.size(); ++i) {
    const CapacityDispersion cd = awgn(mean_esno * gain.x[i]);
    c1 += gain.w[i] * cd.capacity;
    c2 += gain.w[i] * cd.capacity * cd.capacity;
    v += gain.w[i] * cd.dispersion;
  }
  return {c1, v + std::max(0.0, c2 - c1 * c1)};
}

CapacityDispersion FastFadingGaussianInput(const GainQuadrature& gain, double mean_esno, int dims) {
  const double p_per_x = dims == 1 ? 2.0 * mean_esno : mean_esno;
  const double half = 0.5 * dims;
  double c1 = 0, c2 = 0, inv = 0;
  for (std::size_t i = 0; i < gain.x.size(); ++i) {
    const double p = p_per_x * gain.x[i];
    const double c = half * std::log2(1.0 + p);
    c1 += gain.w[i] * c;
    c2 += gain.w[i] * c * c;
    inv += gain.w[i] / (1.0 + p);
  }
  return {c1, half * kLog2e * kLog2e * (1.0 - inv * inv) + std::max(0.0, c2 - c1 * c1)};
}

namespace {

// AnalyseFiniteLength for a fading channel (or receive diversity): the NA of
// fast fading with receiver CSI only.
FiniteLengthLimits AnalyseFadingFiniteLength(const FiniteLengthBlock& block,
                                             std::span<const double> ebno_db, double target_fer,
                                             const FiniteLengthOptions& options, int bits_per_symbol) {
  FiniteLengthLimits r;
  r.k = block.info_bits;
  r.target_fer = target_fer;
  const ChannelSpec& ch = block.channel;
  if (ch.fading() && ch.time != FadingTime::kFast) {
    r.absent_reason =
        ch.time == FadingTime::kBlock
            ? "block fading: one fade per block of coherence_symbols symbols; the finite-length "
              "benchmark is the outage probability (see the outage limits)"
            : "Doppler (correlated) fading: no finite-length limit here (the fast-fading normal "
              "approximation assumes independent fades per symbol)";
    return r;
  }
  std::vector<double> re, im;
  for (const cf32& p : block.points) {
    re.push_back(p.real());
    im.push_back(p.imag());
  }
  const bool binary = IsBinaryModel(block.points);
  const std::vector<double> li = Distinct(re), lq = Distinct(im);
  if (!binary && li.size() * lq.size() != block.points.size()) {
    r.absent_reason =
        "fast fading with a constellation that is not a product of PAM axes: its CM dispersion "
        "averaged over the fading is not evaluated here (too slow by 2-D quadrature)";
    return r;
  }
  const GainQuadrature gain = GainQuadrature::FromGain(CombinedGain::FromSpec(ch));
  const double k = block.info_bits;
  const int symbols = block.coded_bits / bits_per_symbol;
  const bool real_constellation = lq.size() == 1;
  r.n = symbols;
  const auto per_symbol = [&](double esno) {
    if (binary) {
      // BPSK: one binary use at P = 2 Es/N0; Gray QPSK: two at P = Es/N0
      // sharing the symbol's gain.
      const CapacityDispersion b = BinaryInputAwgn(2.0 * esno / bits_per_symbol);
      return CapacityDispersion{bits_per_symbol * b.capacity, bits_per_symbol * b.dispersion};
    }
    return ConstellationAwgn(block.points, esno);
  };
  // The per-symbol AWGN moments tabulated once on a 0.05 dB grid of Es/N0
  // over [-50, 60] dB and interpolated linearly in dB (curvature of C and V
  // in dB below 0.05 bit/dB^2: error below 2e-5 bit per symbol); below the
  // grid C and V scale linearly with the SNR (the low-SNR regime), above it
  // they are held at the last node (C within 1e-9 of log2 M there).
  constexpr double kTableLoDb = -50.0, kTableStepDb = 0.05;
  constexpr int kTableSize = 2201;
  std::vector<CapacityDispersion> table(kTableSize);
  for (int i = 0; i < kTableSize; ++i) {
    table[static_cast<std::size_t>(i)] = per_symbol(DbToLinear(kTableLoDb + kTableStepDb * i));
  }
  const auto tabulated = [&](double esno) {
    if (!(esno > 0)) return CapacityDispersion{0, 0};
    const double pos = (10.0 * std::log10(esno) - kTableLoDb) / kTableStepDb;
    if (pos <= 0) {
      const double f = esno / DbToLinear(kTableLoDb);
      return CapacityDispersion{table[0].capacity * f, table[0].dispersion * f};
    }
    if (pos >= kTableSize - 1) return table.back();
    const auto i = static_cast<std::size_t>(pos);
    const double w = pos - static_cast<double>(i);
    return CapacityDispersion{(1 - w) * table[i].capacity + w * table[i + 1].capacity,
                              (1 - w) * table[i].dispersion + w * table[i + 1].dispersion};
  };
  const auto esno_of = [&](double x) { return k / symbols * DbToLinear(x); };
  const auto na_fer = [&](double x) {
    return NormalApproximationFer(symbols, k, FastFadingDensity(tabulated, gain, esno_of(x)));
  };
  const int dims = real_constellation ? 1 : 2;
  const auto gaussian_fer = [&](double x) {
    // Counted in real dimensions (0.5 log2 of them), as on the AWGN channel,
    // so that K -> infinity gives PPV's AWGN form exactly.
    const CapacityDispersion cd = FastFadingGaussianInput(gain, esno_of(x), dims);
    return NormalApproximationFer(symbols * dims, k,
                                  CapacityDispersion{cd.capacity / dims, cd.dispersion / dims});
  };
  const auto stopped = [&] { return options.stop && options.stop->load(std::memory_order_relaxed); };
  const auto at_target = [&](auto&& fer) {
    const double lo = -6.0, hi = 40.0;
    if (!(fer(lo) > target_fer) || fer(hi) > target_fer) return kNan;
    const Bracket br = Bisect(lo, hi, 1e-3, [&](double x) { return fer(x) > target_fer; });
    return 0.5 * (br.lo + br.hi);
  };
  r.normal_approximation_ebno_db = at_target(na_fer);
  r.normal_approximation_gaussian_ebno_db = at_target(gaussian_fer);
  r.rcu_ebno_db = kNan;
  r.converse_ebno_db = kNan;
  r.converse_equal_power_ebno_db = kNan;
  r.rcu_bound = "none";
  for (const double x : ebno_db) {
    if (stopped()) return r;
    r.ebno_db.push_back(x);
    r.fer_normal_approximation.push_back(na_fer(x));
    r.fer_normal_approximation_gaussian.push_back(gaussian_fer(x));
    r.fer_rcu.push_back(kNan);
    r.fer_converse.push_back(kNan);
  }
  r.present = true;
  r.method =
      "normal approximation log2 M = n C - sqrt(n V) Qinv(eps) + 0.5 log2 n (Polyanskiy, Poor, "
      "Verdu, IEEE Trans. Inf. Theory 56(5), 2010) for fast (i.i.d. per symbol) flat fading with "
      "the gain known at the receiver, n = " +
      std::to_string(symbols) +
      " symbols: the channel x -> (y, h) is memoryless, C = E[C(g)], V = E[V(g)] + Var[C(g)] "
      "over the combined SNR g = mean Es/N0 X (law of total variance; the second term is the "
      "fading's), C(g), V(g) of the " +
      std::string(binary ? "binary-input information density per symbol (Gray BPSK/QPSK)"
                         : "uniform constellation's CM information density (per axis)") +
      " by Gauss-Hermite quadrature (tabulated on a 0.05 dB grid, linear interpolation), "
      "averages over X by the trapezoid rule in ln X on 4000 nodes "
      "(analysis/fading_theory.h); normal_approximation_gaussian: Gaussian input, V = d/2 "
      "log2(e)^2 (1 - E[1/(1+P)]^2) + Var[d/2 log2(1+P)] for d real dimensions per symbol, "
      "counted as n d real uses "
      "(Polyanskiy and Verdu, ISIT 2011, form from memory); no RCU and no converse on fading "
      "channels (NaN)";
  return r;
}

}  // namespace

FiniteLengthLimits AnalyseFiniteLength(const FiniteLengthBlock& block,
                                       std::span<const double> ebno_db, double target_fer,
                                       const FiniteLengthOptions& options) {
  FiniteLengthLimits r;
  r.k = block.info_bits;
  r.target_fer = target_fer;
  const auto stopped = [&] { return options.stop && options.stop->load(std::memory_order_relaxed); };
  const int m = static_cast<int>(std::lround(std::log2(static_cast<double>(block.points.size()))));
  if (block.info_bits <= 0 || block.coded_bits <= 0 || m < 1 || block.coded_bits % m != 0) {
    r.absent_reason = "no block (k or n not positive)";
    return r;
  }
  if (block.channel.fading() || block.channel.branches > 1) {
    return AnalyseFadingFiniteLength(block, ebno_db, target_fer, options, m);
  }
  const bool binary = IsBinaryModel(block.points);
  const double k = block.info_bits;
  const int symbols = block.coded_bits / m;
  // Real uses of the Gaussian-input NA and of the converse, and P per Eb/N0.
  const bool real_constellation = std::all_of(block.points.begin(), block.points.end(),
                                              [](const cf32& p) { return p.imag() == 0.0f; });
  const int real_uses = binary ? block.coded_bits : (real_constellation ? symbols : 2 * symbols);
  const int converse_uses = binary || EqualEnergy(block.points) ? real_uses : real_uses + 1;
  const double p_per_ebno = 2.0 * k / real_uses;  // P = 2 k Eb/N0 / real uses
  const bool bounds = real_uses <= options.max_bound_length;
  r.n = binary ? block.coded_bits : symbols;
  // The per-real-use PAM model of the RCU and the input-specific converse:
  // the I levels when the constellation is a product set with the same
  // levels on both axes (BPSK, Gray QPSK, square QAM) or real; each real use
  // sees noise variance N0 / 2. Other sets (M-PSK, M >= 8) have none.
  std::vector<double> levels;
  {
    std::vector<double> re, im;
    for (const cf32& p : block.points) {
      re.push_back(p.real());
      im.push_back(p.imag());
    }
    const std::vector<double> li = Distinct(re), lq = Distinct(im);
    const bool same_axes =
        li.size() == lq.size() &&
        std::equal(li.begin(), li.end(), lq.begin(), [](double a, double b) {
          return std::fabs(a - b) < 1e-6;
        });
    if (li.size() >= 2 && li.size() <= 64 &&
        ((real_constellation && li.size() == block.points.size()) ||
         (same_axes && li.size() * lq.size() == block.points.size()))) {
      levels = li;
    }
  }
  const bool pam = !levels.empty();
  const auto pam_channel = [&](double x) {
    const double esno = k / symbols * DbToLinear(x);
    return PamChannel{levels, 0.5 / esno};
  };

  const auto na_fer = [&](double x) {
    const double ebno = DbToLinear(x);
    if (binary) return NormalApproximationFer(r.n, k, BinaryInputAwgn(p_per_ebno * ebno));
    const double esno = k / symbols * ebno;
    return NormalApproximationFer(r.n, k, ConstellationAwgn(block.points, esno));
  };
  const auto gaussian_fer = [&](double x) {
    return NormalApproximationFer(real_uses, k, GaussianInputAwgn(p_per_ebno * DbToLinear(x)));
  };
  // The RCU bound itself (saddlepoint inner probability, importance-sampled
  // outer expectation) on the PAM model.
  const auto rcu = [&](double x, int samples) {
    return PamRcu(pam_channel(x), real_uses, k, samples, options.seed);
  };
  const auto binary_converse = [&](double x, int samples) {
    if (binary) {
      return BinaryInputConverseFer(real_uses, k, p_per_ebno * DbToLinear(x), samples,
                                    options.seed + 1);
    }
    return PamConverseFer(pam_channel(x), real_uses, k, samples, options.seed + 1);
  };
  const auto converse_fer = [&](double x) {
    if (pam) return binary_converse(x, options.rcu_samples_curve).fer;
    return EqualPowerConverseFer(converse_uses, k, p_per_ebno * DbToLinear(x));
  };
  // Eb/N0 where a Monte Carlo FER estimate fer(x, samples) falls through the
  // target: 0.1 dB steps up from `start` until it is below, log-linear
  // interpolation, then one correction with more samples along the slope.
  const auto cross_by_steps = [&](auto&& fer, double start, double* rse) {
    double x0 = start;
    double f0 = fer(x0, options.rcu_samples_curve).fer;
    for (int step = 0; step < 40 && f0 > target_fer && !stopped(); ++step) {
      const double x1 = x0 + 0.1;
      const double f1 = fer(x1, options.rcu_samples_curve).fer;
      if (f1 <= target_fer && f1 > 0) {
        const double slope = (std::log10(f1) - std::log10(f0)) / (x1 - x0);  // < 0
        double x = x0 + (std::log10(target_fer) - std::log10(f0)) / slope;
        const RcuEstimate e = fer(x, options.rcu_samples_target);
        if (e.fer > 0) x += (std::log10(target_fer) - std::log10(e.fer)) / slope;
        *rse = e.relative_std_error;
        return x;
      }
      x0 = x1;
      f0 = f1;
    }
    return kNan;
  };
  // Eb/N0 where a FER that falls with Eb/N0 reaches the target (0.001 dB).
  const auto at_target = [&](auto&& fer) {
    double lo = -6.0, hi = 30.0;
    if (!(fer(lo) > target_fer) || fer(hi) > target_fer) return kNan;
    const Bracket br = Bisect(lo, hi, 1e-3, [&](double x) { return fer(x) > target_fer; });
    return 0.5 * (br.lo + br.hi);
  };

  r.normal_approximation_ebno_db = at_target(na_fer);
  r.normal_approximation_gaussian_ebno_db = at_target(gaussian_fer);
  r.rcu_ebno_db = kNan;
  r.converse_ebno_db = kNan;
  if (bounds && options.at_target && !stopped()) {
    // Converse at the target: the Eb/N0 where the bound admits exactly k bits.
    const double conv_lo = -6.0, conv_hi = 30.0;
    const auto admits = [&](double x) {
      return EqualPowerConverseLog2M(converse_uses, p_per_ebno * DbToLinear(x), target_fer) >= k;
    };
    if (!admits(conv_lo) && admits(conv_hi)) {
      const Bracket br = Bisect(conv_lo, conv_hi, 1e-3, [&](double x) { return !admits(x); });
      r.converse_ebno_db = 0.5 * (br.lo + br.hi);
    }
    r.converse_equal_power_ebno_db = r.converse_ebno_db;
    if (pam && std::isfinite(r.converse_ebno_db) && !stopped()) {
      // The input-specific meta-converse is tighter: start from the
      // equal-power one (it lies below) and step up.
      r.converse_ebno_db = cross_by_steps(binary_converse, r.converse_equal_power_ebno_db - 0.1,
                                          &r.converse_relative_std_error);
    }
    if (pam && options.rcu && std::isfinite(r.normal_approximation_ebno_db) && !stopped()) {
      // RCU lies above the NA (by about 0.1 dB at n = 128): step up from
      // just below the NA in 0.1 dB until the bound falls below the target,
      // interpolate log FER linearly, then correct once with more blocks at
      // the interpolated point along the local slope.
      r.rcu_ebno_db = cross_by_steps(rcu, r.normal_approximation_ebno_db - 0.2,
                                     &r.rcu_relative_std_error);
    }
  }
  for (const double x : ebno_db) {
    if (stopped()) return r;
    r.ebno_db.push_back(x);
    const double na = na_fer(x);
    r.fer_normal_approximation.push_back(na);
    r.fer_normal_approximation_gaussian.push_back(gaussian_fer(x));
    // Bounds only where the FER is of interest for a figure (the NA within
    // [1e-9, 0.999]; outside, NaN).
    const bool worth = bounds && na > 1e-9 && na < 0.999;
    r.fer_converse.push_back(worth ? converse_fer(x) : kNan);
    r.fer_rcu.push_back(worth && pam && options.rcu ? rcu(x, options.rcu_samples_curve).fer
                                                    : kNan);
  }
  r.present = true;
  r.rcu_bound = pam && options.rcu ? "RCU" : "none";
  std::string model =
      binary ? "binary-input AWGN, n = " + std::to_string(r.n) +
                   " uses (coded bits; Gray BPSK/QPSK is the binary-input channel bit by bit), P = "
                   "2 R Eb/N0 per use; C, V of the +-1 information density by 200-node "
                   "Gauss-Hermite quadrature"
             : "uniform constellation input (CM information density; a BICM receiver cannot "
               "exceed it), n = " +
                   std::to_string(r.n) +
                   " symbols, C, V by Gauss-Hermite quadrature (product sets per axis)";
  r.method =
      "normal approximation log2 M = n C - sqrt(n V) Qinv(eps) + 0.5 log2 n (Polyanskiy, Poor, "
      "Verdu, IEEE Trans. Inf. Theory 56(5), 2010) on the " +
      model + "; normal_approximation_gaussian: the same with Gaussian input, C = 0.5 log2(1+P), "
      "V = P(P+2)/(2(P+1)^2) log2(e)^2 per real dimension (" + std::to_string(real_uses) +
      " real uses); rcu: " +
      (pam ? "the RCU bound itself (same paper, Thm. 16; not the looser RCUs) for i.i.d. "
             "uniform input per real dimension (" +
                 std::to_string(levels.size()) + " levels, " + std::to_string(real_uses) +
                 " real uses), the outer expectation by importance-sampled Monte Carlo "
                 "(exponentially tilted outputs), " +
                 std::to_string(options.rcu_samples_target) +
                 " blocks at the target (relative standard error in rcu_relative_std_error), " +
                 std::to_string(options.rcu_samples_curve) +
                 " per curve point, the inner pairwise probability by the Lugannani-Rice "
                 "saddlepoint approximation (within 6 % of exact enumeration at n = 10..20, "
                 "better at longer blocks)"
           : std::string("not evaluated for this constellation (not a product of equal PAM "
                         "axes; NaN)")) +
      "; converse: " +
      (pam ? std::string(binary ? "meta-converse for binary input"
                                : "meta-converse for the uniform PAM input per real dimension "
                                  "(bounds codes whose codewords use every level equally "
                                  "often; for unequal-energy levels not every code)") +
                 " (same paper; auxiliary output = the output of i.i.d. uniform input, "
                 "Neyman-Pearson test on the information density, both error probabilities "
                 "from one importance-sampled set of " +
                 std::to_string(options.rcu_samples_target) +
                 " blocks, relative standard error in converse_relative_std_error); "
                 "converse_equal_power_ebno_db: "
           : std::string()) +
      "meta-converse for equal-power codes on the real AWGN channel (same paper; "
      "Gaussian auxiliary output, non-central chi-square Neyman-Pearson test, exact), " +
      std::to_string(converse_uses) + " real uses" +
      (converse_uses > real_uses ? " (average-power code extended by one dimension)" : "") +
      (bounds ? ""
       : options.max_bound_length <= 0
           ? std::string("; RCU and converse not computed (finite_length_bounds = no; NaN)")
           : "; RCU and converse skipped above " + std::to_string(options.max_bound_length) +
                 " real uses (NaN)");
  return r;
}

}  // namespace capgap::analysis
