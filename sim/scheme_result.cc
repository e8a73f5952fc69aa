// Theory grid, capacity limits and summary figures of one scheme.
#include "sim/scheme_result.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "analysis/capacity.h"
#include "analysis/uncoded_theory.h"

namespace capgap {

SchemeResult AnalyseScheme(const Chain& chain, const SweepConfig& sweep,
                           std::vector<PointResult> points) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  SchemeResult r;
  r.scheme = chain.scheme();
  r.code_rate = chain.code_rate();
  r.info_bits_per_symbol = chain.info_bits_per_symbol();
  // Unshaped chain: Nyquist signalling, eta = rho / (1 + 0).
  r.spectral_efficiency = r.info_bits_per_symbol;
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

  r.limits.shannon_ebno_db = analysis::ShannonMinEbn0Db(r.spectral_efficiency);
  r.limits.constrained_ebno_db =
      analysis::ConstrainedMinEbn0Db(chain.mapper().points(), r.info_bits_per_symbol);
  r.limits.spectral_efficiency_basis =
      "ideal Nyquist signalling (no pulse shaping): eta = rho = R m bit/s/Hz";
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
