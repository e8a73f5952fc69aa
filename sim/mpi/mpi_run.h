// MPI mode of `capgap run` (built with -DCAPGAP_MPI=ON, launched by mpirun or
// a batch scheduler): rank 0 coordinates, every rank computes.
//
// Rank 0 loads the config, reads the checkpoint, runs the session (points in
// order, prefix rule, checkpoints, HDF5) exactly as a single process does,
// and additionally hands out ranges of unit indices of the current point to
// the other ranks through MpiCoordinator (a UnitExchange). Other ranks
// receive the resolved config text from rank 0, build the same chains and run
// RunMpiWorker: a thread pool computing the units of the ranges they are given
// and returning each unit's full UnitCounts. Which process simulated a unit
// never changes its counts (they depend on seed, scheme, point, unit only),
// and rank 0 applies the same prefix-in-index-order rule, so counts equal a
// single-process run for any ranks x threads.
//
// Protocol (uint64 words, MPI_COMM_WORLD, point to point only during a run):
//   worker -> 0  kTagReport  [scheme, point, want, n, n x (unit, 7 count words)]
//                results of units of (scheme, point), and a request for `want`
//                more units (0: none; also sent as a heartbeat every second)
//   0 -> worker  kTagAssign  [scheme, point, first, count]
//   0 -> all     kTagCancel  [scheme, point]   the point is decided: drop it
//   0 -> all     kTagStop    [exit status]     finish; answer kTagBye
// Ranges are sized by each worker for about 0.1 s of its threads' work and
// requested before the previous one runs out, so messages cost far less than
// 1 % and no thread waits on a round trip; rank 0 caps a range at half the
// estimated remaining units of the point over the ranks (guided scheduling),
// so ranges shrink near the stopping unit and little work is thrown away. Rank 0 and the workers poll with
// MPI_Iprobe and 1 ms sleeps: no MPI call blocks during a run, and nothing
// spins on a core the simulation needs.
//
// A dying rank: OpenMPI's mpirun terminates the job when any rank exits
// abnormally (SIGTERM to the others, SIGKILL about a second later). Rank 0
// treats that SIGTERM as an interrupt and rewrites its checkpoint at once; the
// periodic checkpoint covers the case where it is killed first. Under a
// launcher that does not do this, rank 0 declares a rank lost after 60 s
// without a message (workers report every second), saves the checkpoint and
// calls MPI_Abort. Either way the run ends, and `--resume` finishes it.
#ifndef CAPGAP_SIM_MPI_RUN_H_
#define CAPGAP_SIM_MPI_RUN_H_

#include <atomic>
#include <chrono>
#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "blocks/core/status.h"
#include "sim/chain/chain.h"
#include "sim/config/config.h"
#include "sim/engine/engine.h"

namespace capgap {

// True when the environment says an MPI launcher started this process
// (OpenMPI, PMI or PMIx variables).
bool LaunchedByMpi();

// MPI_Init_thread (funneled: only the thread that called it makes MPI calls)
// and MPI_Finalize. One per process.
class MpiWorld {
 public:
  static Result<std::unique_ptr<MpiWorld>> Init(int* argc, char*** argv);
  ~MpiWorld();
  MpiWorld(const MpiWorld&) = delete;
  MpiWorld& operator=(const MpiWorld&) = delete;
  int rank() const { return rank_; }
  int size() const { return size_; }

  // Startup, collective. Rank 0 passes the resolved config text (empty: setup
  // failed, every rank should exit with status 1); others receive it.
  void ShareConfig(std::string* text);
  // Startup, collective, after ShareConfig: every rank says whether it built
  // its chains and which noise kernels it runs. On rank 0 returns one entry
  // per rank ("" when ready, else the error) and fills `kernels`.
  std::vector<std::string> GatherReadiness(const std::string& error, const std::string& kernel,
                                           std::vector<std::string>* kernels);
  // Ends the job at once (MPI_Abort): used when a rank is lost.
  [[noreturn]] void Abort(int status);

 private:
  MpiWorld() = default;
  int rank_ = 0;
  int size_ = 1;
};

// Rank 0's side: hands out ranges of the current point to the other ranks.
class MpiCoordinator final : public UnitExchange {
 public:
  explicit MpiCoordinator(int world_size);
  ~MpiCoordinator() override;

  // The session moves to (scheme, point): workers drop the previous point.
  void BeginPoint(std::size_t scheme, std::uint32_t point);
  bool Poll(PointControl& point) override;
  // STOP(status) to every worker, then waits (at most `timeout_seconds`) for
  // each to answer, discarding late results. Returns false if some rank did
  // not answer (then MPI_Finalize could hang: abort instead).
  bool Shutdown(int status, double timeout_seconds);
  // Why Poll stopped the point (a silent rank), or "".
  const std::string& failure() const { return failure_; }
  // Units received from other ranks so far (for the final report).
  std::uint64_t remote_units() const { return remote_units_; }

 private:
  struct Peer {
    std::uint64_t want = 0;  // unanswered request
    std::chrono::steady_clock::time_point last_heard;
    bool bye = false;
  };
  struct Sends;  // non-blocking sends in flight (mpi_run.cc)
  void Send(int rank, int tag, std::vector<std::uint64_t> words);
  std::vector<Peer> peers_;  // index = rank (0 unused)
  std::unique_ptr<Sends> sends_;
  std::uint64_t scheme_ = UINT64_MAX, point_ = UINT64_MAX;
  std::string failure_;
  std::uint64_t remote_units_ = 0;
};

// The other ranks' side: computes assigned units with `threads` threads until
// rank 0 says STOP; returns the exit status rank 0 sent (or 75 after a signal
// when rank 0 stays silent for 10 s). `chains` may be empty when this rank
// could not build them (it then only waits for STOP).
int RunMpiWorker(const std::vector<Chain>& chains, const RunConfig& cfg,
                 const std::atomic<bool>* interrupt);

}  // namespace capgap

#endif  // CAPGAP_SIM_MPI_RUN_H_
