// Sweep engine: runs each scheme's Eb/N0 points in order, splitting a point
// into numbered work units that a pool of threads (and, through a
// UnitExchange, other processes) pulls dynamically.
//
// Stopping rule (thread- and process-count independent): units finish in any
// order, but the point's counts are the sum over the *prefix* of units 0..k in
// index order, where k is the first index at which the prefix reaches
// stop_bit_errors bit errors (if set), stop_frame_errors frame errors (if set)
// or stop_bits information bits, whichever happens first. Units beyond k that
// happened to run are discarded. Since unit i's counts depend only on (seed,
// scheme, point, i), the counts are bit-identical for any number of threads
// or processes.
//
// Resuming: a point may start from a counted prefix saved earlier (PointStart:
// units [0, u) and their sum). Work then continues at unit u with the rule
// applied unit by unit from there, which gives exactly the counts of an
// uninterrupted run as long as stop_bit_errors, stop_frame_errors and stop_bits
// did not decrease (an unset error target counts as infinite)
// (the saved prefix never met the rule at any earlier unit). The counted
// prefix is offered to a checkpoint callback at a fixed interval.
//
// A scheme's sweep ends after its first point whose BER is below ber_floor, or
// that saw no error within stop_bits.
#ifndef CAPGAP_SIM_ENGINE_H_
#define CAPGAP_SIM_ENGINE_H_

#include <atomic>
#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "blocks/channel/channel.h"
#include "sim/chain/chain.h"
#include "sim/config/config.h"
#include "sim/engine/stats.h"
#include "sim/engine/unit_counts.h"

namespace capgap {

struct PointResult {
  double ebno_db = 0;
  double esno_db = 0;
  UnitCounts counts;
  std::uint64_t units = 0;  // units in the counted prefix
  Interval ber_ci{0, 1};
  Interval fer_ci{0, 1};
  double seconds = 0;  // wall time spent on the point, all sessions together
  StopReason stop_reason = StopReason::kStopBitErrors;
  // Units simulated by this call (counted or discarded; 0 when a saved prefix
  // already met the rule). Says how much a resume or extension had to redo.
  std::uint64_t units_simulated = 0;
  double ber() const {
    return counts.bits ? static_cast<double>(counts.bit_errors) / static_cast<double>(counts.bits) : 0;
  }
  double fer() const {
    return counts.frames ? static_cast<double>(counts.frame_errors) / static_cast<double>(counts.frames)
                         : 0;
  }
};

struct Progress {
  const std::string* scheme;
  std::size_t point_index;
  std::size_t point_count;
  double ebno_db;
  UnitCounts counts;  // counted prefix so far
  std::uint64_t stop_bit_errors;      // 0: none
  std::uint64_t stop_frame_errors;  // 0: none
  std::uint64_t stop_bits;
  double seconds;          // spent on the point so far (saved sessions included)
  double bits_per_second;  // bits simulated in this session / its duration
};

// Where a point's counting starts: nothing, or the counted prefix of an earlier
// session of the same point.
struct PointStart {
  std::uint32_t units = 0;  // units [0, units) are already counted ...
  UnitCounts counts;        // ... and sum to this
  double seconds = 0;       // time already spent on the point
};

// The counted prefix of a running point, handed to the checkpoint callback.
struct PointSnapshot {
  std::uint32_t point_index = 0;
  std::uint32_t units = 0;
  UnitCounts counts;
  double seconds = 0;  // saved sessions included
};

// A running point as seen by a UnitExchange: ranges of unit indices can be
// claimed for computation elsewhere, and their counts delivered back.
class PointControl {
 public:
  struct Range {
    std::uint32_t first = 0;
    std::uint32_t count = 0;
  };
  // Claims the next `count` unit indices (contiguous; local threads take
  // others). Returns count 0 once the point is decided.
  virtual Range Claim(std::uint32_t count) = 0;
  // Counts of a claimed unit, in any order.
  virtual void Deliver(std::uint32_t unit, const UnitCounts& counts) = 0;
  virtual bool done() const = 0;
  // Estimate of the units still to be claimed before the rule is met, from
  // the counted prefix's error and bit rates (-1 while nothing is counted).
  // Lets the exchange shrink ranges near the end of a point (guided
  // scheduling), so little work is simulated beyond the stopping unit.
  virtual std::int64_t EstimatedUnclaimedUnits() = 0;

 protected:
  ~PointControl() = default;
};

// Lets work units of a point be computed outside this process (sim/mpi_*).
// RunPoint calls Poll from its calling thread every poll_interval_seconds()
// while the point runs; Poll returning false stops the point as interrupted
// (e.g. a lost rank). Not called per frame.
class UnitExchange {
 public:
  virtual ~UnitExchange() = default;
  virtual bool Poll(PointControl& point) = 0;
  virtual double poll_interval_seconds() const { return 0.001; }
};

struct EngineOptions {
  int threads = 0;  // 0: all cores
  std::function<void(const Progress&)> on_progress;  // from RunPoint's calling thread
  double progress_interval_seconds = 0.25;
  // Set (e.g. from a signal handler) to stop as soon as possible; the
  // interrupted point is reported with StopReason::kInterrupted and its
  // counted prefix. The supervising thread sees it within a tick (50 ms at
  // most) and marks the point done; workers then abandon the units they
  // are simulating (Chain::RunUnitUnlessStopped looks before every frame or
  // decoder batch), whose partial counts are dropped, so a stop during a
  // long unit takes about a frame, not the rest of the unit.
  const std::atomic<bool>* interrupt = nullptr;
  // Called from RunPoint's calling thread every checkpoint_interval_seconds
  // (0: never) with the counted prefix, while worker threads keep running.
  std::function<void(const PointSnapshot&)> on_checkpoint;
  double checkpoint_interval_seconds = 0;
  UnitExchange* exchange = nullptr;  // other processes taking units, or none
};

// The channel of a point (the only place a point's Eb/N0 becomes noise).
std::unique_ptr<const Channel> MakePointChannel(const Chain& chain, double ebno_db);

// True, with the reason, when `counts` meets the stopping rule of `sweep`
// (stop_bit_errors checked first, then stop_frame_errors, then stop_bits, as
// unit by unit in RunPoint).
bool StopRuleMet(const UnitCounts& counts, const SweepConfig& sweep, StopReason* reason);

// Runs one point to its stopping rule, starting from `start`. If the start
// prefix already meets the rule, returns it at once (units_simulated = 0).
PointResult RunPoint(const Chain& chain, const SweepConfig& sweep, std::uint32_t point_index,
                     double ebno_db, const EngineOptions& options, const PointStart& start = {});

// True when a scheme's sweep ends after point `r` (no error within stop_bits,
// or BER below ber_floor).
bool SweepEndsAfter(const PointResult& r, const SweepConfig& sweep);

// Runs a scheme's sweep (points in order, ber_floor rule).
std::vector<PointResult> RunSweep(const Chain& chain, const SweepConfig& sweep,
                                  const EngineOptions& options);

int ResolveThreadCount(int requested);

}  // namespace capgap

#endif  // CAPGAP_SIM_ENGINE_H_
