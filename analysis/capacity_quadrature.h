// Quadrature controls for the capacity integrals of analysis/capacity.h, for
// tests and studies that check convergence or the structure shortcuts. The
// engine uses the plain functions in capacity.h (automatic choice).
//
// Automatic choice: the integrand has smooth "kinks" at the pairwise decision
// boundaries, at |t| = |x - x'| / (2 sqrt N0) in units of the Gauss-Hermite
// variable, of width ~ sqrt(N0) / |x - x'|. When every pairwise kink sits
// inside |t| < 0.7 (low SNR: the integrand is smooth over the Gaussian bulk)
// the small rules are used, otherwise the large ones. Product rules are
// pruned: a node whose weight (product) is below 1e-18 of the largest is
// dropped (contribution < 1e-12 bit). Measured against 256-node (1-D) and
// 160-per-dimension (2-D) rules on a 1 dB grid from -10 to 45 dB Es/N0 for
// BPSK, QPSK, 8/16-PSK and 16/64/256-QAM, CM and BICM: the automatic choice
// is within 1e-8 bit on the 1-D (per-axis) path and within 2e-7 bit on the
// 2-D path; the small rules alone err by up to 3e-5 bit at mid SNR.
#ifndef CAPGAP_ANALYSIS_CAPACITY_QUADRATURE_H_
#define CAPGAP_ANALYSIS_CAPACITY_QUADRATURE_H_

#include <span>

#include "blocks/core/types.h"

namespace capgap::analysis {

inline constexpr int kSmallNodes1d = 48;
inline constexpr int kLargeNodes1d = 200;
inline constexpr int kSmallNodes2d = 32;
inline constexpr int kLargeNodes2d = 96;

struct CapacityQuadrature {
  // Gauss-Hermite nodes per dimension for 1-D (real or per-axis) and 2-D
  // integrals; 0 selects automatically from Es/N0 (see above). Explicit
  // values must lie in [1, kMaxGaussHermiteNodes].
  int nodes_1d = 0;
  int nodes_2d = 0;
  // Use exact structure shortcuts: a product (square-QAM-like) point set
  // splits into two real channels; points that a rotation or reflection of
  // the constellation maps onto each other (for BICM: changing every label by
  // one XOR mask) share one integration. false forces the full 2-D sum over
  // every transmitted point (real constellations still use the real channel,
  // as capacity.h specifies).
  bool use_structure = true;
};

double ConstrainedCapacity(std::span<const cf32> points, double esno_db,
                           const CapacityQuadrature& quadrature);
double BicmCapacity(std::span<const cf32> points, double esno_db,
                    const CapacityQuadrature& quadrature);

}  // namespace capgap::analysis

#endif  // CAPGAP_ANALYSIS_CAPACITY_QUADRATURE_H_
