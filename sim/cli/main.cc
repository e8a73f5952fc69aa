// capgap command-line entry: parses the arguments of `run` (simulate a scheme
// file, checkpointed and resumable, across MPI ranks when built with
// CAPGAP_MPI and started by an MPI launcher), `theory` (closed-form tables
// and limits) and `summary` (table of a curves file), installs the signal
// handlers and calls Run / RunTheory / RunSummary (sim/run/), which do the work and
// own every check and message. Exit statuses: sim/run/run.h and the README.
#include <atomic>
#include <boost/program_options.hpp>
#include <csignal>
#include <cstdlib>
#include <iostream>
#include <string>
#include <vector>

#include "sim/config/config.h"
#include "sim/io/build_info.h"
#include "sim/run/run.h"
#include "sim/run/theory_command.h"
#if CAPGAP_MPI
#include "blocks/kernels/awgn_kernels.h"
#include "sim/mpi/mpi_peers.h"
#endif

namespace po = boost::program_options;
using namespace capgap;

namespace {

std::atomic<bool> g_interrupt{false};
std::atomic<int> g_sigints{0};
static_assert(std::atomic<int>::is_always_lock_free);

void OnSignal(int sig) {
  if (sig == SIGINT && g_sigints.fetch_add(1) >= 1) std::_Exit(kExitAtOnce);  // second Ctrl-C
  g_interrupt.store(true);
}

void InstallSignalHandlers() {
  std::signal(SIGINT, OnSignal);
  std::signal(SIGTERM, OnSignal);
}

int Fail(const std::string& message, int code) {
  std::cerr << "capgap: " << message << "\n";
  return code;
}

const char kMainHelp[] =
    "capgap: Monte Carlo BER/FER of modulation and coding schemes against theory and\n"
    "capacity limits.\n\n"
    "Usage:\n"
    "  capgap run CONFIG [-o FILE.h5] [--resume] [--set KEY=VALUE]... [--threads N] [--seed S]\n"
    "             [--quiet]\n"
    "  mpirun -np N capgap run CONFIG ...     (built with -DCAPGAP_MPI=ON)\n"
    "  capgap theory --modulation NAME --ebno-db FROM to TO by STEP [--rate R] [--csv]\n"
    "  capgap theory --bandwidth HZ --snr-db X\n"
    "  capgap summary FILE.h5 [FILE2.h5 ...]   (several: side by side)\n"
    "  capgap COMMAND --help\n";

std::string JoinArgs(int argc, char** argv) {
  std::string out;
  for (int i = 0; i < argc; ++i) {
    if (i) out += ' ';
    out += argv[i];
  }
  return out;
}

// --------------------------------------------------------------------- run
int CmdRun(int argc, char** argv, const std::string& command_line) {
  po::options_description opts("capgap run CONFIG [options]");
  RunOptions run;
  run.command_line = command_line;
  run.interrupt = &g_interrupt;
  std::string output;
  long long threads = 0;
  std::string seed;
  opts.add_options()("help,h", "show this help")(
      "output,o", po::value(&output),
      "output HDF5 file in an existing directory (default "
      "results/<config name>.h5, creating results/); its checkpoint is FILE.ckpt")(
      "resume",
      "continue the run recorded in FILE.ckpt (finished points are kept; with larger "
      "stop_bit_errors/stop_frame_errors/stop_bits or more Eb/N0 points it extends them); starts "
      "fresh if there is "
      "none")("set", po::value(&run.overrides)->composing(),
              "override a config key, e.g. --set sweep.stop_bit_errors=500 or "
              "--set scheme.qpsk.frame_bits=4096 or --set 'sweep.ebno_db=0 to 12 by 0.5' "
              "(repeatable)")(
      "threads", po::value(&threads),
      "worker threads in [0, 4096] (0: all cores; overrides "
      "sweep.threads)")("seed", po::value(&seed),
                        "master seed, an integer >= 0 (overrides sweep.seed)")(
      "quiet,q", "no progress on stderr")("scalar", "force the portable scalar kernels (no SIMD)");
  po::options_description hidden;
  hidden.add_options()("config", po::value(&run.config_path));
  po::options_description all;
  all.add(opts).add(hidden);
  po::positional_options_description pos;
  pos.add("config", 1);
  po::variables_map vm;
  try {
    po::store(po::command_line_parser(argc, argv).options(all).positional(pos).run(), vm);
    po::notify(vm);
  } catch (const std::exception& e) {
    return Fail(std::string("run: ") + e.what() + " (see capgap run --help)", kExitUsage);
  }
  if (vm.count("help")) {
    std::cout << opts
              << "\nCONFIG is an INI scheme file; see configs/ and the README.\n"
                 "Exit status: 0 done, 1 bad config/file or resume refused, 2 usage (a malformed\n"
                 "or out-of-range command-line value), 75 stopped by SIGINT/SIGTERM with the\n"
                 "checkpoint saved (--resume continues), 130 second SIGINT (exits at once).\n"
              << "\nConfig keys (every one can be set with --set SECTION.KEY=VALUE):\n\n"
              << ConfigKeysHelp();
    return 0;
  }
  if (vm.count("output")) run.output = output;
  if (vm.count("threads")) run.threads = threads;
  if (vm.count("seed")) run.seed = seed;
  run.resume = vm.count("resume") > 0;
  run.scalar = vm.count("scalar") > 0;
  if (vm.count("quiet")) run.progress = ProgressMode::kOff;
  if (Status s = CheckRunArguments(run); !s.ok()) return Fail(s.message(), kExitUsage);

  InstallSignalHandlers();
#if CAPGAP_MPI
  if (LaunchedByMpi()) {
    auto world = MpiWorld::Init(nullptr, nullptr);
    if (!world.ok()) return Fail(world.status().message(), kExitFailed);
    InstallSignalHandlers();  // MPI may install handlers of its own during init; ours must win
    if (world.value()->rank() > 0) {
      if (run.scalar) ForceScalarKernels(true);
      return RunMpiWorkerRank(*world.value(), run.config_path, &g_interrupt);
    }
    MpiPeers peers(*world.value());
    run.peers = &peers;
    return Run(run);
  }
#endif
  return Run(run);
}

// ------------------------------------------------------------------ theory
int CmdTheory(int argc, char** argv) {
  po::options_description opts(
      "capgap theory (--modulation NAME --ebno-db RANGE | --bandwidth HZ --snr-db X)");
  TheoryOptions theory;
  std::string modulation;
  std::vector<std::string> range_words;
  double rate = 1, bandwidth = 0, snr_db = 0;
  opts.add_options()("help,h", "show this help")(
      "modulation", po::value(&modulation),
      "bpsk, qpsk, 8psk, 16qam, 64qam, 256qam, <M>psk, <M>qam")(
      "ebno-db", po::value(&range_words)->multitoken(),
      "Eb/N0 points in [-100, 100] dB: FROM to TO by STEP (inclusive; quoted or as "
      "separate words) or a comma list")("rate", po::value(&rate),
                         "code rate R in [1e-6, 1] for the limits (info bits per symbol R m)")(
      "csv", "machine-readable output: '# key = value' lines, then CSV")(
      "bandwidth", po::value(&bandwidth),
      "bandwidth in (0, 1e15] Hz (Shannon-Hartley capacity; "
      "not with the options above)")("snr-db", po::value(&snr_db),
                                     "signal-to-noise ratio in [-100, 100] dB (Shannon-Hartley "
                                     "capacity)");
  po::variables_map vm;
  try {
    po::store(po::command_line_parser(argc, argv).options(opts).run(), vm);
    po::notify(vm);
  } catch (const std::exception& e) {
    return Fail(std::string("theory: ") + e.what() + " (see capgap theory --help)", kExitUsage);
  }
  if (vm.count("help")) {
    std::cout << opts;
    return 0;
  }
  if (vm.count("modulation")) theory.modulation = modulation;
  if (vm.count("ebno-db")) {
    // The range's words may arrive as one argument ("0 to 12 by 0.5") or as
    // several (0 to 12 by 0.5); both give the same text.
    std::string range;
    for (const std::string& w : range_words) range += (range.empty() ? "" : " ") + w;
    theory.ebno_db = range;
  }
  if (vm.count("rate")) theory.rate = rate;
  theory.csv = vm.count("csv") > 0;
  if (vm.count("bandwidth")) theory.bandwidth_hz = bandwidth;
  if (vm.count("snr-db")) theory.snr_db = snr_db;
  return RunTheory(theory);
}

// ----------------------------------------------------------------- summary
int CmdSummary(int argc, char** argv) {
  po::options_description opts("capgap summary FILE.h5 [FILE2.h5 ...]");
  opts.add_options()("help,h", "show this help");
  po::options_description hidden;
  std::vector<std::string> paths;
  hidden.add_options()("file", po::value(&paths));
  po::options_description all;
  all.add(opts).add(hidden);
  po::positional_options_description pos;
  pos.add("file", -1);
  po::variables_map vm;
  try {
    po::store(po::command_line_parser(argc, argv).options(all).positional(pos).run(), vm);
    po::notify(vm);
  } catch (const std::exception& e) {
    return Fail(std::string("summary: ") + e.what(), kExitUsage);
  }
  if (vm.count("help")) {
    std::cout << opts
              << "\nPrints the summary table of every scheme in a curves file. With several "
                 "files, prints\ntheir schemes side by side (Eb/N0 at the target BER and FER and "
                 "the gap to the Shannon\nlimit, with 95 % intervals) and flags differences "
                 "whose intervals do not overlap.\n";
    return 0;
  }
  if (paths.empty()) return Fail("summary: missing FILE.h5", kExitUsage);
  for (const std::string& p : paths) {
    if (p.empty()) return Fail("summary: empty file name", kExitUsage);
  }
  return RunSummaryComparison(paths, std::cout, std::cerr);
}

}  // namespace

int main(int argc, char** argv) {
  const std::string command_line = JoinArgs(argc, argv);
  if (argc < 2) {
    std::cerr << kMainHelp;
    return kExitUsage;
  }
  const std::string cmd = argv[1];
  if (cmd == "--help" || cmd == "-h" || cmd == "help") {
    std::cout << kMainHelp;
    return 0;
  }
  if (cmd == "--version") {
    std::cout << "capgap " << ProgramVersion() << " (" << GitRevision() << ", " << CompilerId()
              << ", " << BuildType() << ")\n";
    return 0;
  }
  if (cmd == "run") return CmdRun(argc - 1, argv + 1, command_line);
  if (cmd == "theory") return CmdTheory(argc - 1, argv + 1);
  if (cmd == "summary") return CmdSummary(argc - 1, argv + 1);
  return Fail("unknown command '" + cmd + "'; commands: run, theory, summary (capgap --help)",
              kExitUsage);
}
