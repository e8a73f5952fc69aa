// Fading gain generators: the complex gain h of every symbol and receive
// branch of a flat fading channel, E|h|^2 = 1 per branch (so Eb/N0 stays the
// average per branch), independent between branches.
//
// Amplitude laws (FIELD_NOTES section 7; common practice):
//  * rayleigh: h ~ CN(0, 1).
//  * rician: h = sqrt(K/(K+1)) + sqrt(1/(K+1)) CN(0, 1), K = 10^(k_db/10);
//    the line-of-sight phase is 0 (coherent detection with known h makes
//    every error rate independent of it). K = 0 (rician_k_db = -inf) is
//    Rayleigh.
//  * nakagami: |h|^2 ~ Gamma(m, 1/m) with uniform phase; the gamma variate by
//    G. Marsaglia and W. W. Tsang, "A simple method for generating gamma
//    variables", ACM TOMS 26(3), 2000 (m < 1: Gamma(m + 1) U^(1/m), same
//    paper). m = 1 is Rayleigh.
//  * awgn: h = 1 (receive diversity without fading).
// Time variation:
//  * fast: independent per symbol.
//  * block: constant over coherence_symbols symbols, independent between
//    blocks; blocks are counted from the start of each work unit (the
//    chain's units hold whole frames, so coherence_symbols equal to the
//    frame's symbols gives quasi-static fading per frame).
//  * doppler: sum of sinusoids (Y. R. Zheng and C. Xiao, "Simulation models
//    with correct statistical properties for Rayleigh fading channels",
//    IEEE Trans. Commun. 51(6), 2003), per branch
//      h_I(k) = sqrt(2/M) sum_n cos(w_d k cos a_n + phi_n),
//      h_Q(k) = sqrt(2/M) sum_n cos(w_d k sin a_n + psi_n),
//      h = (h_I + j h_Q) / sqrt 2,  a_n = (2 pi n - pi + theta) / (4 M),
//    w_d = 2 pi doppler, M = 16 per quadrature (32 sinusoids), theta,
//    phi_n, psi_n uniform and drawn afresh for every work unit. Over the
//    ensemble the autocorrelation E[h(k) h*(k + d)] is exactly
//    J0(2 pi doppler d) (Clarke's model; W. C. Jakes, Microwave Mobile
//    Communications, 1974). Chosen over filtered Gaussian noise because the
//    spectrum is exact for any doppler without designing a filter, the cost
//    per symbol does not grow as doppler falls (a Doppler filter needs about
//    1/doppler taps or a long IIR start-up), and a unit starts in the
//    stationary state. Rician adds its fixed line-of-sight term to the
//    scattered process. Nakagami-m: the Rayleigh process above mapped
//    memorylessly, symbol by symbol: its power p (Exp(1) distributed) goes
//    to q = F_m^-1(1 - e^-p), F_m the CDF of Gamma(m, 1/m) (inverse
//    regularised incomplete gamma of Boost.Math), the phase is kept:
//    h = sqrt(q / p) h_Rayleigh. The marginal is Nakagami-m exactly as far as
//    p is Exp(1) (inverse-CDF transform; common practice). Known limits: the
//    sum of 16 sinusoids per quadrature is only nearly Gaussian (kurtosis
//    3 - 3/32 at a fixed time over the random phases), so E p^2 = 1.953
//    instead of 2 and the estimated m comes out a few per cent high (1.05
//    for m = 1); the autocorrelation is no longer J0 (the power correlation
//    is a monotone function of J0^2, 1 at lag 0 and exactly 0 where J0 = 0,
//    since the underlying Gaussian samples are then independent); fades
//    happen at the Rayleigh process's instants (the map is monotone), so
//    level crossings are those of the Rayleigh process at the mapped
//    thresholds. Costs one inverse incomplete gamma per symbol and branch.
//
// Randomness: every gain comes from the unit's kFading stream. Rayleigh and
// Rician gains (fast: per symbol; block: per block) take one Philox block
// each through the fast Gaussian kernel (FillStandardNormal, 2 normals per
// gain, branch-major). Nakagami gains are scalar and target-independent: per
// gain one block for the phase (word 0) and, m < 1, the boost uniform (word
// 1), then one block per Marsaglia-Tsang trial (normal by Box-Muller from
// words 0-2, uniform from word 3). Doppler draws 1 + 2 M uniforms per branch
// (one block each) when the unit starts and nothing afterwards.
#ifndef CAPGAP_BLOCKS_CHANNEL_FADING_PROCESS_H_
#define CAPGAP_BLOCKS_CHANNEL_FADING_PROCESS_H_

#include <cmath>
#include <cstddef>
#include <span>

#include "blocks/channel/channel.h"
#include "blocks/channel/channel_spec.h"
#include "blocks/core/rng_stream.h"
#include "blocks/core/status.h"
#include "blocks/core/types.h"

namespace capgap {

class FadingProcess {
 public:
  // Sinusoids per quadrature of the Doppler process.
  static constexpr int kSinusoids = 16;
  // The Doppler phasors are recomputed exactly every this many symbols
  // (between, they advance by complex rotation in double precision).
  static constexpr std::uint64_t kResyncSymbols = 1024;

  // Checks branches in [1, 64], coherence_symbols >= 1, doppler in (0, 0.5],
  // nakagami_m in [0.5, 1e4].
  static Result<FadingProcess> Create(const ChannelSpec& spec);

  const ChannelSpec& spec() const { return spec_; }
  int branches() const { return spec_.branches; }

  // Rayleigh and Rician independent gains are h = a + b (g0 + j g1) from a
  // standard normal pair (g0 with the real part, a on the real part only):
  // the float constants the fast draw uses.
  void GaussianGainAffine(float& a, float& b) const {
    b = static_cast<float>(scatter_ * std::sqrt(0.5));
    a = static_cast<float>(los_);
  }

  // Gains of the unit's next n symbols, branch-major: gains[l n + i] for
  // branch l, symbol i. Continues `state` (Reset() at the start of a unit).
  // REQUIRES: gains.size() >= n * branches().
  void Generate(std::size_t n, std::span<cf32> gains, RngStream& stream,
                ChannelProcessState& state) const;

 private:
  explicit FadingProcess(const ChannelSpec& spec);
  // count independent gains of the amplitude law (fast draw).
  void DrawIndependent(std::span<cf32> gains, RngStream& stream) const;
  void StartDoppler(RngStream& stream, ChannelProcessState& state) const;
  void DopplerGains(std::size_t n, std::span<cf32> gains, ChannelProcessState& state) const;

  ChannelSpec spec_;
  double los_ = 0;      // Rician line-of-sight amplitude sqrt(K/(K+1))
  double scatter_ = 1;  // amplitude of the CN(0, 1) part, sqrt(1/(K+1))
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CHANNEL_FADING_PROCESS_H_
