// The curves file (HDF5, format "capgap-curves", version 1): the interface
// that scripts and later parts read. Layout in the README ("Output file").
// Written under a temporary name in the same directory and renamed when
// complete, so a reader never sees a half-written file.
#ifndef CAPGAP_SIM_CURVES_FILE_H_
#define CAPGAP_SIM_CURVES_FILE_H_

#include <cstddef>
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
  int threads = 1;  // worker threads per process
  int ranks = 1;    // processes of the run (MPI ranks; 1 without MPI)
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
  // FER summary (files of earlier versions: has_fer false) and the
  // finite-length normal approximation at target_fer (has_finite_length).
  bool has_fer = false, has_finite_length = false;
  double target_fer = 0;
  double finite_length_na_ebno_db = 0;
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
  // The /<scheme>/channel group (absent in files of earlier versions: then
  // has_channel is false and the channel is AWGN with one branch).
  bool has_channel = false;
  std::string channel = "awgn", fading = "fast", combining = "mrc";
  int branches = 1;
  // Fading schemes: the ergodic limits (has_ergodic) and, for block fading,
  // the outage gap (has_outage).
  bool has_ergodic = false, has_outage = false;
  double ergodic_shannon_ebno_db = 0, ergodic_constrained_ebno_db = 0, ergodic_bicm_ebno_db = 0;
  Summary summary{};
};

struct StoredRun {
  std::string program_version;
  std::string created_utc;
  int threads = 0;
  int ranks = 0;  // 0: a file written before the attribute existed
  std::vector<StoredScheme> schemes;
};

// Limits of the reader: the file (read whole into memory before HDF5 sees
// it), the points of a curve, the schemes of a file and a fixed-length
// string attribute.
inline constexpr std::uint64_t kMaxCurvesFileBytes = std::uint64_t{256} << 20;
inline constexpr std::uint64_t kMaxCurvePoints = 100000;
inline constexpr std::size_t kMaxCurveSchemes = 1000;
inline constexpr std::size_t kMaxCurveStringBytes = std::size_t{16} << 20;

// Reads a curves file (sim/io/curves_reader.cc). The path must be a regular
// file of at most kMaxCurvesFileBytes (blocks/core/file_read.h); its bytes
// are handed to HDF5 as an in-memory image, so HDF5 never opens the path
// itself. Before any value is read the whole layout is validated: every
// group, dataset and attribute the summary needs exists as a hard link of
// the right kind, every attribute is a scalar of the expected type class
// (string, integer, or number), every per-point dataset is 1-D with the
// expected type class and as many entries as /<scheme>/ebno_db (at most
// kMaxCurvePoints), the "schemes" list names distinct existing groups; then
// the values are checked (finite Eb/N0, bit_errors <= bits, frame_errors <=
// frames, undetected_frame_errors <= frame_errors). Errors name the file and
// the object, e.g. "x.h5: /qpsk/bits: 2-D dataset, expected 1-D of 7
// entries" or "x.h5: /qpsk attribute 'code_rate': array of 1000 entries,
// expected a scalar".
Result<StoredRun> ReadCurvesFile(const std::string& path);
// The same from the bytes of a file; `source` names it in messages.
Result<StoredRun> ParseCurvesImage(const std::string& bytes, const std::string& source);

// ISO 8601 UTC time of now, e.g. "2026-12-01T22:30:00Z".
std::string UtcNow();

}  // namespace capgap

#endif  // CAPGAP_SIM_CURVES_FILE_H_
