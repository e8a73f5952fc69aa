// MPI coordinator (rank 0) and worker loop (other ranks); see mpi_run.h for
// the protocol. Only the thread that called MPI_Init_thread makes MPI calls:
// on rank 0 that is RunPoint's supervising thread (UnitExchange::Poll), on the
// workers the main loop below; compute threads never touch MPI.
#include "sim/mpi/mpi_run.h"

#include <mpi.h>

#include <algorithm>
#include <atomic>
#include <cmath>
#include <condition_variable>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <deque>
#include <list>
#include <memory>
#include <mutex>
#include <optional>
#include <thread>

#include "sim/io/checkpoint.h"

namespace capgap {
namespace {

using Clock = std::chrono::steady_clock;

constexpr int kTagReport = 1;
constexpr int kTagAssign = 2;
constexpr int kTagCancel = 3;
constexpr int kTagStop = 4;
constexpr int kTagBye = 5;
constexpr std::uint64_t kNone = UINT64_MAX;
constexpr std::size_t kReportHeader = 4;                       // scheme, point, want, n
constexpr std::size_t kResultWords = 1 + kUnitCountFields;     // unit, counts
constexpr double kRangeSeconds = 0.1;       // work per requested range
constexpr double kBatchSeconds = 0.005;     // finished units wait at most this long
constexpr double kHeartbeatSeconds = 1.0;   // a worker reports at least this often
constexpr double kSilenceSeconds = 60.0;    // rank 0 declares a silent rank lost
constexpr double kStopWaitSeconds = 10.0;   // a signalled worker waits this long for STOP
constexpr std::uint32_t kMaxRange = 65536;
constexpr std::uint64_t kFirstRange = 16;   // until the point's rates are known
constexpr auto kPollSleep = std::chrono::milliseconds(1);

double Seconds(Clock::duration d) { return std::chrono::duration<double>(d).count(); }

// Non-blocking sends whose buffers live until MPI is done with them.
class SendQueue {
 public:
  void Send(int rank, int tag, std::vector<std::uint64_t> words) {
    auto item = std::make_unique<Item>();
    item->words = std::move(words);
    MPI_Isend(item->words.data(), static_cast<int>(item->words.size()), MPI_UINT64_T, rank, tag,
              MPI_COMM_WORLD, &item->request);
    items_.push_back(std::move(item));
  }
  void Reap() {
    for (auto it = items_.begin(); it != items_.end();) {
      int done = 0;
      if (MPI_Test(&(*it)->request, &done, MPI_STATUS_IGNORE) != MPI_SUCCESS || done) {
        it = items_.erase(it);
      } else {
        ++it;
      }
    }
  }
  bool empty() const { return items_.empty(); }
  // Polls until every send completed or `seconds` passed.
  bool Drain(double seconds) {
    const auto t0 = Clock::now();
    for (Reap(); !items_.empty(); Reap()) {
      if (Seconds(Clock::now() - t0) > seconds) return false;
      std::this_thread::sleep_for(kPollSleep);
    }
    return true;
  }

 private:
  struct Item {
    std::vector<std::uint64_t> words;
    MPI_Request request;
  };
  std::list<std::unique_ptr<Item>> items_;
};

// Receives the message MPI_Iprobe found.
std::vector<std::uint64_t> Receive(const MPI_Status& probe) {
  int count = 0;
  MPI_Get_count(&probe, MPI_UINT64_T, &count);
  std::vector<std::uint64_t> words(static_cast<std::size_t>(std::max(count, 0)));
  MPI_Recv(words.data(), count, MPI_UINT64_T, probe.MPI_SOURCE, probe.MPI_TAG, MPI_COMM_WORLD,
           MPI_STATUS_IGNORE);
  return words;
}

bool Probe(int source, MPI_Status* status) {
  int flag = 0;
  return MPI_Iprobe(source, MPI_ANY_TAG, MPI_COMM_WORLD, &flag, status) == MPI_SUCCESS && flag;
}

// A worker rank's compute threads: take units from the queue of ranges of the
// current point, put their counts in the outbox. Switching the point (or to
// none) empties both; units of the old point still running are abandoned at
// their next frame (each generation has its own drop flag, which Switch
// raises), so a cancelled point or a signal frees the threads within a frame
// or decoder batch instead of a whole unit.
class WorkerPool {
 public:
  using Result = std::pair<std::uint32_t, UnitCounts>;

  WorkerPool(const std::vector<Chain>& chains, const RunConfig& cfg, int threads)
      : chains_(chains), cfg_(cfg) {
    for (int t = 0; t < threads; ++t) threads_.emplace_back([this] { Loop(); });
  }
  ~WorkerPool() {
    {
      std::lock_guard<std::mutex> lock(mu_);
      stop_ = true;
      drop_->store(true, std::memory_order_relaxed);
    }
    cv_.notify_all();
    for (auto& t : threads_) t.join();
  }

  void Switch(std::uint64_t scheme, std::uint64_t point) {
    std::shared_ptr<const Channel> channel;
    if (scheme != kNone) {
      channel = MakePointChannel(chains_[scheme], cfg_.schemes[scheme].ebno_db[point]);
    }
    std::lock_guard<std::mutex> lock(mu_);
    drop_->store(true, std::memory_order_relaxed);
    drop_ = std::make_shared<std::atomic<bool>>(false);
    ++generation_;
    scheme_ = scheme;
    point_ = point;
    channel_ = std::move(channel);
    queue_.clear();
    queued_ = 0;
    outbox_.clear();
  }
  void Add(std::uint32_t first, std::uint32_t count) {
    {
      std::lock_guard<std::mutex> lock(mu_);
      queue_.push_back({first, count});
      queued_ += count;
    }
    cv_.notify_all();
  }
  std::uint64_t scheme() {
    std::lock_guard<std::mutex> lock(mu_);
    return scheme_;
  }
  std::uint64_t point() {
    std::lock_guard<std::mutex> lock(mu_);
    return point_;
  }
  std::uint64_t queued() {
    std::lock_guard<std::mutex> lock(mu_);
    return queued_;
  }
  std::size_t results() {
    std::lock_guard<std::mutex> lock(mu_);
    return outbox_.size();
  }
  double unit_seconds() {
    std::lock_guard<std::mutex> lock(mu_);
    return unit_seconds_;
  }
  // Results so far with the point they belong to.
  std::vector<Result> Take(std::uint64_t* scheme, std::uint64_t* point) {
    std::lock_guard<std::mutex> lock(mu_);
    *scheme = scheme_;
    *point = point_;
    std::vector<Result> out;
    out.swap(outbox_);
    return out;
  }

 private:
  void Loop() {
    std::vector<std::optional<ChainWorkspace>> ws(chains_.size());
    std::unique_lock<std::mutex> lock(mu_);
    while (true) {
      cv_.wait(lock, [&] { return stop_ || !queue_.empty(); });
      if (stop_) return;
      PointControl::Range& r = queue_.front();
      const std::uint32_t unit = r.first++;
      if (--r.count == 0) queue_.pop_front();
      --queued_;
      const std::uint64_t generation = generation_;
      const std::size_t scheme = static_cast<std::size_t>(scheme_);
      const auto point = static_cast<std::uint32_t>(point_);
      const std::shared_ptr<const Channel> channel = channel_;
      const std::shared_ptr<const std::atomic<bool>> drop = drop_;
      lock.unlock();
      if (!ws[scheme]) ws[scheme].emplace(chains_[scheme].MakeWorkspace());
      const auto t0 = Clock::now();
      const std::optional<UnitCounts> counts =
          chains_[scheme].RunUnitUnlessStopped(*channel, point, unit, *ws[scheme], drop.get());
      const double dt = Seconds(Clock::now() - t0);
      lock.lock();
      if (!counts) continue;  // abandoned: its point was switched away
      if (generation == generation_) outbox_.emplace_back(unit, *counts);
      unit_seconds_ = unit_seconds_ == 0 ? dt : 0.8 * unit_seconds_ + 0.2 * dt;
    }
  }

  const std::vector<Chain>& chains_;
  const RunConfig& cfg_;
  std::mutex mu_;
  std::condition_variable cv_;
  bool stop_ = false;
  std::uint64_t generation_ = 0;
  std::uint64_t scheme_ = kNone, point_ = kNone;
  std::shared_ptr<const Channel> channel_;
  // Raised when the generation ends (Switch, destruction): its units stop.
  std::shared_ptr<std::atomic<bool>> drop_ = std::make_shared<std::atomic<bool>>(false);
  std::deque<PointControl::Range> queue_;
  std::uint64_t queued_ = 0;
  std::vector<Result> outbox_;
  double unit_seconds_ = 0;  // per unit per thread, smoothed
  std::vector<std::thread> threads_;
};

}  // namespace

bool LaunchedByMpi() {
  for (const char* var : {"OMPI_COMM_WORLD_SIZE", "PMI_SIZE", "PMIX_RANK", "PMI_RANK"}) {
    if (std::getenv(var)) return true;
  }
  return false;
}

// ------------------------------------------------------------------ world
Result<std::unique_ptr<MpiWorld>> MpiWorld::Init(int* argc, char*** argv) {
  int provided = 0;
  if (MPI_Init_thread(argc, argv, MPI_THREAD_FUNNELED, &provided) != MPI_SUCCESS) {
    return Status::Error("MPI_Init_thread failed");
  }
  std::unique_ptr<MpiWorld> world(new MpiWorld());
  if (provided < MPI_THREAD_FUNNELED) {
    return Status::Error("the MPI library does not support threads (MPI_THREAD_FUNNELED)");
  }
  // Errors come back as codes (checked where they matter) instead of
  // aborting the job inside a call.
  MPI_Comm_set_errhandler(MPI_COMM_WORLD, MPI_ERRORS_RETURN);
  MPI_Comm_rank(MPI_COMM_WORLD, &world->rank_);
  MPI_Comm_size(MPI_COMM_WORLD, &world->size_);
  return world;
}

MpiWorld::~MpiWorld() { MPI_Finalize(); }

void MpiWorld::ShareConfig(std::string* text) {
  std::uint64_t size = rank_ == 0 ? text->size() : 0;
  MPI_Bcast(&size, 1, MPI_UINT64_T, 0, MPI_COMM_WORLD);
  if (rank_ != 0) text->assign(static_cast<std::size_t>(size), '\0');
  if (size > 0) MPI_Bcast(text->data(), static_cast<int>(size), MPI_CHAR, 0, MPI_COMM_WORLD);
}

std::vector<std::string> MpiWorld::GatherReadiness(const std::string& error,
                                                   const std::string& kernel,
                                                   std::vector<std::string>* kernels) {
  constexpr std::size_t kError = 480, kKernel = 32, kSlot = kError + kKernel;
  std::vector<char> mine(kSlot, '\0');
  std::memcpy(mine.data(), error.data(), std::min(error.size(), kError - 1));
  std::memcpy(mine.data() + kError, kernel.data(), std::min(kernel.size(), kKernel - 1));
  std::vector<char> all(rank_ == 0 ? kSlot * static_cast<std::size_t>(size_) : 0);
  MPI_Gather(mine.data(), static_cast<int>(kSlot), MPI_CHAR, all.data(), static_cast<int>(kSlot),
             MPI_CHAR, 0, MPI_COMM_WORLD);
  std::vector<std::string> errors;
  if (rank_ != 0) return errors;
  kernels->clear();
  for (int r = 0; r < size_; ++r) {
    const char* slot = all.data() + kSlot * static_cast<std::size_t>(r);
    errors.emplace_back(slot);
    kernels->emplace_back(slot + kError);
  }
  return errors;
}

void MpiWorld::Abort(int status) {
  std::fflush(stdout);
  std::fflush(stderr);
  MPI_Abort(MPI_COMM_WORLD, status);
  std::_Exit(status);
}

// ------------------------------------------------------------ coordinator
struct MpiCoordinator::Sends : SendQueue {};

MpiCoordinator::MpiCoordinator(int world_size)
    : peers_(static_cast<std::size_t>(world_size)), sends_(std::make_unique<Sends>()) {
  for (Peer& p : peers_) p.last_heard = Clock::now();
}

MpiCoordinator::~MpiCoordinator() = default;

void MpiCoordinator::Send(int rank, int tag, std::vector<std::uint64_t> words) {
  sends_->Send(rank, tag, std::move(words));
}

void MpiCoordinator::BeginPoint(std::size_t scheme, std::uint32_t point) {
  if (scheme_ != kNone) {
    for (std::size_t r = 1; r < peers_.size(); ++r) {
      Send(static_cast<int>(r), kTagCancel, {scheme_, point_});
    }
  }
  scheme_ = scheme;
  point_ = point;
  // Time spent between points (checkpoint, analysis) is not silence.
  for (Peer& p : peers_) p.last_heard = Clock::now();
}

bool MpiCoordinator::Poll(PointControl& point) {
  MPI_Status probe;
  const auto now = Clock::now();
  while (Probe(MPI_ANY_SOURCE, &probe)) {
    const std::vector<std::uint64_t> msg = Receive(probe);
    const auto src = static_cast<std::size_t>(probe.MPI_SOURCE);
    if (src == 0 || src >= peers_.size()) continue;
    Peer& peer = peers_[src];
    peer.last_heard = now;
    if (probe.MPI_TAG == kTagBye) {
      peer.bye = true;
      continue;
    }
    if (probe.MPI_TAG != kTagReport || msg.size() < kReportHeader) continue;
    const std::uint64_t n = msg[3];
    if (msg.size() != kReportHeader + n * kResultWords) continue;
    if (msg[0] == scheme_ && msg[1] == point_) {
      for (std::uint64_t k = 0; k < n; ++k) {
        const std::uint64_t* w = msg.data() + kReportHeader + k * kResultWords;
        point.Deliver(static_cast<std::uint32_t>(w[0]), UnpackCounts(w + 1));
      }
      remote_units_ += n;
    }
    if (msg[2] > 0) peer.want = msg[2];
  }
  for (std::size_t r = 1; r < peers_.size(); ++r) {
    Peer& peer = peers_[r];
    if (peer.want == 0) continue;
    // Guided scheduling: at most half the estimated remaining work, shared
    // among the ranks, so ranges shrink as the point nears its stopping unit.
    const std::int64_t unclaimed = point.EstimatedUnclaimedUnits();
    const std::uint64_t cap =
        unclaimed < 0 ? kFirstRange
                      : std::max<std::uint64_t>(1, static_cast<std::uint64_t>(unclaimed) /
                                                       (2 * peers_.size()));
    const PointControl::Range range = point.Claim(
        static_cast<std::uint32_t>(std::min<std::uint64_t>({peer.want, cap, kMaxRange})));
    if (range.count == 0) break;  // decided: the next point serves the rest
    Send(static_cast<int>(r), kTagAssign, {scheme_, point_, range.first, range.count});
    peer.want = 0;
  }
  sends_->Reap();
  for (std::size_t r = 1; r < peers_.size(); ++r) {
    if (!peers_[r].bye && Seconds(now - peers_[r].last_heard) > kSilenceSeconds) {
      failure_ = "rank " + std::to_string(r) + " sent nothing for " +
                 std::to_string(static_cast<int>(kSilenceSeconds)) + " s: treating it as lost";
      return false;
    }
  }
  return true;
}

bool MpiCoordinator::Shutdown(int status, double timeout_seconds) {
  for (std::size_t r = 1; r < peers_.size(); ++r) {
    Send(static_cast<int>(r), kTagStop, {static_cast<std::uint64_t>(status)});
  }
  const auto t0 = Clock::now();
  auto all_bye = [&] {
    for (std::size_t r = 1; r < peers_.size(); ++r) {
      if (!peers_[r].bye) return false;
    }
    return true;
  };
  while (!all_bye() && Seconds(Clock::now() - t0) < timeout_seconds) {
    MPI_Status probe;
    bool any = false;
    while (Probe(MPI_ANY_SOURCE, &probe)) {
      any = true;
      Receive(probe);  // late results: discarded
      const auto src = static_cast<std::size_t>(probe.MPI_SOURCE);
      if (probe.MPI_TAG == kTagBye && src > 0 && src < peers_.size()) peers_[src].bye = true;
    }
    sends_->Reap();
    if (!any) std::this_thread::sleep_for(kPollSleep);
  }
  if (!all_bye()) return false;
  return sends_->Drain(timeout_seconds);
}

// ----------------------------------------------------------------- worker
int RunMpiWorker(const std::vector<Chain>& chains, const RunConfig& cfg,
                 const std::atomic<bool>* interrupt) {
  const int threads = ResolveThreadCount(cfg.sweep.threads);
  std::optional<WorkerPool> pool;
  if (!chains.empty()) pool.emplace(chains, cfg, threads);
  SendQueue sends;
  bool outstanding = false;   // a request rank 0 has not answered yet
  bool interrupted = false;
  Clock::time_point interrupted_at;
  auto last_sent = Clock::now() - std::chrono::hours(1);
  int stop_status = -1;

  while (stop_status < 0) {
    MPI_Status probe;
    while (Probe(0, &probe)) {
      const std::vector<std::uint64_t> msg = Receive(probe);
      if (probe.MPI_TAG == kTagStop && !msg.empty()) {
        stop_status = static_cast<int>(msg[0]);
      } else if (probe.MPI_TAG == kTagAssign && msg.size() == 4) {
        outstanding = false;
        if (pool && !interrupted && msg[0] < chains.size() &&
            msg[1] < cfg.schemes[msg[0]].ebno_db.size()) {
          if (pool->scheme() != msg[0] || pool->point() != msg[1]) pool->Switch(msg[0], msg[1]);
          if (msg[3] > 0) {
            pool->Add(static_cast<std::uint32_t>(msg[2]), static_cast<std::uint32_t>(msg[3]));
          }
        }
      } else if (probe.MPI_TAG == kTagCancel && msg.size() == 2) {
        if (pool && pool->scheme() == msg[0] && pool->point() == msg[1]) pool->Switch(kNone, kNone);
      }
    }
    if (stop_status >= 0) break;
    const auto now = Clock::now();
    if (!interrupted && interrupt && interrupt->load()) {
      // Stop computing; rank 0 (signalled too) saves and sends STOP.
      interrupted = true;
      interrupted_at = now;
      if (pool) pool->Switch(kNone, kNone);
    }
    if (interrupted && Seconds(now - interrupted_at) > kStopWaitSeconds) {
      std::fflush(stderr);
      std::_Exit(75);  // rank 0 is gone; nothing of ours needs saving
    }

    std::uint64_t want = 0;
    if (pool && !interrupted && !outstanding) {
      const double spu = pool->unit_seconds();
      double target = spu > 0 ? std::ceil(kRangeSeconds * threads / spu) : threads;
      target = std::clamp(target, static_cast<double>(threads), static_cast<double>(kMaxRange));
      if (static_cast<double>(pool->queued()) * 2 <= target) want = static_cast<std::uint64_t>(target);
    }
    const std::size_t pending = pool ? pool->results() : 0;
    const double since = Seconds(now - last_sent);
    const bool send = want > 0 || since >= kHeartbeatSeconds ||
                      (pending > 0 && (since >= kBatchSeconds || pool->queued() == 0));
    if (send) {
      std::uint64_t scheme = kNone, point = kNone;
      std::vector<WorkerPool::Result> results;
      if (pool) results = pool->Take(&scheme, &point);
      std::vector<std::uint64_t> msg(kReportHeader + results.size() * kResultWords);
      msg[0] = scheme;
      msg[1] = point;
      msg[2] = want;
      msg[3] = results.size();
      for (std::size_t k = 0; k < results.size(); ++k) {
        std::uint64_t* w = msg.data() + kReportHeader + k * kResultWords;
        w[0] = results[k].first;
        PackCounts(results[k].second, w + 1);
      }
      sends.Send(0, kTagReport, std::move(msg));
      last_sent = now;
      if (want > 0) outstanding = true;
    }
    sends.Reap();
    std::this_thread::sleep_for(kPollSleep);
  }
  pool.reset();  // joins the compute threads
  sends.Drain(kStopWaitSeconds);
  sends.Send(0, kTagBye, {0});
  sends.Drain(kStopWaitSeconds);
  return stop_status;
}

}  // namespace capgap
