// Tests for analysis/gauss_hermite: small rules against their closed forms,
// exactness on polynomials up to degree 2n - 1 (and not beyond), and a
// smooth non-polynomial integral with a known value.
#include "analysis/gauss_hermite.h"

#include <gtest/gtest.h>

#include <cmath>
#include <numbers>

namespace capgap::analysis {
namespace {

const double kSqrtPi = std::sqrt(std::numbers::pi);

// int exp(-t^2) t^(2j) dt = Gamma(j + 1/2) (standard Gaussian moment).
double EvenMoment(int j) { return std::tgamma(j + 0.5); }

double RuleMoment(const GaussHermiteRule& rule, int degree) {
  double sum = 0.0;
  for (std::size_t i = 0; i < rule.nodes.size(); ++i) {
    sum += rule.weights[i] * std::pow(rule.nodes[i], degree);
  }
  return sum;
}

TEST(GaussHermite, TwoAndThreeNodeRulesMatchClosedForm) {
  // Nodes are the roots of H_2 = 4t^2 - 2 and H_3 = 8t^3 - 12t; the weights
  // follow from exactness on 1 and t^2 (arithmetic).
  const GaussHermiteRule two = MakeGaussHermiteRule(2);
  EXPECT_NEAR(two.nodes[0], -std::sqrt(0.5), 1e-15);
  EXPECT_NEAR(two.nodes[1], std::sqrt(0.5), 1e-15);
  EXPECT_NEAR(two.weights[0], kSqrtPi / 2, 1e-15);
  EXPECT_NEAR(two.weights[1], kSqrtPi / 2, 1e-15);
  const GaussHermiteRule three = MakeGaussHermiteRule(3);
  EXPECT_NEAR(three.nodes[0], -std::sqrt(1.5), 1e-15);
  EXPECT_EQ(three.nodes[1], 0.0);
  EXPECT_NEAR(three.nodes[2], std::sqrt(1.5), 1e-15);
  EXPECT_NEAR(three.weights[0], kSqrtPi / 6, 1e-15);
  EXPECT_NEAR(three.weights[1], 2 * kSqrtPi / 3, 1e-15);
  EXPECT_NEAR(three.weights[2], kSqrtPi / 6, 1e-15);
}

TEST(GaussHermite, NodesAreSymmetricAscendingAndWeightsPositive) {
  for (int n : {1, 4, 7, 48, 96, 200, kMaxGaussHermiteNodes}) {
    const GaussHermiteRule rule = MakeGaussHermiteRule(n);
    ASSERT_EQ(rule.nodes.size(), static_cast<std::size_t>(n));
    ASSERT_EQ(rule.weights.size(), static_cast<std::size_t>(n));
    double sum = 0.0;
    for (std::size_t i = 0; i < rule.nodes.size(); ++i) {
      EXPECT_EQ(rule.nodes[i], -rule.nodes[rule.nodes.size() - 1 - i]);
      if (i > 0) {
        EXPECT_GT(rule.nodes[i], rule.nodes[i - 1]);
      }
      EXPECT_GT(rule.weights[i], 0.0);
      sum += rule.weights[i];
    }
    EXPECT_NEAR(sum / kSqrtPi, 1.0, 1e-13) << n;
  }
}

TEST(GaussHermite, IntegratesPolynomialsBelowDegree2nExactly) {
  for (int n : {5, 12, 20}) {
    const GaussHermiteRule rule = MakeGaussHermiteRule(n);
    for (int j = 0; 2 * j <= 2 * n - 1; ++j) {
      EXPECT_NEAR(RuleMoment(rule, 2 * j) / EvenMoment(j), 1.0, 1e-12)
          << "n=" << n << " degree " << 2 * j;
      EXPECT_NEAR(RuleMoment(rule, 2 * j + 1), 0.0, 1e-12 * EvenMoment(j + 1));
    }
    // Degree 2n is the first one a Gauss rule misses: the error is
    // n! sqrt(pi) / 2^n (remainder term of Gauss-Hermite quadrature,
    // Abramowitz & Stegun 25.4.46; from memory), far above rounding.
    const double miss = std::tgamma(n + 1.0) * kSqrtPi / std::pow(2.0, n);
    EXPECT_NEAR(EvenMoment(n) - RuleMoment(rule, 2 * n), miss, 1e-9 * miss) << "n=" << n;
  }
}

TEST(GaussHermite, IntegratesGaussianTimesCosine) {
  // int exp(-t^2) cos(a t) dt = sqrt(pi) exp(-a^2 / 4) (standard Fourier
  // transform of a Gaussian); a = 3 needs a few tens of nodes.
  for (int n : {40, 96, 200, kMaxGaussHermiteNodes}) {
    const GaussHermiteRule rule = MakeGaussHermiteRule(n);
    double sum = 0.0;
    for (std::size_t i = 0; i < rule.nodes.size(); ++i) {
      sum += rule.weights[i] * std::cos(3.0 * rule.nodes[i]);
    }
    EXPECT_NEAR(sum, kSqrtPi * std::exp(-9.0 / 4.0), 1e-14) << n;
  }
}

}  // namespace
}  // namespace capgap::analysis
