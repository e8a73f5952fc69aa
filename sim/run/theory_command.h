// `capgap theory` and `capgap summary` as functions (the CLI parses the
// arguments and calls them), so that their checks can be tested in-process.
//
// theory has two forms, which cannot be combined:
//   uncoded tables: --modulation NAME --ebno-db RANGE [--rate R] [--csv]
//     exact uncoded BER/SER on AWGN per Eb/N0 point, and the limits
//     (Shannon, constellation-constrained, BICM) at rho = R m;
//   Shannon-Hartley: --bandwidth HZ --snr-db X, C = B log2(1 + S/N).
// Allowed values (every one finite): Eb/N0 points and SNR in
// [kTheoryMinDb, kTheoryMaxDb] dB, code rate in [kTheoryMinRate, 1],
// bandwidth in (0, kTheoryMaxBandwidthHz] Hz. Any other value, a missing or
// conflicting option is a usage error (status 2) naming the option and the
// allowed range.
#ifndef CAPGAP_SIM_RUN_THEORY_COMMAND_H_
#define CAPGAP_SIM_RUN_THEORY_COMMAND_H_

#include <iostream>
#include <optional>
#include <string>
#include <vector>

namespace capgap {

inline constexpr double kTheoryMinDb = -100;
inline constexpr double kTheoryMaxDb = 100;
inline constexpr double kTheoryMinRate = 1e-6;
inline constexpr double kTheoryMaxBandwidthHz = 1e15;

struct TheoryOptions {
  // Uncoded tables.
  std::optional<std::string> modulation;  // --modulation
  std::optional<std::string> ebno_db;     // --ebno-db FROM to TO by STEP or a list
  std::optional<double> rate;             // --rate (default 1)
  bool csv = false;                       // --csv
  // Shannon-Hartley.
  std::optional<double> bandwidth_hz;  // --bandwidth
  std::optional<double> snr_db;        // --snr-db
  std::ostream* out = &std::cout;
  std::ostream* err = &std::cerr;
};

// Returns the exit status: 0 done, 1 internal failure, 2 usage.
int RunTheory(const TheoryOptions& options);

// `capgap summary FILE.h5`: the summary table of every scheme in a curves
// file on `out`; 0, or 1 with the reason on `err`. The file is read
// (ReadCurvesFile) in a child process, so a damaged file that crashes the
// HDF5 library gives status 1 ("FILE: damaged HDF5 file: the HDF5 library
// failed reading it (signal 11)"), not a crash.
int RunSummary(const std::string& path, std::ostream& out, std::ostream& err);

// `capgap summary A.h5 B.h5 ...`: with one file RunSummary; with several the
// schemes side by side (FormatComparisonTable, files labelled A, B, ...),
// each file read in a child process first so that a damaged one is named.
int RunSummaryComparison(const std::vector<std::string>& paths, std::ostream& out,
                         std::ostream& err);

}  // namespace capgap

#endif  // CAPGAP_SIM_RUN_THEORY_COMMAND_H_
