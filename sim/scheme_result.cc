// Theory grid, capacity limits and summary figures of one scheme.
#include "sim/scheme_result.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "analysis/capacity.h"
#include "analysis/uncoded_theory.h"
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

  if (chain.coded()) {
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

  r.limits.shannon_ebno_db = analysis::ShannonMinEbn0Db(r.spectral_efficiency);
  r.limits.constrained_ebno_db =
      analysis::ConstrainedMinEbn0Db(chain.mapper().points(), r.info_bits_per_symbol);
  r.limits.spectral_efficiency_basis =
      chain.shaped()
          ? "measured: eta = rho / B99, B99 the 99 % power bandwidth of the transmitted "
            "signal (Welch PSD) in symbol rates"
          : "ideal Nyquist signalling (no pulse shaping): eta = rho = R m bit/s/Hz";
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
  return r;
}

}  // namespace capgap
