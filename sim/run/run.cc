// `capgap run` (see run.h): argument checks, config, output path, checkpoint,
// chains, the session with progress, the curves file and the summary. The
// only thing it knows about MPI is the RunPeers interface.
#include "sim/run/run.h"

#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <memory>
#include <string>
#include <vector>

#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/demap_kernels.h"
#include "sim/chain/chain.h"
#include "sim/chain/scheme_result.h"
#include "sim/config/config.h"
#include "sim/config/text.h"
#include "sim/io/atomic_file.h"
#include "sim/io/build_info.h"
#include "sim/io/checkpoint.h"
#include "sim/io/curves_file.h"
#include "sim/io/summary_table.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;

// Effective progress mode (kAuto resolved).
ProgressMode ResolveProgress(const RunOptions& o, int ranks) {
  if (o.progress != ProgressMode::kAuto) return o.progress;
  if (ranks > 1) return ProgressMode::kLines;
  if (o.err == &std::cerr && ::isatty(STDERR_FILENO)) return ProgressMode::kBar;
  return ProgressMode::kOff;
}

// kBar: one line rewritten in place (a terminal). kLines: a full line every
// few seconds, for logs (MPI runs, where only rank 0 prints, so the output is
// one line per update, not one per rank).
class ProgressPrinter {
 public:
  ProgressPrinter(ProgressMode mode, std::ostream& err) : mode_(mode), err_(err) {}
  bool enabled() const { return mode_ != ProgressMode::kOff; }

  void Update(const Progress& p) {
    if (!enabled()) return;
    // The point stops at whichever target it reaches first (unset targets: 0).
    const auto fraction = [](std::uint64_t have, std::uint64_t target) {
      return target == 0 ? 0.0 : static_cast<double>(have) / static_cast<double>(target);
    };
    const double f = std::min(
        1.0, std::max({fraction(p.counts.bit_errors, p.stop_bit_errors),
                       fraction(p.counts.frame_errors, p.stop_frame_errors),
                       fraction(p.counts.bits, p.stop_bits)}));
    // "errors 12/100", "frame errors 3/50" or both, as configured.
    char targets[160] = "";
    if (p.stop_bit_errors > 0) {
      std::snprintf(targets, sizeof targets, "errors %llu/%llu",
                    static_cast<unsigned long long>(p.counts.bit_errors),
                    static_cast<unsigned long long>(p.stop_bit_errors));
    }
    if (p.stop_frame_errors > 0) {
      const std::size_t used = std::strlen(targets);
      std::snprintf(targets + used, sizeof targets - used, "%sframe errors %llu/%llu",
                    used ? "  " : "", static_cast<unsigned long long>(p.counts.frame_errors),
                    static_cast<unsigned long long>(p.stop_frame_errors));
    }
    char eta[32] = "?";
    if (f > 0) std::snprintf(eta, sizeof eta, "%.0fs", p.seconds * (1 - f) / f);
    char line[512];
    std::snprintf(
        line, sizeof line,
        "%s[%s] point %zu/%zu  Eb/N0 %6.2f dB  %s  bits %.3g  "
        "%.1f Mbit/s  ETA %s%s",
        mode_ == ProgressMode::kBar ? "\r\033[K" : "", p.scheme->c_str(), p.point_index + 1,
        p.point_count, p.ebno_db, targets, static_cast<double>(p.counts.bits),
        p.bits_per_second / 1e6, eta, mode_ == ProgressMode::kLines ? "\n" : "");
    err_ << line << std::flush;
    bar_drawn_ = mode_ == ProgressMode::kBar;
  }
  void PointDone(const std::string& scheme, std::size_t i, std::size_t n, const PointResult& r) {
    if (!enabled()) return;
    char line[512];
    std::snprintf(line, sizeof line,
                  "%s[%s] point %zu/%zu  Eb/N0 %6.2f dB  BER %.3e [%.2e, %.2e]  "
                  "errors %llu  bits %.3g  %.1fs  (%s%s)\n",
                  mode_ == ProgressMode::kBar ? "\r\033[K" : "", scheme.c_str(), i + 1, n,
                  r.ebno_db, r.ber(), r.ber_ci.low, r.ber_ci.high,
                  static_cast<unsigned long long>(r.counts.bit_errors),
                  static_cast<double>(r.counts.bits), r.seconds, ToString(r.stop_reason).c_str(),
                  r.units_simulated == 0 ? ", from checkpoint" : "");
    err_ << line << std::flush;
    bar_drawn_ = false;
  }
  // Ends a bar left on screen (before other messages).
  void EndLine() {
    if (bar_drawn_) err_ << "\n" << std::flush;
    bar_drawn_ = false;
  }

 private:
  ProgressMode mode_;
  std::ostream& err_;
  bool bar_drawn_ = false;
};

// "--seed" value: decimal digits only, at most 2^64 - 1 (sim/config/text.h).
bool ParseSeed(const std::string& text, std::uint64_t* seed) {
  auto v = ParseUint64(text);
  if (v.ok()) *seed = v.value();
  return v.ok();
}

// The output path against the file system (after CheckRunArguments): not a
// directory, in an existing writable directory. The default results/ is
// created.
Status CheckOutputPath(const std::string& output, bool is_default) {
  std::error_code ec;
  const fs::path path(output);
  fs::path dir = path.parent_path();
  if (is_default && !dir.empty()) {
    fs::create_directories(dir, ec);
    if (ec) {
      return Status::Error("cannot create the output directory '" + dir.string() +
                           "': " + ec.message());
    }
  }
  const std::string what = is_default ? "output '" + output + "'" : "run: -o '" + output + "'";
  if (fs::is_directory(path, ec)) {
    return Status::Error(what + ": is a directory; give a file name, e.g. " +
                         (path / "curves.h5").string());
  }
  if (dir.empty()) dir = ".";
  if (!fs::exists(dir, ec)) {
    return Status::Error(what + ": directory '" + dir.string() +
                         "' does not exist (create it first)");
  }
  if (!fs::is_directory(dir, ec)) {
    return Status::Error(what + ": '" + dir.string() + "' is not a directory");
  }
  if (::access(dir.c_str(), W_OK | X_OK) != 0) {
    return Status::Error(what + ": directory '" + dir.string() + "' is not writable");
  }
  return Status::Ok();
}

std::string Quoted(const std::string& s) { return "'" + s + "'"; }

}  // namespace

Status CheckRunArguments(const RunOptions& o) {
  if (o.config_path.empty()) return Status::Error("run: missing CONFIG (see capgap run --help)");
  if (o.output) {
    const std::string& out = *o.output;
    if (out.empty()) {
      return Status::Error("run: -o '': must name the output file, e.g. -o results/curves.h5");
    }
    if (out.back() == '/') {
      return Status::Error("run: -o " + Quoted(out) + ": ends in '/', which names a directory; " +
                           "give a file name, e.g. -o " + out + "curves.h5");
    }
  }
  if (o.threads && (*o.threads < 0 || *o.threads > kMaxThreadsOption)) {
    return Status::Error("run: --threads = " + std::to_string(*o.threads) +
                         ": must be an integer in [0, " + std::to_string(kMaxThreadsOption) +
                         "] (0: all cores)");
  }
  std::uint64_t seed = 0;
  if (o.seed && !ParseSeed(*o.seed, &seed)) {
    return Status::Error("run: --seed = " + Quoted(*o.seed) +
                         ": must be an integer in [0, 18446744073709551615]");
  }
  for (const std::string& set : o.overrides) {
    const auto eq = set.find('=');
    if (eq == std::string::npos || eq == 0) {
      return Status::Error("run: --set " + Quoted(set) +
                           ": expected KEY=VALUE, e.g. --set sweep.stop_bit_errors=500");
    }
  }
  return Status::Ok();
}

int Run(const RunOptions& o) {
  std::ostream& err = *o.err;
  std::ostream& out = *o.out;
  RunPeers* peers = o.peers && o.peers->size() > 1 ? o.peers : nullptr;
  const int ranks = peers ? peers->size() : 1;
  bool started = false;
  auto say = [&](const std::string& message) {
    err << "capgap: " << message << "\n" << std::flush;
  };
  // Setup failures must release the peers from their first collective.
  auto fail = [&](const std::string& message, int code = kExitFailed) {
    if (peers && !started) {
      peers->Release();
      started = true;
    }
    say(message);
    return code;
  };

  if (Status s = CheckRunArguments(o); !s.ok()) return fail(s.message(), kExitUsage);
  if (o.scalar) ForceScalarKernels(true);

  // Command-line values become overrides after the --set ones (they win).
  std::vector<std::string> overrides = o.overrides;
  if (o.threads) overrides.push_back("sweep.threads=" + std::to_string(*o.threads));
  if (o.seed) overrides.push_back("sweep.seed=" + *o.seed);
  auto config = LoadRunConfig(o.config_path, overrides);
  if (!config.ok()) return fail(config.status().message());
  const RunConfig& cfg = config.value();

  const bool default_output = !o.output.has_value();
  const std::string output =
      default_output ? "results/" + fs::path(o.config_path).stem().string() + ".h5" : *o.output;
  if (Status s = CheckOutputPath(output, default_output); !s.ok()) return fail(s.message());
  const std::string ckpt_path = CheckpointPath(output);
  RemoveStaleTemporaries(output);
  RemoveStaleTemporaries(ckpt_path);

  // Checkpoint: continue it (--resume), or refuse to overwrite unfinished work.
  Checkpoint ckpt;
  bool resumed = false;
  if (fs::exists(ckpt_path)) {
    auto stored = ReadCheckpoint(ckpt_path);
    if (o.resume) {
      if (!stored.ok()) return fail("cannot resume: " + stored.status().message());
      if (Status s = CheckResumable(stored.value(), cfg, ckpt_path); !s.ok())
        return fail(s.message());
      ckpt = std::move(stored).value();
      resumed = true;
    } else if (stored.ok() && !stored.value().complete) {
      return fail(ckpt_path + " holds an unfinished run (" +
                  std::to_string(stored.value().FinishedPoints()) +
                  " point(s) finished); continue it with --resume, or delete it to start over");
    }
  }

  const int nthreads = ResolveThreadCount(cfg.sweep.threads);
  // Command line to continue a stopped run.
  auto again = [&]() {
    std::string line = "capgap run " + o.config_path + " -o " + output + " --resume";
    for (const std::string& set : o.overrides) line += " --set " + set;
    if (o.threads) line += " --threads " + std::to_string(*o.threads);
    if (o.seed) line += " --seed " + *o.seed;
    return line;
  };

  // Stopped before anything was simulated (here or, under MPI, on another
  // rank while it built its codes): a resumed checkpoint stays as it is; a
  // fresh run records its config with no point yet, so that the run
  // continues with --resume like after any other stop.
  auto stopped_building = [&](const std::string& what) {
    if (!resumed) {
      ckpt.complete = false;
      ckpt.seed = cfg.sweep.seed;
      ckpt.kernel_target = NoiseKernelTarget();
      ckpt.config_text = cfg.ResolvedText();
      ckpt.updated_utc = UtcNow();
      ckpt.schemes.clear();
      for (const SchemeConfig& sc : cfg.schemes) ckpt.schemes.push_back(SchemeRecord{sc.name, {}});
      if (Status w = WriteCheckpoint(ckpt_path, ckpt); !w.ok()) return fail(w.message());
    }
    return fail(what + "; checkpoint " + ckpt_path + " saved (" +
                    std::to_string(ckpt.FinishedPoints()) +
                    " point(s) finished); continue with: " + again(),
                kExitStopped);
  };
  // Build every chain before the first frame, so a bad scheme fails fast.
  // The interrupt flag reaches the constructions (PEG, the encoder's
  // elimination), which then stop within a second.
  BuildContext build;
  build.stop = o.interrupt;
  build.threads = nthreads;
  std::vector<Chain> chains;
  for (const SchemeConfig& s : cfg.schemes) {
    auto chain = Chain::Create(s, cfg.sweep.seed, build);
    if (chain.ok()) {
      chains.push_back(std::move(chain).value());
      continue;
    }
    if (!chain.status().stopped()) return fail(o.config_path + ": " + chain.status().message());
    return stopped_building("stopped by signal while building the code of scheme '" + s.name + "'");
  }
  // Recorded counts checked against the chains before anything is written:
  // a refused checkpoint is left as it is.
  if (resumed) {
    if (Status s = CheckRecordedCounts(ckpt, chains, ckpt_path); !s.ok()) return fail(s.message());
  }

  const ProgressMode mode = ResolveProgress(o, ranks);
  ProgressPrinter printer(mode, err);

  if (peers) {
    std::vector<std::string> notes;
    const Status s = peers->Start(cfg.ResolvedText(), &notes);
    started = true;
    if (s.stopped()) return stopped_building(s.message());
    if (!s.ok()) return fail(s.message());
    for (const std::string& note : notes) say("note: " + note);
  }

  if (printer.enabled()) {
    char line[256];
    std::snprintf(
        line, sizeof line,
        "capgap %s: %zu scheme(s), %d process(es) x %d thread(s), kernels %s, seed %llu\n",
        ProgramVersion(), chains.size(), ranks, nthreads, NoiseKernelTarget(),
        static_cast<unsigned long long>(cfg.sweep.seed));
    err << line;
    if (AssertionsEnabled()) err << "note: assertions are on (debug build): slow\n";
    if (resumed) {
      err << "resuming from " << ckpt_path << ": " << ckpt.FinishedPoints()
          << " point(s) finished, " << ckpt.RecordedPoints() << " recorded\n";
    }
    err << std::flush;
  }
  if (resumed && ckpt.kernel_target != NoiseKernelTarget()) {
    say("note: " + ckpt_path + " was written with the " + ckpt.kernel_target +
        " noise kernels, this run uses " + NoiseKernelTarget() +
        "; their float rounding differs, so the counts can differ slightly from an uninterrupted "
        "run (--scalar on both sides makes them identical)");
  }
  if (o.resume && !resumed && printer.enabled()) {
    err << "no checkpoint " << ckpt_path << ": starting from the beginning\n" << std::flush;
  }

  SessionOptions so;
  so.engine.threads = cfg.sweep.threads;
  so.engine.interrupt = o.interrupt;
  if (printer.enabled()) {
    so.engine.on_progress = [&](const Progress& p) { printer.Update(p); };
    if (mode == ProgressMode::kLines) so.engine.progress_interval_seconds = 10;
  }
  so.checkpoint_path = ckpt_path;
  so.kernel_target = NoiseKernelTarget();
  so.on_point_done = [&](const std::string& scheme, std::size_t i, std::size_t n,
                         const PointResult& r) { printer.PointDone(scheme, i, n, r); };
  so.on_warning = [&](const std::string& message) {
    printer.EndLine();
    say("warning: " + message);
  };
  if (peers) {
    so.engine.exchange = peers->exchange();
    so.on_point_begin = [&](std::size_t scheme, std::uint32_t point) {
      peers->BeginPoint(scheme, point);
    };
  }
  SessionResult session = RunSession(chains, cfg, ckpt, so);
  printer.EndLine();
  // Said before the peers are stopped: under mpirun a lost rank makes the
  // launcher kill this process soon after, and the checkpoint is on disk.
  if (session.end == SessionEnd::kInterrupted) {
    std::string why = "stopped by signal";
    if (peers && !peers->failure().empty()) why = peers->failure();
    say(why + "; checkpoint " + ckpt_path + " saved (" + std::to_string(ckpt.FinishedPoints()) +
        " point(s) finished); continue with: " + again());
  }
  if (peers) peers->Finish(session.end, ckpt_path, err);
  if (session.end == SessionEnd::kFailed) return fail(session.status.message());
  if (session.end == SessionEnd::kInterrupted) return kExitStopped;

  std::vector<SchemeResult> results;
  for (std::size_t i = 0; i < chains.size(); ++i) {
    results.push_back(
        AnalyseScheme(chains[i], cfg.SweepFor(i), std::move(session.points[i]), o.interrupt));
  }
  // A stop during the analysis (density evolution takes seconds for some
  // LDPC ensembles): every point is in the checkpoint, --resume redoes the
  // analysis and writes the file.
  if (o.interrupt && o.interrupt->load()) {
    say("stopped by signal during the analysis; checkpoint " + ckpt_path + " saved (" +
        std::to_string(ckpt.FinishedPoints()) + " point(s) finished); continue with: " + again());
    return kExitStopped;
  }
  RunMetadata meta;
  meta.command_line = o.command_line;
  meta.config_text = cfg.ResolvedText();
  meta.threads = nthreads;
  meta.ranks = ranks;
  meta.seed = cfg.sweep.seed;
  meta.kernel_target = NoiseKernelTarget();
  meta.demap_kernel_target = DemapKernelTarget();
  meta.created_utc = UtcNow();
  if (Status s = WriteCurvesFile(output, meta, results); !s.ok()) return fail(s.message());
  ckpt.complete = true;
  ckpt.updated_utc = UtcNow();
  if (Status s = WriteCheckpoint(ckpt_path, ckpt); !s.ok()) return fail(s.message());
  auto stored = ReadCurvesFile(output);
  if (!stored.ok()) return fail(stored.status().message());
  out << FormatSummaryTable(stored.value());
  out << "units: " << session.units_counted << " counted, " << session.units_reused
      << " reused from the checkpoint, " << session.units_simulated << " simulated in this run\n";
  out << "wrote " << output << "\n" << std::flush;
  return kExitDone;
}

}  // namespace capgap
