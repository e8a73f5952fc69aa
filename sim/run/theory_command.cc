// `capgap theory` and `capgap summary` (see theory_command.h).
#include "sim/run/theory_command.h"

#include <sys/wait.h>
#include <unistd.h>

#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <functional>
#include <sstream>
#include <string>
#include <vector>

#include "analysis/capacity.h"
#include "analysis/uncoded_theory.h"
#include "blocks/core/energy.h"
#include "blocks/mapping/mapper.h"
#include "sim/chain/registry.h"
#include "sim/config/config.h"
#include "sim/io/curves_file.h"
#include "sim/io/summary_table.h"
#include "sim/run/run.h"

namespace capgap {
namespace {

std::string Number(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

// printf into a string (theory's table layout).
template <typename... Args>
std::string Format(const char* format, Args... args) {
  char buf[256];
  std::snprintf(buf, sizeof buf, format, args...);
  return buf;
}

// "" when lo <= v <= hi (and v finite), else the rule naming the option.
std::string RangeError(const char* option, double v, double lo, double hi, const char* unit) {
  if (std::isfinite(v) && v >= lo && v <= hi) return "";
  return std::string("theory: ") + option + " = " + Number(v) + ": must be a number in [" +
         Number(lo) + ", " + Number(hi) + "]" + unit;
}

int ShannonHartley(double bandwidth, double snr_db, std::ostream& out) {
  const double c = analysis::ShannonHartleyCapacity(bandwidth, snr_db);
  out << "Shannon-Hartley capacity C = B log2(1 + S/N)\n"
      << Format("  bandwidth  %.6g Hz\n", bandwidth) << Format("  SNR        %.4g dB\n", snr_db)
      << Format("  capacity   %.6g bit/s (%.4f bit/s/Hz)\n", c, c / bandwidth);
  return kExitDone;
}

}  // namespace

int RunTheory(const TheoryOptions& o) {
  std::ostream& out = *o.out;
  auto usage = [&](const std::string& message) {
    *o.err << "capgap: " << message << "\n" << std::flush;
    return kExitUsage;
  };
  const bool capacity_form = o.bandwidth_hz || o.snr_db;
  const bool table_form = o.modulation || o.ebno_db || o.rate || o.csv;
  if (capacity_form && table_form) {
    return usage(
        "theory: --bandwidth/--snr-db (Shannon-Hartley capacity) and "
        "--modulation/--ebno-db/--rate/--csv (uncoded tables and limits) cannot be combined; "
        "give one group");
  }
  if (capacity_form) {
    if (!o.bandwidth_hz || !o.snr_db) return usage("theory: --bandwidth and --snr-db go together");
    const double bw = *o.bandwidth_hz;
    if (!(std::isfinite(bw) && bw > 0 && bw <= kTheoryMaxBandwidthHz)) {
      return usage("theory: --bandwidth = " + Number(bw) + ": must be a number in (0, " +
                   Number(kTheoryMaxBandwidthHz) + "] Hz");
    }
    if (auto e = RangeError("--snr-db", *o.snr_db, kTheoryMinDb, kTheoryMaxDb, " dB"); !e.empty()) {
      return usage(e);
    }
    return ShannonHartley(bw, *o.snr_db, out);
  }
  if (!o.modulation || !o.ebno_db || o.modulation->empty() || o.ebno_db->empty()) {
    return usage("theory: need --modulation and --ebno-db (or --bandwidth and --snr-db)");
  }
  auto mod = ParseConstellation(*o.modulation);
  if (!mod.ok())
    return usage("theory: --modulation = '" + *o.modulation + "': " + mod.status().message());
  const double rate = o.rate.value_or(1.0);
  if (auto e = RangeError("--rate", rate, kTheoryMinRate, 1.0, " (code rate)"); !e.empty()) {
    return usage(e);
  }
  auto points = ParseDbList(*o.ebno_db, "--ebno-db");
  if (!points.ok()) return usage("theory: " + points.status().message());
  for (double x : points.value()) {
    if (x < kTheoryMinDb || x > kTheoryMaxDb) {
      return usage("theory: --ebno-db = '" + *o.ebno_db + "': point " + Number(x) +
                   " dB is outside [" + Number(kTheoryMinDb) + ", " + Number(kTheoryMaxDb) +
                   "] dB");
    }
  }
  auto mapper = Mapper::Create(mod.value());
  if (!mapper.ok()) {
    *o.err << "capgap: " << mapper.status().message() << "\n";
    return kExitFailed;
  }
  const int m = mod.value().bits_per_symbol();
  const double rho = rate * m;
  const double shannon = analysis::ShannonMinEbnoDb(rho);
  const double constrained = analysis::ConstrainedMinEbnoDb(mapper.value().points(), rho);
  const double bicm = analysis::BicmMinEbnoDb(mapper.value().points(), rho);
  auto fmt = [](double v) {
    if (std::isinf(v)) return std::string(v > 0 ? "inf" : "-inf");
    return Format("%.4f", v);
  };
  const std::string name = ToString(mod.value());
  if (o.csv) {
    out << "# modulation = " << name << "\n"
        << Format("# code_rate = %.6g\n# info_bits_per_symbol = %.6g\n", rate, rho)
        << "# shannon_ebno_db = " << fmt(shannon)
        << "\n# constrained_ebno_db = " << fmt(constrained) << "\n# bicm_ebno_db = " << fmt(bicm)
        << "\nebno_db,esno_db,ber,ser\n";
  } else {
    out << name << ", uncoded BER/SER on AWGN ("
        << (analysis::UncodedTheoryIsExact(mod.value()) ? "exact, Gray labelling"
                                                        : "union bound over the points")
        << ")\n"
        << Format("limits at rho = R m = %.4g information bits per symbol (eta = rho):\n", rho)
        << "  Shannon (unconstrained input)  " << fmt(shannon) << " dB\n"
        << "  constellation-constrained      " << fmt(constrained) << " dB"
        << (std::isinf(constrained) ? "  (rho = m: no finite limit without a code)" : "") << "\n"
        << "  BICM (Gray)                    " << fmt(bicm) << " dB\n\n"
        << Format("%9s %9s %13s %13s\n", "Eb/N0 dB", "Es/N0 dB", "BER", "SER");
  }
  for (double x : points.value()) {
    // The uncoded table is per information bit of the uncoded modulation.
    const double esno = EsnoDbFromEbnoDb(x, m);
    const double ber = analysis::UncodedBer(mod.value(), x);
    const double ser = analysis::UncodedSer(mod.value(), x);
    out << (o.csv ? Format("%.6g,%.6g,%.6e,%.6e\n", x, esno, ber, ser)
                  : Format("%9.3f %9.3f %13.4e %13.4e\n", x, esno, ber, ser));
  }
  out << std::flush;
  return kExitDone;
}

namespace {

// Runs `make_text` in a child process and prints its text on `out`, or the
// error on `err` naming `path`; see RunSummary for why a child.
int InChild(const std::string& path, const std::function<Result<std::string>()>& make_text,
            std::ostream& out, std::ostream& err);

}  // namespace

int RunSummary(const std::string& path, std::ostream& out, std::ostream& err) {
  return InChild(
      path,
      [&]() -> Result<std::string> {
        auto run = ReadCurvesFile(path);
        if (!run.ok()) return run.status();
        return FormatSummaryTable(run.value());
      },
      out, err);
}

int RunSummaryComparison(const std::vector<std::string>& paths, std::ostream& out,
                         std::ostream& err) {
  if (paths.size() == 1) return RunSummary(paths[0], out, err);
  // Each file is first read alone, so that a damaged one is named; then all
  // of them together in one child that formats the comparison.
  std::ostringstream ignored;
  for (const std::string& path : paths) {
    const int status = InChild(
        path, [&]() -> Result<std::string> {
          auto run = ReadCurvesFile(path);
          if (!run.ok()) return run.status();
          return std::string();
        },
        ignored, err);
    if (status != kExitDone) return status;
  }
  std::vector<std::string> labels;
  for (std::size_t i = 0; i < paths.size(); ++i) {
    // Built by append: GCC 12 warns falsely (-Wrestrict) on "F" + string.
    std::string label(1, i < 26 ? static_cast<char>('A' + i) : 'F');
    if (i >= 26) label.append(std::to_string(i + 1));
    labels.push_back(label);
  }
  return InChild(
      paths[0],
      [&]() -> Result<std::string> {
        std::vector<StoredRun> runs;
        for (const std::string& path : paths) {
          auto run = ReadCurvesFile(path);
          if (!run.ok()) return run.status();
          runs.push_back(std::move(run).value());
        }
        return FormatComparisonTable(labels, paths, runs);
      },
      out, err);
}

namespace {

int InChild(const std::string& path, const std::function<Result<std::string>()>& make_text,
            std::ostream& out, std::ostream& err) {
  // The file is parsed in a child process: the HDF5 library (1.10) can
  // crash on a damaged file (e.g. a corrupt global heap behind a
  // variable-length string), which our validation cannot prevent as it
  // happens inside the library's own decoding. The child sends back a
  // status byte and the table or the message; a child killed by a signal
  // becomes status 1 with the reason.
  int fds[2];
  if (::pipe(fds) != 0) {
    err << "capgap: " << path << ": cannot create a pipe: " << std::strerror(errno) << "\n";
    return kExitFailed;
  }
  std::fflush(nullptr);
  const pid_t child = ::fork();
  if (child < 0) {
    ::close(fds[0]);
    ::close(fds[1]);
    err << "capgap: " << path << ": cannot fork: " << std::strerror(errno) << "\n";
    return kExitFailed;
  }
  if (child == 0) {
    ::close(fds[0]);
    auto text = make_text();
    // Built by append: GCC 12 warns falsely (-Wrestrict) on "0" + string.
    std::string reply(1, text.ok() ? '0' : '1');
    reply.append(text.ok() ? text.value() : text.status().message());
    std::size_t done = 0;
    while (done < reply.size()) {
      const ssize_t n = ::write(fds[1], reply.data() + done, reply.size() - done);
      if (n < 0 && errno == EINTR) continue;
      if (n <= 0) ::_exit(2);
      done += static_cast<std::size_t>(n);
    }
    ::_exit(0);
  }
  ::close(fds[1]);
  std::string reply;
  char buf[65536];
  for (;;) {
    const ssize_t n = ::read(fds[0], buf, sizeof buf);
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) break;
    reply.append(buf, static_cast<std::size_t>(n));
  }
  ::close(fds[0]);
  int status = 0;
  while (::waitpid(child, &status, 0) < 0 && errno == EINTR) {
  }
  if (WIFSIGNALED(status)) {
    err << "capgap: " << path << ": damaged HDF5 file: the HDF5 library failed reading it (signal "
        << WTERMSIG(status) << ")\n";
    return kExitFailed;
  }
  if (!WIFEXITED(status) || WEXITSTATUS(status) != 0 || reply.empty()) {
    err << "capgap: " << path << ": cannot read curves file (reader process failed)\n";
    return kExitFailed;
  }
  if (reply[0] != '0') {
    err << "capgap: " << reply.substr(1) << "\n";
    return kExitFailed;
  }
  out << reply.substr(1) << std::flush;
  return kExitDone;
}

}  // namespace

}  // namespace capgap
