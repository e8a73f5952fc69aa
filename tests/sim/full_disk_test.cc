// A full disk while the curves file is written: `capgap run` exits 1 with the
// reason (no crash in the HDF5 library at exit), the previous curves file
// keeps its bytes, the checkpoint stays readable, no temporary file is left,
// and once space is back `--resume` finishes with the counts of the earlier
// run. Needs a small tmpfs (mounting one needs root); skipped with a message
// where it cannot be mounted.
#include <sys/mount.h>
#include <sys/statvfs.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "sim/io/checkpoint.h"
#include "sim/io/curves_file.h"
#include "tests/sim/capgap_process.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;

// A tmpfs of `size` mounted at `dir` for the life of the object.
class SmallTmpfs {
 public:
  SmallTmpfs(const fs::path& dir, const std::string& size) : dir_(dir) {
    fs::create_directories(dir_);
    const std::string options = "size=" + size;
    mounted_ = ::mount("tmpfs", dir_.c_str(), "tmpfs", 0, options.c_str()) == 0;
    if (!mounted_) why_ = std::strerror(errno);
  }
  ~SmallTmpfs() {
    if (mounted_) ::umount2(dir_.c_str(), MNT_DETACH);
  }
  SmallTmpfs(const SmallTmpfs&) = delete;
  SmallTmpfs& operator=(const SmallTmpfs&) = delete;
  bool mounted() const { return mounted_; }
  const std::string& why() const { return why_; }
  std::uint64_t FreeBytes() const {
    struct statvfs st {};
    if (::statvfs(dir_.c_str(), &st) != 0) return 0;
    return static_cast<std::uint64_t>(st.f_bavail) * st.f_frsize;
  }

 private:
  fs::path dir_;
  bool mounted_ = false;
  std::string why_;
};

std::string Slurp(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

TEST(FullDisk, CurvesWriteFailureExits1AndKeepsThePreviousFiles) {
  const fs::path dir = test::TempDir("full_disk_test", "disk");
  struct RemoveAtEnd {  // destroyed after the tmpfs is unmounted
    fs::path dir;
    ~RemoveAtEnd() {
      std::error_code ec;
      fs::remove_all(dir, ec);
    }
  } remove_at_end{dir};
  SmallTmpfs disk(dir / "disk", "1m");
  if (!disk.mounted()) {
    GTEST_SKIP() << "cannot mount a tmpfs at " << (dir / "disk") << " (" << disk.why()
                 << "; needs root): full-disk case not run";
  }
  const fs::path config = dir / "full_disk.ini";
  std::ofstream(config) << "[sweep]\nebno_db = 0 to 4 by 2\nstop_bit_errors = 50\nstop_bits = 200000\n"
                           "seed = 3\n[scheme.qpsk]\nmodulation = qpsk\nframe_bits = 960\n";
  const std::string out = (dir / "disk" / "out.h5").string();
  const std::string ckpt = CheckpointPath(out);
  const std::vector<std::string> args = {"run", config.string(), "-o", out, "--quiet"};
  const test::RunOutput first = test::RunCapgap(args, dir);
  ASSERT_EQ(first.status, 0) << first.log;
  const std::string previous = Slurp(out);
  const test::FileCounts counts = test::ReadCounts(out);

  // Leave room for the checkpoint's rewrites (a temporary copy beside the
  // file, in 4 KiB pages) but not for a new curves file.
  const std::uint64_t ckpt_pages = (fs::file_size(ckpt) + 4095) / 4096;
  const std::uint64_t room = (2 * ckpt_pages + 1) * 4096;
  ASSERT_GT(previous.size(), room) << "curves file too small to overflow the disk";
  const std::uint64_t free_bytes = disk.FreeBytes();
  ASSERT_GT(free_bytes, room);
  {
    std::ofstream filler(dir / "disk" / "filler", std::ios::binary);
    filler << std::string(free_bytes - room, 'f');
  }
  ASSERT_LT(disk.FreeBytes(), previous.size());

  const test::RunOutput full = test::RunCapgap(args, dir);
  EXPECT_EQ(full.status, 1) << full.log;  // not 139 (a crash at exit)
  EXPECT_NE(full.log.find("capgap: " + out + ": write failed: No space left on device"),
            std::string::npos)
      << full.log;
  EXPECT_EQ(Slurp(out), previous);
  const auto stored = ReadCheckpoint(ckpt);
  ASSERT_TRUE(stored.ok()) << stored.status().message();
  for (const auto& e : fs::directory_iterator(dir / "disk")) {
    EXPECT_EQ(e.path().string().find(".tmp-"), std::string::npos) << e.path();
  }

  // Space back: --resume reuses the recorded points and writes the file.
  fs::remove(dir / "disk" / "filler");
  std::vector<std::string> resume = args;
  resume.push_back("--resume");
  const test::RunOutput again = test::RunCapgap(resume, dir);
  ASSERT_EQ(again.status, 0) << again.log;
  EXPECT_EQ(test::ReadCounts(out), counts);
}

}  // namespace
}  // namespace capgap
