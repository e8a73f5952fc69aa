// The curves file (HDF5, format "capgap-curves", version 1): the interface
// that scripts and later parts read. Layout in the README ("Output file").
// Written under a temporary name in the same directory and renamed when
// complete, so a reader never sees a half-written file.
#ifndef CAPGAP_SIM_CURVES_FILE_H_
#define CAPGAP_SIM_CURVES_FILE_H_

#include <cstdint>
#include <string>
#include <vector>

#include "blocks/core/status.h"
#include "sim/chain/scheme_result.h"

namespace capgap {

inline constexpr char kCurvesFormat[] = "capgap-curves";
inline constexpr int kCurvesFormatVersion = 1;

struct RunMetadata {
  std::string command_line;
  std::string config_text;
  int threads = 1;
  std::uint64_t seed = 0;
  std::string kernel_target;
  std::string demap_kernel_target;
  std::string created_utc;  // ISO 8601
};

Status WriteCurvesFile(const std::string& path, const RunMetadata& meta,
                       const std::vector<SchemeResult>& schemes);

// What `capgap summary` needs back from a file.
struct StoredScheme {
  std::string name;
  std::string modulation;
  std::string demapper;
  std::string code;
  double code_rate = 1;
  double info_bits_per_symbol = 1;
  double spectral_efficiency = 1;
  double spectral_efficiency_ideal = 1;
  double target_ber = 0;
  std::vector<double> ebno_db;
  std::vector<std::uint64_t> bits, bit_errors;
  std::vector<double> ber;
  double shannon_ebno_db = 0, constrained_ebno_db = 0;
  // Codes with an ensemble threshold (LDPC): the threshold, the code and
  // decoder as described in /<scheme>/code.
  bool has_threshold = false;
  double threshold_ebno_db = 0, binary_input_ebno_db = 0;
  std::string threshold_method, code_description, decoder_description;
  int code_girth = 0;
  std::vector<double> decoder_iterations_mean;
  std::vector<std::uint64_t> undetected_frame_errors;
  Summary summary{};
};

struct StoredRun {
  std::string program_version;
  std::string created_utc;
  int threads = 0;
  std::vector<StoredScheme> schemes;
};

Result<StoredRun> ReadCurvesFile(const std::string& path);

// ISO 8601 UTC time of now, e.g. "2026-12-01T22:30:00Z".
std::string UtcNow();

}  // namespace capgap

#endif  // CAPGAP_SIM_CURVES_FILE_H_
