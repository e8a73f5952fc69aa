// Theory grid, capacity limits and summary figures of one scheme.
#include "sim/chain/scheme_result.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "analysis/capacity.h"
#include "analysis/density_evolution.h"
#include "analysis/fading_theory.h"
#include "analysis/uncoded_theory.h"
#include "blocks/channel/channel_words.h"
#include "blocks/shaping/pulse.h"
#include "blocks/shaping/spectrum.h"
#include "sim/chain/registry.h"
#include "sim/engine/stats.h"

namespace capgap {
namespace {

// Welch PSD of 2^17 random symbols through the scheme's transmitter, from a
// stream of its own (kSpectrumPointIndex, blocks/core/rng_stream.h). Segment
// length: the power of two giving a bin width of at most 1/256 symbol rate.
SpectrumResult MeasureSpectrum(const Chain& chain, std::uint64_t seed) {
  SpectrumResult out;
  const int sps = chain.samples_per_symbol();
  int segment = 16;
  while (segment < 256 * sps) segment *= 2;
  auto welch = WelchPsd::Create(segment, sps);
  if (!welch.ok()) return out;
  const Transmitter& tx = chain.transmitter();
  FirWorkspace tx_ws = tx.MakeWorkspace();
  WelchPsd::Workspace psd_ws = welch.value().MakeWorkspace();
  RngStream stream(DeriveKey(seed, chain.scheme().name), kSpectrumPointIndex, 0, Substream::kChannel);
  const std::size_t chunk = 4096;
  const auto m = static_cast<std::size_t>(chain.mapper().bits_per_symbol());
  std::vector<Bit> bits(chunk * m);
  std::vector<cf32> symbols(chunk), samples(chunk * static_cast<std::size_t>(sps));
  for (int c = 0; c < 32; ++c) {
    GenerateRandomBits(bits, stream);
    chain.mapper().Map(bits, symbols);
    tx.Shape(symbols, samples, tx_ws);
    // The first chunk holds the filter's start-up transient: skip it.
    if (c > 0) welch.value().Accumulate(samples, psd_ws);
  }
  std::vector<double> psd(static_cast<std::size_t>(segment));
  if (!welch.value().Finish(psd_ws, psd).ok()) return out;
  out.present = true;
  const double floor = 1e-30;
  for (int k = 0; k < segment; ++k) {
    out.frequency.push_back(welch.value().frequency(k));
    out.psd_db.push_back(10.0 * std::log10(std::max(psd[static_cast<std::size_t>(k)], floor)));
  }
  out.occupied_bandwidth_99 = OccupiedBandwidth(psd, welch.value().bin_width(), 0.99);
  out.bandwidth_3db = HalfPowerBandwidth(psd, welch.value().bin_width());
  return out;
}

// Noise-free eye of a shaped scheme: the scheme's transmit pulse and matched
// filter (no timing offset) designed at max(S, 16) samples per symbol, so the
// traces are smooth whatever S the chain runs at; the pulses are the same
// continuous functions (pulse.h) sampled more finely. With the tap centring of
// pulse.h the cascade h_tx * h_rx peaks span * S' samples after a symbol
// enters, so symbol k's ideal instant is sample (k + span) * S'.
void MeasureEye(const Chain& chain, std::uint64_t seed, SignalViews& out) {
  PulseSpec spec = chain.transmitter().spec();
  spec.samples_per_symbol = std::max(spec.samples_per_symbol, 16);
  const int sps = spec.samples_per_symbol;
  auto taps = DesignPulseTaps(spec);
  if (!taps.ok()) return;
  const std::vector<float>& h = taps.value();
  std::vector<double> cascade(2 * h.size() - 1, 0.0);
  for (std::size_t i = 0; i < h.size(); ++i) {
    for (std::size_t j = 0; j < h.size(); ++j) {
      cascade[i + j] += static_cast<double>(h[i]) * static_cast<double>(h[j]);
    }
  }
  constexpr int kSymbols = 320;
  const auto m = static_cast<std::size_t>(chain.mapper().bits_per_symbol());
  RngStream stream(DeriveKey(seed, chain.scheme().name), kEyePointIndex, 0, Substream::kChannel);
  std::vector<Bit> bits(static_cast<std::size_t>(kSymbols) * m);
  GenerateRandomBits(bits, stream);
  std::vector<cf32> symbols(static_cast<std::size_t>(kSymbols));
  chain.mapper().Map(bits, symbols);
  const long len = static_cast<long>(cascade.size());
  auto filtered = [&](long n) {  // in-phase matched-filter output at sample n
    double acc = 0;
    for (long k = 0; k < kSymbols; ++k) {
      const long i = n - k * sps;
      if (i >= 0 && i < len) {
        acc += cascade[static_cast<std::size_t>(i)] *
               static_cast<double>(symbols[static_cast<std::size_t>(k)].real());
      }
    }
    return acc;
  };
  for (int j = -sps; j <= sps; ++j) out.eye_time.push_back(static_cast<double>(j) / sps);
  // Traces whose +-span neighbourhood is inside the symbol block (full ISI).
  const int span = spec.span_symbols;
  for (int k = 2 * span; k + 2 * span < kSymbols; ++k) {
    const long centre = static_cast<long>(k + span) * sps;
    for (int j = -sps; j <= sps; ++j) out.eye.push_back(filtered(centre + j));
    ++out.eye_traces;
  }
}

// The channel differs from one-branch AWGN: fading theory and limits apply.
bool FadingTheoryApplies(const ChannelSpec& channel) {
  return channel.fading() || channel.branches > 1;
}

// Fading limits and the outage curve (see Limits in scheme_result.h).
void AnalyseFadingLimits(const Chain& chain, SchemeResult& r) {
  const ChannelSpec& ch = chain.scheme().channel;
  const auto points = chain.mapper().points();
  const double rho = r.info_bits_per_symbol;
  Limits& lim = r.limits;
  lim.ergodic_present = true;
  lim.ergodic_shannon_ebno_db = analysis::ErgodicShannonMinEbnoDb(ch, rho);
  lim.ergodic_constrained_ebno_db = analysis::ErgodicConstrainedMinEbnoDb(points, ch, rho);
  lim.ergodic_bicm_ebno_db = analysis::ErgodicBicmMinEbnoDb(points, ch, rho);
  // The Gaussian-input ergodic bound on the power-bandwidth plane, eta = rho
  // from 0.05 to 10 bit/s/Hz (geometric steps).
  for (int i = 0; i <= 24; ++i) {
    const double eta = 0.05 * std::pow(200.0, i / 24.0);
    lim.ergodic_curve_rho.push_back(eta);
    lim.ergodic_curve_ebno_db.push_back(analysis::ErgodicShannonMinEbnoDb(ch, eta));
  }
  if (ch.time != FadingTime::kBlock) return;
  lim.outage_present = true;
  lim.outage_threshold_gaussian_esno_db = analysis::GaussianOutageThresholdEsnoDb(rho);
  lim.outage_threshold_constrained_esno_db = analysis::OutageThresholdEsnoDb(points, rho);
  for (const double x : r.theory.ebno_db) {
    lim.outage_ebno_db.push_back(x);
    lim.outage_probability_gaussian.push_back(analysis::OutageProbabilityAtThreshold(
        ch, lim.outage_threshold_gaussian_esno_db, rho, x));
    lim.outage_probability_constrained.push_back(analysis::OutageProbabilityAtThreshold(
        ch, lim.outage_threshold_constrained_esno_db, rho, x));
  }
}

// Finite-length limits of a coded scheme at its own block (AWGN: NA, RCU,
// converse; fast fading: NA): coded bits and information bits per frame on its constellation, on
// a 0.1 dB grid over the sweep +-1 dB, and at target_fer.
void AnalyseFiniteLengthLimits(const Chain& chain, const SweepConfig& sweep, SchemeResult& r,
                               const std::atomic<bool>* stop) {
  analysis::FiniteLengthLimits& fl = r.limits.finite_length;
  if (chain.code().identity()) {
    fl.absent_reason = "uncoded: a frame is not a code block, so there is no (n, k) to bound";
    return;
  }
  // Fading (or receive diversity): AnalyseFiniteLength gives the fast-fading
  // normal approximation, or no group with the reason (block fading: the
  // outage limit applies).
  analysis::FiniteLengthBlock block;
  block.channel = chain.scheme().channel;
  block.coded_bits = static_cast<int>(chain.code().coded_bits());
  block.info_bits = static_cast<int>(chain.code().info_bits());
  const auto pts = chain.mapper().points();
  block.points.assign(pts.begin(), pts.end());
  std::vector<double> grid;
  const double lo = std::floor((sweep.ebno_db.front() - 1.0) * 10.0) / 10.0;
  const double hi = sweep.ebno_db.back() + 1.0;
  for (int i = 0; lo + 0.1 * i <= hi + 1e-9; ++i) {
    grid.push_back(std::round((lo + 0.1 * i) * 1e6) / 1e6);
  }
  analysis::FiniteLengthOptions options;
  options.seed = sweep.seed;
  options.stop = stop;
  if (!sweep.finite_length_bounds) options.max_bound_length = 0;
  fl = analysis::AnalyseFiniteLength(block, grid, sweep.target_fer, options);
}

}  // namespace

CodeReport DescribeChannel(const ChannelSpec& channel) {
  CodeReport report;
  report.Add("channel", ToString(channel.law));
  report.Add("rician_k_db", channel.rician_k_db);
  report.Add("nakagami_m", channel.nakagami_m);
  report.Add("fading", ToString(channel.time));
  report.Add("coherence_symbols", static_cast<int>(channel.coherence_symbols));
  report.Add("doppler", channel.doppler);
  report.Add("branches", channel.branches);
  report.Add("combining", ToString(channel.combining));
  report.Add("channel_state", std::string("perfect"));
  report.Add("ebno_basis", std::string("Eb/N0 is the average per receive branch (E|h|^2 = 1 "
                                       "per branch); the receiver knows every gain h"));
  return report;
}

TargetCrossing CrossTarget(std::span<const PointResult> points, ErrorRate rate, double target) {
  std::vector<double> x, y, low, high;
  for (const auto& p : points) {
    if (p.stop_reason == StopReason::kInterrupted) continue;
    const bool ber = rate == ErrorRate::kBer;
    const Interval& ci = ber ? p.ber_ci : p.fer_ci;
    x.push_back(p.ebno_db);
    y.push_back(ber ? p.ber() : p.fer());
    low.push_back(ci.low);
    high.push_back(ci.high);
  }
  // The lower bound crosses first (optimistic Eb/N0), the upper bound last.
  return {CrossingDb(x, y, target), CrossingDb(x, low, target), CrossingDb(x, high, target)};
}

double OutageGapDb(const SchemeResult& r, double target_fer) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const ChannelSpec& ch = r.scheme.channel;
  if (ch.time != FadingTime::kBlock || !FadingTheoryApplies(ch)) return nan;
  if (!(target_fer > 0.0) || !(target_fer < 1.0)) return nan;
  const double simulated = CrossTarget(r.points, ErrorRate::kFer, target_fer).ebno_db;
  const double rho = r.info_bits_per_symbol;
  const double outage = analysis::OutageEbnoDbAtProbability(
      ch, analysis::GaussianOutageThresholdEsnoDb(rho), rho, target_fer);
  return simulated - outage;
}

SchemeResult AnalyseScheme(const Chain& chain, const SweepConfig& sweep,
                           std::vector<PointResult> points, const std::atomic<bool>* stop) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  SchemeResult r;
  r.scheme = chain.scheme();
  r.code_rate = chain.code_rate();
  r.iterative = chain.code().iterative();
  r.info_bits_per_symbol = chain.info_bits_per_symbol();
  // Unshaped chain: ideal Nyquist signalling, eta = rho / (1 + 0). Shaped
  // chain: eta = rho / (measured 99 % bandwidth in symbol rates), with the
  // ideal rho / (1 + a) reported beside it.
  r.spectral_efficiency = r.info_bits_per_symbol;
  r.spectral_efficiency_ideal = r.info_bits_per_symbol;
  if (chain.shaped()) {
    r.spectral_efficiency_ideal = r.info_bits_per_symbol / (1.0 + chain.scheme().rolloff);
    r.spectrum = MeasureSpectrum(chain, sweep.seed);
    if (r.spectrum.present && r.spectrum.occupied_bandwidth_99 > 0) {
      r.spectral_efficiency = r.info_bits_per_symbol / r.spectrum.occupied_bandwidth_99;
    }
  }
  r.target_ber = sweep.target_ber;
  r.target_fer = sweep.target_fer;
  r.points = std::move(points);

  // Theory on a 0.05 dB grid spanning the configured sweep, one dB either side.
  // Fading schemes: the average over the scheme's channel, the AWGN curve
  // beside it.
  const Modulation& mod = chain.scheme().modulation;
  const ChannelSpec& channel = chain.scheme().channel;
  const bool fading = FadingTheoryApplies(channel);
  r.channel = DescribeChannel(channel);
  const double lo = sweep.ebno_db.front() - 1.0;
  const double hi = sweep.ebno_db.back() + 1.0;
  const int n = static_cast<int>(std::floor((hi - lo) / 0.05 + 1e-9)) + 1;
  if (!analysis::UncodedTheoryIsExact(mod)) {
    r.theory.uncoded_method =
        fading ? "union bound over the constellation's pairwise distances on AWGN (upper bound, "
                 "tight at high SNR); no fading average for a generic constellation (NaN)"
               : "union bound over the constellation's pairwise distances (upper bound, tight at "
                 "high SNR)";
  }
  for (int i = 0; i < n; ++i) {
    const double x = std::round((lo + 0.05 * i) * 1e6) / 1e6;
    r.theory.ebno_db.push_back(x);
    if (fading) {
      r.theory.ber_uncoded.push_back(analysis::FadingBer(mod, channel, x));
      r.theory.ser_uncoded.push_back(analysis::FadingSer(mod, channel, x));
      r.theory.ber_uncoded_awgn.push_back(analysis::UncodedBer(mod, x));
    } else {
      r.theory.ber_uncoded.push_back(analysis::UncodedBer(mod, x));
      r.theory.ser_uncoded.push_back(analysis::UncodedSer(mod, x));
    }
  }

  // The code family's own analysis: bounds, thresholds, code facts.
  if (const CodeFamily* family = FindCodeFamily(chain.scheme().code); family && family->analyse) {
    family->analyse(chain.code(), chain.scheme(), r, stop);
  }

  r.limits.shannon_ebno_db = analysis::ShannonMinEbnoDb(r.spectral_efficiency);
  r.limits.constrained_ebno_db =
      analysis::ConstrainedMinEbnoDb(chain.mapper().points(), r.info_bits_per_symbol);
  r.limits.spectral_efficiency_basis =
      chain.shaped()
          ? "measured: eta = rho / B99, B99 the 99 % power bandwidth of the transmitted "
            "signal (Welch PSD) in symbol rates"
          : "ideal Nyquist signalling (no pulse shaping): eta = rho = R m bit/s/Hz";
  {
    const double m = chain.mapper().bits_per_symbol();
    for (int i = 0; i <= 23; ++i) {
      const double rho = m * (0.05 + 0.04 * i);
      r.limits.constrained_curve_rho.push_back(rho);
      r.limits.constrained_curve_ebno_db.push_back(
          analysis::ConstrainedMinEbnoDb(chain.mapper().points(), rho));
    }
  }
  if (fading) AnalyseFadingLimits(chain, r);
  AnalyseFiniteLengthLimits(chain, sweep, r, stop);
  if (std::isinf(r.limits.constrained_ebno_db)) {
    r.limits.notes =
        "constrained limit is infinite: an uncoded constellation carries its m bits per symbol "
        "only at infinite SNR; it becomes finite once a code lowers rho";
  }

  Summary& s = r.summary;
  const TargetCrossing at_ber = CrossTarget(r.points, ErrorRate::kBer, sweep.target_ber);
  s.ebno_at_target_db = at_ber.ebno_db;
  s.ebno_at_target_low_db = at_ber.low_db;
  s.ebno_at_target_high_db = at_ber.high_db;
  const TargetCrossing at_fer = CrossTarget(r.points, ErrorRate::kFer, sweep.target_fer);
  s.ebno_at_target_fer_db = at_fer.ebno_db;
  s.ebno_at_target_fer_low_db = at_fer.low_db;
  s.ebno_at_target_fer_high_db = at_fer.high_db;
  s.uncoded_ebno_at_target_db = fading
                                    ? analysis::FadingEbnoDbAtBer(mod, channel, sweep.target_ber)
                                    : analysis::UncodedEbnoDbAtBer(mod, sweep.target_ber);
  s.coding_gain_db = s.uncoded_ebno_at_target_db - s.ebno_at_target_db;
  s.gap_to_shannon_db = s.ebno_at_target_db - r.limits.shannon_ebno_db;
  s.gap_to_constrained_db = std::isfinite(r.limits.constrained_ebno_db)
                                ? s.ebno_at_target_db - r.limits.constrained_ebno_db
                                : nan;
  if (r.limits.ergodic_present) {
    s.gap_to_ergodic_db = s.ebno_at_target_db - r.limits.ergodic_shannon_ebno_db;
  }
  s.gap_to_outage_db = OutageGapDb(r, r.target_fer);
  if (r.limits.finite_length.present) {
    s.gap_to_finite_length_db =
        s.ebno_at_target_fer_db - r.limits.finite_length.normal_approximation_ebno_db;
  }
  if (r.limits.threshold_present) {
    const Modulation& m = chain.scheme().modulation;
    if (m.family == ModulationFamily::kPsk && m.order <= 4) {
      s.gap_to_threshold_db = s.ebno_at_target_db - r.limits.threshold_ebno_db;
      s.gap_to_binary_input_db = s.ebno_at_target_db - r.limits.binary_input_ebno_db;
    }
  }

  // Signal views at the operating point: the Eb/N0 needed for target_ber if
  // the curve crosses it, else the last simulated point.
  if (!r.points.empty()) {
    SignalViews& v = r.signal;
    v.present = true;
    v.constellation_ebno_db =
        std::isfinite(s.ebno_at_target_db) ? s.ebno_at_target_db : r.points.back().ebno_db;
    const auto channel = chain.MakePointChannel(v.constellation_ebno_db);
    for (const cf32& z : chain.CaptureDemapperInput(*channel, 2000)) {
      v.constellation_i.push_back(z.real());
      v.constellation_q.push_back(z.imag());
    }
    if (chain.shaped()) MeasureEye(chain, sweep.seed, v);
  }
  return r;
}

}  // namespace capgap
