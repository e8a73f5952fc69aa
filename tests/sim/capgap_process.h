// Test helpers shared by the CLI-driven checkpoint/resume and MPI tests:
// start the capgap binary (directly or under an MPI launcher) with its output
// in a file, signal it, wait with a timeout; read back a curves file's
// per-point counts with the HDF5 API; compare checkpoint records.
#ifndef CAPGAP_TESTS_SIM_CAPGAP_PROCESS_H_
#define CAPGAP_TESTS_SIM_CAPGAP_PROCESS_H_

#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include <H5Cpp.h>
#include <gtest/gtest.h>

#include "sim/io/checkpoint.h"
#include "sim/io/curves_file.h"

namespace capgap {
namespace test {

namespace fs = std::filesystem;
using Clock = std::chrono::steady_clock;

inline double SecondsSince(Clock::time_point t0) {
  return std::chrono::duration<double>(Clock::now() - t0).count();
}

inline fs::path TempDir(const std::string& suite, const std::string& name) {
  fs::path dir = fs::temp_directory_path() /
                 ("capgap_" + suite + "_" + std::to_string(::getpid()) + "_" + name);
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

inline std::string Config(const std::string& name) {
  return std::string(CAPGAP_SOURCE_DIR) + "/configs/" + name;
}

inline std::string CapgapBinary() { return std::string(CAPGAP_BINARY_DIR) + "/capgap"; }

// A child process (argv[0] = program) with stdout and stderr in `log`.
class Process {
 public:
  Process(const std::string& program, const std::vector<std::string>& args, const fs::path& log)
      : log_(log) {
    pid_ = ::fork();
    if (pid_ == 0) {
      std::FILE* f = std::fopen(log.c_str(), "w");
      if (f) {
        ::dup2(::fileno(f), 1);
        ::dup2(::fileno(f), 2);
      }
      std::vector<char*> argv;
      argv.push_back(const_cast<char*>(program.c_str()));
      for (const auto& a : args) argv.push_back(const_cast<char*>(a.c_str()));
      argv.push_back(nullptr);
      ::execv(program.c_str(), argv.data());
      ::_exit(127);
    }
  }
  // capgap itself.
  Process(const std::vector<std::string>& args, const fs::path& log)
      : Process(CapgapBinary(), args, log) {}
  Process(const Process&) = delete;
  Process& operator=(const Process&) = delete;
  ~Process() {
    if (!Exited()) {
      ::kill(pid_, SIGKILL);
      ::waitpid(pid_, &status_, 0);
    }
  }

  pid_t pid() const { return pid_; }
  void Signal(int sig) { ::kill(pid_, sig); }
  bool Exited() {
    if (done_) return true;
    int st = 0;
    if (::waitpid(pid_, &st, WNOHANG) == pid_) {
      done_ = true;
      status_ = st;
    }
    return done_;
  }
  // Exit status, -signal if killed by one, or -1000 after the timeout (the
  // process is then killed).
  int Wait(double timeout_seconds = 120) {
    const auto t0 = Clock::now();
    while (!Exited()) {
      if (SecondsSince(t0) > timeout_seconds) {
        ::kill(pid_, SIGKILL);
        ::waitpid(pid_, &status_, 0);
        done_ = true;
        return -1000;
      }
      std::this_thread::sleep_for(std::chrono::milliseconds(2));
    }
    return WIFEXITED(status_) ? WEXITSTATUS(status_) : -WTERMSIG(status_);
  }
  std::string Log() const {
    std::ifstream in(log_);
    std::stringstream ss;
    ss << in.rdbuf();
    return ss.str();
  }

 private:
  pid_t pid_ = -1;
  fs::path log_;
  bool done_ = false;
  int status_ = 0;
};

struct RunOutput {
  int status;
  std::string log;
  double seconds;
};

inline RunOutput RunProgram(const std::string& program, const std::vector<std::string>& args,
                            const fs::path& dir, double timeout_seconds = 120) {
  const auto t0 = Clock::now();
  Process p(program, args, dir / "log.txt");
  const int status = p.Wait(timeout_seconds);
  return {status, p.Log(), SecondsSince(t0)};
}

inline RunOutput RunCapgap(const std::vector<std::string>& args, const fs::path& dir) {
  return RunProgram(CapgapBinary(), args, dir);
}

// Per-point counts of a curves file, read with the HDF5 API directly (the
// program's own reader must accept the file too).
struct FileCounts {
  std::vector<std::string> schemes;
  std::vector<std::vector<std::uint64_t>> bits, bit_errors, frames, frame_errors;
  bool operator==(const FileCounts&) const = default;
};

inline std::vector<std::uint64_t> ReadU64(const H5::Group& g, const char* name) {
  H5::DataSet ds = g.openDataSet(name);
  hsize_t n = 0;
  ds.getSpace().getSimpleExtentDims(&n);
  std::vector<std::uint64_t> v(n);
  if (n) ds.read(v.data(), H5::PredType::NATIVE_UINT64);
  return v;
}

inline FileCounts ReadCounts(const std::string& path) {
  FileCounts c;
  auto run = ReadCurvesFile(path);
  EXPECT_TRUE(run.ok()) << run.status().message();
  if (!run.ok()) return c;
  H5::H5File file(path, H5F_ACC_RDONLY);
  for (const StoredScheme& s : run.value().schemes) {
    H5::Group g = file.openGroup("/" + s.name);
    c.schemes.push_back(s.name);
    c.bits.push_back(ReadU64(g, "bits"));
    c.bit_errors.push_back(ReadU64(g, "bit_errors"));
    c.frames.push_back(ReadU64(g, "frames"));
    c.frame_errors.push_back(ReadU64(g, "frame_errors"));
  }
  return c;
}

// A file's bytes ("" when it cannot be read).
inline std::string ReadText(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

inline Checkpoint ReadGood(const std::string& path) {
  auto c = ReadCheckpoint(path);
  EXPECT_TRUE(c.ok()) << c.status().message();
  return c.ok() ? c.value() : Checkpoint{};
}

// Checkpoint records compared on everything but wall time: the counted
// prefix (units and every UnitCounts field), finished flag and stop reason.
inline void ExpectSameRecords(const Checkpoint& a, const Checkpoint& b) {
  ASSERT_EQ(a.schemes.size(), b.schemes.size());
  for (std::size_t s = 0; s < a.schemes.size(); ++s) {
    ASSERT_EQ(a.schemes[s].points.size(), b.schemes[s].points.size()) << a.schemes[s].name;
    for (std::size_t i = 0; i < a.schemes[s].points.size(); ++i) {
      const PointRecord& x = a.schemes[s].points[i];
      const PointRecord& y = b.schemes[s].points[i];
      EXPECT_EQ(x.units, y.units) << a.schemes[s].name << " point " << i;
      EXPECT_EQ(x.counts, y.counts) << a.schemes[s].name << " point " << i;
      EXPECT_EQ(x.finished, y.finished) << a.schemes[s].name << " point " << i;
      EXPECT_EQ(x.stop_reason, y.stop_reason) << a.schemes[s].name << " point " << i;
      EXPECT_EQ(x.ebno_db, y.ebno_db);
    }
  }
}

inline std::size_t TotalUnits(const Checkpoint& c) {
  std::size_t n = 0;
  for (const auto& s : c.schemes) {
    for (const auto& p : s.points) n += p.units;
  }
  return n;
}

// Waits (at most 60 s) until the run's checkpoint records at least
// `finished` finished points, so that a signal lands mid-run. False if the
// process exited first.
inline bool WaitForFinishedPoints(Process& p, const std::string& ckpt, std::size_t finished) {
  const auto t0 = Clock::now();
  while (SecondsSince(t0) < 60) {
    if (p.Exited()) return false;
    auto c = ReadCheckpoint(ckpt);
    if (c.ok() && c.value().FinishedPoints() >= finished) return true;
    std::this_thread::sleep_for(std::chrono::milliseconds(2));
  }
  return false;
}

}  // namespace test
}  // namespace capgap

#endif  // CAPGAP_TESTS_SIM_CAPGAP_PROCESS_H_
