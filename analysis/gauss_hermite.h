// Gauss-Hermite quadrature rules for the weight exp(-t^2) on the real line:
// the noise average in every capacity integral of analysis/capacity.cc.
//
// Nodes come from the Golub-Welsch eigenproblem of the Hermite Jacobi matrix
// (G. H. Golub and J. H. Welsch, Math. Comp. 23, 1969), solved with Eigen's
// symmetric tridiagonal eigensolver, then polished by Newton steps on the
// orthonormal three-term recurrence; weights are 1 / sum_k phi_k(t)^2 (the
// Christoffel function), which keeps the tiny outer weights accurate in a
// relative sense. int exp(-t^2) f(t) dt = sum_i weights[i] f(nodes[i]), exact
// for polynomials of degree < 2 n.
#ifndef CAPGAP_ANALYSIS_GAUSS_HERMITE_H_
#define CAPGAP_ANALYSIS_GAUSS_HERMITE_H_

#include <vector>

namespace capgap::analysis {

// Largest supported rule: beyond ~256 nodes the outer phi_k(t)^2 approach
// the double range (they grow like exp(t^2), t_max ~ sqrt(2 n)).
inline constexpr int kMaxGaussHermiteNodes = 256;

struct GaussHermiteRule {
  std::vector<double> nodes;    // ascending, symmetric about 0
  std::vector<double> weights;  // positive, sum = sqrt(pi)
};

// REQUIRES 1 <= num_nodes <= kMaxGaussHermiteNodes.
GaussHermiteRule MakeGaussHermiteRule(int num_nodes);

}  // namespace capgap::analysis

#endif  // CAPGAP_ANALYSIS_GAUSS_HERMITE_H_
