// Everything reported for one scheme of a run: the simulated points, uncoded
// theory on a fine grid, the capacity limits for its information bits per
// symbol, and the summary at target_ber (Eb/N0 needed with its interval from
// the CI bounds, coding gain, gaps to the limits).
#ifndef CAPGAP_SIM_SCHEME_RESULT_H_
#define CAPGAP_SIM_SCHEME_RESULT_H_

#include <string>
#include <vector>

#include "sim/chain.h"
#include "sim/config.h"
#include "sim/engine.h"

namespace capgap {

struct TheoryCurve {
  std::vector<double> ebno_db;
  std::vector<double> ber_uncoded;
  std::vector<double> ser_uncoded;
  // Soft-decision union bound of a convolutional code (empty when it does not
  // apply: uncoded, or a mapper other than BPSK/QPSK).
  std::vector<double> ber_bound;
  std::string bound_channel;
};

// What the output records of a convolutional code.
struct CodeResult {
  bool present = false;
  int free_distance = 0;
  std::vector<int> spectrum_distance;
  std::vector<std::uint64_t> spectrum_info_weight;
  std::vector<std::uint64_t> spectrum_events;
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
};

struct Summary {
  double ebno_at_target_db;
  double ebno_at_target_low_db;   // from the lower CI bound (optimistic)
  double ebno_at_target_high_db;  // from the upper CI bound (pessimistic)
  double uncoded_ebno_at_target_db;
  double coding_gain_db;
  double gap_to_shannon_db;
  double gap_to_constrained_db;
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
  CodeResult code;
  double target_ber = 1e-5;
  std::vector<PointResult> points;
  TheoryCurve theory;
  Limits limits;
  Summary summary;
};

// Fills theory, limits and summary for simulated points of `chain`.
SchemeResult AnalyseScheme(const Chain& chain, const SweepConfig& sweep,
                           std::vector<PointResult> points);

}  // namespace capgap

#endif  // CAPGAP_SIM_SCHEME_RESULT_H_
