// Fixed-width summary table: per scheme, Eb/N0 needed at the target BER with
// its 95 % interval, the uncoded theory value, coding gain, and the gaps to the
// unconstrained (Shannon) and constellation-constrained limits.
#include "sim/io/summary_table.h"

#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

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
  // Frame error rates: Eb/N0 at the target FER with its interval, the
  // finite-length limit (normal approximation) at the scheme's (n, k), the
  // gap to it and to the Shannon limit at the same FER.
  bool fer_header = false;
  for (const StoredScheme& s : run.schemes) {
    if (!s.has_fer || s.code == "none") continue;
    if (!fer_header) {
      std::snprintf(line, sizeof line, "%-14s %7s  %7s %-15s %7s %6s  %7s\n", "FER scheme",
                    "FER", "Eb/N0", "95% interval", "NA", "gap", "Shannon");
      out += line;
      fer_header = true;
    }
    const Summary& m = s.summary;
    std::string interval("[");
    interval.append(Db(m.ebno_at_target_fer_low_db)).append(", ");
    interval.append(Db(m.ebno_at_target_fer_high_db)).append("]");
    const double nan = std::nan("");
    const double gap_shannon = m.ebno_at_target_fer_db - s.shannon_ebno_db;
    std::snprintf(line, sizeof line, "%-14s %7.0e  %7s %-15s %7s %6s  %7s\n", s.name.c_str(),
                  s.target_fer, Db(m.ebno_at_target_fer_db).c_str(), interval.c_str(),
                  Db(s.has_finite_length ? s.finite_length_na_ebno_db : nan).c_str(),
                  Db(s.has_finite_length ? m.gap_to_finite_length_db : nan).c_str(),
                  Db(gap_shannon).c_str());
    out += line;
  }
  if (fer_header) {
    out += "FER: the target frame error rate; Eb/N0 where the simulated FER crosses it, interval "
           "from the FER's 95 %\nbounds; NA: normal approximation (Polyanskiy-Poor-Verdu 2010) "
           "for the best code of the scheme's own\n(n, k) at that FER; gap = simulated - NA; "
           "Shannon: simulated - Shannon limit at eta (infinite length).\n";
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

namespace {

// An Eb/N0 value with its interval as low/high edges; NaN where the curve did
// not reach the target.
struct Estimate {
  double value, low, high;
  bool ok() const { return !std::isnan(value) && !std::isnan(low) && !std::isnan(high); }
};

Estimate Shifted(Estimate e, double by) { return {e.value - by, e.low - by, e.high - by}; }

Estimate BerEstimate(const StoredScheme& s) {
  const Summary& m = s.summary;
  return {m.ebno_at_target_db, std::fmin(m.ebno_at_target_low_db, m.ebno_at_target_high_db),
          std::fmax(m.ebno_at_target_low_db, m.ebno_at_target_high_db)};
}

Estimate FerEstimate(const StoredScheme& s) {
  const Summary& m = s.summary;
  if (!s.has_fer) return {NAN, NAN, NAN};
  return {m.ebno_at_target_fer_db, std::fmin(m.ebno_at_target_fer_low_db, m.ebno_at_target_fer_high_db),
          std::fmax(m.ebno_at_target_fer_low_db, m.ebno_at_target_fer_high_db)};
}

std::string WithInterval(const Estimate& e) {
  if (std::isnan(e.value)) return "-";
  std::string out = Db(e.value);
  out.append(" [").append(Db(e.low)).append(", ").append(Db(e.high)).append("]");
  return out;
}

std::string Delta(double v) {
  if (std::isnan(v)) return "-";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%+.2f", v);
  return buf;
}

// Non-overlapping 95 % intervals: the difference is larger than the
// statistical uncertainty of either curve (a conservative test: overlapping
// intervals do not prove equality).
bool Disjoint(const Estimate& a, const Estimate& b) {
  return a.ok() && b.ok() && (a.high < b.low || b.high < a.low);
}

const StoredScheme* FindScheme(const StoredRun& run, const std::string& name) {
  for (const StoredScheme& s : run.schemes) {
    if (s.name == name) return &s;
  }
  return nullptr;
}

}  // namespace

std::string FormatComparisonTable(const std::vector<std::string>& labels,
                                  const std::vector<std::string>& paths,
                                  const std::vector<StoredRun>& runs) {
  std::string out;
  for (std::size_t i = 0; i < runs.size(); ++i) {
    out.append(labels[i]).append(" = ").append(paths[i]).append(" (")
        .append(runs[i].program_version).append(", ").append(runs[i].created_utc).append(")\n");
  }
  std::vector<std::string> names;
  for (const StoredRun& r : runs) {
    for (const StoredScheme& s : r.schemes) {
      bool seen = false;
      for (const std::string& n : names) seen |= n == s.name;
      if (!seen) names.push_back(s.name);
    }
  }
  char line[640];
  std::snprintf(line, sizeof line, "%-14s %-4s  %-24s %-24s %-24s  %6s %6s  %s\n", "scheme", "file",
                "Eb/N0 at BER [95%]", "gap to Shannon [95%]", "Eb/N0 at FER [95%]", "dBER", "dFER",
                "vs first file");
  out += line;
  std::size_t flagged = 0;
  for (const std::string& name : names) {
    const StoredScheme* base = nullptr;
    for (std::size_t i = 0; i < runs.size(); ++i) {
      const StoredScheme* s = FindScheme(runs[i], name);
      if (!s) {
        std::snprintf(line, sizeof line, "%-14s %-4s  (not in this file)\n", name.c_str(), labels[i].c_str());
        out += line;
        continue;
      }
      const Estimate ber = BerEstimate(*s), fer = FerEstimate(*s);
      const Estimate gap = Shifted(ber, s->shannon_ebno_db);
      std::string d_ber = "", d_fer = "", verdict;
      if (!base) {
        base = s;
        verdict = "(reference)";
      } else {
        const Estimate b_ber = BerEstimate(*base), b_fer = FerEstimate(*base);
        const bool same_ber_target = s->target_ber == base->target_ber;
        const bool same_fer_target = !s->has_fer || !base->has_fer || s->target_fer == base->target_fer;
        d_ber = same_ber_target ? Delta(ber.value - b_ber.value) : "-";
        d_fer = same_fer_target && s->has_fer && base->has_fer ? Delta(fer.value - b_fer.value) : "-";
        std::string what;
        if (same_ber_target && Disjoint(ber, b_ber)) what = "BER";
        if (same_fer_target && Disjoint(fer, b_fer)) what += what.empty() ? "FER" : ", FER";
        if (!same_ber_target || !same_fer_target) {
          verdict = "not comparable: target ";
          verdict += !same_ber_target ? "BER" : "FER";
          verdict += " differs";
        } else if (!what.empty()) {
          verdict = "DIFFERS (" + what + ": intervals do not overlap)";
          ++flagged;
        } else if (!ber.ok() || !b_ber.ok()) {
          verdict = "BER target not reached by both";
        } else {
          verdict = "within the intervals";
        }
      }
      std::snprintf(line, sizeof line, "%-14s %-4s  %-24s %-24s %-24s  %6s %6s  %s\n", name.c_str(),
                    labels[i].c_str(), WithInterval(ber).c_str(), WithInterval(gap).c_str(),
                    WithInterval(fer).c_str(), d_ber.c_str(), d_fer.c_str(), verdict.c_str());
      out += line;
    }
  }
  std::snprintf(line, sizeof line,
                "Eb/N0 in dB at each scheme's target BER and FER, 95 %% intervals from the "
                "Clopper-Pearson bounds of the\n"
                "curve; gap = Eb/N0 - Shannon limit at the "
                "scheme's eta; dBER/dFER: difference to the first file holding\n"
                "the scheme. "
                "DIFFERS: the 95 %% intervals do not overlap. %zu difference(s) flagged.\n",
                flagged);
  out += line;
  return out;
}

}  // namespace capgap
