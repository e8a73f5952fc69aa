// One `capgap run` session over every scheme of a config, continuing from a
// checkpoint when there is one: points run in order with the ber_floor rule,
// each starting from its recorded counted prefix, and the checkpoint is
// rewritten every checkpoint_seconds while a point runs, after every point and
// when the session stops early.
//
// Resume and extension give the counts of an uninterrupted run of the final
// config: a recorded prefix is reused as it is when it already meets the
// (possibly raised) stopping rule, and continued unit by unit otherwise;
// appended points and new schemes start at unit 0; the scheme-ending rule
// (no error, BER below ber_floor) is re-applied to the final counts, so a
// scheme that ended early under old settings goes on if it no longer would.
// CheckResumable (sim/io/checkpoint.h) must have accepted the config first.
#ifndef CAPGAP_SIM_SWEEP_SESSION_H_
#define CAPGAP_SIM_SWEEP_SESSION_H_

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "sim/chain/chain.h"
#include "sim/io/checkpoint.h"
#include "sim/config/config.h"
#include "sim/engine/engine.h"

namespace capgap {

struct SessionOptions {
  // threads, interrupt, progress, exchange; the session sets the checkpoint
  // callback and interval (from sweep.checkpoint_seconds).
  EngineOptions engine;
  std::string checkpoint_path;  // where the checkpoint is written (required)
  std::string kernel_target;    // recorded in the checkpoint
  // Before a point starts (scheme index in cfg.schemes, point index); lets an
  // MPI coordinator switch its workers to it.
  std::function<void(std::size_t scheme, std::uint32_t point)> on_point_begin;
  std::function<void(const std::string& scheme, std::size_t point, std::size_t points,
                     const PointResult& r)> on_point_done;
  // A checkpoint write that failed while the run goes on (the run keeps its
  // last good checkpoint).
  std::function<void(const std::string& message)> on_warning;
};

enum class SessionEnd { kComplete, kInterrupted, kFailed };

struct SessionResult {
  SessionEnd end = SessionEnd::kFailed;
  Status status;                                 // kFailed: why
  std::vector<std::vector<PointResult>> points;  // per scheme (cfg order), the points of the curve
  std::uint64_t units_counted = 0;    // units in the counted prefixes of those points
  std::uint64_t units_reused = 0;     // of which taken from the checkpoint
  std::uint64_t units_simulated = 0;  // simulated in this session (counted or discarded)
};

// Runs (or continues) every scheme of `cfg`; `ckpt` is the checkpoint to
// continue (empty for a fresh run) and is updated in place. The checkpoint is
// written at the start of the session (so it always describes this config),
// periodically, after each point and at an early stop. Never marks the
// checkpoint complete: the caller does, after writing the curves file.
SessionResult RunSession(const std::vector<Chain>& chains, const RunConfig& cfg, Checkpoint& ckpt,
                         const SessionOptions& options);

}  // namespace capgap

#endif  // CAPGAP_SIM_SWEEP_SESSION_H_
