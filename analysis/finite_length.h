// Finite-length limits of a block of n channel uses carrying k information
// bits on the AWGN channel: how small a frame error rate (FER) any code of
// that length and rate can reach at an Eb/N0, and the Eb/N0 any such code
// needs for a target FER.
//
// Source for all three quantities: Y. Polyanskiy, H. V. Poor, S. Verdu,
// "Channel coding rate in the finite blocklength regime", IEEE Trans. Inf.
// Theory 56(5), 2010 (PPV below).
//
// - Normal approximation (NA): log2 M ~ n C - sqrt(n V) Qinv(eps) +
//   0.5 log2 n, with C = E[i(X;Y)] and V = Var[i(X;Y)] of the information
//   density of the actual input: binary input +-1 by Gauss-Hermite
//   quadrature (BinaryInputAwgn); uniform M-PSK/QAM by the coded-modulation
//   (CM) information density (ConstellationAwgn; square QAM splits into its
//   two PAM axes exactly); Gaussian input by the closed form of PPV
//   (GaussianInputAwgn). Solved for eps: FER = Q((n C + 0.5 log2 n - k) /
//   sqrt(n V)). An approximation, neither bound.
// - Achievability: PPV's random-coding union (RCU) bound itself (Thm. 16),
//   eps <= E[min(1, (M - 1) P[i(Xbar^n;Y^n) >= i(X^n;Y^n) | X^n, Y^n])], for
//   i.i.d. uniform input per real dimension (binary +-1, or the PAM axis of
//   Gray QPSK and square QAM): the outer expectation by importance-sampled
//   Monte Carlo (each output letter drawn from the exponentially tilted
//   density p(y|x) 2^(-theta i(x;y)), tabulated, theta centring the sum of
//   the information densities on log2(M - 1); likelihood-ratio weights;
//   relative standard error returned), the inner probability by the
//   Lugannani-Rice saddlepoint approximation (PamRcu). The RCUs form (Markov's
//   inequality on the inner probability, BinaryInputRcus) stays for
//   comparison; it lies 0.4-0.5 dB above the RCU at (128, 64).
// - Converse: for binary input (and PAM axes: PamConverseFer), PPV's
//   meta-converse with the output of uniform i.i.d. input as auxiliary
//   distribution, both error
//   probabilities of its Neyman-Pearson test estimated from one importance-
//   sampled set (BinaryInputConverseFer). Beside it, and for other inputs,
//   PPV's meta-converse for equal-power codes on the real AWGN
//   channel (Thm. 41 form; auxiliary output N(0, (1 + P) I)), log2 M <=
//   -log2 beta_{1-eps}: the Neyman-Pearson test reduces to a non-central
//   chi-square statistic (EqualPowerConverseLog2M). Every BPSK/QPSK and
//   M-PSK codeword has equal energy, so it bounds those codes directly; a
//   code with an average-power constraint (QAM) is bounded through the
//   length n + 1 equal-power code it extends to (PPV Lemma 39).
//
// Channel and SNR conventions: a "real use" carries one real dimension with
// signal power P over unit noise variance (SNR P). BPSK uses one real
// dimension per symbol at P = 2 Es/N0; a complex constellation two at P =
// Es/N0 each; so a Gray BPSK or QPSK block of n coded bits is n uses of the
// binary-input AWGN channel at P = 2 R Eb/N0 (R = k/n).
#ifndef CAPGAP_ANALYSIS_FINITE_LENGTH_H_
#define CAPGAP_ANALYSIS_FINITE_LENGTH_H_

#include <atomic>
#include <cstdint>
#include <functional>
#include <span>
#include <string>
#include <vector>

#include "blocks/channel/channel_spec.h"
#include "blocks/core/types.h"

namespace capgap::analysis {

// Capacity (bit per use) and dispersion (bit^2 per use) of an information
// density.
struct CapacityDispersion {
  double capacity = 0;
  double dispersion = 0;
};

// Binary input +-1, equiprobable, real AWGN with SNR `snr` (linear, P over
// noise variance per real use): i = 1 - log2(1 + exp(-2 x y / sigma^2)),
// sigma^2 = 1/snr; 200-node Gauss-Hermite quadrature.
CapacityDispersion BinaryInputAwgn(double snr);

// Gaussian input on the real AWGN channel (PPV): C = 0.5 log2(1 + P),
// V = P (P + 2) / (2 (P + 1)^2) log2(e)^2.
CapacityDispersion GaussianInputAwgn(double snr);

// Uniform input over `points` (unit average energy) on the complex AWGN
// channel at Es/N0 (linear), per complex use: CM information density
// i = log2 M - log2 sum_x' exp(-(|y - x'|^2 - |y - x|^2) / N0). A product
// (square-QAM-like) set adds its two axes' PAM values (independent); other
// sets use a 64 x 64 Gauss-Hermite product rule.
CapacityDispersion ConstellationAwgn(std::span<const cf32> points, double esno);

// NA FER of k information bits in n uses: Q((n C + 0.5 log2 n - k) /
// sqrt(n V)). REQUIRES n >= 1.
double NormalApproximationFer(double n, double k, const CapacityDispersion& cd);

struct RcuEstimate {
  double fer = 0;
  double relative_std_error = 0;  // of the Monte Carlo estimate
};
// RCUs (s = 1) bound on the FER of the best code with k information bits in n
// uses of the binary-input AWGN channel at SNR `snr`, from `samples` blocks of
// importance-sampled outputs (deterministic for a given seed).
// s in (0, 1]: the RCUs parameter (generalized density i_s = 1 - log2(1 +
// exp(-2 s x y snr)); Markov's inequality holds for every s > 0).
RcuEstimate BinaryInputRcus(int n, double k, double snr, double s, int samples,
                            std::uint64_t seed);

// PPV meta-converse for equal-power codes of length n (real uses) at SNR P:
// the largest log2 M any code with error probability eps can have.
double EqualPowerConverseLog2M(int n, double snr, double eps);
// The smallest FER a code with k information bits can have by that bound
// (bisection on log eps; 1 when even eps -> 1 does not admit k bits).
double EqualPowerConverseFer(int n, double k, double snr);

// PPV meta-converse for the binary-input AWGN channel with auxiliary output
// the output of i.i.d. uniform input (by symmetry the bound holds for every
// code): the smallest FER of k bits in n uses at SNR `snr`, by importance
// sampling (exponential tilt centring the information density on k); fer is
// the estimate, relative_std_error its error.
RcuEstimate BinaryInputConverseFer(int n, double k, double snr, int samples,
                                   std::uint64_t seed);

// Uniform PAM input on the real AWGN channel: `levels` (each used with
// probability 1/L, 2 <= L <= 64) and the noise variance per real use. Binary
// input +-1 at SNR P is {{-1, 1}, 1/P}; square M-QAM is two uses of its axis
// PAM per symbol (uniform QAM is uniform and independent per axis), with
// noise variance N0/2.
struct PamChannel {
  std::vector<double> levels;
  double noise_variance = 1;
};

// ln P[sum_j Z_j >= 0] for independent Z_j, each uniform over the L values
// z[j L .. j L + L - 1], by the Lugannani-Rice saddlepoint approximation
// (R. Lugannani, S. Rice, Adv. Appl. Probab. 12, 1980) at the root of the
// cumulant generating function's derivative; Chernoff's bound exp(K(t)) where
// no root exists. In the RCU bound z[j L + b] = ln p(y_j|b) - ln p(y_j|x_j):
// the probability that an independent uniform codeword is at least as likely
// as the sent one. REQUIRES z.size() % L == 0.
// `hint` (optional): a start for the root, updated to the root found.
double LogPairwiseErrorSaddlepoint(std::span<const double> z, std::size_t levels,
                                   double* hint = nullptr);

// The random-coding union (RCU) bound of PPV (Thm. 16) itself, eps <=
// E[min(1, (M - 1) P[i(Xbar^n; Y^n) >= i(X^n; Y^n) | X^n, Y^n])], for i.i.d.
// uniform PAM input: the outer expectation by importance-sampled Monte
// Carlo (levels uniform, outputs exponentially tilted as in the RCUs bound,
// likelihood-ratio weights; relative standard error returned), the inner
// probability given (x^n, y^n) by LogPairwiseErrorSaddlepoint (its relative
// error against exact enumeration: tests/analysis/finite_length_test.cc).
RcuEstimate PamRcu(const PamChannel& channel, int n, double k, int samples, std::uint64_t seed);
// PamRcu for binary input +-1 at SNR `snr`.
RcuEstimate BinaryInputRcu(int n, double k, double snr, int samples, std::uint64_t seed);

// The meta-converse of BinaryInputConverseFer for PAM input: auxiliary output
// the output of i.i.d. uniform input, the codeword using every level equally
// often (letter j has level j mod L). For symmetric inputs (binary, QPSK: the
// law of the information density is the same for every codeword) it bounds
// every code; for PAM/QAM with unequal-energy levels it bounds codes whose
// codewords have that uniform composition.
RcuEstimate PamConverseFer(const PamChannel& channel, int n, double k, int samples,
                           std::uint64_t seed);

class CombinedGain;  // analysis/fading_theory.h

// Fast (i.i.d. per symbol) flat fading with the gain known at the receiver:
// the channel from x to (y, h) is memoryless, so the NA applies with C and V
// of its information density i(x; y, h). With per-symbol AWGN moments
// C(g), V(g) at SNR g and g = mean_esno X (X the combined gain), the law of
// total variance gives C = E[C(g)], V = E[V(g)] + Var[C(g)] (the second
// term is the fading's own contribution). Averages by GainQuadrature.
// Fixed nodes and weights for E[f(X)] over the law of the combined gain:
// trapezoid rule in t = ln x on 4000 points over [1e-12, the 1 - 1e-15
// quantile], weights pdf(x) x dt normalised to sum 1 (so the truncated
// tails are spread); built once (the density is evaluated 4000 times)
// because the NA search averages many functions. Deterministic X: one node.
// Accuracy against CombinedGain::Average: tests/analysis/finite_length_test.cc.
struct GainQuadrature {
  std::vector<double> x, w;
  static GainQuadrature FromGain(const CombinedGain& gain);
};

// `awgn(esno)` gives the per-symbol moments on the AWGN channel at Es/N0.
CapacityDispersion FastFadingDensity(const std::function<CapacityDispersion(double)>& awgn,
                                     const GainQuadrature& gain, double mean_esno);

// Gaussian input on the same channel, per symbol of `dims` real dimensions
// sharing one gain (1: real signalling at P = 2 Es/N0 X; 2: complex at
// Es/N0 X): C = dims/2 E[log2(1 + P)], V = dims/2 log2(e)^2 (1 - E[1/(1 +
// P)]^2) + Var[dims/2 log2(1 + P)] (Y. Polyanskiy, S. Verdu, "Scalar
// coherent fading channel: dispersion analysis", ISIT 2011; form from
// memory; without fading it is PPV's AWGN dispersion, dims times).
CapacityDispersion FastFadingGaussianInput(const GainQuadrature& gain, double mean_esno, int dims);

// What the finite-length analysis of a scheme uses: its block on the channel
// and which models apply.
struct FiniteLengthBlock {
  int coded_bits = 0;  // per frame
  int info_bits = 0;   // k per frame
  std::vector<cf32> points;  // the constellation, unit average energy
  // The channel: AWGN; fading (or receive diversity) with time kFast gets
  // the NA of FastFadingDensity (no RCU, no converse); block and Doppler
  // fading get no finite-length limits (absent: the outage limit applies).
  ChannelSpec channel;
};

struct FiniteLengthLimits {
  bool present = false;
  std::string absent_reason;  // why not, when !present
  int n = 0;                  // channel uses of the model the NA counts (see method)
  int k = 0;
  double target_fer = 0;
  double normal_approximation_ebno_db = 0;
  double normal_approximation_gaussian_ebno_db = 0;
  double rcu_ebno_db = 0;       // NaN where the model has no RCU evaluation
  double rcu_relative_std_error = 0;
  // Which achievability bound rcu_* holds: "RCU" (the random-coding union
  // bound itself, PamRcu) or "none" (not evaluated).
  std::string rcu_bound;
  double converse_ebno_db = 0;  // PAM model: the input-specific meta-converse
  double converse_relative_std_error = 0;
  double converse_equal_power_ebno_db = 0;  // the equal-power (Gaussian auxiliary) one
  std::string method;
  std::vector<double> ebno_db;
  std::vector<double> fer_normal_approximation;
  std::vector<double> fer_normal_approximation_gaussian;
  std::vector<double> fer_rcu;
  std::vector<double> fer_converse;
};

struct FiniteLengthOptions {
  // Blocks per Monte Carlo estimate (RCU and binary-input converse): per
  // curve point and search step, and at the target.
  int rcu_samples_curve = 500;
  int rcu_samples_target = 6000;
  std::uint64_t seed = 1;
  // Blocks longer than this (real uses) skip RCU and converse (NaN): the NA
  // is within a few hundredths of a dB of both there.
  int max_bound_length = 20000;
  bool rcu = true;        // false: skip the RCU bound (NaN)
  bool at_target = true;  // false: skip the bounds' Eb/N0 at target_fer (curves only)
  const std::atomic<bool>* stop = nullptr;  // gives up (present = false) once true
};

// The limits of `block` on the Eb/N0 grid `ebno_db` and at target_fer.
// Binary model (BPSK, QPSK): n = coded bits; other constellations: n =
// symbols per frame, NA from the CM density; RCU and input-specific
// converse on the PAM axis (2n real uses) for square QAM and real PAM,
// neither for other sets (M-PSK, M >= 8: RCU NaN, converse equal-power).
FiniteLengthLimits AnalyseFiniteLength(const FiniteLengthBlock& block,
                                       std::span<const double> ebno_db, double target_fer,
                                       const FiniteLengthOptions& options = {});

}  // namespace capgap::analysis

#endif  // CAPGAP_ANALYSIS_FINITE_LENGTH_H_
