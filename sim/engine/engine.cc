// Sweep engine: dynamic pull of work units by a thread pool (and by other
// processes through a UnitExchange), prefix-in-order stopping decision,
// progress and checkpoint callbacks from the calling thread.
//
// Threads: `threads` workers only simulate units and absorb them into the
// shared PointState under its mutex; the thread that called RunPoint
// supervises (interrupt flag, exchange polling, progress, checkpoints) and
// sleeps on a condition variable in between, so callbacks never stall a
// worker and a slow checkpoint write costs no simulation time.
#include "sim/engine/engine.h"

#include <chrono>
#include <algorithm>
#include <condition_variable>
#include <limits>
#include <map>
#include <mutex>
#include <optional>
#include <thread>

#include "blocks/core/types.h"

namespace capgap {

std::string ToString(StopReason reason) {
  switch (reason) {
    case StopReason::kStopBitErrors: return "stop_bit_errors";
    case StopReason::kStopBits: return "stop_bits";
    case StopReason::kInterrupted: return "interrupted";
    case StopReason::kStopFrameErrors: return "stop_frame_errors";
  }
  return "unknown";
}

Result<StopReason> ParseStopReason(const std::string& word) {
  for (StopReason r : {StopReason::kStopBitErrors, StopReason::kStopFrameErrors, StopReason::kStopBits,
                       StopReason::kInterrupted}) {
    if (word == ToString(r)) return r;
  }
  return Status::Error("stop reason '" + word +
                       "': valid: stop_bit_errors, stop_frame_errors, stop_bits, interrupted");
}

int ResolveThreadCount(int requested) {
  if (requested > 0) return requested;
  const unsigned hw = std::thread::hardware_concurrency();
  return hw == 0 ? 1 : static_cast<int>(hw);
}

std::unique_ptr<const Channel> MakePointChannel(const Chain& chain, double ebno_db) {
  return chain.MakePointChannel(ebno_db);
}

bool StopRuleMet(const UnitCounts& counts, const SweepConfig& sweep, StopReason* reason) {
  if (sweep.stop_bit_errors > 0 && counts.bit_errors >= sweep.stop_bit_errors) {
    *reason = StopReason::kStopBitErrors;
    return true;
  }
  if (sweep.stop_frame_errors > 0 && counts.frame_errors >= sweep.stop_frame_errors) {
    *reason = StopReason::kStopFrameErrors;
    return true;
  }
  if (counts.bits >= sweep.stop_bits) {
    *reason = StopReason::kStopBits;
    return true;
  }
  return false;
}

bool SweepEndsAfter(const PointResult& r, const SweepConfig& sweep) {
  return r.counts.bit_errors == 0 || r.ber() < sweep.ber_floor;
}

namespace {

using Clock = std::chrono::steady_clock;

double SecondsSince(Clock::time_point t0) {
  return std::chrono::duration<double>(Clock::now() - t0).count();
}

// Shared state of one point. Workers take unit indices from `next_unit`;
// completed units wait in `pending` until the prefix reaches them.
class PointState final : public PointControl {
 public:
  PointState(const SweepConfig& sweep, const PointStart& start)
      : sweep_(sweep), next_unit(start.units), prefix_end(start.units), prefix(start.counts) {}

  Range Claim(std::uint32_t count) override {
    if (count == 0 || done_flag.load(std::memory_order_acquire)) return {};
    const std::uint32_t first = next_unit.fetch_add(count, std::memory_order_relaxed);
    CAPGAP_DCHECK(first + count > first);  // unit indices are 32-bit
    return {first, count};
  }
  void Deliver(std::uint32_t unit, const UnitCounts& counts) override {
    std::lock_guard<std::mutex> lock(mu);
    AbsorbLocked(unit, counts);
  }
  bool done() const override { return done_flag.load(std::memory_order_acquire); }
  std::int64_t EstimatedUnclaimedUnits() override {
    std::lock_guard<std::mutex> lock(mu);
    if (prefix_end == 0) return -1;
    const double units = prefix_end;
    double need = std::numeric_limits<double>::infinity();
    // Units still needed to reach `target` (0: no such target) at the
    // prefix's rate of `have` per unit.
    const auto units_to = [&](std::uint64_t target, std::uint64_t have) {
      if (target == 0 || have == 0) return std::numeric_limits<double>::infinity();
      return static_cast<double>(target - std::min(target, have)) * units / static_cast<double>(have);
    };
    need = std::min(units_to(sweep_.stop_bit_errors, prefix.bit_errors),
                    units_to(sweep_.stop_frame_errors, prefix.frame_errors));
    if (prefix.bits > 0) {
      need = std::min(need, static_cast<double>(sweep_.stop_bits - std::min(sweep_.stop_bits, prefix.bits)) *
                                units / static_cast<double>(prefix.bits));
    }
    const double unclaimed = units + need - next_unit.load(std::memory_order_relaxed);
    return unclaimed > 0 ? static_cast<std::int64_t>(std::min(unclaimed, 1e15)) : 0;
  }

  // REQUIRES: mu held. Adds a finished unit, advances the counted prefix in
  // index order and applies the stopping rule after each unit it absorbs.
  void AbsorbLocked(std::uint32_t unit, const UnitCounts& counts) {
    all += counts;
    ++simulated;
    if (done_flag.load(std::memory_order_relaxed)) return;
    CAPGAP_DCHECK(unit >= prefix_end);
    pending.emplace(unit, counts);
    for (auto it = pending.find(prefix_end); it != pending.end(); it = pending.find(prefix_end)) {
      prefix += it->second;
      pending.erase(it);
      ++prefix_end;
      StopReason r;
      if (StopRuleMet(prefix, sweep_, &r)) {
        FinishLocked(r);
        break;
      }
    }
  }
  // REQUIRES: mu held.
  void FinishLocked(StopReason r) {
    if (done_flag.load(std::memory_order_relaxed)) return;
    reason = r;
    done_flag.store(true, std::memory_order_release);
    cv.notify_all();
  }

 private:
  const SweepConfig& sweep_;

 public:
  std::mutex mu;
  std::condition_variable cv;
  std::atomic<std::uint32_t> next_unit;
  std::atomic<bool> done_flag{false};
  std::map<std::uint32_t, UnitCounts> pending;
  std::uint32_t prefix_end;  // units [0, prefix_end) are counted
  UnitCounts prefix;
  UnitCounts all;  // every unit finished in this call, for the speed figure
  std::uint64_t simulated = 0;
  StopReason reason = StopReason::kStopBitErrors;
};

}  // namespace

PointResult RunPoint(const Chain& chain, const SweepConfig& sweep, std::uint32_t point_index,
                     double ebno_db, const EngineOptions& options, const PointStart& start) {
  const auto t0 = Clock::now();
  const std::unique_ptr<const Channel> point_channel = MakePointChannel(chain, ebno_db);
  const Channel& channel = *point_channel;
  PointState st(sweep, start);
  StopReason start_reason;
  const bool already_done = StopRuleMet(start.counts, sweep, &start_reason);
  if (already_done) {
    std::lock_guard<std::mutex> lock(st.mu);
    st.FinishLocked(start_reason);
  }
  const auto interrupted = [&] {
    return options.interrupt && options.interrupt->load(std::memory_order_relaxed);
  };

  auto worker = [&]() {
    ChainWorkspace ws = chain.MakeWorkspace();
    while (!st.done()) {
      if (interrupted()) {
        std::lock_guard<std::mutex> lock(st.mu);
        st.FinishLocked(StopReason::kInterrupted);
        break;
      }
      const std::uint32_t unit = st.next_unit.fetch_add(1, std::memory_order_relaxed);
      // Abandoned once the point is decided: by the stopping rule (the unit
      // lies beyond the deciding one and would be discarded) or by the
      // interrupt flag, which the supervisor turns into done within a tick.
      // An abandoned unit never reaches the counted prefix.
      const std::optional<UnitCounts> counts =
          chain.RunUnitUnlessStopped(channel, point_index, unit, ws, &st.done_flag);
      if (!counts) break;
      std::lock_guard<std::mutex> lock(st.mu);
      st.AbsorbLocked(unit, *counts);
    }
  };

  std::vector<std::thread> pool;
  if (!already_done) {
    const int threads = ResolveThreadCount(options.threads);
    pool.reserve(static_cast<std::size_t>(threads));
    for (int t = 0; t < threads; ++t) pool.emplace_back(worker);
  }

  // Supervise until the point is decided.
  // Wake often enough for the exchange, the checkpoint and progress timers
  // and the interrupt flag (workers also see it between units).
  double tick = options.exchange ? options.exchange->poll_interval_seconds() : 0.05;
  if (options.on_checkpoint && options.checkpoint_interval_seconds > 0) {
    tick = std::min(tick, options.checkpoint_interval_seconds);
  }
  if (options.on_progress) tick = std::min(tick, options.progress_interval_seconds);
  const auto tick_duration = std::chrono::duration_cast<Clock::duration>(
      std::chrono::duration<double>(tick));
  auto last_progress = t0;
  auto last_checkpoint = t0;
  {
    std::unique_lock<std::mutex> lock(st.mu);
    while (!st.done()) {
      st.cv.wait_for(lock, tick_duration);
      if (st.done()) break;
      if (interrupted()) {
        st.FinishLocked(StopReason::kInterrupted);
        break;
      }
      const auto now = Clock::now();
      const double secs = std::chrono::duration<double>(now - t0).count();
      const bool progress_due =
          options.on_progress &&
          std::chrono::duration<double>(now - last_progress).count() >= options.progress_interval_seconds;
      const bool checkpoint_due =
          options.on_checkpoint && options.checkpoint_interval_seconds > 0 &&
          std::chrono::duration<double>(now - last_checkpoint).count() >=
              options.checkpoint_interval_seconds;
      const UnitCounts prefix = st.prefix;
      const std::uint32_t prefix_end = st.prefix_end;
      const std::uint64_t all_bits = st.all.bits;
      lock.unlock();
      bool keep_going = true;
      if (options.exchange) keep_going = options.exchange->Poll(st);
      if (progress_due) {
        last_progress = now;
        Progress p{&chain.scheme().name, point_index, sweep.ebno_db.size(), ebno_db, prefix,
                   sweep.stop_bit_errors, sweep.stop_frame_errors, sweep.stop_bits, start.seconds + secs,
                   secs > 0 ? static_cast<double>(all_bits) / secs : 0.0};
        options.on_progress(p);
      }
      if (checkpoint_due) {
        options.on_checkpoint(PointSnapshot{point_index, prefix_end, prefix, start.seconds + secs});
        // Measured from the end of the write, so a slow disk cannot make
        // checkpoints back to back.
        last_checkpoint = Clock::now();
      }
      lock.lock();
      if (!keep_going) st.FinishLocked(StopReason::kInterrupted);
    }
  }
  for (auto& th : pool) th.join();

  PointResult r;
  r.ebno_db = ebno_db;
  r.esno_db = channel.level().esno_db;
  r.counts = st.prefix;
  r.units = st.prefix_end;
  r.stop_reason = st.reason;
  r.units_simulated = st.simulated;
  if (r.counts.bits > 0) {
    r.ber_ci = ClopperPearson(r.counts.bit_errors, r.counts.bits);
    r.fer_ci = ClopperPearson(r.counts.frame_errors, r.counts.frames);
  }
  r.seconds = start.seconds + SecondsSince(t0);
  return r;
}

std::vector<PointResult> RunSweep(const Chain& chain, const SweepConfig& sweep,
                                  const EngineOptions& options) {
  std::vector<PointResult> results;
  for (std::size_t i = 0; i < sweep.ebno_db.size(); ++i) {
    PointResult r = RunPoint(chain, sweep, static_cast<std::uint32_t>(i), sweep.ebno_db[i], options);
    results.push_back(r);
    if (r.stop_reason == StopReason::kInterrupted) break;
    if (SweepEndsAfter(r, sweep)) break;
  }
  return results;
}

}  // namespace capgap
