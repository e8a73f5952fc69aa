// Run configuration: the INI scheme file (sim/config/ini_reader.h),
// command-line overrides, validation of every key before the first frame, and
// the resolved configuration text stored in every output file.
//
// Format: a [sweep] section and one [scheme.NAME] section per scheme, in the
// order they are simulated. Keys, defaults and rules are declared once in the
// key tables (sim/config/config_keys.cc), which also give the messages and
// ConfigKeysHelp(); the README documents them. Every error names the file,
// the full key, the value and the rule.
#ifndef CAPGAP_SIM_CONFIG_H_
#define CAPGAP_SIM_CONFIG_H_

#include <any>
#include <cstdint>
#include <limits>
#include <map>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "blocks/channel/channel_spec.h"
#include "blocks/core/status.h"
#include "blocks/fec/conv_channel_code.h"
#include "blocks/fec/conv_code.h"
#include "blocks/fec/ldpc_construction.h"
#include "blocks/fec/ldpc_decoder.h"
#include "blocks/mapping/demapper.h"
#include "blocks/mapping/modulation.h"
#include "blocks/shaping/pulse.h"

namespace capgap {

enum class SourceKind { kRandom, kPrbs9, kPrbs15, kPrbs23, kPrbs31 };
// The words of SourceKind, in enum order (the `source` key's word list).
inline constexpr std::string_view kSourceKindWords[] = {"random", "prbs9", "prbs15", "prbs23",
                                                        "prbs31"};

struct SweepConfig {
  std::vector<double> ebno_db;          // points in simulation order
  // Stopping rule of a point: it stops at the first unit (in index order)
  // after which its counted prefix holds stop_bit_errors bit errors, or
  // stop_frame_errors frame errors, or stop_bits information bits, whichever
  // comes first; 0 disables one error target (at least one is set).
  std::uint64_t stop_bit_errors = 116;  // bit errors that end a point (0: none)
  std::uint64_t stop_frame_errors = 0;  // frame errors that end a point (0: none)
  std::uint64_t stop_bits = 30000000;   // information bits that end a point
  double ber_floor = 1e-7;              // a scheme's sweep ends after a point below it
  double target_ber = 1e-5;             // BER of the summary (Eb/N0 needed, gaps)
  double target_fer = 1e-4;             // FER of the summary and finite-length limits
  std::uint64_t seed = 1;
  int threads = 0;                      // 0: all cores
  // Seconds between checkpoints while a point runs (0: only when a point
  // finishes or the run stops). Does not change any count.
  double checkpoint_seconds = 60;
};

// Convolutional-code keys of a scheme (code = conv). Generators and puncture
// pattern are kept as text here and parsed by the code block itself, whose
// messages the chain prefixes with the key.
struct ConvSchemeConfig {
  std::string generators = "133,171";
  int constraint_length = 7;
  std::string puncture = "none";
  Termination termination = Termination::kTerminated;  // tail, tailbiting
  ConvDecoderKind decoder = ConvDecoderKind::kViterbiSoft;
  int traceback = 0;                   // 0: automatic
};

// LDPC keys of a scheme (code = ldpc). Enum words are parsed once, by the
// family's parse step (ParseX of the blocks); texts (degrees, paths) are
// parsed by the code blocks when the chain is built; their messages get the
// key.
struct LdpcSchemeConfig {
  LdpcConstructionKind construction = LdpcConstructionKind::kPeg;
  // peg: code length n, design rate (m = round(n (1 - rate)) checks), the
  // variable-node degree distribution, and the seed of the construction.
  int length = 2016;
  double rate = 0.5;
  std::string degrees = "3";
  std::uint64_t construction_seed = 1;
  // qc: base (exponent) matrix file and lifting size (0: the file's own).
  std::string base_matrix;
  int lifting = 0;
  // file: a parity-check matrix in capgap's sparse text format.
  std::string matrix_file;
  LdpcAlgorithm decoder = LdpcAlgorithm::kMinSumNormalized;
  LdpcSchedule schedule = LdpcSchedule::kLayered;
  int max_iterations = 50;
  LdpcArithmetic arithmetic = LdpcArithmetic::kAuto;
  double normalization = 0.75;
  double offset = 0.5;
  // Refuse codes whose estimated memory (H, encoder, decoder x threads) is larger.
  std::uint64_t memory_limit_mb = 4096;
  // Directory of the config file: relative paths above are taken from it.
  std::string config_dir;
  // base_matrix / matrix_file resolved against config_dir.
  std::string ResolvePath(const std::string& path) const;
};

struct SchemeConfig {
  std::string name;
  // Eb/N0 points of this scheme: its own ebno_db key, else sweep.ebno_db.
  std::vector<double> ebno_db;
  // Overrides of the sweep's stop_frame_errors / target_fer (0 / NaN: the
  // sweep's own); RunConfig::SweepFor applies them.
  std::uint64_t stop_frame_errors = 0;
  double target_fer = std::numeric_limits<double>::quiet_NaN();
  Modulation modulation;
  DemapMethod demapper = DemapMethod::kMaxLog;
  std::uint32_t frame_bits = 0;         // information bits per frame
  std::uint32_t unit_frames = 0;        // frames per work unit (0 = automatic)
  SourceKind source = SourceKind::kRandom;
  // Pulse shaping (shaping = none: one sample per symbol, ideal Nyquist).
  PulseShape shaping = PulseShape::kNone;
  double rolloff = 0.35;
  int span = 16;                 // filter length in symbols
  int samples_per_symbol = 8;
  double timing_offset = 0;      // receiver sampling offset, symbols
  double phase_offset_deg = 0;   // carrier phase offset
  double frequency_offset = 0;   // carrier frequency offset, cycles per symbol
  std::string code = "none";  // a code family of the registry (sim/chain/registry.cc)
  ConvSchemeConfig conv;
  LdpcSchemeConfig ldpc;
  // Typed options of code families that keep them outside the structs above
  // (set by the family's parse, read by its build; sim/families/).
  std::any code_options;
  // The channel and the interleaver between encoder and mapper (defaults:
  // AWGN, no interleaver).
  ChannelSpec channel;
  InterleaverSpec interleaver;
  // Frames per work unit after resolving "automatic" (a function of the
  // scheme only, never of the thread count or the CPU): about 64 kbit, for
  // LDPC a multiple of 64 codewords.
  std::uint32_t ResolvedUnitFrames() const;
};

struct RunConfig {
  std::string source_name;  // file name used in messages
  SweepConfig sweep;
  std::vector<SchemeConfig> schemes;
  // The sweep of scheme i: `sweep` with that scheme's Eb/N0 points,
  // stop_frame_errors and target_fer.
  SweepConfig SweepFor(std::size_t i) const;
  // Every key after defaults and overrides, "section.key" -> value.
  std::vector<std::pair<std::string, std::string>> resolved;
  // INI text equivalent to `resolved` (stored in output files).
  std::string ResolvedText() const;
};

// Parses and validates an INI file; `overrides` are "KEY=VALUE" strings
// (e.g. "sweep.stop_bit_errors=500", "scheme.qpsk.frame_bits=4096") applied
// after the file, before validation.
Result<RunConfig> LoadRunConfig(const std::string& path,
                                const std::vector<std::string>& overrides);
// Same, from text already in memory (tests); `source_name` is used in messages.
Result<RunConfig> ParseRunConfig(const std::string& text, const std::string& source_name,
                                 const std::vector<std::string>& overrides);

// Range syntax shared by config and CLI: "FROM to TO by STEP" (inclusive,
// STEP > 0, TO >= FROM; the old "START:STEP:STOP" form is refused showing
// the new one) or a comma list "a,b,c". `what` names the key in messages.
Result<std::vector<double>> ParseDbList(const std::string& text, const std::string& what);

// The ParseSourceKind / ToString pair; the message lists the valid words
// ("valid: random, prbs9, prbs15, prbs23, prbs31").
Result<SourceKind> ParseSourceKind(std::string_view word);
std::string ToString(SourceKind kind);

class ResolvedKeys;  // sim/config/key_table.h
// "FILE: KEY = 'VALUE': must be a multiple of m (bits per symbol of MOD)"
// unless m divides the integer value of `key`.
Status CheckMultipleOfBitsPerSymbol(const ResolvedKeys& keys, const char* key,
                                    const Modulation& modulation);

// Every config key with its default, rule and meaning, generated from the key
// tables (printed by `capgap run --help`).
std::string ConfigKeysHelp();

}  // namespace capgap

#endif  // CAPGAP_SIM_CONFIG_H_
