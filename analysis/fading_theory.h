// Theory and limits of flat fading channels with perfect receiver channel
// state: exact average uncoded BER and SER of Gray BPSK, QPSK, M-PSK and
// square M-QAM over Rayleigh, Rician and Nakagami-m fading with L-branch
// maximal-ratio (MRC) or selection (SC) combining; the ergodic capacities
// (Gaussian input, constellation-constrained CM and BICM) and the Eb/N0 at
// which each equals a scheme's information bits per symbol; the outage
// probability of block fading (Gaussian input and constellation-constrained).
//
// Conventions (blocks/channel/channel_spec.h): E|h|^2 = 1 per branch, Eb/N0
// and Es/N0 are the averages per branch, the receiver knows h exactly. The
// combiner's output SNR is gamma = gamma_bar X, gamma_bar the average branch
// Es/N0 and X the "combined gain" (CombinedGain below): MRC sums the branch
// gains |h_l|^2, SC keeps the largest. Only the marginal law of X enters the
// uncoded error rates and the ergodic limits, so fast, block and Doppler
// fading share them (uncoded decisions are symbol by symbol with perfect
// CSI, so time correlation of h does not change the average error rate).
//
// Methods (M. K. Simon and M.-S. Alouini, Digital Communication over Fading
// Channels, 2nd ed., Wiley, 2005: ch. 5 MGF-based averaging, ch. 8 coherent
// M-PSK/M-QAM, ch. 9 MRC and SC):
//  * MGF method in Craig's form: each Gaussian-tail term of the AWGN error
//    rate is (1/pi) int_0^U exp(-a gamma / sin^2 t) dt; averaged over the
//    fading it becomes (1/pi) int_0^U M_X(a gamma_bar / sin^2 t) dt with the
//    MGF M_X(s) = E[exp(-s X)] in closed form: MRC of Rayleigh / Nakagami-m
//    (1 + s/m)^(-mL), MRC of Rician [(1+K)/(1+K+s)]^L exp(-LKs/(1+K+s)), SC
//    of Rayleigh prod_{k=1..L} k/(k+s) (the partial-fraction form of Simon &
//    Alouini's alternating sum; the product has no cancellation).
//  * Terms: BPSK Q(sqrt(2 Es/N0)); QPSK Q(sqrt(Es/N0)) per bit and
//    2Q - Q^2 per symbol (Q^2 by Craig's form over [0, pi/4]); M-PSK SER by
//    Craig's integral over [0, (M-1) pi/M]; exact Gray M-PSK BER from the
//    decision-sector probabilities, each the difference of two Craig-type
//    phase-tail integrals G(phi) = (1/2 pi) int_0^{pi-phi} exp(-gamma sin^2
//    phi / sin^2 t) dt averaged by the MGF (exact: no Ps/m approximation);
//    square M-QAM SER 4(1-1/L)Q - 4(1-1/L)^2 Q^2, Gray BER the exact sum of
//    K. Cho and D. Yoon, IEEE Trans. Commun. 50(7), 2002, term by term.
//  * SC of Rician or Nakagami-m (no closed-form MGF): the MGF by parts,
//    M(s) = int_0^inf e^{-u} F_X(u/s) du with F_X = F^L the SC output CDF,
//    by quadrature, tabulated once per channel (CombinedGain::Mgf; theta
//    integrals over the table use relative tolerance 1e-9); checked
//    against the direct average of the AWGN rate over the SC density
//    L F(x)^(L-1) f(x) (CombinedGain::Average) in the test.
//  * theta integrals: adaptive Gauss-Kronrod (61 points, Boost.Math), relative
//    tolerance 1e-12; the integrand M_X(a gamma_bar / sin^2 t) is smooth and
//    monotone on [0, pi/2], so convergence is fast. Measured against the
//    closed form (BPSK Rayleigh MRC, L = 1..4, -10..40 dB in 0.5 dB steps):
//    relative error below 1e-15 (tests/analysis/fading_theory_test.cc
//    checks 1e-8).
//  * Averages over the gain density (SC non-Rayleigh error rates, ergodic
//    capacities): t = ln x, adaptive Gauss-Kronrod (61 points) over
//    [ln 1e-40, ln x_hi] with x_hi the 1 - 1e-30 quantile, relative tolerance
//    1e-10; the density of X (gamma for Rayleigh/Nakagami MRC, scaled
//    non-central chi-square with 2L degrees of freedom and non-centrality
//    2LK for Rician MRC, L F^(L-1) f for SC) comes from Boost.Math.
//  * Constrained ergodic capacities average the AWGN CM/BICM capacity of
//    analysis/capacity.h, tabulated on a 0.25 dB grid of Es/N0 from -40 dB up
//    to where it reaches m (to 1e-12 bit) and interpolated by a cubic
//    B-spline in dB (below the grid: C ~ C(grid start) gamma / gamma_start,
//    the low-SNR linear regime; above: m). Interpolation error measured below
//    2e-6 bit (test); the Eb/N0 limits are then good to about 1e-3 dB.
//  * Ergodic Rayleigh (L = 1), Gaussian input: C = log2(e) e^{1/g} E1(1/g)
//    (closed form, Boost.Math expint; asymptotic series for 1/g > 700).
//  * Outage: P(C(gamma_bar X) < R) = F_X(gamma_th / gamma_bar), gamma_th =
//    2^R - 1 (Gaussian input) or the Es/N0 where the AWGN CM capacity of
//    the constellation equals R (constrained, from analysis/capacity.h).
//    Rayleigh L = 1: 1 - exp(-(2^R - 1)/gamma_bar).
// Invalid input or an unsupported modulation gives NaN; nothing throws.
#ifndef CAPGAP_ANALYSIS_FADING_THEORY_H_
#define CAPGAP_ANALYSIS_FADING_THEORY_H_

#include <memory>
#include <span>
#include <type_traits>

#include "blocks/channel/channel_spec.h"
#include "blocks/core/types.h"
#include "blocks/mapping/modulation.h"

namespace capgap::analysis {

class MgfTable;  // fading_theory.cc

// The combiner's output SNR per unit average branch SNR, X = gamma /
// gamma_bar, for a channel spec (time variation ignored: marginal law only).
// AWGN: X = L for MRC (array gain), 1 for SC. Rician with K = 0 (linear,
// i.e. rician_k_db = -inf) is Rayleigh.
class CombinedGain {
 public:
  static CombinedGain FromSpec(const ChannelSpec& spec);

  FadingLaw law() const { return law_; }
  Combining combining() const { return combining_; }
  int branches() const { return branches_; }
  double rician_k() const { return k_; }  // linear
  double nakagami_m() const { return m_; }
  // No fading: X is the constant L (MRC) or 1 (SC).
  bool deterministic() const { return law_ == FadingLaw::kAwgn; }
  // True when Mgf is a closed form (every MRC; SC of Rayleigh and AWGN).
  bool closed_form_mgf() const;

  // E[exp(-s X)], s >= 0 (s = +inf gives 0). SC of Rician/Nakagami (no
  // closed form): MgfIntegral tabulated once per channel (cached, shared by
  // threads) on 24 points per decade of s in [1e-8, 1e14], cubic B-spline of
  // ln M against ln s, power-law tail beyond; relative error below 3e-7
  // (measured in the test).
  double Mgf(double s) const;
  // By parts, M(s) = int_0^inf e^{-u} F(u/s) du with F the CDF of X, by
  // adaptive Gauss-Kronrod (61 points, 1e-9 relative) on [0, inf).
  double MgfIntegral(double s) const;
  double Cdf(double x) const;       // P(X <= x)
  double Survival(double x) const;  // P(X > x), accurate in the upper tail
  double Pdf(double x) const;       // density (0 for deterministic X)
  // x with Cdf(x) = p, 0 < p < 1.
  double Quantile(double p) const;
  // x with Survival(x) = q, 0 < q < 1.
  double QuantileComplement(double q) const;

  // E[f(X)] over the law of X (see the file comment for the quadrature).
  template <typename F>
  double Average(F&& f) const;

 private:
  // One branch's gain: CDF / survival / density / quantiles.
  double BranchCdf(double x) const;
  double BranchSurvival(double x) const;
  double BranchPdf(double x) const;
  double BranchQuantile(double p) const;
  double BranchQuantileComplement(double q) const;
  double AverageImpl(double (*call)(const void*, double), const void* f) const;

  std::shared_ptr<const MgfTable> table_;  // SC of Rician/Nakagami
  FadingLaw law_ = FadingLaw::kAwgn;
  Combining combining_ = Combining::kMrc;
  int branches_ = 1;
  double k_ = 0;  // Rician K, linear
  double m_ = 1;  // Nakagami m (1 for Rayleigh)
};

template <typename F>
double CombinedGain::Average(F&& f) const {
  using Fn = std::remove_reference_t<F>;
  return AverageImpl(
      [](const void* p, double x) { return static_cast<double>((*static_cast<const Fn*>(p))(x)); },
      &f);
}

// (1/pi) int_0^upper M_X(a gamma_bar / sin^2 t) dt: the fading average of
// the Craig-form term (1/pi) int_0^upper exp(-a gamma / sin^2 t) dt.
double CraigAverage(const CombinedGain& gain, double a_times_snr, double upper);

// Average uncoded BER / SER of the Gray modulation over the channel at mean
// Eb/N0 (dB, per branch, per information bit of the uncoded scheme: rho = m).
// AWGN (L = 1) returns UncodedBer / UncodedSer of analysis/uncoded_theory.h
// itself; AWGN with L MRC branches is that at L times the SNR. Generic
// constellations (points as data, ModulationFamily::kGeneric) have no MGF form
// here: NaN for every channel but plain AWGN (where the union bound returns).
double FadingBer(const Modulation& modulation, const ChannelSpec& channel, double ebno_db);
double FadingSer(const Modulation& modulation, const ChannelSpec& channel, double ebno_db);

// Mean Eb/N0 (dB) at which FadingBer equals `ber` (0 < ber < 0.5), by
// bracketing and bisection to 1e-6 dB; NaN if not reachable.
double FadingEbnoDbAtBer(const Modulation& modulation, const ChannelSpec& channel, double ber);

// BPSK over Rayleigh, L-branch MRC, closed form (Proakis & Salehi, Digital
// Communications, 5th ed., ch. 13): with mu = sqrt(g / (1 + g)), g the mean
// Eb/N0 per branch (linear), Pb = ((1 - mu)/2)^L sum_{k=0}^{L-1}
// C(L-1+k, k) ((1 + mu)/2)^k.
double BpskRayleighMrcBerClosedForm(double ebno_linear, int branches);

// Ergodic capacity with Gaussian input, bit per channel use, at mean Es/N0
// (dB per branch): E[log2(1 + gamma_bar X)] by quadrature over X.
double ErgodicGaussianCapacity(const ChannelSpec& channel, double esno_db);
// Rayleigh, one branch: log2(e) e^{1/g} E1(1/g), g = mean SNR (linear).
double RayleighErgodicCapacityClosedForm(double snr_linear);
// Ergodic CM / BICM capacity of the constellation (points[label], unit
// average energy, as analysis/capacity.h) with receiver CSI at mean Es/N0.
double ErgodicConstrainedCapacity(std::span<const cf32> points, const ChannelSpec& channel,
                                  double esno_db);
double ErgodicBicmCapacity(std::span<const cf32> points, const ChannelSpec& channel,
                           double esno_db);

// Mean Eb/N0 (dB per branch) at which each ergodic capacity equals rho
// information bits per channel use (Es/N0 = rho Eb/N0), by bisection to
// 1e-6 dB (analysis/bisection.h). +inf when rho >= log2(M) for the
// constrained ones; NaN for rho <= 0. Gaussian input as rho -> 0 tends to
// 10 log10(ln 2 / E[X]) (-1.59 dB for one branch).
double ErgodicShannonMinEbnoDb(const ChannelSpec& channel, double rho);
double ErgodicConstrainedMinEbnoDb(std::span<const cf32> points, const ChannelSpec& channel,
                                   double rho);
double ErgodicBicmMinEbnoDb(std::span<const cf32> points, const ChannelSpec& channel, double rho);

// Outage probability of block fading at rate rho (information bits per
// channel use) and mean Eb/N0 (dB per branch): P(log2(1 + gamma) < rho).
double OutageProbabilityGaussian(const ChannelSpec& channel, double rho, double ebno_db);
// P(C_CM(gamma) < rho) for the constellation: the SNR threshold is the Es/N0
// where its AWGN CM capacity equals rho (1 for every Eb/N0 when rho >=
// log2 M). `threshold_esno_db` from OutageThresholdEsnoDb saves the search.
double OutageThresholdEsnoDb(std::span<const cf32> points, double rho);
double OutageProbabilityAtThreshold(const ChannelSpec& channel, double threshold_esno_db,
                                    double rho, double ebno_db);
double OutageProbabilityConstrained(std::span<const cf32> points, const ChannelSpec& channel,
                                    double rho, double ebno_db);
// Mean Eb/N0 (dB) at which the outage probability with SNR threshold
// threshold_esno_db equals p (0 < p < 1): the quantile of X, exact.
double OutageEbnoDbAtProbability(const ChannelSpec& channel, double threshold_esno_db, double rho,
                                 double p);
// Es/N0 threshold of Gaussian input: 10 log10(2^rho - 1).
double GaussianOutageThresholdEsnoDb(double rho);

}  // namespace capgap::analysis

#endif  // CAPGAP_ANALYSIS_FADING_THEORY_H_
