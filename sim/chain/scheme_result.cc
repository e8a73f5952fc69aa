// Theory grid, capacity limits and summary figures of one scheme.
#include "sim/chain/scheme_result.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "analysis/capacity.h"
#include "analysis/density_evolution.h"
#include "analysis/uncoded_theory.h"
#include "blocks/fec/ldpc_construction.h"
#include "blocks/shaping/pulse.h"
#include "blocks/shaping/spectrum.h"

namespace capgap {
namespace {

// Welch PSD of 2^17 random symbols through the scheme's transmitter, from a
// stream of its own (point index 0xFFFFFFFF is never a sweep point). Segment
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
  RngStream stream(DeriveKey(seed, chain.scheme().name), 0xFFFFFFFFu, 0, Substream::kChannel);
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
  RngStream stream(DeriveKey(seed, chain.scheme().name), 0xFFFFFFFDu, 0, Substream::kChannel);
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

// Code facts, decoder settings and the density-evolution thresholds of an
// LDPC scheme.
void AnalyseLdpc(const Chain& chain, SchemeResult& r) {
  const LdpcCode& code = chain.ldpc_code();
  const LdpcSchemeConfig& c = chain.scheme().ldpc;
  LdpcResult& l = r.ldpc;
  l.present = true;
  l.construction = c.construction;
  l.description = code.description();
  l.length = code.length();
  l.info_bits = chain.ldpc_encoder().info_bits();
  l.checks = code.checks();
  l.rank = chain.ldpc_encoder().rank();
  l.lifting = code.lifting();
  l.girth = Girth(code);
  const DegreeProfile profile = ComputeDegreeProfile(code);
  l.degree_profile = profile.ToString();
  l.variable_nodes_by_degree = profile.variable_nodes_by_degree;
  l.check_nodes_by_degree = profile.check_nodes_by_degree;
  l.encoder = chain.ldpc_encoder().uses_dual_diagonal() ? "dual-diagonal (linear time)"
                                                        : "gaussian elimination (dense GF(2))";
  const LdpcDecoderOptions& o = chain.ldpc_decoder().options();
  l.decoder = ToString(o.algorithm);
  l.schedule = ToString(o.schedule);
  l.kernel_target = chain.ldpc_decoder().kernel_target();
  l.max_iterations = o.max_iterations;
  l.normalization = o.normalization;
  l.offset = o.offset;

  Limits& lim = r.limits;
  lim.binary_input_ebno_db = analysis::BinaryInputMinEbn0Db(r.code_rate);
  auto dist = analysis::EdgeDistributionFromNodeCounts(profile.variable_nodes_by_degree,
                                                       profile.check_nodes_by_degree);
  if (!dist.ok()) {
    lim.threshold_description = "no threshold: " + dist.status().message();
    return;
  }
  // The ensemble's threshold at the code's actual rate k/n (a rank-deficient
  // H carries a little more than the design rate).
  auto quantized = analysis::QuantizedThreshold(dist.value(), r.code_rate);
  auto ga = analysis::GaussianApproxThreshold(dist.value(), r.code_rate);
  if (ga.ok()) lim.threshold_ga_ebno_db = ga.value().ebno_db;
  const auto& best = quantized.ok() ? quantized : ga;
  if (best.ok()) {
    lim.threshold_ebno_db = best.value().ebno_db;
    lim.threshold_sigma = best.value().sigma;
    lim.threshold_method = analysis::ToString(best.value().method);
    lim.threshold_description = best.value().description;
  } else {
    lim.threshold_description = "no threshold: " + best.status().message();
  }
  const Modulation& mod = chain.scheme().modulation;
  const bool binary = mod.family == ModulationFamily::kPsk && mod.order <= 4;
  lim.threshold_channel =
      binary ? "binary-input AWGN: exact for BPSK and Gray QPSK (two independent binary channels)"
             : "binary-input AWGN: a reference only for this mapper (BICM bit channels are not "
               "binary-input AWGN); no gap is quoted";
}

}  // namespace

SchemeResult AnalyseScheme(const Chain& chain, const SweepConfig& sweep,
                           std::vector<PointResult> points) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  SchemeResult r;
  r.scheme = chain.scheme();
  r.code_rate = chain.code_rate();
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
  r.points = std::move(points);

  // Theory on a 0.05 dB grid spanning the configured sweep, one dB either side.
  const Modulation& mod = chain.scheme().modulation;
  const double lo = sweep.ebno_db.front() - 1.0;
  const double hi = sweep.ebno_db.back() + 1.0;
  const int n = static_cast<int>(std::floor((hi - lo) / 0.05 + 1e-9)) + 1;
  for (int i = 0; i < n; ++i) {
    const double x = std::round((lo + 0.05 * i) * 1e6) / 1e6;
    r.theory.ebno_db.push_back(x);
    r.theory.ber_uncoded.push_back(analysis::UncodedBer(mod, x));
    r.theory.ser_uncoded.push_back(analysis::UncodedSer(mod, x));
  }

  if (chain.conv_coded()) {
    auto spectrum = ComputeDistanceSpectrum(chain.conv_code(), 10);
    if (spectrum.ok()) {
      const DistanceSpectrum& d = spectrum.value();
      r.code.present = true;
      r.code.free_distance = d.free_distance;
      r.code.spectrum_distance = d.distances;
      r.code.spectrum_info_weight = d.info_weight;
      r.code.spectrum_events = d.num_events;
      // The bound assumes binary antipodal signalling per coded bit: BPSK, or
      // Gray QPSK (two independent BPSK channels). Other mappers: omitted.
      const bool binary = mod.family == ModulationFamily::kPsk && mod.order <= 4;
      if (binary) {
        r.theory.bound_channel =
            "soft-decision union bound, 10 terms, BPSK/QPSK on AWGN, effective rate (tail "
            "and puncturing included)";
        for (double x : r.theory.ebno_db) {
          r.theory.ber_bound.push_back(std::min(0.5, UnionBoundBer(d, x, r.code_rate)));
        }
      }
    }
  }

  if (chain.ldpc_coded()) AnalyseLdpc(chain, r);

  r.limits.shannon_ebno_db = analysis::ShannonMinEbn0Db(r.spectral_efficiency);
  r.limits.constrained_ebno_db =
      analysis::ConstrainedMinEbn0Db(chain.mapper().points(), r.info_bits_per_symbol);
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
          analysis::ConstrainedMinEbn0Db(chain.mapper().points(), rho));
    }
  }
  if (std::isinf(r.limits.constrained_ebno_db)) {
    r.limits.notes =
        "constrained limit is infinite: an uncoded constellation carries its m bits per symbol "
        "only at infinite SNR; it becomes finite once a code lowers rho";
  }

  std::vector<double> x, ber, ber_low, ber_high;
  for (const auto& p : r.points) {
    if (p.stop_reason == StopReason::kInterrupted) continue;
    x.push_back(p.ebno_db);
    ber.push_back(p.ber());
    ber_low.push_back(p.ber_ci.low);
    ber_high.push_back(p.ber_ci.high);
  }
  Summary& s = r.summary;
  s.ebno_at_target_db = CrossingDb(x, ber, sweep.target_ber);
  // The lower BER bound crosses first (optimistic Eb/N0), the upper bound last.
  s.ebno_at_target_low_db = CrossingDb(x, ber_low, sweep.target_ber);
  s.ebno_at_target_high_db = CrossingDb(x, ber_high, sweep.target_ber);
  s.uncoded_ebno_at_target_db = analysis::UncodedEbn0DbAtBer(mod, sweep.target_ber);
  s.coding_gain_db = s.uncoded_ebno_at_target_db - s.ebno_at_target_db;
  s.gap_to_shannon_db = s.ebno_at_target_db - r.limits.shannon_ebno_db;
  s.gap_to_constrained_db = std::isfinite(r.limits.constrained_ebno_db)
                                ? s.ebno_at_target_db - r.limits.constrained_ebno_db
                                : nan;
  if (r.ldpc.present) {
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
    NoiseSpec spec;
    spec.ebn0_db = v.constellation_ebno_db;
    spec.code_rate = chain.code_rate();
    spec.bits_per_symbol = chain.mapper().bits_per_symbol();
    spec.samples_per_symbol = chain.samples_per_symbol();
    for (const cf32& z : chain.CaptureDemapperInput(AwgnChannel(spec), 2000)) {
      v.constellation_i.push_back(z.real());
      v.constellation_q.push_back(z.imag());
    }
    if (chain.shaped()) MeasureEye(chain, sweep.seed, v);
  }
  return r;
}

}  // namespace capgap
