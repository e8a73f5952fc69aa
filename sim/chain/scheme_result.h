// Everything reported for one scheme of a run: the simulated points, uncoded
// theory on a fine grid, the capacity limits for its information bits per
// symbol, and the summary at target_ber (Eb/N0 needed with its interval from
// the CI bounds, coding gain, gaps to the limits).
#ifndef CAPGAP_SIM_SCHEME_RESULT_H_
#define CAPGAP_SIM_SCHEME_RESULT_H_

#include <atomic>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include "analysis/finite_length.h"
#include "sim/chain/chain.h"
#include "sim/config/config.h"
#include "sim/engine/engine.h"

namespace capgap {

struct TheoryCurve {
  std::vector<double> ebno_db;
  // Uncoded BER and SER on the scheme's own channel (AWGN or the average
  // over its fading and combining, analysis/fading_theory.h).
  std::vector<double> ber_uncoded;
  std::vector<double> ser_uncoded;
  // Fading schemes (channel other than AWGN with one branch): the AWGN
  // uncoded BER on the same grid, for comparison; empty otherwise.
  std::vector<double> ber_uncoded_awgn;
  // Empty when ber_uncoded/ser_uncoded are exact; otherwise what they are
  // (a generic constellation's union bound, analysis/uncoded_theory.h),
  // written as the theory group's `uncoded_method` attribute.
  std::string uncoded_method;
  // The code's union bounds on BER and FER on the theory grid (empty when the
  // family has none or it does not apply to the mapper), and what they
  // assume.
  std::vector<double> ber_bound;
  std::vector<double> fer_bound;
  std::string bound_channel;
};

// What a code family records about its code, written under /<scheme>/code
// in the order given: attributes (text, integer, real) and series (int32,
// uint64, double). The curves writer knows no family; each family's analyse
// step (sim/families/) fills this.
struct CodeReport {
  using Value = std::variant<std::string, int, double>;
  using Series =
      std::variant<std::vector<std::int32_t>, std::vector<std::uint64_t>, std::vector<double>>;
  struct Attribute {
    std::string name;
    Value value;
  };
  struct Dataset {
    std::string name;
    Series values;
  };
  bool present = false;
  std::vector<Attribute> attributes;
  std::vector<Dataset> datasets;

  void Add(std::string name, Value value) {
    present = true;
    attributes.push_back({std::move(name), std::move(value)});
  }
  void AddSeries(std::string name, Series values) {
    present = true;
    datasets.push_back({std::move(name), std::move(values)});
  }
  // nullptr when absent.
  const Value* Find(std::string_view name) const {
    for (const Attribute& a : attributes) {
      if (a.name == name) return &a.value;
    }
    return nullptr;
  }
};

struct Limits {
  double shannon_ebno_db;      // unconstrained Gaussian input at spectral_efficiency
  double constrained_ebno_db;  // this constellation at rho; +inf when rho = m
  std::string spectral_efficiency_basis;
  std::string notes;
  // The constellation's constrained-capacity curve on the power-bandwidth
  // plane at ideal Nyquist signalling: rho from 0.05 m to 0.97 m bits per
  // symbol and the Eb/N0 it needs (for the comparison chart).
  std::vector<double> constrained_curve_rho;
  std::vector<double> constrained_curve_ebno_db;
  // Codes with an ensemble threshold (LDPC): the belief-propagation
  // threshold of the code's degree distribution on the binary-input AWGN
  // channel (quantised density evolution; the Gaussian approximation beside
  // it), and the binary-input capacity limit at the code rate. NaN otherwise;
  // threshold_present says whether the family reports them at all.
  bool threshold_present = false;
  double threshold_ebno_db = std::numeric_limits<double>::quiet_NaN();
  double threshold_sigma = std::numeric_limits<double>::quiet_NaN();
  std::string threshold_method, threshold_description;
  double threshold_ga_ebno_db = std::numeric_limits<double>::quiet_NaN();
  double binary_input_ebno_db = std::numeric_limits<double>::quiet_NaN();
  std::string threshold_channel;
  // Fading schemes (ergodic_present): mean Eb/N0 per branch at which the
  // ergodic capacity with receiver CSI equals rho = info_bits_per_symbol,
  // for Gaussian input, the constellation (CM) and BICM (+inf for the
  // constrained ones when rho = m), and the Gaussian-input ergodic bound on
  // the power-bandwidth plane (eta = rho, ideal Nyquist) for the chart.
  bool ergodic_present = false;
  double ergodic_shannon_ebno_db = std::numeric_limits<double>::quiet_NaN();
  double ergodic_constrained_ebno_db = std::numeric_limits<double>::quiet_NaN();
  double ergodic_bicm_ebno_db = std::numeric_limits<double>::quiet_NaN();
  std::vector<double> ergodic_curve_rho, ergodic_curve_ebno_db;
  // Block fading (outage_present): the outage probability at rate rho
  // against mean Eb/N0 per branch, Gaussian input and constellation-
  // constrained (CM), and the SNR thresholds behind them (Es/N0, dB).
  bool outage_present = false;
  std::vector<double> outage_ebno_db, outage_probability_gaussian,
      outage_probability_constrained;
  double outage_threshold_gaussian_esno_db = std::numeric_limits<double>::quiet_NaN();
  double outage_threshold_constrained_esno_db = std::numeric_limits<double>::quiet_NaN();
  // Finite-length limits at the scheme's own block (n, k) on the AWGN
  // channel, on a 0.1 dB grid and at target_fer (analysis/finite_length.h);
  // finite_length.present is false for uncoded schemes and block/Doppler
  // fading (fast fading: the NA only), with the
  // reason in finite_length.absent_reason.
  analysis::FiniteLengthLimits finite_length;
};

struct Summary {
  double ebno_at_target_db;
  double ebno_at_target_low_db;   // from the lower CI bound (optimistic)
  double ebno_at_target_high_db;  // from the upper CI bound (pessimistic)
  // The same at target_fer from the FER and its Clopper-Pearson bounds.
  double ebno_at_target_fer_db = std::numeric_limits<double>::quiet_NaN();
  double ebno_at_target_fer_low_db = std::numeric_limits<double>::quiet_NaN();
  double ebno_at_target_fer_high_db = std::numeric_limits<double>::quiet_NaN();
  double uncoded_ebno_at_target_db;
  double coding_gain_db;
  double gap_to_shannon_db;
  double gap_to_constrained_db;
  // LDPC on BPSK/QPSK (where the binary-input analysis applies), else NaN.
  double gap_to_threshold_db = std::numeric_limits<double>::quiet_NaN();
  double gap_to_binary_input_db = std::numeric_limits<double>::quiet_NaN();
  // Fading schemes: ebno_at_target_db - ergodic_shannon_ebno_db.
  double gap_to_ergodic_db = std::numeric_limits<double>::quiet_NaN();
  // Block fading: Eb/N0 where the simulated FER crosses target_fer minus the
  // Eb/N0 where the Gaussian-input outage probability equals target_fer
  // (OutageGapDb); NaN while no target FER is set.
  double gap_to_outage_db = std::numeric_limits<double>::quiet_NaN();
  // ebno_at_target_fer_db minus the normal approximation's Eb/N0 at
  // target_fer for the scheme's (n, k); NaN without a finite-length limit.
  double gap_to_finite_length_db = std::numeric_limits<double>::quiet_NaN();
};

// Power spectral density of the transmitted signal of a shaped scheme
// (Welch's method), frequency in units of the symbol rate.
struct SpectrumResult {
  bool present = false;
  std::vector<double> frequency;
  std::vector<double> psd_db;
  double occupied_bandwidth_99 = 0;  // symbol rates
  double bandwidth_3db = 0;          // symbol rates
};

// Pictures of the signal for the plots: the demapper's input at the
// operating point (constellation after the matched filter, impairments and
// noise included) and, for shaped schemes, the noise-free eye of the
// matched-filter output at S samples per symbol.
struct SignalViews {
  bool present = false;
  double constellation_ebno_db = 0;
  std::vector<double> constellation_i, constellation_q;
  // Eye: eye_traces rows of eye_time.size() samples each (row-major), the
  // in-phase matched-filter output over [-1, 1] symbol periods around each
  // ideal sampling instant (t = 0), noise-free and without impairments.
  int eye_traces = 0;
  std::vector<double> eye_time;
  std::vector<double> eye;
};

struct SchemeResult {
  SchemeConfig scheme;
  double code_rate = 1;
  double info_bits_per_symbol = 1;
  double spectral_efficiency = 1;        // what the Shannon gap uses
  double spectral_efficiency_ideal = 1;  // rho / (1 + rolloff); rho without shaping
  SpectrumResult spectrum;
  SignalViews signal;
  CodeReport code;
  // The /<scheme>/channel group: every channel key and the receiver's
  // channel state, as attributes (same shape as a code report).
  CodeReport channel;
  // The decoder is iterative: the points carry iteration statistics.
  bool iterative = false;
  double target_ber = 1e-5;
  // FER of the summary (Eb/N0 at target FER, outage gap, finite-length
  // limits): the scheme's sweep.target_fer.
  double target_fer = 1e-4;
  std::vector<PointResult> points;
  TheoryCurve theory;
  Limits limits;
  Summary summary;
};

// Where a simulated curve crosses a target error rate: the Eb/N0 of the
// rate itself and of its Clopper-Pearson bounds (low_db from the lower bound,
// optimistic; high_db from the upper, pessimistic), interpolated in log
// rate (CrossingDb), over the points not interrupted; NaN where a curve does
// not cross.
enum class ErrorRate { kBer, kFer };
struct TargetCrossing {
  double ebno_db;
  double low_db;
  double high_db;
};
TargetCrossing CrossTarget(std::span<const PointResult> points, ErrorRate rate, double target);

// Gap to the block-fading outage limit at a target FER: the Eb/N0 where the
// simulated FER (points not interrupted) crosses target_fer minus the Eb/N0
// where the Gaussian-input outage probability of r's channel at rate
// r.info_bits_per_symbol equals target_fer. NaN unless r's channel is block
// fading, 0 < target_fer < 1 and the FER curve crosses it.
double OutageGapDb(const SchemeResult& r, double target_fer);

// The /<scheme>/channel attributes of a channel spec: channel, rician_k_db,
// nakagami_m, fading, coherence_symbols, doppler, branches, combining,
// channel_state = "perfect", ebno_basis (Eb/N0 is the average per branch).
CodeReport DescribeChannel(const ChannelSpec& channel);

// Fills theory, limits and summary for simulated points of `chain`. Once
// *stop reads true (stop may be null) long parts (density evolution) give
// up and the result is incomplete: the caller must discard it.
SchemeResult AnalyseScheme(const Chain& chain, const SweepConfig& sweep,
                           std::vector<PointResult> points,
                           const std::atomic<bool>* stop = nullptr);

}  // namespace capgap

#endif  // CAPGAP_SIM_SCHEME_RESULT_H_
