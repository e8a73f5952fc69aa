// The curves-file reader against hostile files: each case writes a small
// valid capgap-curves file with the HDF5 C++ API, breaks one object (shape,
// type, length, count, link, group), and expects ReadCurvesFile and
// `capgap summary` (RunSummary, status 1) to refuse it with a message naming
// the file and the object; nothing may crash or read beyond a dataset.
#include <gtest/gtest.h>
#include <sys/stat.h>
#include <unistd.h>

#include <H5Cpp.h>

#include <filesystem>
#include <fstream>
#include <functional>
#include <sstream>
#include <string>
#include <vector>

#include "sim/io/curves_file.h"
#include "sim/run/run.h"
#include "sim/run/theory_command.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;

fs::path TempDir(const std::string& name) {
  const fs::path dir = fs::temp_directory_path() /
                       ("capgap_curves_reader_test_" + std::to_string(::getpid()) + "_" + name);
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

void StrAttr(H5::H5Object& obj, const char* name, const std::string& value) {
  H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
  obj.createAttribute(name, type, H5::DataSpace(H5S_SCALAR)).write(type, value);
}

void NumAttr(H5::H5Object& obj, const char* name, double value) {
  obj.createAttribute(name, H5::PredType::NATIVE_DOUBLE, H5::DataSpace(H5S_SCALAR))
      .write(H5::PredType::NATIVE_DOUBLE, &value);
}

void IntAttr(H5::H5Object& obj, const char* name, int value) {
  obj.createAttribute(name, H5::PredType::NATIVE_INT, H5::DataSpace(H5S_SCALAR))
      .write(H5::PredType::NATIVE_INT, &value);
}

template <typename T>
void Series(H5::Group& g, const char* name, const H5::PredType& type, const std::vector<T>& v) {
  const hsize_t dims[1] = {v.size()};
  H5::DataSet ds = g.createDataSet(name, type, H5::DataSpace(1, dims));
  if (!v.empty()) ds.write(v.data(), type);
}

// A valid file: one scheme "qpsk" with 4 points (bits 1000 each, bit errors
// 0..3), every object the summary reads, as the writer lays it out.
void WriteValid(const std::string& path) {
  H5::H5File f(path, H5F_ACC_TRUNC);
  StrAttr(f, "format", kCurvesFormat);
  IntAttr(f, "format_version", kCurvesFormatVersion);
  StrAttr(f, "program_version", "test");
  StrAttr(f, "created_utc", "2026-01-01T00:00:00Z");
  IntAttr(f, "threads", 2);
  StrAttr(f, "schemes", "qpsk");
  H5::Group g = f.createGroup("/qpsk");
  StrAttr(g, "modulation", "qpsk");
  StrAttr(g, "demapper", "maxlog");
  StrAttr(g, "code", "none");
  NumAttr(g, "code_rate", 1.0);
  NumAttr(g, "info_bits_per_symbol", 2.0);
  NumAttr(g, "spectral_efficiency", 2.0);
  NumAttr(g, "target_ber", 1e-3);
  const std::vector<double> ebno = {0, 2, 4, 6}, rate = {0, 1e-3, 2e-3, 3e-3};
  const std::vector<std::uint64_t> bits(4, 1000), errors = {0, 1, 2, 3}, frames(4, 10);
  Series(g, "ebno_db", H5::PredType::NATIVE_DOUBLE, ebno);
  Series(g, "esno_db", H5::PredType::NATIVE_DOUBLE, ebno);
  Series(g, "bits", H5::PredType::NATIVE_UINT64, bits);
  Series(g, "bit_errors", H5::PredType::NATIVE_UINT64, errors);
  Series(g, "frames", H5::PredType::NATIVE_UINT64, frames);
  Series(g, "frame_errors", H5::PredType::NATIVE_UINT64, errors);
  for (const char* name : {"ber", "ber_low", "ber_high", "fer", "fer_low", "fer_high", "seconds"}) {
    Series(g, name, H5::PredType::NATIVE_DOUBLE, rate);
  }
  {
    H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
    const hsize_t dims[1] = {4};
    const char* stop[4] = {"stop_bits", "stop_bits", "stop_bit_errors", "stop_bit_errors"};
    g.createDataSet("stop_reason", type, H5::DataSpace(1, dims)).write(stop, type);
  }
  H5::Group lim = g.createGroup("limits");
  NumAttr(lim, "shannon_ebno_db", 1.76);
  NumAttr(lim, "constrained_ebno_db", 1.9);
  H5::Group sum = g.createGroup("summary");
  for (const char* name : {"ebno_at_target_db", "ebno_at_target_low_db", "ebno_at_target_high_db",
                           "uncoded_ebno_at_target_db", "coding_gain_db", "gap_to_shannon_db",
                           "gap_to_constrained_db"}) {
    NumAttr(sum, name, 5.0);
  }
}

// Writes the valid file, applies `breakage` to it, reads it back.
Result<StoredRun> ReadBroken(const fs::path& dir, const std::function<void(H5::H5File&)>& breakage) {
  const std::string path = (dir / "broken.h5").string();
  WriteValid(path);
  {
    H5::H5File f(path, H5F_ACC_RDWR);
    breakage(f);
  }
  return ReadCurvesFile(path);
}

std::string Message(const Result<StoredRun>& r) { return r.ok() ? "OK" : r.status().message(); }

class CurvesReader : public ::testing::Test {
 protected:
  void SetUp() override {
    H5::Exception::dontPrint();
    dir_ = TempDir(::testing::UnitTest::GetInstance()->current_test_info()->name());
    path_ = (dir_ / "broken.h5").string();
  }
  void TearDown() override { fs::remove_all(dir_); }
  // The reader's message and the summary command's status and error line.
  void ExpectRefused(const std::function<void(H5::H5File&)>& breakage, const std::string& object_rule) {
    const Result<StoredRun> r = ReadBroken(dir_, breakage);
    EXPECT_EQ(Message(r), path_ + ": " + object_rule);
    std::ostringstream out, err;
    EXPECT_EQ(RunSummary(path_, out, err), kExitFailed);
    EXPECT_EQ(err.str(), "capgap: " + path_ + ": " + object_rule + "\n");
    EXPECT_EQ(out.str(), "");
  }
  fs::path dir_;
  std::string path_;
};

TEST_F(CurvesReader, ValidFileReadsBack) {
  const Result<StoredRun> r = ReadBroken(dir_, [](H5::H5File&) {});
  ASSERT_TRUE(r.ok()) << r.status().message();
  ASSERT_EQ(r.value().schemes.size(), 1u);
  const StoredScheme& s = r.value().schemes[0];
  EXPECT_EQ(s.name, "qpsk");
  EXPECT_EQ(s.ebno_db, (std::vector<double>{0, 2, 4, 6}));
  EXPECT_EQ(s.bit_errors, (std::vector<std::uint64_t>{0, 1, 2, 3}));
  EXPECT_EQ(r.value().threads, 2);
  std::ostringstream out, err;
  EXPECT_EQ(RunSummary(path_, out, err), kExitDone) << err.str();
}

TEST_F(CurvesReader, TwoDimensionalEbnoIsRefused) {
  ExpectRefused(
      [](H5::H5File& f) {
        f.unlink("/qpsk/ebno_db");
        const hsize_t dims[2] = {2, 2};
        f.createDataSet("/qpsk/ebno_db", H5::PredType::NATIVE_DOUBLE, H5::DataSpace(2, dims));
      },
      "/qpsk/ebno_db: 2-D dataset, expected 1-D");
}

TEST_F(CurvesReader, TwoDimensionalBitsIsRefused) {
  ExpectRefused(
      [](H5::H5File& f) {
        f.unlink("/qpsk/bits");
        const hsize_t dims[2] = {4, 3};
        f.createDataSet("/qpsk/bits", H5::PredType::NATIVE_UINT64, H5::DataSpace(2, dims));
      },
      "/qpsk/bits: 2-D dataset, expected 1-D of 4 entries");
}

TEST_F(CurvesReader, ArrayAttributeIsRefused) {
  ExpectRefused(
      [](H5::H5File& f) {
        H5::Group g = f.openGroup("/qpsk");
        g.removeAttr("code_rate");
        const hsize_t dims[1] = {1000};
        const std::vector<double> v(1000, 0.5);
        g.createAttribute("code_rate", H5::PredType::NATIVE_DOUBLE, H5::DataSpace(1, dims))
            .write(H5::PredType::NATIVE_DOUBLE, v.data());
      },
      "/qpsk attribute 'code_rate': array of 1000 entries, expected a scalar number");
}

TEST_F(CurvesReader, ShortBitsIsRefused) {
  ExpectRefused(
      [](H5::H5File& f) {
        f.unlink("/qpsk/bits");
        H5::Group g = f.openGroup("/qpsk");
        Series(g, "bits", H5::PredType::NATIVE_UINT64, std::vector<std::uint64_t>{1000});
      },
      "/qpsk/bits: 1 entries, expected 4 (the length of /qpsk/ebno_db)");
}

TEST_F(CurvesReader, MillionPointsAreRefused) {
  ExpectRefused(
      [](H5::H5File& f) {
        f.unlink("/qpsk/ebno_db");
        const hsize_t dims[1] = {1000000};
        // Never written: the reader must refuse on the shape alone.
        f.createDataSet("/qpsk/ebno_db", H5::PredType::NATIVE_DOUBLE, H5::DataSpace(1, dims));
      },
      "/qpsk/ebno_db: 1000000 entries; at most 100000 points are read");
}

TEST_F(CurvesReader, MoreBitErrorsThanBitsAreRefused) {
  ExpectRefused(
      [](H5::H5File& f) {
        f.unlink("/qpsk/bit_errors");
        H5::Group g = f.openGroup("/qpsk");
        Series(g, "bit_errors", H5::PredType::NATIVE_UINT64,
               std::vector<std::uint64_t>{0, 1, 1001, 3});
      },
      "/qpsk/bit_errors: entry 2 is 1001 > /qpsk/bits = 1000");
}

TEST_F(CurvesReader, MoreFrameErrorsThanFramesAreRefused) {
  ExpectRefused(
      [](H5::H5File& f) {
        f.unlink("/qpsk/frame_errors");
        H5::Group g = f.openGroup("/qpsk");
        Series(g, "frame_errors", H5::PredType::NATIVE_UINT64,
               std::vector<std::uint64_t>{0, 11, 2, 3});
      },
      "/qpsk/frame_errors: entry 1 is 11 > /qpsk/frames = 10");
}

TEST_F(CurvesReader, MissingGroupsAreNamed) {
  ExpectRefused(
      [](H5::H5File& f) {
        f.removeAttr("schemes");
        StrAttr(f, "schemes", "qpsk,gone");
      },
      "/gone: group missing");
  ExpectRefused([](H5::H5File& f) { f.unlink("/qpsk/limits"); }, "/qpsk/limits: group missing");
  ExpectRefused([](H5::H5File& f) { f.unlink("/qpsk/summary"); }, "/qpsk/summary: group missing");
}

TEST_F(CurvesReader, WrongKindsAndTypesAreNamed) {
  // A dataset where a group belongs, and the reverse.
  ExpectRefused(
      [](H5::H5File& f) {
        f.unlink("/qpsk/limits");
        H5::Group g = f.openGroup("/qpsk");
        Series(g, "limits", H5::PredType::NATIVE_DOUBLE, std::vector<double>{1});
      },
      "/qpsk/limits: is a dataset, expected a group");
  ExpectRefused(
      [](H5::H5File& f) {
        f.unlink("/qpsk/ber");
        f.createGroup("/qpsk/ber");
      },
      "/qpsk/ber: is a group, expected a dataset");
  // Counts stored as floating point, a string attribute stored as a number,
  // a number attribute stored as a string, a scalar where a series belongs.
  ExpectRefused(
      [](H5::H5File& f) {
        f.unlink("/qpsk/bits");
        H5::Group g = f.openGroup("/qpsk");
        Series(g, "bits", H5::PredType::NATIVE_DOUBLE, std::vector<double>(4, 1000));
      },
      "/qpsk/bits: floating-point dataset, expected integers");
  ExpectRefused(
      [](H5::H5File& f) {
        H5::Group g = f.openGroup("/qpsk");
        g.removeAttr("modulation");
        IntAttr(g, "modulation", 4);
      },
      "/qpsk attribute 'modulation': integer value, expected a string");
  ExpectRefused(
      [](H5::H5File& f) {
        H5::Group g = f.openGroup("/qpsk");
        g.removeAttr("target_ber");
        StrAttr(g, "target_ber", "1e-3");
      },
      "/qpsk attribute 'target_ber': string value, expected a number");
  ExpectRefused(
      [](H5::H5File& f) {
        f.unlink("/qpsk/fer");
        f.createDataSet("/qpsk/fer", H5::PredType::NATIVE_DOUBLE, H5::DataSpace(H5S_SCALAR));
      },
      "/qpsk/fer: scalar dataset, expected 1-D of 4 entries");
  ExpectRefused(
      [](H5::H5File& f) {
        H5::Group g = f.openGroup("/qpsk/limits");
        g.removeAttr("shannon_ebno_db");
      },
      "/qpsk/limits: attribute 'shannon_ebno_db' missing");
}

TEST_F(CurvesReader, LinksAndSchemeListsAreChecked) {
  ExpectRefused(
      [](H5::H5File& f) {
        f.unlink("/qpsk/bits");
        f.link(H5L_TYPE_SOFT, "/qpsk/frames", "/qpsk/bits");
      },
      "/qpsk/bits: is a soft or external link; expected a dataset");
  ExpectRefused(
      [](H5::H5File& f) {
        f.removeAttr("schemes");
        StrAttr(f, "schemes", "qpsk,qpsk");
      },
      "/ attribute 'schemes': scheme 'qpsk' listed twice");
  ExpectRefused(
      [](H5::H5File& f) {
        f.removeAttr("schemes");
        StrAttr(f, "schemes", "qpsk/limits");
      },
      "/ attribute 'schemes': scheme name 'qpsk/limits': expected letters, digits, '_', '-' and "
      "'.' (a group below the root)");
}

TEST_F(CurvesReader, NullVariableLengthStringReadsAsEmpty) {
  const Result<StoredRun> r = ReadBroken(dir_, [](H5::H5File& f) {
    H5::Group g = f.openGroup("/qpsk");
    g.removeAttr("demapper");
    H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
    H5::Attribute a = g.createAttribute("demapper", type, H5::DataSpace(H5S_SCALAR));
    const char* null_string = nullptr;
    a.write(type, &null_string);
  });
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value().schemes.at(0).demapper, "");
}

TEST_F(CurvesReader, NonFilesAreRefusedWithoutReading) {
  std::ostringstream out, err;
  // A FIFO: refused at once (a reader that opened it would wait for a writer).
  const std::string fifo = (dir_ / "fifo.h5").string();
  ASSERT_EQ(::mkfifo(fifo.c_str(), 0600), 0);
  EXPECT_EQ(Message(ReadCurvesFile(fifo)), fifo + ": is not a regular file (a FIFO)");
  EXPECT_EQ(Message(ReadCurvesFile("/dev/zero")),
            "/dev/zero: is not a regular file (a character device)");
  EXPECT_EQ(Message(ReadCurvesFile(dir_.string())),
            dir_.string() + ": is a directory, not a curves file");
  const std::string text = (dir_ / "text.h5").string();
  std::ofstream(text) << "not hdf5\n";
  EXPECT_EQ(Message(ReadCurvesFile(text)), text + ": not an HDF5 file");
  // The signature followed by garbage: refused by HDF5, not a crash.
  const std::string fake = (dir_ / "fake.h5").string();
  std::ofstream(fake, std::ios::binary) << std::string("\x89HDF\r\n\x1a\n", 8) << std::string(600, 'x');
  EXPECT_EQ(Message(ReadCurvesFile(fake)), fake + ": not a readable HDF5 file");
  EXPECT_EQ(RunSummary(fifo, out, err), kExitFailed);
}

}  // namespace
}  // namespace capgap

namespace capgap {
namespace {

// Found by tests/fuzz/fuzz_curves_bytes.cc: a real curves file with bytes
// changed so that a variable-length string points into a corrupt global
// heap. The HDF5 library (1.10.8) crashes decoding it (H5HG_read); `capgap
// summary` reads in a child process, so the command ends with status 1 and
// one line naming the file (under AddressSanitizer the child exits instead
// of dying by the signal; the message then says the reader failed).
TEST(CurvesReaderRegression, FileThatCrashesTheHdf5LibraryGivesStatus1) {
  const std::string path =
      std::string(CAPGAP_SOURCE_DIR) + "/tests/fuzz/regressions/curves_heap_crash.h5";
  ASSERT_TRUE(std::filesystem::is_regular_file(path)) << path;
  std::ostringstream out, err;
  EXPECT_EQ(RunSummary(path, out, err), kExitFailed);
  EXPECT_EQ(out.str(), "");
  const std::string e = err.str();
  EXPECT_EQ(e.rfind("capgap: " + path + ": ", 0), 0u) << e;
  EXPECT_EQ(e.find('\n'), e.size() - 1) << e;
  const bool named = e.find("damaged HDF5 file") != std::string::npos ||
                     e.find("reader process failed") != std::string::npos;
  EXPECT_TRUE(named) << e;
}

}  // namespace
}  // namespace capgap
