// Capacity limits for the gap-to-capacity figures: Shannon-Hartley, the
// unconstrained minimum Eb/N0 at a spectral efficiency, and the constellation-
// constrained (CM) and BICM capacities with their Eb/N0 limits.
//
// CM: C = m - E_{x,n}[log2 sum_x' exp(-(|x - x' + n|^2 - |n|^2) / N0)]. With
// n = sqrt(N0) t (t has density exp(-|t|^2)/pi, or /sqrt(pi) in 1-D) and
// u = (x - x') / sqrt(N0) the exponent is |t|^2 - |u + t|^2 <= |t|^2 and the
// x' = x term is exactly 1, so the sum never overflows (the pruned rules keep
// |t|^2 below ~50) and log2(1 + rest) is taken with log1p. BICM: bit b adds
// 1 - E[log2(1 + S_diff / S_same)], S_same/S_diff the sums over x' whose bit
// b equals/differs from x's (Caire, Taricco, Biglieri 1998). The noise average
// is a (pruned) Gauss-Hermite product rule, see capacity_quadrature.h.
//
// Exact shortcuts (use_structure): a point set that is a Cartesian product
// A + jB with equiprobable points has independent real and imaginary channels,
// so C = C_A + C_B on two real channels with noise N0/2; BICM splits the same
// way when every bit is a function of one axis (Gray square QAM). Points that
// an isometry of the constellation maps onto each other (all of M-PSK for CM;
// four-point orbits of Gray M-PSK for BICM) have equal terms, so one point per
// orbit is integrated. With these, ConstrainedMinEbnoDb for 256-QAM takes
// about 1 ms; the generic 2-D path (8-PSK: ~1 ms per limit) is slowest for
// BICM with many points (64-PSK: ~0.3 s per limit).
// Limits are found with TOMS 748 (Boost.Math) in Es/N0 (dB) to 1e-7 dB,
// starting from the Shannon bound 2^rho - 1, below which C < rho always.
#include "analysis/capacity.h"

#include <algorithm>
#include <bit>
#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>
#include <cstdint>
#include <limits>
#include <map>
#include <memory>
#include <mutex>
#include <numbers>
#include <vector>

#include "analysis/capacity_quadrature.h"
#include "analysis/gauss_hermite.h"
#include "blocks/core/energy.h"

namespace capgap::analysis {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kLn2 = std::numbers::ln2;
// Two coordinates closer than this are the same level (points are float).
constexpr double kLevelTolerance = 1e-6;
// Pruning threshold relative to the largest weight (product) of a rule.
constexpr double kPruneRelative = 1e-18;
// Kinks of the integrand lie at |t| = |x - x'| / (2 sqrt N0); when even the
// farthest pair's kink lies below this value the small rules are accurate.
constexpr double kSmoothKinkPosition = 0.7;

struct Node {
  double t1;
  double t2;  // 0 for 1-D rules
  double weight;
};

// Pruned 1-D or 2-D product rules, built once per node count and shared by
// all threads (never modified after construction).
const std::vector<Node>& CachedNodes(int nodes_per_dim, bool two_dim) {
  static std::mutex mutex;
  static std::map<std::pair<int, bool>, std::unique_ptr<std::vector<Node>>> cache;
  std::lock_guard<std::mutex> lock(mutex);
  auto& slot = cache[{nodes_per_dim, two_dim}];
  if (!slot) {
    const GaussHermiteRule rule = MakeGaussHermiteRule(nodes_per_dim);
    const double w_max = *std::max_element(rule.weights.begin(), rule.weights.end());
    auto nodes = std::make_unique<std::vector<Node>>();
    const std::size_t n = rule.nodes.size();
    for (std::size_t i = 0; i < n; ++i) {
      if (!two_dim) {
        if (rule.weights[i] >= kPruneRelative * w_max) {
          nodes->push_back({rule.nodes[i], 0.0, rule.weights[i]});
        }
        continue;
      }
      for (std::size_t j = 0; j < n; ++j) {
        const double w = rule.weights[i] * rule.weights[j];
        if (w >= kPruneRelative * w_max * w_max) {
          nodes->push_back({rule.nodes[i], rule.nodes[j], w});
        }
      }
    }
    slot = std::move(nodes);
  }
  return *slot;
}

// A transmitted point standing for `multiplicity` points with equal terms.
struct Representative {
  std::size_t index;
  double multiplicity;
};

// A channel input alphabet in double precision. labels[i] holds the bits
// (MSB first across num_bits) that BICM partitions by; for CM they are unused.
struct Alphabet {
  std::vector<double> re;
  std::vector<double> im;  // empty for a real (1-D) channel
  std::vector<std::uint32_t> labels;
  int num_bits = 0;
  // Transmitted points to average over (symmetry orbits, see Orbits()).
  std::vector<Representative> transmit;
  double max_distance = 0.0;  // largest |x - x'|, for ChooseNodes
  bool two_dim() const { return !im.empty(); }
  std::size_t size() const { return re.size(); }
};

double MaxDistance(const Alphabet& a) {
  double best = 0.0;
  for (std::size_t i = 0; i < a.size(); ++i) {
    for (std::size_t j = i + 1; j < a.size(); ++j) {
      const double dr = a.re[i] - a.re[j];
      const double di = a.two_dim() ? a.im[i] - a.im[j] : 0.0;
      best = std::max(best, std::hypot(dr, di));
    }
  }
  return best;
}

int ChooseNodes(const Alphabet& a, double n0, const CapacityQuadrature& q) {
  const int explicit_nodes = a.two_dim() ? q.nodes_2d : q.nodes_1d;
  if (explicit_nodes > 0) return explicit_nodes;
  const bool smooth = a.max_distance / (2.0 * std::sqrt(n0)) < kSmoothKinkPosition;
  if (a.two_dim()) return smooth ? kSmallNodes2d : kLargeNodes2d;
  return smooth ? kSmallNodes1d : kLargeNodes1d;
}

// Equivocation terms in bits: *cm = E[log2(sum_x' p(y|x') / p(y|x))] and,
// when per_bit is non-null, per_bit[b] = E[log2(1 + S_diff_b / S_same_b)],
// averaged over the transmitted points given by `representatives`.
void Equivocations(const Alphabet& a, double n0, int nodes_per_dim,
                   std::span<const Representative> representatives, double* cm,
                   std::vector<double>* per_bit) {
  const std::vector<Node>& nodes = CachedNodes(nodes_per_dim, a.two_dim());
  const std::size_t size = a.size();
  const std::size_t num_bits = per_bit != nullptr ? static_cast<std::size_t>(a.num_bits) : 0;
  const double inv_sqrt_n0 = 1.0 / std::sqrt(n0);
  std::vector<double> ur(size), ui(size), offset(size);
  // same_bit[k * num_bits + b] = 1 when point k's bit b equals x's, else 0
  // (point-major, so the per-bit sums below are independent accumulators).
  std::vector<double> same_bit(num_bits * size);
  std::vector<double> same_others(num_bits), x_bits(num_bits);
  std::vector<double> bit_acc(num_bits, 0.0);
  double cm_acc = 0.0;
  double total_multiplicity = 0.0;
  for (const Representative& rep : representatives) {
    const std::size_t x = rep.index;
    for (std::size_t k = 0; k < size; ++k) {
      ur[k] = (a.re[x] - a.re[k]) * inv_sqrt_n0;
      ui[k] = a.two_dim() ? (a.im[x] - a.im[k]) * inv_sqrt_n0 : 0.0;
      offset[k] = -(ur[k] * ur[k] + ui[k] * ui[k]);
      for (std::size_t b = 0; b < num_bits; ++b) {
        same_bit[k * num_bits + b] = (((a.labels[x] ^ a.labels[k]) >> b) & 1u) == 0u ? 1.0 : 0.0;
      }
    }
    // The x' = x term is exactly 1; it is kept out of the sums (weight 0
    // via exp(-inf)) and added back explicitly, so log1p sees only the rest.
    offset[x] = -std::numeric_limits<double>::infinity();
    double x_cm = 0.0;
    std::fill(x_bits.begin(), x_bits.end(), 0.0);
    for (const Node& node : nodes) {
      // Exponent |t|^2 - |u + t|^2 = -|u|^2 - 2 (u1 t1 + u2 t2).
      double others = 0.0;
      std::fill(same_others.begin(), same_others.end(), 0.0);
      for (std::size_t k = 0; k < size; ++k) {
        const double wk = std::exp(offset[k] - 2.0 * (ur[k] * node.t1 + ui[k] * node.t2));
        others += wk;
        const double* mask = same_bit.data() + k * num_bits;
        for (std::size_t b = 0; b < num_bits; ++b) same_others[b] += wk * mask[b];
      }
      x_cm += node.weight * std::log1p(others);
      for (std::size_t b = 0; b < num_bits; ++b) {
        // S_diff = others - same_others: absolute error <= eps * others,
        // which is at most eps relative to S_same + S_diff.
        const double s_diff = std::max(others - same_others[b], 0.0);
        x_bits[b] += node.weight * std::log1p(s_diff / (1.0 + same_others[b]));
      }
    }
    cm_acc += rep.multiplicity * x_cm;
    for (std::size_t b = 0; b < num_bits; ++b) {
      bit_acc[b] += rep.multiplicity * x_bits[b];
    }
    total_multiplicity += rep.multiplicity;
  }
  // Normalise: weights sum to pi (2-D) or sqrt(pi) (1-D); nats -> bits.
  const double norm =
      total_multiplicity * kLn2 * (a.two_dim() ? std::numbers::pi : std::sqrt(std::numbers::pi));
  *cm = cm_acc / norm;
  if (per_bit != nullptr) {
    per_bit->assign(num_bits, 0.0);
    for (std::size_t b = 0; b < num_bits; ++b) (*per_bit)[b] = bit_acc[b] / norm;
  }
}

// Orbits of the points under the isometries about the origin (rotations and
// reflections) that map the alphabet onto itself and, when labels matter,
// change every label by one XOR mask. Points of one orbit have equal CM
// terms, and equal BICM terms when labels matter (the noise is circular and
// a common XOR mask only renames bit values), so one representative per
// orbit suffices. Candidate isometries map the largest point onto a point of
// the same magnitude, so the search costs O(#candidates * M^2).
std::vector<Representative> Orbits(const Alphabet& a, bool labels_matter, bool use_structure) {
  const std::size_t size = a.size();
  std::vector<std::complex<double>> z(size);
  for (std::size_t i = 0; i < size; ++i) {
    z[i] = {a.re[i], a.two_dim() ? a.im[i] : 0.0};
  }
  std::vector<std::size_t> parent(size);
  for (std::size_t i = 0; i < size; ++i) parent[i] = i;
  auto find = [&parent](std::size_t i) {
    while (parent[i] != i) i = parent[i] = parent[parent[i]];
    return i;
  };
  constexpr double kMatch = 1e-5;
  if (use_structure && size <= 4096) {
    std::size_t base = 0;
    for (std::size_t i = 1; i < size; ++i) {
      if (std::abs(z[i]) > std::abs(z[base])) base = i;
    }
    const double radius = std::abs(z[base]);
    std::vector<std::size_t> image(size);
    for (std::size_t j = 0; j < size; ++j) {
      if (std::abs(std::abs(z[j]) - radius) > kMatch) continue;
      // Rotation z -> r z and reflection z -> f conj(z) sending base to j
      // (for j = base the rotation is the identity and is skipped).
      const std::complex<double> r = z[j] / z[base];
      const std::complex<double> f = z[j] / std::conj(z[base]);
      for (int kind = j == base ? 1 : 0; kind < 2; ++kind) {
        bool ok = true;
        for (std::size_t i = 0; i < size && ok; ++i) {
          const std::complex<double> g = kind == 0 ? r * z[i] : f * std::conj(z[i]);
          ok = false;
          for (std::size_t k = 0; k < size; ++k) {
            if (std::abs(g - z[k]) < kMatch) {
              image[i] = k;
              ok = true;
              break;
            }
          }
        }
        if (ok && labels_matter) {
          const std::uint32_t mask = a.labels[0] ^ a.labels[image[0]];
          for (std::size_t i = 0; i < size && ok; ++i) {
            ok = (a.labels[i] ^ a.labels[image[i]]) == mask;
          }
        }
        if (!ok) continue;
        for (std::size_t i = 0; i < size; ++i) {
          parent[find(i)] = find(image[i]);
        }
      }
    }
  }
  std::vector<double> count(size, 0.0);
  for (std::size_t i = 0; i < size; ++i) count[find(i)] += 1.0;
  std::vector<Representative> reps;
  for (std::size_t i = 0; i < size; ++i) {
    if (count[i] > 0.0) reps.push_back({i, count[i]});
  }
  return reps;
}

// Sorted distinct values (within kLevelTolerance) and each input's index.
std::vector<double> Levels(const std::vector<double>& values, std::vector<std::size_t>* index) {
  std::vector<double> sorted = values;
  std::sort(sorted.begin(), sorted.end());
  std::vector<double> levels;
  for (double v : sorted) {
    if (levels.empty() || v - levels.back() > kLevelTolerance) {
      levels.push_back(v);
    }
  }
  index->resize(values.size());
  for (std::size_t i = 0; i < values.size(); ++i) {
    const auto it = std::lower_bound(levels.begin(), levels.end(), values[i] - kLevelTolerance);
    (*index)[i] = static_cast<std::size_t>(it - levels.begin());
  }
  return levels;
}

// A constellation prepared for the integrals: either one 1-D/2-D alphabet or
// two real alphabets (product structure), each carrying the bits it decides.
struct Problem {
  std::vector<Alphabet> parts;
  int bits_per_symbol = 0;
};

// Tries the Cartesian-product split; for BICM also requires every bit to be
// a function of one axis. Returns false when the structure is absent.
bool SplitProduct(std::span<const cf32> points, int m, bool need_bits, Problem* problem) {
  const std::size_t size = points.size();
  std::vector<double> re(size), im(size);
  for (std::size_t i = 0; i < size; ++i) {
    re[i] = points[i].real();
    im[i] = points[i].imag();
  }
  std::vector<std::size_t> ia, ib;
  const std::vector<double> a_levels = Levels(re, &ia);
  const std::vector<double> b_levels = Levels(im, &ib);
  if (a_levels.size() * b_levels.size() != size) return false;
  std::vector<char> seen(size, 0);
  for (std::size_t i = 0; i < size; ++i) {
    char& cell = seen[ia[i] * b_levels.size() + ib[i]];
    if (cell != 0) return false;
    cell = 1;
  }
  Alphabet axis_a, axis_b;
  axis_a.re = a_levels;
  axis_b.re = b_levels;
  axis_a.labels.assign(a_levels.size(), 0);
  axis_b.labels.assign(b_levels.size(), 0);
  if (need_bits) {
    // Bit b (MSB first) of label i is (i >> (m - 1 - b)) & 1.
    std::vector<int> owner(static_cast<std::size_t>(m), -1);
    for (int b = 0; b < m; ++b) {
      const int shift = m - 1 - b;
      for (int axis = 0; axis < 2 && owner[static_cast<std::size_t>(b)] < 0; ++axis) {
        const std::vector<std::size_t>& index = axis == 0 ? ia : ib;
        const std::size_t count = axis == 0 ? a_levels.size() : b_levels.size();
        std::vector<int> value(count, -1);
        bool consistent = true;
        for (std::size_t i = 0; i < size && consistent; ++i) {
          const int bit = static_cast<int>((i >> shift) & 1u);
          int& v = value[index[i]];
          if (v < 0) v = bit;
          consistent = (v == bit);
        }
        if (!consistent) continue;
        owner[static_cast<std::size_t>(b)] = axis;
        Alphabet& target = axis == 0 ? axis_a : axis_b;
        for (std::size_t l = 0; l < count; ++l) {
          target.labels[l] |= static_cast<std::uint32_t>(value[l]) << target.num_bits;
        }
        ++target.num_bits;
      }
      if (owner[static_cast<std::size_t>(b)] < 0) return false;
    }
  }
  problem->parts.clear();
  if (axis_a.size() > 1) problem->parts.push_back(std::move(axis_a));
  if (axis_b.size() > 1) problem->parts.push_back(std::move(axis_b));
  return true;
}

Problem Prepare(std::span<const cf32> points, bool need_bits, bool use_structure) {
  Problem problem;
  const std::size_t size = points.size();
  problem.bits_per_symbol = std::countr_zero(size);
  const int m = problem.bits_per_symbol;
  bool all_real = true;
  for (const cf32& p : points) all_real = all_real && p.imag() == 0.0f;
  if (use_structure && SplitProduct(points, m, need_bits, &problem)) {
    for (Alphabet& part : problem.parts) {
      part.transmit = Orbits(part, need_bits, use_structure);
      part.max_distance = MaxDistance(part);
    }
    return problem;
  }
  Alphabet whole;
  whole.num_bits = m;
  for (std::size_t i = 0; i < size; ++i) {
    whole.re.push_back(points[i].real());
    if (!all_real) whole.im.push_back(points[i].imag());
    // Store bit b (MSB first) at position b so Equivocations can index it.
    std::uint32_t bits = 0;
    for (int b = 0; b < m; ++b) {
      bits |= static_cast<std::uint32_t>((i >> (m - 1 - b)) & 1u) << b;
    }
    whole.labels.push_back(bits);
  }
  whole.transmit = Orbits(whole, need_bits, use_structure);
  whole.max_distance = MaxDistance(whole);
  problem.parts.push_back(std::move(whole));
  return problem;
}

bool ValidPoints(std::span<const cf32> points) {
  return points.size() >= 2 && std::has_single_bit(points.size()) &&
         points.size() <= (std::size_t{1} << 16);
}

// Sum of equivocations (bits) whose subtraction from m gives the capacity.
double CmEquivocation(const Problem& problem, double n0, const CapacityQuadrature& q) {
  double total = 0.0;
  for (const Alphabet& part : problem.parts) {
    double cm = 0.0;
    Equivocations(part, n0, ChooseNodes(part, n0, q), part.transmit, &cm, nullptr);
    total += cm;
  }
  return total;
}

double BicmEquivocation(const Problem& problem, double n0, const CapacityQuadrature& q) {
  double total = 0.0;
  std::vector<double> per_bit;
  for (const Alphabet& part : problem.parts) {
    double cm = 0.0;
    Equivocations(part, n0, ChooseNodes(part, n0, q), part.transmit, &cm, &per_bit);
    for (double v : per_bit) total += v;
  }
  return total;
}

double N0FromEsnoDb(double esno_db) { return 1.0 / DbToLinear(esno_db); }

// Es/N0 (dB) where m - equivocation(Es/N0) = rho; returns Eb/N0 (dB).
template <typename Equivocation>
double MinEbnoDb(const Problem& problem, double rho, const Equivocation& equivocation) {
  const double m = problem.bits_per_symbol;
  if (!(rho > 0.0)) return kNaN;
  if (rho >= m) return kInf;
  auto excess = [&](double esno_db) {
    return (m - rho) - equivocation(problem, N0FromEsnoDb(esno_db), CapacityQuadrature{});
  };
  // C(Es/N0) <= log2(1 + Es/N0), so C < rho at Es/N0 = 2^rho - 1.
  double lo = LinearToDb(std::expm1(rho * kLn2));
  double f_lo = excess(lo);
  while (f_lo > 0.0) {  // only if quadrature error crossed the bound
    lo -= 1.0;
    if (lo < -100.0) return kNaN;
    f_lo = excess(lo);
  }
  double hi = lo + 3.0;
  double f_hi = excess(hi);
  while (f_hi <= 0.0) {
    lo = hi;
    f_lo = f_hi;
    hi += 3.0;
    if (hi > 200.0) return kInf;
    f_hi = excess(hi);
  }
  if (f_lo == 0.0) return EbnoDbFromEsnoDb(lo, rho);
  std::uintmax_t max_iter = 100;
  const auto bracket = boost::math::tools::toms748_solve(
      excess, lo, hi, f_lo, f_hi, [](double a, double b) { return std::abs(b - a) < 1e-7; },
      max_iter);
  return EbnoDbFromEsnoDb(0.5 * (bracket.first + bracket.second), rho);
}

}  // namespace

double ShannonHartleyCapacity(double bandwidth_hz, double snr_db) {
  return bandwidth_hz * std::log1p(DbToLinear(snr_db)) / kLn2;
}

double ShannonMinEbnoDb(double eta) {
  CAPGAP_DCHECK(eta >= 0.0);
  if (!(eta >= 0.0)) return kNaN;
  if (eta == 0.0) return LinearToDb(kLn2);
  const double x = eta * kLn2;
  // log((2^eta - 1) / eta) without overflow for large eta and without
  // cancellation for small eta.
  const double log_expm1 = x > 30.0 ? x + std::log1p(-std::exp(-x)) : std::log(std::expm1(x));
  return 10.0 * (log_expm1 - std::log(eta)) / std::numbers::ln10;
}

double ConstrainedCapacity(std::span<const cf32> points, double esno_db,
                           const CapacityQuadrature& quadrature) {
  if (!ValidPoints(points) || std::isnan(esno_db)) return kNaN;
  const Problem problem = Prepare(points, false, quadrature.use_structure);
  return problem.bits_per_symbol - CmEquivocation(problem, N0FromEsnoDb(esno_db), quadrature);
}

double BicmCapacity(std::span<const cf32> points, double esno_db,
                    const CapacityQuadrature& quadrature) {
  if (!ValidPoints(points) || std::isnan(esno_db)) return kNaN;
  const Problem problem = Prepare(points, true, quadrature.use_structure);
  return problem.bits_per_symbol - BicmEquivocation(problem, N0FromEsnoDb(esno_db), quadrature);
}

double ConstrainedCapacity(std::span<const cf32> points, double esno_db) {
  return ConstrainedCapacity(points, esno_db, CapacityQuadrature{});
}

double BicmCapacity(std::span<const cf32> points, double esno_db) {
  return BicmCapacity(points, esno_db, CapacityQuadrature{});
}

double ConstrainedMinEbnoDb(std::span<const cf32> points, double rho) {
  CAPGAP_DCHECK(rho > 0.0);
  if (!ValidPoints(points)) return kNaN;
  return MinEbnoDb(Prepare(points, false, true), rho, CmEquivocation);
}

double BicmMinEbnoDb(std::span<const cf32> points, double rho) {
  CAPGAP_DCHECK(rho > 0.0);
  if (!ValidPoints(points)) return kNaN;
  return MinEbnoDb(Prepare(points, true, true), rho, BicmEquivocation);
}

double BinaryInputMinEbnoDb(double rate) {
  const cf32 bpsk[2] = {cf32(1.0f, 0.0f), cf32(-1.0f, 0.0f)};
  return ConstrainedMinEbnoDb(bpsk, rate);
}

}  // namespace capgap::analysis
