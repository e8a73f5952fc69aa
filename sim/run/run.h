// `capgap run` as a function: everything the command does after its
// arguments are parsed (command-line values checked, config loaded, output
// path checked, checkpoint continued or protected, chains built, session run
// with progress and checkpoints, curves file written, summary printed), so
// that it can be tested in-process. sim/cli/main.cc only parses arguments,
// installs the signal handlers and calls Run.
//
// Every check is made before the first unit is simulated; a refused run
// leaves no file behind and previous outputs untouched. Messages go to
// `RunOptions::err` as one line "capgap: ..." naming the option or key, the
// value and the rule; the summary table goes to `RunOptions::out`.
//
// Exit statuses (README "Exit status"):
//   0  complete: curves file written, checkpoint marked complete
//   1  the arguments are well formed but a file refuses them: config file
//      missing or invalid (also a --set KEY=VALUE whose value breaks the
//      key's rule), output directory missing or not writable, -o naming an
//      existing directory, a refused resume, a failed write
//   2  usage: the arguments alone are wrong, decided before any file is
//      read (--threads, --seed, -o or --set malformed or out of range)
//   75 stopped by the interrupt flag (or a lost MPI rank) after saving the
//      checkpoint; --resume continues
//   130 a second SIGINT (the CLI's signal handler exits at once)
#ifndef CAPGAP_SIM_RUN_RUN_H_
#define CAPGAP_SIM_RUN_RUN_H_

#include <atomic>
#include <cstdint>
#include <iostream>
#include <optional>
#include <string>
#include <vector>

#include "blocks/core/status.h"
#include "sim/engine/engine.h"
#include "sim/engine/sweep_session.h"

namespace capgap {

inline constexpr int kExitDone = 0;
inline constexpr int kExitFailed = 1;
inline constexpr int kExitUsage = 2;
inline constexpr int kExitStopped = 75;  // EX_TEMPFAIL of sysexits.h: try again
inline constexpr int kExitAtOnce = 130;  // 128 + SIGINT

// --threads accepts [0, kMaxThreadsOption] (the range of sweep.threads).
inline constexpr long long kMaxThreadsOption = 4096;

// The other processes of a distributed run, as the coordinating process sees
// them (sim/mpi/mpi_peers.h implements it for MPI; a single process has
// none). Run calls Release (setup failed first) or Start once, then
// BeginPoint before each point, and Finish once after the session.
class RunPeers {
 public:
  virtual ~RunPeers() = default;
  // Processes in the run, this one included.
  virtual int size() const = 0;
  // Setup failed before Start: the peers exit with status 1.
  virtual void Release() = 0;
  // Sends the resolved config text; every peer builds its chains. An error
  // names the rank that could not (the peers are then shut down); a
  // Status::Stopped says a rank was stopped by a signal while building its
  // codes (the run then exits 75 with its checkpoint). `notes`
  // receives lines worth printing (e.g. ranks running other kernels).
  virtual Status Start(const std::string& config_text, std::vector<std::string>* notes) = 0;
  // Takes units of the current point (EngineOptions::exchange).
  virtual UnitExchange* exchange() = 0;
  virtual void BeginPoint(std::size_t scheme, std::uint32_t point) = 0;
  // Why the peers stopped the session (a lost rank), or "".
  virtual std::string failure() const = 0;
  // Stops the peers with the session's outcome. May end this process
  // (MPI_Abort) when a peer is lost or does not answer, after saying so on
  // `err`; the checkpoint `ckpt_path` is already saved then.
  virtual void Finish(SessionEnd end, const std::string& ckpt_path, std::ostream& err) = 0;
};

enum class ProgressMode {
  kAuto,   // kLines with peers, kBar when err is std::cerr on a terminal, else off
  kOff,    // --quiet
  kBar,    // one line rewritten in place
  kLines,  // a full line every 10 s (logs)
};

struct RunOptions {
  std::string config_path;             // CONFIG
  std::vector<std::string> overrides;  // --set KEY=VALUE, in command-line order
  std::optional<std::string> output;   // -o; unset: results/<config stem>.h5
  bool resume = false;                 // --resume
  std::optional<long long> threads;    // --threads N, in [0, kMaxThreadsOption]
  std::optional<std::string> seed;     // --seed S as typed: an integer in [0, 2^64 - 1]
  ProgressMode progress = ProgressMode::kAuto;
  bool scalar = false;  // --scalar: ForceScalarKernels(true) (process-wide, stays on)
  // Set (e.g. by a signal handler) to stop: checkpoint saved, status 75.
  const std::atomic<bool>* interrupt = nullptr;
  std::ostream* out = &std::cout;  // summary table, "wrote FILE"
  std::ostream* err = &std::cerr;  // errors, warnings, progress
  std::string command_line;        // recorded in the curves file
  RunPeers* peers = nullptr;       // other processes of an MPI run, or none
};

// The command-line values alone (no file read): -o, --threads, --seed and
// the KEY=VALUE form of every --set. An error is a usage error (status 2);
// its message starts with "run: " and names the option.
Status CheckRunArguments(const RunOptions& options);

// `capgap run`; returns the exit status above.
int Run(const RunOptions& options);

}  // namespace capgap

#endif  // CAPGAP_SIM_RUN_RUN_H_
