// Gauss-Hermite rules by Golub-Welsch plus Newton polishing (see the header).
// Used once per node count and cached by the caller; not on any hot path.
#include "analysis/gauss_hermite.h"

#include <Eigen/Eigenvalues>
#include <algorithm>
#include <cmath>
#include <numbers>

#include "blocks/core/types.h"

namespace capgap::analysis {
namespace {

// Orthonormal Hermite functions w.r.t. exp(-t^2):
//   phi_0 = pi^(-1/4), phi_{k+1} = sqrt(2/(k+1)) t phi_k - sqrt(k/(k+1)) phi_{k-1}.
// Returns phi_n(t) and phi_{n-1}(t); *sum_sq receives sum_{k<n} phi_k(t)^2.
void HermiteOrthonormal(int n, double t, double* phi_n, double* phi_n1, double* sum_sq) {
  double prev = 0.0;
  double cur = 1.0 / std::sqrt(std::sqrt(std::numbers::pi));
  double sum = 0.0;
  for (int k = 0; k < n; ++k) {
    sum += cur * cur;
    const double next =
        std::sqrt(2.0 / (k + 1)) * t * cur - std::sqrt(static_cast<double>(k) / (k + 1)) * prev;
    prev = cur;
    cur = next;
  }
  *phi_n = cur;
  *phi_n1 = prev;
  *sum_sq = sum;
}

}  // namespace

GaussHermiteRule MakeGaussHermiteRule(int num_nodes) {
  CAPGAP_DCHECK(num_nodes >= 1 && num_nodes <= kMaxGaussHermiteNodes);
  const auto n = static_cast<Eigen::Index>(num_nodes);
  GaussHermiteRule rule;
  rule.nodes.resize(static_cast<std::size_t>(num_nodes));
  rule.weights.resize(static_cast<std::size_t>(num_nodes));
  if (num_nodes == 1) {
    rule.nodes[0] = 0.0;
    rule.weights[0] = std::sqrt(std::numbers::pi);
    return rule;
  }
  // Jacobi matrix: zero diagonal, off-diagonal sqrt(k / 2), k = 1..n-1.
  Eigen::VectorXd diagonal = Eigen::VectorXd::Zero(n);
  Eigen::VectorXd off_diagonal(n - 1);
  for (Eigen::Index k = 1; k < n; ++k) {
    off_diagonal[k - 1] = std::sqrt(static_cast<double>(k) / 2.0);
  }
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> solver;
  solver.computeFromTridiagonal(diagonal, off_diagonal, Eigen::EigenvaluesOnly);
  for (Eigen::Index i = 0; i < n; ++i) {
    double t = solver.eigenvalues()[i];
    // Newton on phi_n, phi_n' = sqrt(2 n) phi_{n-1}; two steps from an
    // eigenvalue accurate to a few ulps of the largest node.
    double phi_n = 0.0, phi_n1 = 0.0, sum_sq = 0.0;
    for (int step = 0; step < 2; ++step) {
      HermiteOrthonormal(num_nodes, t, &phi_n, &phi_n1, &sum_sq);
      const double derivative = std::sqrt(2.0 * num_nodes) * phi_n1;
      if (derivative != 0.0) t -= phi_n / derivative;
    }
    rule.nodes[static_cast<std::size_t>(i)] = t;
  }
  // Enforce exact symmetry (the eigensolver's rounding is not symmetric).
  std::sort(rule.nodes.begin(), rule.nodes.end());
  for (int i = 0; i < num_nodes / 2; ++i) {
    const auto lo = static_cast<std::size_t>(i);
    const auto hi = static_cast<std::size_t>(num_nodes - 1 - i);
    const double t = 0.5 * (rule.nodes[hi] - rule.nodes[lo]);
    rule.nodes[lo] = -t;
    rule.nodes[hi] = t;
  }
  if (num_nodes % 2 == 1) rule.nodes[static_cast<std::size_t>(num_nodes / 2)] = 0.0;
  for (std::size_t i = 0; i < rule.nodes.size(); ++i) {
    double phi_n = 0.0, phi_n1 = 0.0, sum_sq = 0.0;
    HermiteOrthonormal(num_nodes, rule.nodes[i], &phi_n, &phi_n1, &sum_sq);
    rule.weights[i] = 1.0 / sum_sq;
  }
  return rule;
}

}  // namespace capgap::analysis
