// Golden counts: the per-point counts of a fixed set of runs (every config
// in configs/ and tests/golden/golden_extra.ini, with small limits), recorded
// once from the code as it was before the chain was rebuilt around role
// interfaces, and kept as a regression baseline: any later change that moves
// a single count of any of these runs is a bug until shown otherwise.
//
// The runs go through the capgap binary and its HDF5 output only (the file
// format is the stable interface), so the check survives any reorganisation
// of the code behind it. Per point: Eb/N0, bits, bit errors, frames, frame
// errors and, for iterative decoders, the iteration mean and maximum and the
// undetected frame errors.
//
// Golden file (tests/golden/golden_counts.txt), one line per point:
//   RUN SCHEME POINT EBNO_DB BITS BIT_ERRORS FRAMES FRAME_ERRORS IT_MEAN IT_MAX UNDETECTED
// RUN is the config path relative to the source tree; the iteration fields
// are '-' for schemes without an iterative decoder. Doubles are written with
// 17 significant digits, so they read back to the same bits.
#ifndef CAPGAP_TESTS_GOLDEN_GOLDEN_COUNTS_H_
#define CAPGAP_TESTS_GOLDEN_GOLDEN_COUNTS_H_

#include <sys/wait.h>

#include <algorithm>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <H5Cpp.h>

namespace capgap::golden {

namespace fs = std::filesystem;

// The limits every golden run uses (small, so the whole set runs in seconds;
// the per-scheme Eb/N0 points and every other key stay as in the file).
inline const std::vector<std::string>& GoldenOverrides() {
  static const std::vector<std::string> kOverrides = {
      "--set", "sweep.stop_bit_errors=100", "--set", "sweep.stop_bits=400000"};
  return kOverrides;
}

// Config files of the golden set, relative to the source tree.
inline std::vector<std::string> GoldenRuns() {
  std::vector<std::string> runs;
  for (const auto& e : fs::directory_iterator(fs::path(CAPGAP_SOURCE_DIR) / "configs")) {
    if (e.is_regular_file() && e.path().extension() == ".ini") {
      runs.push_back("configs/" + e.path().filename().string());
    }
  }
  std::sort(runs.begin(), runs.end());
  runs.push_back("tests/golden/golden_extra.ini");
  return runs;
}

struct PointCounts {
  std::string run, scheme;
  std::size_t point = 0;
  double ebno_db = 0;
  std::uint64_t bits = 0, bit_errors = 0, frames = 0, frame_errors = 0;
  bool iterative = false;
  double it_mean = 0;
  std::uint64_t it_max = 0, undetected = 0;
  bool operator==(const PointCounts&) const = default;
};

inline std::string Format(const PointCounts& p) {
  char buf[512];
  if (p.iterative) {
    std::snprintf(buf, sizeof buf, "%s %s %zu %.17g %llu %llu %llu %llu %.17g %llu %llu",
                  p.run.c_str(), p.scheme.c_str(), p.point, p.ebno_db,
                  static_cast<unsigned long long>(p.bits),
                  static_cast<unsigned long long>(p.bit_errors),
                  static_cast<unsigned long long>(p.frames),
                  static_cast<unsigned long long>(p.frame_errors), p.it_mean,
                  static_cast<unsigned long long>(p.it_max),
                  static_cast<unsigned long long>(p.undetected));
  } else {
    std::snprintf(buf, sizeof buf, "%s %s %zu %.17g %llu %llu %llu %llu - - -", p.run.c_str(),
                  p.scheme.c_str(), p.point, p.ebno_db, static_cast<unsigned long long>(p.bits),
                  static_cast<unsigned long long>(p.bit_errors),
                  static_cast<unsigned long long>(p.frames),
                  static_cast<unsigned long long>(p.frame_errors));
  }
  return buf;
}

// Parses one golden line; false on a malformed line.
inline bool Parse(const std::string& line, PointCounts* p) {
  std::istringstream in(line);
  std::string it_mean, it_max, undetected;
  if (!(in >> p->run >> p->scheme >> p->point >> p->ebno_db >> p->bits >> p->bit_errors >>
        p->frames >> p->frame_errors >> it_mean >> it_max >> undetected)) {
    return false;
  }
  p->iterative = it_mean != "-";
  if (p->iterative) {
    p->it_mean = std::strtod(it_mean.c_str(), nullptr);
    p->it_max = std::strtoull(it_max.c_str(), nullptr, 10);
    p->undetected = std::strtoull(undetected.c_str(), nullptr, 10);
  }
  return true;
}

inline fs::path GoldenFile() {
  return fs::path(CAPGAP_SOURCE_DIR) / "tests" / "golden" / "golden_counts.txt";
}

// Every point of the golden file, in file order.
inline std::vector<PointCounts> ReadGolden(std::string* error) {
  std::vector<PointCounts> out;
  std::ifstream in(GoldenFile());
  if (!in) {
    *error = "cannot open " + GoldenFile().string();
    return out;
  }
  std::string line;
  int n = 0;
  while (std::getline(in, line)) {
    ++n;
    if (line.empty() || line[0] == '#') continue;
    PointCounts p;
    if (!Parse(line, &p)) {
      *error = GoldenFile().string() + ":" + std::to_string(n) + ": malformed line";
      return {};
    }
    out.push_back(p);
  }
  return out;
}

template <typename T>
std::vector<T> ReadVector(const H5::Group& g, const char* name, const H5::PredType& type) {
  H5::DataSet ds = g.openDataSet(name);
  H5::DataSpace space = ds.getSpace();
  if (space.getSimpleExtentNdims() != 1) return {};
  hsize_t n = 0;
  space.getSimpleExtentDims(&n);
  std::vector<T> v(n);
  if (n) ds.read(v.data(), type);
  return v;
}

// The counts of every scheme group (a root group holding `bits`) of a curves
// file, in the order of the file's `schemes` attribute if present, else by
// name.
inline std::vector<PointCounts> ReadFileCounts(const std::string& path, const std::string& run) {
  std::vector<PointCounts> out;
  H5::H5File file(path, H5F_ACC_RDONLY);
  std::vector<std::string> names;
  for (hsize_t i = 0; i < file.getNumObjs(); ++i) {
    const std::string name = file.getObjnameByIdx(i);
    if (file.childObjType(name) != H5O_TYPE_GROUP) continue;
    H5::Group g = file.openGroup(name);
    if (g.nameExists("bits")) names.push_back(name);
  }
  std::sort(names.begin(), names.end());
  for (const std::string& name : names) {
    H5::Group g = file.openGroup(name);
    const auto U64 = H5::PredType::NATIVE_UINT64;
    const auto F64 = H5::PredType::NATIVE_DOUBLE;
    const auto ebno = ReadVector<double>(g, "ebno_db", F64);
    const auto bits = ReadVector<std::uint64_t>(g, "bits", U64);
    const auto bit_errors = ReadVector<std::uint64_t>(g, "bit_errors", U64);
    const auto frames = ReadVector<std::uint64_t>(g, "frames", U64);
    const auto frame_errors = ReadVector<std::uint64_t>(g, "frame_errors", U64);
    const bool iterative = g.nameExists("decoder_iterations_mean");
    std::vector<double> it_mean;
    std::vector<std::uint64_t> it_max, undetected;
    if (iterative) {
      it_mean = ReadVector<double>(g, "decoder_iterations_mean", F64);
      it_max = ReadVector<std::uint64_t>(g, "decoder_iterations_max", U64);
      undetected = ReadVector<std::uint64_t>(g, "undetected_frame_errors", U64);
    }
    for (std::size_t i = 0; i < bits.size(); ++i) {
      PointCounts p;
      p.run = run;
      p.scheme = name;
      p.point = i;
      p.ebno_db = i < ebno.size() ? ebno[i] : -1e300;
      p.bits = bits[i];
      p.bit_errors = i < bit_errors.size() ? bit_errors[i] : ~0ull;
      p.frames = i < frames.size() ? frames[i] : ~0ull;
      p.frame_errors = i < frame_errors.size() ? frame_errors[i] : ~0ull;
      p.iterative = iterative;
      if (iterative) {
        p.it_mean = i < it_mean.size() ? it_mean[i] : -1;
        p.it_max = i < it_max.size() ? it_max[i] : ~0ull;
        p.undetected = i < undetected.size() ? undetected[i] : ~0ull;
      }
      out.push_back(p);
    }
  }
  return out;
}

// Shell-quotes one argument.
inline std::string Quote(const std::string& s) {
  std::string out = "'";
  for (char c : s) {
    if (c == '\'') {
      out += "'\\''";
    } else {
      out += c;
    }
  }
  return out + "'";
}

// Runs `launcher capgap run RUN -o OUT <golden limits> extra...` (launcher may
// be empty, or e.g. "mpirun -np 2"); returns the exit status and fills `log`.
inline int RunGolden(const std::string& launcher, const std::string& run, const fs::path& out,
                     const std::vector<std::string>& extra, std::string* log) {
  std::string cmd = launcher;
  if (!cmd.empty()) cmd += ' ';
  cmd += Quote(std::string(CAPGAP_BINARY_DIR) + "/capgap");
  cmd += " run ";
  cmd += Quote(std::string(CAPGAP_SOURCE_DIR) + "/" + run);
  cmd += " -o ";
  cmd += Quote(out.string());
  cmd += " --quiet";
  for (const auto& a : GoldenOverrides()) {
    cmd += ' ';
    cmd += Quote(a);
  }
  for (const auto& a : extra) {
    cmd += ' ';
    cmd += Quote(a);
  }
  fs::path log_path = out;
  log_path += ".log";
  cmd += " > ";
  cmd += Quote(log_path.string());
  cmd += " 2>&1";
  const int status = std::system(cmd.c_str());
  std::ifstream in(log_path);
  std::stringstream ss;
  ss << in.rdbuf();
  *log = cmd;
  *log += '\n';
  *log += ss.str();
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

}  // namespace capgap::golden

#endif  // CAPGAP_TESTS_GOLDEN_GOLDEN_COUNTS_H_
