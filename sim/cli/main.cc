// capgap command-line entry: `run` (simulate a scheme file), `theory`
// (closed-form tables and limits), `summary` (table of a curves file).
// Every bad input gives one line naming the key, the value and what is
// allowed, and a non-zero exit; no half-written output is left behind.
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
#include "blocks/mapping/mapper.h"
#include "sim/build_info.h"
#include "sim/chain.h"
#include "sim/config.h"
#include "sim/curves_file.h"
#include "sim/engine.h"
#include "sim/scheme_result.h"
#include "sim/summary_table.h"

namespace po = boost::program_options;
using namespace capgap;

namespace {

constexpr int kExitUsage = 2;
constexpr int kExitInterrupted = 130;

std::atomic<bool> g_interrupt{false};

void OnSignal(int) {
  if (g_interrupt.exchange(true)) std::_Exit(kExitInterrupted);  // second signal: now
}

int Fail(const std::string& message, int code = 1) {
  std::cerr << "capgap: " << message << "\n";
  return code;
}

const char kMainHelp[] =
    "capgap: Monte Carlo BER/FER of modulation and coding schemes against theory and\n"
    "capacity limits.\n\n"
    "Usage:\n"
    "  capgap run CONFIG [-o FILE.h5] [--set KEY=VALUE]... [--threads N] [--seed S] [--quiet]\n"
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
class ProgressPrinter {
 public:
  explicit ProgressPrinter(bool enabled) : enabled_(enabled) {}
  bool enabled() const { return enabled_; }

  void Update(const Progress& p) {
    if (!enabled_) return;
    const double f_err = static_cast<double>(p.counts.bit_errors) / static_cast<double>(p.target_errors);
    const double f_bits = static_cast<double>(p.counts.bits) / static_cast<double>(p.max_bits);
    const double f = std::min(1.0, std::max(f_err, f_bits));
    char eta[32] = "?";
    if (f > 0) std::snprintf(eta, sizeof eta, "%.0fs", p.seconds * (1 - f) / f);
    std::fprintf(stderr,
                 "\r\033[K[%s] point %zu/%zu  Eb/N0 %6.2f dB  errors %llu/%llu  bits %.3g  "
                 "%.1f Mbit/s  ETA %s",
                 p.scheme->c_str(), p.point_index + 1, p.point_count, p.ebno_db,
                 static_cast<unsigned long long>(p.counts.bit_errors),
                 static_cast<unsigned long long>(p.target_errors),
                 static_cast<double>(p.counts.bits), p.bits_per_second / 1e6, eta);
    std::fflush(stderr);
  }
  void PointDone(const std::string& scheme, std::size_t i, std::size_t n, const PointResult& r) {
    if (!enabled_) return;
    std::fprintf(stderr,
                 "\r\033[K[%s] point %zu/%zu  Eb/N0 %6.2f dB  BER %.3e [%.2e, %.2e]  "
                 "errors %llu  bits %.3g  %.1fs  (%s)\n",
                 scheme.c_str(), i + 1, n, r.ebno_db, r.ber(), r.ber_ci.low, r.ber_ci.high,
                 static_cast<unsigned long long>(r.counts.bit_errors),
                 static_cast<double>(r.counts.bits), r.seconds, ToString(r.stop_reason).c_str());
  }

 private:
  bool enabled_;
};

// --------------------------------------------------------------------- run
int CmdRun(int argc, char** argv, const std::string& command_line) {
  po::options_description opts("capgap run CONFIG [options]");
  std::string output;
  std::vector<std::string> sets;
  int threads = -1;
  std::string seed_text;
  opts.add_options()("help,h", "show this help")(
      "output,o", po::value(&output), "output HDF5 file (default results/<config name>.h5)")(
      "set", po::value(&sets)->composing(),
      "override a config key, e.g. --set sweep.target_errors=500 or "
      "--set scheme.qpsk.frame_bits=4096 (repeatable)")(
      "threads", po::value(&threads), "worker threads (0: all cores; overrides sweep.threads)")(
      "seed", po::value(&seed_text), "master seed (overrides sweep.seed)")(
      "quiet,q", "no progress on stderr")(
      "scalar", "force the portable scalar kernels (no SIMD)");
  po::options_description hidden;
  std::string config_path;
  hidden.add_options()("config", po::value(&config_path));
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
    std::cout << opts << "\nCONFIG is an INI scheme file; see configs/ and the README.\n";
    return 0;
  }
  if (config_path.empty()) return Fail("run: missing CONFIG (see capgap run --help)", kExitUsage);
  if (vm.count("threads")) {
    if (threads < 0) return Fail("run: --threads = " + std::to_string(threads) + ": must be >= 0", kExitUsage);
    sets.push_back("sweep.threads=" + std::to_string(threads));
  }
  if (vm.count("seed")) sets.push_back("sweep.seed=" + seed_text);
  if (vm.count("scalar")) ForceScalarKernels(true);

  auto config = LoadRunConfig(config_path, sets);
  if (!config.ok()) return Fail(config.status().message());
  const RunConfig& cfg = config.value();
  if (output.empty()) {
    output = "results/" + std::filesystem::path(config_path).stem().string() + ".h5";
  }

  // Build every chain before the first frame, so a bad scheme fails fast.
  std::vector<Chain> chains;
  for (const SchemeConfig& s : cfg.schemes) {
    auto chain = Chain::Create(s, cfg.sweep.seed);
    if (!chain.ok()) return Fail(config_path + ": " + chain.status().message());
    chains.push_back(std::move(chain).value());
  }

  std::signal(SIGINT, OnSignal);
  std::signal(SIGTERM, OnSignal);
  const bool show = !vm.count("quiet") && ::isatty(STDERR_FILENO);
  ProgressPrinter printer(show);
  EngineOptions eo;
  eo.threads = cfg.sweep.threads;
  eo.interrupt = &g_interrupt;
  if (show) eo.on_progress = [&](const Progress& p) { printer.Update(p); };
  const int nthreads = ResolveThreadCount(cfg.sweep.threads);
  if (show) {
    std::fprintf(stderr, "capgap %s: %zu scheme(s), %d thread(s), kernels %s, seed %llu\n",
                 ProgramVersion(), chains.size(), nthreads, NoiseKernelTarget(),
                 static_cast<unsigned long long>(cfg.sweep.seed));
    if (AssertionsEnabled()) std::fprintf(stderr, "note: assertions are on (debug build): slow\n");
  }

  std::vector<SchemeResult> results;
  for (const Chain& chain : chains) {
    std::vector<PointResult> points;
    for (std::size_t i = 0; i < cfg.sweep.ebno_db.size(); ++i) {
      PointResult r = RunPoint(chain, cfg.sweep, static_cast<std::uint32_t>(i), cfg.sweep.ebno_db[i], eo);
      if (r.stop_reason == StopReason::kInterrupted) {
        if (show) std::fprintf(stderr, "\n");
        return Fail("interrupted; no output written (" + output + " untouched)", kExitInterrupted);
      }
      printer.PointDone(chain.scheme().name, i, cfg.sweep.ebno_db.size(), r);
      points.push_back(r);
      if (r.counts.bit_errors == 0 || r.ber() < cfg.sweep.ber_floor) break;
    }
    results.push_back(AnalyseScheme(chain, cfg.sweep, std::move(points)));
  }

  RunMetadata meta;
  meta.command_line = command_line;
  meta.config_text = cfg.ResolvedText();
  meta.threads = nthreads;
  meta.seed = cfg.sweep.seed;
  meta.kernel_target = NoiseKernelTarget();
  meta.created_utc = UtcNow();
  if (Status s = WriteCurvesFile(output, meta, results); !s.ok()) return Fail(s.message());
  auto stored = ReadCurvesFile(output);
  if (!stored.ok()) return Fail(stored.status().message());
  std::cout << FormatSummaryTable(stored.value());
  std::cout << "wrote " << output << "\n";
  return 0;
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
