// Fixed-width summary table: per scheme, Eb/N0 needed at the target BER with
// its 95 % interval, the uncoded theory value, coding gain, and the gaps to the
// unconstrained (Shannon) and constellation-constrained limits.
#include "sim/io/summary_table.h"

#include <cmath>
#include <cstdio>

namespace capgap {
namespace {

std::string Db(double v) {
  if (std::isnan(v)) return "-";
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.2f", v);
  return buf;
}

}  // namespace

std::string FormatSummaryTable(const StoredRun& run) {
  std::string out;
  char line[512];
  double target = run.schemes.empty() ? 0 : run.schemes.front().target_ber;
  std::snprintf(line, sizeof line,
                "%-14s %-8s %5s %5s %5s  %7s %-15s %7s %6s  %7s %6s  %7s %6s\n", "scheme",
                "mod", "rho", "eta", "ideal", "Eb/N0", "95% interval", "theory", "gain", "Shannon", "gap",
                "constr", "gap");
  out += line;
  for (const StoredScheme& s : run.schemes) {
    const Summary& m = s.summary;
    // Built by append: GCC 12 warns falsely (-Wrestrict) on chained operator+.
    std::string interval("[");
    interval.append(Db(m.ebno_at_target_low_db)).append(", ");
    interval.append(Db(m.ebno_at_target_high_db)).append("]");
    std::snprintf(line, sizeof line,
                  "%-14s %-8s %5.2f %5.2f %5.2f  %7s %-15s %7s %6s  %7s %6s  %7s %6s\n",
                  s.name.c_str(), s.modulation.c_str(), s.info_bits_per_symbol,
                  s.spectral_efficiency, s.spectral_efficiency_ideal, Db(m.ebno_at_target_db).c_str(), interval.c_str(),
                  Db(m.uncoded_ebno_at_target_db).c_str(), Db(m.coding_gain_db).c_str(),
                  Db(s.shannon_ebno_db).c_str(), Db(m.gap_to_shannon_db).c_str(),
                  Db(s.constrained_ebno_db).c_str(), Db(m.gap_to_constrained_db).c_str());
    out += line;
    if (s.target_ber != target) target = -1;
  }
  if (target > 0) {
    std::snprintf(line, sizeof line,
                  "All Eb/N0 values in dB at BER %.0e. rho: information bits per symbol; eta: "
                  "spectral efficiency in bit/s/Hz\n(shaped schemes: rho / measured 99 %% "
                  "bandwidth; unshaped: rho, ideal Nyquist); ideal: rho / (1 + roll-off);\ntheory: uncoded "
                  "closed form (union bound for generic constellations such as 16apsk); gain = "
                  "theory - simulated;\nShannon: (2^eta-1)/eta; constr: "
                  "constellation-constrained capacity limit at rho (inf for uncoded schemes); "
                  "'-': curve did not reach the target.\n",
                  target);
    out += line;
  }
  // LDPC schemes: the curve against the ensemble's threshold and the
  // binary-input capacity at the code rate, and how hard the decoder worked.
  bool ldpc_header = false;
  for (const StoredScheme& s : run.schemes) {
    if (!s.has_threshold) continue;
    if (!ldpc_header) {
      std::snprintf(line, sizeof line, "%-14s %9s %7s %6s  %7s %6s  %9s %10s  %s\n", "LDPC scheme",
                    "threshold", "method", "gap", "BI-AWGN", "gap", "iter@last", "undetected",
                    "code; decoder");
      out += line;
      ldpc_header = true;
    }
    const double iters = s.decoder_iterations_mean.empty() ? NAN : s.decoder_iterations_mean.back();
    std::uint64_t undetected = 0;
    for (std::uint64_t u : s.undetected_frame_errors) undetected += u;
    char it[32];
    std::snprintf(it, sizeof it, "%.1f", iters);
    const std::string method = s.threshold_method == "quantized" ? "DE-q"
                               : s.threshold_method.empty()      ? "-"
                                                                 : "DE-GA";
    std::string code = s.code_description;
    code.append(", girth ").append(std::to_string(s.code_girth)).append("; ").append(s.decoder_description);
    std::snprintf(line, sizeof line, "%-14s %9s %7s %6s  %7s %6s  %9s %10llu  %s\n", s.name.c_str(),
                  Db(s.threshold_ebno_db).c_str(), method.c_str(),
                  Db(s.summary.gap_to_threshold_db).c_str(), Db(s.binary_input_ebno_db).c_str(),
                  Db(s.summary.gap_to_binary_input_db).c_str(), it,
                  static_cast<unsigned long long>(undetected), code.c_str());
    out += line;
  }
  if (ldpc_header) {
    out += "threshold: BP threshold of the code's degree distribution on the binary-input AWGN "
           "channel at its rate\n(DE-q: quantised density evolution; DE-GA: Gaussian "
           "approximation); BI-AWGN: binary-input capacity limit\nat the code rate; gaps only "
           "for BPSK/QPSK; iter@last: mean decoder iterations at the last point;\nundetected: "
           "frames decoded to a wrong codeword, all points.\n";
  }
  // Fading schemes: the channel, the ergodic limits with receiver channel
  // state and the gaps to them (and to outage for block fading).
  bool fading_header = false;
  for (const StoredScheme& s : run.schemes) {
    if (!s.has_ergodic) continue;
    if (!fading_header) {
      std::snprintf(line, sizeof line, "%-14s %-22s %8s %6s  %8s %8s  %7s\n", "fading scheme",
                    "channel", "ergodic", "gap", "erg-CM", "erg-BICM", "outage");
      out += line;
      fading_header = true;
    }
    std::string channel = s.channel;
    channel.append(", ").append(s.fading);
    if (s.branches > 1) channel.append(", ").append(std::to_string(s.branches)).append("x ").append(s.combining);
    std::snprintf(line, sizeof line, "%-14s %-22s %8s %6s  %8s %8s  %7s\n", s.name.c_str(),
                  channel.c_str(), Db(s.ergodic_shannon_ebno_db).c_str(),
                  Db(s.summary.gap_to_ergodic_db).c_str(), Db(s.ergodic_constrained_ebno_db).c_str(),
                  Db(s.ergodic_bicm_ebno_db).c_str(),
                  s.has_outage ? Db(s.summary.gap_to_outage_db).c_str() : "");
    out += line;
  }
  if (fading_header) {
    out += "ergodic: Eb/N0 (average per branch) where the ergodic Gaussian-input capacity with "
           "perfect receiver\nchannel state equals rho; gap = simulated - ergodic; erg-CM, "
           "erg-BICM: the same for the constellation;\noutage: block fading, simulated minus "
           "Gaussian-input outage Eb/N0 at the target FER ('-' without one);\nin the first "
           "table, theory and gain of fading schemes use the uncoded theory on their own "
           "channel.\n";
  }
  return out;
}

}  // namespace capgap
