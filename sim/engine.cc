// Sweep engine: dynamic pull of work units by a thread pool, prefix-in-order
// stopping decision, progress reporting.
#include "sim/engine.h"

#include <chrono>
#include <map>
#include <mutex>
#include <thread>

namespace capgap {

std::string ToString(StopReason reason) {
  switch (reason) {
    case StopReason::kTargetErrors: return "target_errors";
    case StopReason::kMaxBits: return "max_bits";
    case StopReason::kInterrupted: return "interrupted";
  }
  return "unknown";
}

int ResolveThreadCount(int requested) {
  if (requested > 0) return requested;
  const unsigned hw = std::thread::hardware_concurrency();
  return hw == 0 ? 1 : static_cast<int>(hw);
}

namespace {

using Clock = std::chrono::steady_clock;

double SecondsSince(Clock::time_point t0) {
  return std::chrono::duration<double>(Clock::now() - t0).count();
}

// Shared state of one point. Workers take unit indices from `next_unit`;
// completed units wait in `pending` until the prefix reaches them.
struct PointState {
  std::mutex mu;
  std::atomic<std::uint32_t> next_unit{0};
  std::atomic<bool> done{false};
  std::map<std::uint32_t, UnitCounts> pending;
  std::uint32_t prefix_end = 0;  // units [0, prefix_end) are counted
  UnitCounts prefix;
  UnitCounts all;  // every finished unit, for the speed figure
  StopReason reason = StopReason::kTargetErrors;
  Clock::time_point last_progress;
};

}  // namespace

PointResult RunPoint(const Chain& chain, const SweepConfig& sweep, std::uint32_t point_index,
                     double ebno_db, const EngineOptions& options) {
  const auto t0 = Clock::now();
  NoiseSpec spec;
  spec.ebn0_db = ebno_db;
  spec.code_rate = chain.code_rate();
  spec.bits_per_symbol = chain.mapper().bits_per_symbol();
  spec.samples_per_symbol = chain.samples_per_symbol();
  const AwgnChannel channel(spec);

  PointState st;
  st.last_progress = t0;
  const int threads = ResolveThreadCount(options.threads);

  auto worker = [&]() {
    ChainWorkspace ws = chain.MakeWorkspace();
    while (!st.done.load(std::memory_order_acquire)) {
      if (options.interrupt && options.interrupt->load(std::memory_order_relaxed)) {
        std::lock_guard<std::mutex> lock(st.mu);
        if (!st.done.load()) {
          st.reason = StopReason::kInterrupted;
          st.done.store(true, std::memory_order_release);
        }
        break;
      }
      const std::uint32_t unit = st.next_unit.fetch_add(1, std::memory_order_relaxed);
      const UnitCounts counts = chain.RunUnit(channel, point_index, unit, ws);
      std::lock_guard<std::mutex> lock(st.mu);
      st.all += counts;
      if (st.done.load(std::memory_order_relaxed)) break;
      st.pending.emplace(unit, counts);
      // Advance the counted prefix in index order and apply the stopping rule
      // after each unit it absorbs.
      for (auto it = st.pending.find(st.prefix_end); it != st.pending.end();
           it = st.pending.find(st.prefix_end)) {
        st.prefix += it->second;
        st.pending.erase(it);
        ++st.prefix_end;
        if (st.prefix.bit_errors >= sweep.target_errors) {
          st.reason = StopReason::kTargetErrors;
          st.done.store(true, std::memory_order_release);
          break;
        }
        if (st.prefix.bits >= sweep.max_bits) {
          st.reason = StopReason::kMaxBits;
          st.done.store(true, std::memory_order_release);
          break;
        }
      }
      if (options.on_progress && !st.done.load(std::memory_order_relaxed)) {
        const auto now = Clock::now();
        if (std::chrono::duration<double>(now - st.last_progress).count() >=
            options.progress_interval_seconds) {
          st.last_progress = now;
          const double secs = SecondsSince(t0);
          Progress p{&chain.scheme().name, point_index, sweep.ebno_db.size(), ebno_db, st.prefix,
                     sweep.target_errors, sweep.max_bits, secs,
                     secs > 0 ? static_cast<double>(st.all.bits) / secs : 0.0};
          options.on_progress(p);
        }
      }
    }
  };

  if (threads == 1) {
    worker();
  } else {
    std::vector<std::thread> pool;
    pool.reserve(static_cast<std::size_t>(threads));
    for (int t = 0; t < threads; ++t) pool.emplace_back(worker);
    for (auto& th : pool) th.join();
  }

  PointResult r;
  r.ebno_db = ebno_db;
  r.esno_db = channel.level().esn0_db;
  r.counts = st.prefix;
  r.units = st.prefix_end;
  r.stop_reason = st.reason;
  if (r.counts.bits > 0) {
    r.ber_ci = ClopperPearson(r.counts.bit_errors, r.counts.bits);
    r.fer_ci = ClopperPearson(r.counts.frame_errors, r.counts.frames);
  }
  r.seconds = SecondsSince(t0);
  return r;
}

std::vector<PointResult> RunSweep(const Chain& chain, const SweepConfig& sweep,
                                  const EngineOptions& options) {
  std::vector<PointResult> results;
  for (std::size_t i = 0; i < sweep.ebno_db.size(); ++i) {
    PointResult r = RunPoint(chain, sweep, static_cast<std::uint32_t>(i), sweep.ebno_db[i], options);
    results.push_back(r);
    if (r.stop_reason == StopReason::kInterrupted) break;
    if (r.counts.bit_errors == 0) break;  // no error within max_bits
    if (r.ber() < sweep.ber_floor) break;
  }
  return results;
}

}  // namespace capgap
