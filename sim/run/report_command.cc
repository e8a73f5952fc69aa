// capgap report: checks the paths, then runs analysis/report.py (see
// report_command.h) as a child process and passes its status on.
#include "sim/run/report_command.h"

#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cerrno>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <string>
#include <system_error>
#include <vector>

#include "sim/run/run.h"

extern char** environ;

namespace capgap {
namespace {

namespace fs = std::filesystem;

#ifndef CAPGAP_ANALYSIS_DIR
#define CAPGAP_ANALYSIS_DIR ""
#endif

int Fail(std::ostream& err, const std::string& message, int code) {
  err << "capgap: report: " << message << "\n";
  return code;
}

std::string EnvOr(const char* name, const std::string& fallback) {
  const char* v = std::getenv(name);
  return (v != nullptr && *v != '\0') ? std::string(v) : fallback;
}

bool EndsWithHtml(const std::string& path) {
  std::string ext = fs::path(path).extension().string();
  for (char& c : ext) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return ext == ".html" || ext == ".htm";
}

}  // namespace

std::string DefaultReportPath(const std::string& input) {
  return fs::path(input).replace_extension(".html").string();
}

int RunReport(const ReportOptions& options) {
  std::ostream& err = *options.err;
  std::error_code ec;
  if (options.input.empty()) return Fail(err, "missing FILE.h5 (capgap report --help)", kExitUsage);
  if (!fs::exists(options.input, ec)) {
    return Fail(err, options.input + ": no such file", kExitFailed);
  }
  if (!fs::is_regular_file(options.input, ec)) {
    return Fail(err, options.input + ": not a regular file (a capgap curves .h5 is needed)",
                kExitFailed);
  }
  const std::string output =
      options.output.empty() ? DefaultReportPath(options.input) : options.output;
  if (!EndsWithHtml(output)) {
    return Fail(err, "-o " + output + ": the report must end in .html", kExitUsage);
  }
  fs::path dir = fs::path(output).parent_path();
  if (dir.empty()) dir = ".";
  if (!fs::is_directory(dir, ec)) {
    return Fail(err, "-o " + output + ": directory " + dir.string() + " does not exist",
                kExitFailed);
  }
  const std::string analysis = EnvOr("CAPGAP_ANALYSIS_DIR", CAPGAP_ANALYSIS_DIR);
  const std::string script = (fs::path(analysis) / "report.py").string();
  if (analysis.empty() || !fs::is_regular_file(script, ec)) {
    return Fail(err,
                "cannot find analysis/report.py (looked for '" + script +
                    "'); set CAPGAP_ANALYSIS_DIR to the analysis/ directory of the capgap "
                    "sources",
                kExitFailed);
  }
  std::string python = EnvOr("CAPGAP_PYTHON", "");
  if (python.empty()) {
    python = ::access("/usr/bin/python3", X_OK) == 0 ? "/usr/bin/python3" : "python3";
  }
  // The figures need no display; keep bytecode out of the source tree.
  ::setenv("MPLBACKEND", "Agg", 0);
  ::setenv("PYTHONDONTWRITEBYTECODE", "1", 1);
  std::vector<std::string> args = {python, "-B", script, options.input, "-o", output};
  std::vector<char*> argv;
  for (std::string& a : args) argv.push_back(a.data());
  argv.push_back(nullptr);
  pid_t pid = 0;
  const int rc = ::posix_spawnp(&pid, python.c_str(), nullptr, nullptr, argv.data(), environ);
  if (rc != 0) {
    return Fail(err,
                "cannot start " + python + " (" + std::strerror(rc) +
                    "); install python3 with python3-matplotlib python3-h5py python3-numpy "
                    "or set CAPGAP_PYTHON",
                kExitFailed);
  }
  int status = 0;
  while (::waitpid(pid, &status, 0) < 0) {
    if (errno != EINTR) return Fail(err, "waiting for " + python + " failed", kExitFailed);
  }
  if (WIFEXITED(status) && WEXITSTATUS(status) == 0) return kExitDone;
  if (WIFEXITED(status) && WEXITSTATUS(status) == kExitUsage) return kExitUsage;
  return Fail(err,
              script + " did not write " + output +
                  (WIFEXITED(status) ? " (exit status " + std::to_string(WEXITSTATUS(status)) + ")"
                                     : std::string(" (killed by a signal)")),
              kExitFailed);
}

}  // namespace capgap
