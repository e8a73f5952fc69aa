// Belief-propagation (sum-product) thresholds of LDPC ensembles on the
// binary-input AWGN channel by density evolution: the largest noise standard
// deviation sigma at which the message error probability of an unbounded-
// length, cycle-free ensemble goes to zero. The LDPC scheme results quote the
// threshold beside the capacity limit of the rate (capacity.h).
//
// Conventions (DEVELOPERS.md, Conventions): BPSK 0 -> +1, 1 -> -1, noise
// variance sigma^2 per real dimension; LLR = ln P(b=0|y)/P(b=1|y) = 2y/sigma^2,
// LLR > 0 favours bit 0. By channel and decoder symmetry the all-zero codeword
// is analysed, so the channel LLR is Gaussian with mean 2/sigma^2 and variance
// twice its mean. Eb/N0 = 1/(2 R sigma^2) for the rate R the caller charges.
//
// Degree distributions are from the edge perspective (Richardson, Shokrollahi,
// Urbanke 2001): lambda(x) = sum_d lambda_d x^(d-1), rho(x) likewise, where
// lambda_d is the fraction of edges attached to variable nodes of degree d.
//
// Two methods:
// - Gaussian approximation: S.-Y. Chung, T. J. Richardson, R. L. Urbanke,
//   "Analysis of sum-product decoding of low-density parity-check codes using
//   a Gaussian approximation", IEEE Trans. Inf. Theory 47(2), 2001. Messages
//   are taken to be symmetric Gaussians, described by their mean alone; the
//   check-node rule becomes a recursion through phi(x) = 1 - E[tanh(U/2)],
//   U ~ N(x, 2x). By default phi is evaluated accurately (GaussianApproxPhi);
//   the paper's closed-form fit is an option (GaussianApproxOptions).
// - Quantized (discretized) density evolution: T. Richardson, A. Shokrollahi,
//   R. Urbanke, "Design of capacity-approaching irregular low-density parity-
//   check codes", IEEE Trans. Inf. Theory 47(2), 2001, with the discretization
//   of S.-Y. Chung, G. D. Forney, T. Richardson, R. Urbanke, "On the design of
//   low-density parity-check codes within 0.0045 dB of the Shannon limit",
//   IEEE Commun. Lett. 5(2), 2001 (authors from memory). The pmf of the LLR on
//   a uniform grid is evolved exactly for a quantized decoder: variable nodes
//   add LLRs (FFT convolution, saturated at the grid ends), check nodes apply
//   the rounded pairwise rule 2 atanh(tanh(a/2) tanh(b/2)) degree-1 times.
//
// Both thresholds are found by bisection on sigma below the binary-input
// capacity sigma of the design rate and the stability limit
// lambda_2 rho'(1) exp(-1/(2 sigma^2)) < 1. Everything here is deterministic,
// keeps no mutable global state (the phi table is built once, thread-safely,
// and never changed) and may be called from several threads at once.
#ifndef CAPGAP_ANALYSIS_DENSITY_EVOLUTION_H_
#define CAPGAP_ANALYSIS_DENSITY_EVOLUTION_H_

#include <atomic>
#include <span>
#include <string>
#include <vector>

#include "blocks/core/status.h"

namespace capgap::analysis {

// Edge-perspective degree distributions: lambda[d] is the fraction of edges
// attached to variable nodes of degree d (coefficient of x^(d-1)); rho[d]
// likewise for check nodes. Index = degree; entries for d < 2 are zero.
struct EdgeDistribution {
  std::vector<double> lambda;
  std::vector<double> rho;
};

// Node counts indexed by degree (variable_nodes_by_degree[d] = number of
// variable nodes of degree d) -> edge perspective, lambda_d = d n_d / E.
// Rules: counts >= 0; no nodes of degree 0 or 1; at least one edge; both
// sides count the same number of edges E.
Result<EdgeDistribution> EdgeDistributionFromNodeCounts(
    std::span<const int> variable_nodes_by_degree, std::span<const int> check_nodes_by_degree);

// The (dv, dc)-regular ensemble; dv >= 2, dc >= 2.
Result<EdgeDistribution> RegularEdgeDistribution(int variable_degree, int check_degree);

// OK when every coefficient is finite and >= 0, entries for d < 2 are zero,
// each side has a positive entry and sums to 1 within 1e-9, and the design
// rate is > 0. The threshold functions call it first.
Status ValidateEdgeDistribution(const EdgeDistribution& distribution);

// 1 - (sum_d rho_d / d) / (sum_d lambda_d / d).
double DesignRate(const EdgeDistribution& distribution);

enum class DeMethod { kGaussianApproximation, kQuantized };
std::string ToString(DeMethod method);  // "gaussian_approximation", "quantized"

struct ThresholdResult {
  double sigma = 0.0;    // largest sigma found to decode (within the tolerance)
  double ebno_db = 0.0;  // 10 log10(1 / (2 R sigma^2)), R = the rate passed in
  DeMethod method = DeMethod::kGaussianApproximation;
  std::string description;  // method, grid and stopping rule, for the results
};

struct QuantizedDeOptions {
  // Grid: LLRs k * llr_step for |k| <= llr_max / llr_step, saturated at
  // +-llr_max. With step 0.05 the (3,6) threshold is 0.0007 dB from its
  // step-0.0125 value; saturation puts a floor of roughly exp(-llr_max/2) under
  // the error probability of ensembles with degree-2 variable nodes, which
  // must stay below target_error_probability (see density_evolution.cc).
  double llr_step = 0.05;
  double llr_max = 30.0;
  // A sigma decodes if the error probability of variable-to-check messages
  // (mass below 0 plus half the mass at 0) falls to target_error_probability
  // within max_iterations. It fails as soon as an iteration lowers the error
  // probability by less than stall_fraction of itself (a fixed point).
  int max_iterations = 3000;
  double target_error_probability = 1e-6;
  double stall_fraction = 1e-5;
  // Bisection stops when the bracket [decodes, fails] is narrower than this.
  double sigma_tolerance = 1e-4;
  // Checked every iteration: once it reads true, QuantizedThreshold returns
  // Status::Stopped. nullptr: never.
  const std::atomic<bool>* stop = nullptr;
};

struct GaussianApproxOptions {
  // false: phi accurate to ~1e-12 (GaussianApproxPhi). true: the paper's
  // closed-form fit exp(-0.4527 x^0.86 + 0.0218) (x < 10) and
  // sqrt(pi/x) exp(-x/4) (1 - 10/(7x)) (x >= 10). Only the fit reproduces
  // the GA thresholds tabulated in the paper as we recall them (sigma 0.8747
  // for (3,6), 0.8323 for (4,8)); the exact phi gives 0.8719 and 0.8295.
  bool closed_form_phi = false;
  double sigma_tolerance = 1e-5;  // bisection stops below this bracket width
};

// Gaussian-approximation threshold; rate is the R used for ebno_db, in (0, 1].
// Takes milliseconds.
Result<ThresholdResult> GaussianApproxThreshold(const EdgeDistribution& distribution, double rate,
                                                const GaussianApproxOptions& options = {});

// Quantized density-evolution threshold; options are validated (step > 0,
// llr_max >= 4 step and at most 2^16 steps, max_iterations >= 1, target in
// (0, 0.5), stall_fraction in [0, 1), sigma_tolerance > 0, and
// 2 d_max llr_max / llr_step <= 2^21 for the largest variable degree d_max,
// which bounds the FFT size). Fails with a Status if even the capacity sigma
// "decodes" (a grid far too coarse to be trusted). (3,6) takes about 0.5 s,
// irregular ensembles a few seconds; Status::Stopped when options.stop is set.
Result<ThresholdResult> QuantizedThreshold(const EdgeDistribution& distribution, double rate,
                                           const QuantizedDeOptions& options = {});

// phi(x) = 1 - E[tanh(U/2)], U ~ N(x, 2x), x >= 0 (phi(0) = 1; decreasing;
// phi(x) ~ sqrt(pi/x) exp(-x/4) as x -> infinity). Relative error below
// ~1e-12 (piecewise Chebyshev table of ln phi, asymptotic series beyond
// x = 2048). LogGaussianApproxPhi returns ln phi(x) without underflow.
double GaussianApproxPhi(double x);
double LogGaussianApproxPhi(double x);
// Inverse: the x >= 0 with ln phi(x) = log_y, for log_y <= 0.
double GaussianApproxPhiInverseLog(double log_y);

}  // namespace capgap::analysis

#endif  // CAPGAP_ANALYSIS_DENSITY_EVOLUTION_H_
