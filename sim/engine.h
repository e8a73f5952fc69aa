// Sweep engine: runs each scheme's Eb/N0 points in order, splitting a point
// into numbered work units that a pool of threads pulls dynamically.
//
// Stopping rule (thread-count independent): units finish in any order, but the
// point's counts are the sum over the *prefix* of units 0..k in index order,
// where k is the first index at which the prefix reaches target_errors bit
// errors or max_bits information bits. Units beyond k that happened to run are
// discarded. Since unit i's counts depend only on (seed, scheme, point, i),
// the counts are bit-identical for any number of threads.
//
// A scheme's sweep ends after its first point whose BER is below ber_floor, or
// that saw no error within max_bits.
#ifndef CAPGAP_SIM_ENGINE_H_
#define CAPGAP_SIM_ENGINE_H_

#include <atomic>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "sim/chain.h"
#include "sim/config.h"
#include "sim/stats.h"

namespace capgap {

enum class StopReason { kTargetErrors, kMaxBits, kInterrupted };
std::string ToString(StopReason reason);

struct PointResult {
  double ebno_db = 0;
  double esno_db = 0;
  UnitCounts counts;
  std::uint64_t units = 0;  // units in the counted prefix
  Interval ber_ci{0, 1};
  Interval fer_ci{0, 1};
  double seconds = 0;
  StopReason stop_reason = StopReason::kTargetErrors;
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
  std::uint64_t target_errors;
  std::uint64_t max_bits;
  double seconds;       // since the point started
  double bits_per_second;  // all bits simulated so far at this point / seconds
};

struct EngineOptions {
  int threads = 0;  // 0: all cores
  std::function<void(const Progress&)> on_progress;  // called from one thread at a time
  double progress_interval_seconds = 0.25;
  // Set (e.g. from a signal handler) to stop as soon as possible; the
  // interrupted point is reported with StopReason::kInterrupted.
  const std::atomic<bool>* interrupt = nullptr;
};

// Runs one point to its stopping rule.
PointResult RunPoint(const Chain& chain, const SweepConfig& sweep, std::uint32_t point_index,
                     double ebno_db, const EngineOptions& options);

// Runs a scheme's sweep (points in order, ber_floor rule).
std::vector<PointResult> RunSweep(const Chain& chain, const SweepConfig& sweep,
                                  const EngineOptions& options);

int ResolveThreadCount(int requested);

}  // namespace capgap

#endif  // CAPGAP_SIM_ENGINE_H_
