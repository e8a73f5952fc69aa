// Checkpoint of a run (format "capgap-checkpoint", version 1): what `capgap
// run --resume` needs to continue a sweep without redoing or double-counting a
// work unit. A text file beside the output, "<output>.ckpt", replaced
// crash-safely (sim/io/atomic_file.h) so the previous good copy survives a kill
// at any instant. Layout, documented in the README ("Long runs"):
//
//   capgap-checkpoint 1
//   state running|complete          complete: the curves file was written
//   seed <u64>
//   kernel_target <word>
//   updated_utc <ISO 8601>
//   config_bytes <n>
//   <n bytes: the resolved configuration of the run that wrote the file>
//   schemes <count>
//   scheme <name> <points>
//   point <i> ebno_db=<%.17g> units=<u> finished=<0|1> stop=<reason>
//         seconds=<%.17g> bits=<u64> bit_errors=<u64> ...   (one line)
//   ...
//   checksum <16 hex digits: FNV-1a 64 of every byte before this line>
//
// A point record holds the counted prefix of the point: units [0, units) in
// index order and the sum of their UnitCounts, every field by name. Units
// finished beyond the prefix when the file was written are not recorded
// (they are recomputed on resume: bounded loss, the work in flight).
#ifndef CAPGAP_SIM_CHECKPOINT_H_
#define CAPGAP_SIM_CHECKPOINT_H_

#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "blocks/core/status.h"
#include "sim/chain/chain.h"
#include "sim/config/config.h"
#include "sim/engine/engine.h"

namespace capgap {

inline constexpr char kCheckpointFormat[] = "capgap-checkpoint";
// Version 2 renamed the sweep keys target_errors -> stop_bit_errors and
// max_bits -> stop_bits (also as stop reasons) and wrote Eb/N0 ranges as
// "FROM to TO by STEP" instead of "START:STEP:STOP". Version 1 files are
// still read: ParseCheckpoint rewrites their stored configuration and stop
// words into version 2 (same points, same meaning), see UpgradeV1ConfigText.
inline constexpr int kCheckpointVersion = 2;

// The stored configuration text of a version 1 checkpoint in version 2
// spelling: in [sweep], 'target_errors = V' -> 'stop_bit_errors = V' and
// 'max_bits = V' -> 'stop_bits = V'; every 'ebno_db = A:S:B' -> 'ebno_db =
// A to B by S' (the same points: both forms expand with the same arithmetic).
// Other lines are kept byte for byte.
std::string UpgradeV1ConfigText(const std::string& text);

// Every field of UnitCounts, by name, in declaration order: the one place that
// serialises them (checkpoint text and MPI messages both use it). The
// structured binding fails to compile when a field is added to UnitCounts, so
// a new field cannot be forgotten here; the sizeof check is a second guard.
inline constexpr std::size_t kUnitCountFields = 7;
static_assert(sizeof(UnitCounts) == 56,
              "UnitCounts changed: update ForEachCountField and kUnitCountFields");
template <typename Counts, typename F>
void ForEachCountField(Counts& c, F&& f) {
  auto& [bits, bit_errors, frames, frame_errors, decoder_iterations, max_decoder_iterations,
         undetected_frame_errors] = c;
  f("bits", bits);
  f("bit_errors", bit_errors);
  f("frames", frames);
  f("frame_errors", frame_errors);
  f("decoder_iterations", decoder_iterations);
  f("max_decoder_iterations", max_decoder_iterations);
  f("undetected_frame_errors", undetected_frame_errors);
}

// Packs / unpacks UnitCounts as kUnitCountFields uint64 words (MPI messages).
void PackCounts(const UnitCounts& c, std::uint64_t* words);
UnitCounts UnpackCounts(const std::uint64_t* words);

struct PointRecord {
  double ebno_db = 0;
  std::uint32_t units = 0;  // counted prefix: units [0, units)
  UnitCounts counts;        // their sum
  bool finished = false;    // the point met its stopping rule
  StopReason stop_reason = StopReason::kInterrupted;
  double seconds = 0;       // wall time spent on the point so far
};

struct SchemeRecord {
  std::string name;
  std::vector<PointRecord> points;  // by point index, from 0, no gaps
};

struct Checkpoint {
  bool complete = false;      // the run finished and its curves file was written
  std::uint64_t seed = 0;
  std::string kernel_target;  // noise kernels of the process that wrote it
  std::string updated_utc;
  std::string config_text;    // resolved configuration (RunConfig::ResolvedText)
  std::vector<SchemeRecord> schemes;

  SchemeRecord* Find(const std::string& name);
  const SchemeRecord* Find(const std::string& name) const;
  // Points with finished = true, over all schemes, and all points recorded.
  std::size_t FinishedPoints() const;
  std::size_t RecordedPoints() const;
};

// "<output>.ckpt".
std::string CheckpointPath(const std::string& output_path);

std::string SerializeCheckpoint(const Checkpoint& c);
// `source` names the file in messages.
Result<Checkpoint> ParseCheckpoint(const std::string& bytes, const std::string& source);

// Crash-safe write (temporary file, fsync, rename, fsync of the directory).
Status WriteCheckpoint(const std::string& path, const Checkpoint& c);

// Largest checkpoint read: 64 MiB (the stored config is at most 4 MiB, a
// point line about 300 bytes).
inline constexpr std::uint64_t kMaxCheckpointBytes = std::uint64_t{64} << 20;
// Reads a regular file of at most kMaxCheckpointBytes (anything else is
// refused without reading it, blocks/core/file_read.h) and parses it.
// ParseCheckpoint never trusts a count: a record whose numbers cannot be the
// sum of real units is refused naming its scheme and point, e.g.
// "x.ckpt: line 14: scheme qpsk point 2: bit_errors = 9 > bits = 8" (also
// frame_errors > frames, undetected > frame errors, frames and bits not both
// zero or both positive, fewer frames than units, frame errors without bit
// errors or beyond them, iteration counts out of range, a non-finite Eb/N0
// or time).
Result<Checkpoint> ReadCheckpoint(const std::string& path);

// The rules that need the built chains: for every recorded point of a scheme
// in `chains`, frames = units x unit_frames and bits = frames x frame_bits.
// Refused as "cannot resume from PATH: scheme S point I: frames = ... !=
// units = ... x F frames per unit".
Status CheckRecordedCounts(const Checkpoint& ckpt, const std::vector<Chain>& chains,
                           const std::string& ckpt_path);

// Whether `cfg` may continue the run recorded in `ckpt` (read from
// `ckpt_path`, named in messages). Refused, naming the key and both values:
// any change of a key its key table marks fixed (OnResume, key_table.h), a
// scheme of the checkpoint missing from the config, sweep.seed, the Eb/N0 of
// a recorded point, a decrease of stop_bit_errors, of a scheme's
// stop_frame_errors (sweep or scheme key) or of stop_bits. An unset error
// target counts as infinite: setting one where there was none is a
// decrease, removing one a raise. Free (extension) keys: stop_bit_errors,
// stop_frame_errors and stop_bits upwards (a raised target continues the
// same streams from the recorded prefix), ebno_db points appended (or
// dropped at the end), ber_floor, target_ber, target_fer, threads,
// checkpoint_seconds; new schemes run from scratch.
Status CheckResumable(const Checkpoint& ckpt, const RunConfig& cfg, const std::string& ckpt_path);

}  // namespace capgap

#endif  // CAPGAP_SIM_CHECKPOINT_H_
