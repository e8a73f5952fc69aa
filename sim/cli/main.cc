// capgap command-line entry: `run` (simulate a scheme file, checkpointed and
// resumable, across MPI ranks when built with CAPGAP_MPI and started by an
// MPI launcher), `theory` (closed-form tables and limits), `summary` (table
// of a curves file). Every bad input gives one line naming the key, the value
// and what is allowed, and a non-zero exit; no half-written output is left
// behind (files are written under temporary names and renamed).
#include <unistd.h>

#include <atomic>
#include <cmath>
#include <csignal>
#include <cstdio>
#include <filesystem>
#include <iostream>
#include <sstream>
#include <string>
#include <vector>

#include <boost/program_options.hpp>

#include "analysis/capacity.h"
#include "analysis/uncoded_theory.h"
#include "blocks/core/energy.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/demap_kernels.h"
#include "blocks/mapping/mapper.h"
#include "sim/io/atomic_file.h"
#include "sim/io/build_info.h"
#include "sim/chain/chain.h"
#include "sim/io/checkpoint.h"
#include "sim/config/config.h"
#include "sim/io/curves_file.h"
#include "sim/engine/engine.h"
#include "sim/engine/sweep_session.h"
#if CAPGAP_MPI
#include "sim/mpi/mpi_run.h"
#endif
#include "sim/chain/scheme_result.h"
#include "sim/io/summary_table.h"

namespace po = boost::program_options;
using namespace capgap;

namespace capgap {
class MpiWorld;  // sim/mpi/mpi_run.h (MPI builds only)
}  // namespace capgap

namespace {

// Exit statuses (README "Exit status"): 0 done, 1 bad config, file or resume
// refused, 2 usage, 75 stopped by SIGINT/SIGTERM (or a lost MPI rank) after
// saving the checkpoint -- `--resume` continues -- and 130 for a second
// SIGINT, which exits at once (the last checkpoint written stays good).
constexpr int kExitUsage = 2;
constexpr int kExitStopped = 75;   // EX_TEMPFAIL of sysexits.h: try again
constexpr int kExitAtOnce = 130;   // 128 + SIGINT

std::atomic<bool> g_interrupt{false};
std::atomic<int> g_sigints{0};
static_assert(std::atomic<int>::is_always_lock_free);

void OnSignal(int sig) {
  if (sig == SIGINT && g_sigints.fetch_add(1) >= 1) std::_Exit(kExitAtOnce);  // second Ctrl-C
  g_interrupt.store(true);
}

int Fail(const std::string& message, int code = 1) {
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
    "  capgap theory --modulation NAME --ebno-db START:STEP:STOP [--rate R] [--csv]\n"
    "  capgap theory --bandwidth HZ --snr-db X\n"
    "  capgap summary FILE.h5\n"
    "  capgap COMMAND --help\n";

std::string JoinArgs(int argc, char** argv) {
  std::string out;
  for (int i = 0; i < argc; ++i) {
    if (i) out += ' ';
    out += argv[i];
  }
  return out;
}

// ---------------------------------------------------------------- progress
// kBar: one line rewritten in place (stderr is a terminal). kLines: a full
// line every few seconds, for logs (MPI runs, where only rank 0 prints, so
// the output is one line per update, not one per rank).
class ProgressPrinter {
 public:
  enum class Mode { kOff, kBar, kLines };
  explicit ProgressPrinter(Mode mode) : mode_(mode) {}
  bool enabled() const { return mode_ != Mode::kOff; }
  Mode mode() const { return mode_; }

  void Update(const Progress& p) {
    if (!enabled()) return;
    const double f_err = static_cast<double>(p.counts.bit_errors) / static_cast<double>(p.target_errors);
    const double f_bits = static_cast<double>(p.counts.bits) / static_cast<double>(p.max_bits);
    const double f = std::min(1.0, std::max(f_err, f_bits));
    char eta[32] = "?";
    if (f > 0) std::snprintf(eta, sizeof eta, "%.0fs", p.seconds * (1 - f) / f);
    std::fprintf(stderr,
                 "%s[%s] point %zu/%zu  Eb/N0 %6.2f dB  errors %llu/%llu  bits %.3g  "
                 "%.1f Mbit/s  ETA %s%s",
                 mode_ == Mode::kBar ? "\r\033[K" : "", p.scheme->c_str(), p.point_index + 1,
                 p.point_count, p.ebno_db, static_cast<unsigned long long>(p.counts.bit_errors),
                 static_cast<unsigned long long>(p.target_errors),
                 static_cast<double>(p.counts.bits), p.bits_per_second / 1e6, eta,
                 mode_ == Mode::kLines ? "\n" : "");
    std::fflush(stderr);
    bar_drawn_ = mode_ == Mode::kBar;
  }
  void PointDone(const std::string& scheme, std::size_t i, std::size_t n, const PointResult& r) {
    if (!enabled()) return;
    std::fprintf(stderr,
                 "%s[%s] point %zu/%zu  Eb/N0 %6.2f dB  BER %.3e [%.2e, %.2e]  "
                 "errors %llu  bits %.3g  %.1fs  (%s%s)\n",
                 mode_ == Mode::kBar ? "\r\033[K" : "", scheme.c_str(), i + 1, n, r.ebno_db, r.ber(),
                 r.ber_ci.low, r.ber_ci.high, static_cast<unsigned long long>(r.counts.bit_errors),
                 static_cast<double>(r.counts.bits), r.seconds, ToString(r.stop_reason).c_str(),
                 r.units_simulated == 0 ? ", from checkpoint" : "");
    bar_drawn_ = false;
  }
  // Ends a bar left on screen (before other messages).
  void EndLine() {
    if (bar_drawn_) std::fprintf(stderr, "\n");
    bar_drawn_ = false;
  }

 private:
  Mode mode_;
  bool bar_drawn_ = false;
};

// --------------------------------------------------------------------- run
struct RunArgs {
  std::string config_path;
  std::string output;
  std::vector<std::string> sets;
  bool resume = false;
  bool quiet = false;
  std::string command_line;
};

#if CAPGAP_MPI
// Ranks other than 0: config from rank 0, then compute until told to stop.
int RunWorkerRank(MpiWorld& world) {
  std::string text;
  world.ShareConfig(&text);
  if (text.empty()) return 1;  // rank 0 failed during setup and said why
  RunConfig cfg;
  std::vector<Chain> chains;
  std::string error;
  auto parsed = ParseRunConfig(text, "configuration from rank 0", {});
  if (!parsed.ok()) {
    error = parsed.status().message();
  } else {
    cfg = std::move(parsed).value();
    for (const SchemeConfig& s : cfg.schemes) {
      auto chain = Chain::Create(s, cfg.sweep.seed);
      if (!chain.ok()) {
        error = chain.status().message();
        chains.clear();
        break;
      }
      chains.push_back(std::move(chain).value());
    }
  }
  std::vector<std::string> kernels;
  world.GatherReadiness(error, NoiseKernelTarget(), &kernels);
  return RunMpiWorker(chains, cfg, &g_interrupt);
}
#endif

// Rank 0, or the only process. `world` is null without MPI.
int RunMain(const RunArgs& args, [[maybe_unused]] MpiWorld* world) {
  int ranks = 1;
#if CAPGAP_MPI
  if (world) ranks = world->size();
#endif
  [[maybe_unused]] bool shared = false;
  // Setup failures must release the other ranks from their first collective.
  auto fail = [&](const std::string& message, int code = 1) {
#if CAPGAP_MPI
    if (world && !shared) {
      std::string none;
      world->ShareConfig(&none);
      shared = true;
    }
#endif
    return Fail(message, code);
  };

  auto config = LoadRunConfig(args.config_path, args.sets);
  if (!config.ok()) return fail(config.status().message());
  const RunConfig& cfg = config.value();
  std::string output = args.output;
  if (output.empty()) {
    output = "results/" + std::filesystem::path(args.config_path).stem().string() + ".h5";
  }
  const std::string ckpt_path = CheckpointPath(output);
  {
    std::error_code ec;
    const std::filesystem::path parent = std::filesystem::path(output).parent_path();
    if (!parent.empty()) std::filesystem::create_directories(parent, ec);
  }
  RemoveStaleTemporaries(output);
  RemoveStaleTemporaries(ckpt_path);

  // Checkpoint: continue it (--resume), or refuse to overwrite unfinished work.
  Checkpoint ckpt;
  bool resumed = false;
  if (std::filesystem::exists(ckpt_path)) {
    auto stored = ReadCheckpoint(ckpt_path);
    if (args.resume) {
      if (!stored.ok()) return fail("cannot resume: " + stored.status().message());
      if (Status s = CheckResumable(stored.value(), cfg, ckpt_path); !s.ok()) return fail(s.message());
      ckpt = std::move(stored).value();
      resumed = true;
    } else if (stored.ok() && !stored.value().complete) {
      return fail(ckpt_path + " holds an unfinished run (" +
                  std::to_string(stored.value().FinishedPoints()) +
                  " point(s) finished); continue it with --resume, or delete it to start over");
    }
  }

  // Build every chain before the first frame, so a bad scheme fails fast.
  std::vector<Chain> chains;
  for (const SchemeConfig& s : cfg.schemes) {
    auto chain = Chain::Create(s, cfg.sweep.seed);
    if (!chain.ok()) return fail(args.config_path + ": " + chain.status().message());
    chains.push_back(std::move(chain).value());
  }

  const int nthreads = ResolveThreadCount(cfg.sweep.threads);
  ProgressPrinter::Mode mode = ProgressPrinter::Mode::kOff;
  if (!args.quiet) {
    if (ranks > 1) {
      mode = ProgressPrinter::Mode::kLines;
    } else if (::isatty(STDERR_FILENO)) {
      mode = ProgressPrinter::Mode::kBar;
    }
  }
  ProgressPrinter printer(mode);

#if CAPGAP_MPI
  std::unique_ptr<MpiCoordinator> coordinator;
  if (world && ranks > 1) {
    std::string text = cfg.ResolvedText();
    world->ShareConfig(&text);
    shared = true;
    std::vector<std::string> kernels;
    const auto errors = world->GatherReadiness("", NoiseKernelTarget(), &kernels);
    coordinator = std::make_unique<MpiCoordinator>(ranks);
    for (int r = 1; r < ranks; ++r) {
      if (!errors[static_cast<std::size_t>(r)].empty()) {
        coordinator->Shutdown(1, 10);
        return Fail("rank " + std::to_string(r) + ": " + errors[static_cast<std::size_t>(r)]);
      }
    }
    for (int r = 1; r < ranks; ++r) {
      if (kernels[static_cast<std::size_t>(r)] != kernels[0]) {
        std::fprintf(stderr,
                     "capgap: note: rank %d runs the %s noise kernels, rank 0 %s; their float "
                     "rounding differs, so counts can differ slightly from a single-process run "
                     "(use --scalar on every rank for identical counts)\n",
                     r, kernels[static_cast<std::size_t>(r)].c_str(), kernels[0].c_str());
        break;
      }
    }
  }
#endif

  if (printer.enabled()) {
    std::fprintf(stderr, "capgap %s: %zu scheme(s), %d process(es) x %d thread(s), kernels %s, seed %llu\n",
                 ProgramVersion(), chains.size(), ranks, nthreads, NoiseKernelTarget(),
                 static_cast<unsigned long long>(cfg.sweep.seed));
    if (AssertionsEnabled()) std::fprintf(stderr, "note: assertions are on (debug build): slow\n");
    if (resumed) {
      std::fprintf(stderr, "resuming from %s: %zu point(s) finished, %zu recorded\n",
                   ckpt_path.c_str(), ckpt.FinishedPoints(), ckpt.RecordedPoints());
    }
  }
  if (resumed && ckpt.kernel_target != NoiseKernelTarget()) {
    std::fprintf(stderr,
                 "capgap: note: %s was written with the %s noise kernels, this run uses %s; their "
                 "float rounding differs, so the counts can differ slightly from an uninterrupted "
                 "run (--scalar on both sides makes them identical)\n",
                 ckpt_path.c_str(), ckpt.kernel_target.c_str(), NoiseKernelTarget());
  }
  if (args.resume && !resumed && printer.enabled()) {
    std::fprintf(stderr, "no checkpoint %s: starting from the beginning\n", ckpt_path.c_str());
  }

  SessionOptions so;
  so.engine.threads = cfg.sweep.threads;
  so.engine.interrupt = &g_interrupt;
  if (printer.enabled()) {
    so.engine.on_progress = [&](const Progress& p) { printer.Update(p); };
    if (mode == ProgressPrinter::Mode::kLines) so.engine.progress_interval_seconds = 10;
  }
  so.checkpoint_path = ckpt_path;
  so.kernel_target = NoiseKernelTarget();
  so.on_point_done = [&](const std::string& scheme, std::size_t i, std::size_t n,
                         const PointResult& r) { printer.PointDone(scheme, i, n, r); };
  so.on_warning = [&](const std::string& message) {
    printer.EndLine();
    std::fprintf(stderr, "capgap: warning: %s\n", message.c_str());
  };
#if CAPGAP_MPI
  if (coordinator) {
    so.engine.exchange = coordinator.get();
    so.on_point_begin = [&](std::size_t scheme, std::uint32_t point) {
      coordinator->BeginPoint(scheme, point);
    };
  }
#endif
  SessionResult session = RunSession(chains, cfg, ckpt, so);
  printer.EndLine();
  // Said before the MPI shutdown: under mpirun a lost rank makes the launcher
  // kill this process soon after, and the checkpoint is already on disk.
  std::string why = "stopped by signal";
#if CAPGAP_MPI
  if (coordinator && !coordinator->failure().empty()) why = coordinator->failure();
#endif
  std::string again = "capgap run " + args.config_path + " -o " + output + " --resume";
  for (const std::string& set : args.sets) again += " --set " + set;
  const std::string stopped = why + "; checkpoint " + ckpt_path + " saved (" +
                              std::to_string(ckpt.FinishedPoints()) +
                              " point(s) finished); continue with: " + again;
  if (session.end == SessionEnd::kInterrupted) Fail(stopped);

#if CAPGAP_MPI
  if (coordinator) {
    const int worker_status = session.end == SessionEnd::kComplete ? 0
                              : session.end == SessionEnd::kInterrupted ? kExitStopped : 1;
    if (!coordinator->failure().empty()) world->Abort(kExitStopped);  // said above
    if (!coordinator->Shutdown(worker_status, 10)) {
      std::fprintf(stderr, "capgap: a rank did not answer STOP; checkpoint %s saved\n", ckpt_path.c_str());
      world->Abort(session.end == SessionEnd::kComplete ? 1 : kExitStopped);
    }
  }
#endif
  if (session.end == SessionEnd::kFailed) return Fail(session.status.message());
  if (session.end == SessionEnd::kInterrupted) return kExitStopped;

  std::vector<SchemeResult> results;
  for (std::size_t i = 0; i < chains.size(); ++i) {
    results.push_back(AnalyseScheme(chains[i], cfg.SweepFor(i), std::move(session.points[i])));
  }
  RunMetadata meta;
  meta.command_line = args.command_line;
  meta.config_text = cfg.ResolvedText();
  meta.threads = nthreads;
  meta.seed = cfg.sweep.seed;
  meta.kernel_target = NoiseKernelTarget();
  meta.demap_kernel_target = DemapKernelTarget();
  meta.created_utc = UtcNow();
  if (Status s = WriteCurvesFile(output, meta, results); !s.ok()) return Fail(s.message());
  ckpt.complete = true;
  ckpt.updated_utc = UtcNow();
  if (Status s = WriteCheckpoint(ckpt_path, ckpt); !s.ok()) return Fail(s.message());
  auto stored = ReadCurvesFile(output);
  if (!stored.ok()) return Fail(stored.status().message());
  std::cout << FormatSummaryTable(stored.value());
  std::cout << "units: " << session.units_counted << " counted, " << session.units_reused
            << " reused from the checkpoint, " << session.units_simulated
            << " simulated in this run\n";
  std::cout << "wrote " << output << "\n";
  return 0;
}

int CmdRun(int argc, char** argv, const std::string& command_line) {
  po::options_description opts("capgap run CONFIG [options]");
  RunArgs args;
  args.command_line = command_line;
  int threads = -1;
  std::string seed_text;
  opts.add_options()("help,h", "show this help")(
      "output,o", po::value(&args.output), "output HDF5 file (default results/<config name>.h5); "
      "its checkpoint is FILE.ckpt")(
      "resume", "continue the run recorded in FILE.ckpt (finished points are kept; with larger "
      "target_errors/max_bits or more Eb/N0 points it extends them); starts fresh if there is none")(
      "set", po::value(&args.sets)->composing(),
      "override a config key, e.g. --set sweep.target_errors=500 or "
      "--set scheme.qpsk.frame_bits=4096 (repeatable)")(
      "threads", po::value(&threads), "worker threads (0: all cores; overrides sweep.threads)")(
      "seed", po::value(&seed_text), "master seed (overrides sweep.seed)")(
      "quiet,q", "no progress on stderr")(
      "scalar", "force the portable scalar kernels (no SIMD)");
  po::options_description hidden;
  hidden.add_options()("config", po::value(&args.config_path));
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
                 "Exit status: 0 done, 1 bad config/file or resume refused, 2 usage, 75 stopped "
                 "by SIGINT/SIGTERM\nwith the checkpoint saved (--resume continues), 130 second "
                 "SIGINT (exits at once).\n";
    return 0;
  }
  if (args.config_path.empty()) return Fail("run: missing CONFIG (see capgap run --help)", kExitUsage);
  if (vm.count("threads")) {
    if (threads < 0) return Fail("run: --threads = " + std::to_string(threads) + ": must be >= 0", kExitUsage);
    args.sets.push_back("sweep.threads=" + std::to_string(threads));
  }
  if (vm.count("seed")) args.sets.push_back("sweep.seed=" + seed_text);
  if (vm.count("scalar")) ForceScalarKernels(true);
  args.resume = vm.count("resume") > 0;
  args.quiet = vm.count("quiet") > 0;

  std::signal(SIGINT, OnSignal);
  std::signal(SIGTERM, OnSignal);
#if CAPGAP_MPI
  if (LaunchedByMpi()) {
    auto world = MpiWorld::Init(nullptr, nullptr);
    if (!world.ok()) return Fail(world.status().message());
    // MPI may install handlers of its own during init; ours must win.
    std::signal(SIGINT, OnSignal);
    std::signal(SIGTERM, OnSignal);
    if (world.value()->rank() > 0) return RunWorkerRank(*world.value());
    return RunMain(args, world.value()->size() > 1 ? world.value().get() : nullptr);
  }
#endif
  return RunMain(args, nullptr);
}

// ------------------------------------------------------------------ theory
int CmdTheory(int argc, char** argv) {
  po::options_description opts("capgap theory (--modulation NAME --ebno-db RANGE | --bandwidth HZ --snr-db X)");
  std::string modulation_word, range;
  double rate = 1.0, bandwidth = 0, snr_db = 0;
  opts.add_options()("help,h", "show this help")(
      "modulation", po::value(&modulation_word), "bpsk, qpsk, 8psk, 16qam, 64qam, 256qam, <M>psk, <M>qam")(
      "ebno-db", po::value(&range), "Eb/N0 points: START:STEP:STOP (inclusive) or a comma list")(
      "rate", po::value(&rate), "code rate R in (0, 1] for the limits (info bits per symbol R m)")(
      "csv", "machine-readable output: '# key = value' lines, then CSV")(
      "bandwidth", po::value(&bandwidth), "bandwidth in Hz (Shannon-Hartley capacity)")(
      "snr-db", po::value(&snr_db), "signal-to-noise ratio in dB (Shannon-Hartley capacity)");
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
  if (vm.count("bandwidth") || vm.count("snr-db")) {
    if (!vm.count("bandwidth") || !vm.count("snr-db")) {
      return Fail("theory: --bandwidth and --snr-db go together", kExitUsage);
    }
    if (!(bandwidth > 0) || !std::isfinite(bandwidth)) {
      return Fail("theory: --bandwidth = " + std::to_string(bandwidth) + ": must be > 0 Hz", kExitUsage);
    }
    const double c = analysis::ShannonHartleyCapacity(bandwidth, snr_db);
    std::printf("Shannon-Hartley capacity C = B log2(1 + S/N)\n");
    std::printf("  bandwidth  %.6g Hz\n  SNR        %.4g dB\n  capacity   %.6g bit/s (%.4f bit/s/Hz)\n",
                bandwidth, snr_db, c, c / bandwidth);
    return 0;
  }
  if (modulation_word.empty() || range.empty()) {
    return Fail("theory: need --modulation and --ebno-db (or --bandwidth and --snr-db)", kExitUsage);
  }
  auto mod = ParseModulation(modulation_word);
  if (!mod.ok()) return Fail("theory: --modulation = '" + modulation_word + "': " + mod.status().message(), kExitUsage);
  if (!(rate > 0 && rate <= 1)) {
    return Fail("theory: --rate = " + std::to_string(rate) + ": must be in (0, 1]", kExitUsage);
  }
  auto points = ParseDbList(range, "--ebno-db");
  if (!points.ok()) return Fail("theory: " + points.status().message(), kExitUsage);
  auto mapper = Mapper::Create(mod.value());
  if (!mapper.ok()) return Fail(mapper.status().message());
  const int m = mod.value().bits_per_symbol();
  const double rho = rate * m;
  const double shannon = analysis::ShannonMinEbn0Db(rho);
  const double constrained = analysis::ConstrainedMinEbn0Db(mapper.value().points(), rho);
  const double bicm = analysis::BicmMinEbn0Db(mapper.value().points(), rho);
  const bool csv = vm.count("csv") > 0;
  auto fmt = [](double v) {
    char buf[32];
    if (std::isinf(v)) return std::string(v > 0 ? "inf" : "-inf");
    std::snprintf(buf, sizeof buf, "%.4f", v);
    return std::string(buf);
  };
  if (csv) {
    std::printf("# modulation = %s\n# code_rate = %.6g\n# info_bits_per_symbol = %.6g\n",
                ToString(mod.value()).c_str(), rate, rho);
    std::printf("# shannon_ebno_db = %s\n# constrained_ebno_db = %s\n# bicm_ebno_db = %s\n",
                fmt(shannon).c_str(), fmt(constrained).c_str(), fmt(bicm).c_str());
    std::printf("ebno_db,esno_db,ber,ser\n");
  } else {
    std::printf("%s, uncoded BER/SER on AWGN (exact, Gray labelling)\n", ToString(mod.value()).c_str());
    std::printf("limits at rho = R m = %.4g information bits per symbol (eta = rho):\n", rho);
    std::printf("  Shannon (unconstrained input)  %s dB\n", fmt(shannon).c_str());
    std::printf("  constellation-constrained      %s dB%s\n", fmt(constrained).c_str(),
                std::isinf(constrained) ? "  (rho = m: no finite limit without a code)" : "");
    std::printf("  BICM (Gray)                    %s dB\n\n", fmt(bicm).c_str());
    std::printf("%9s %9s %13s %13s\n", "Eb/N0 dB", "Es/N0 dB", "BER", "SER");
  }
  for (double x : points.value()) {
    // The uncoded table is per information bit of the uncoded modulation.
    const double esno = EsN0DbFromEbN0Db(x, m);
    const double ber = analysis::UncodedBer(mod.value(), x);
    const double ser = analysis::UncodedSer(mod.value(), x);
    if (csv) {
      std::printf("%.6g,%.6g,%.6e,%.6e\n", x, esno, ber, ser);
    } else {
      std::printf("%9.3f %9.3f %13.4e %13.4e\n", x, esno, ber, ser);
    }
  }
  return 0;
}

// ----------------------------------------------------------------- summary
int CmdSummary(int argc, char** argv) {
  po::options_description opts("capgap summary FILE.h5");
  opts.add_options()("help,h", "show this help");
  po::options_description hidden;
  std::string path;
  hidden.add_options()("file", po::value(&path));
  po::options_description all;
  all.add(opts).add(hidden);
  po::positional_options_description pos;
  pos.add("file", 1);
  po::variables_map vm;
  try {
    po::store(po::command_line_parser(argc, argv).options(all).positional(pos).run(), vm);
    po::notify(vm);
  } catch (const std::exception& e) {
    return Fail(std::string("summary: ") + e.what(), kExitUsage);
  }
  if (vm.count("help")) {
    std::cout << opts << "\nPrints the summary table of every scheme in a curves file.\n";
    return 0;
  }
  if (path.empty()) return Fail("summary: missing FILE.h5", kExitUsage);
  auto run = ReadCurvesFile(path);
  if (!run.ok()) return Fail(run.status().message());
  std::cout << FormatSummaryTable(run.value());
  return 0;
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
