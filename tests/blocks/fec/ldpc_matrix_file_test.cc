// Tests of the sparse parity-check matrix text format and its helpers
// (blocks/fec/ldpc_matrix_file.h).
#include "blocks/fec/ldpc_matrix_file.h"

#include <sys/stat.h>
#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "blocks/fec/ldpc_construction.h"
#include "gtest/gtest.h"

namespace capgap {
namespace {

std::vector<std::vector<int>> Rows(const LdpcCode& code) {
  std::vector<std::vector<int>> rows(static_cast<std::size_t>(code.checks()));
  for (int r = 0; r < code.checks(); ++r) {
    for (int e = code.row_start()[static_cast<std::size_t>(r)];
         e < code.row_start()[static_cast<std::size_t>(r) + 1]; ++e) {
      rows[static_cast<std::size_t>(r)].push_back(
          code.edge_variable()[static_cast<std::size_t>(e)]);
    }
  }
  return rows;
}

void ExpectSameCode(const LdpcCode& a, const LdpcCode& b) {
  EXPECT_EQ(a.length(), b.length());
  EXPECT_EQ(a.checks(), b.checks());
  EXPECT_EQ(a.lifting(), b.lifting());
  EXPECT_EQ(Rows(a), Rows(b));
  EXPECT_EQ(a.description(), b.description());
}

TEST(LdpcMatrixFile, ReadsHandWrittenText) {
  const char* text =
      "# Hamming (7,4) parity checks\n"
      "\n"
      "parity-check columns 7 rows 3   # header\n"
      "description hand   written\n"
      "0 1 3 4\n"
      "  6 3 2 1   # any order\n"
      "0\t2 3 5\n";
  Result<LdpcCode> r = ReadLdpcMatrix(text, "h.txt");
  ASSERT_TRUE(r.ok()) << r.status().message();
  const LdpcCode& code = r.value();
  EXPECT_EQ(code.length(), 7);
  EXPECT_EQ(code.checks(), 3);
  EXPECT_EQ(code.lifting(), 0);
  EXPECT_EQ(code.description(), "hand   written");
  EXPECT_EQ(Rows(code), (std::vector<std::vector<int>>{{0, 1, 3, 4}, {1, 2, 3, 6}, {0, 2, 3, 5}}));
}

TEST(LdpcMatrixFile, DefaultDescriptionNamesTheSource) {
  Result<LdpcCode> r = ReadLdpcMatrix("parity-check columns 2 rows 1\n0 1\n", "x.txt");
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value().description(), "read from x.txt");
}

TEST(LdpcMatrixFile, WriterFormatIsAsDocumented) {
  LdpcCode code = LdpcCode::FromRows(3, {{0, 2}, {}, {2, 1, 0}}).value();
  code.set_description("tiny # code\nsecond line");
  const std::string text = WriteLdpcMatrix(code);
  EXPECT_EQ(text,
            "# capgap sparse parity-check matrix (format: blocks/fec/ldpc_matrix_file.h).\n"
            "# Header 'parity-check columns <N> rows <M> [lifting <Z>]', optional\n"
            "# 'description <text>', then one line per row r = 0..M-1: its 0-based column\n"
            "# indices ('-' for an empty row).\n"
            "parity-check columns 3 rows 3\n"
            "description tiny   code second line\n"
            "0 2\n"
            "-\n"
            "0 1 2\n");
  // The empty row reads back.
  auto back = ReadLdpcMatrix(text, "w.txt");
  ASSERT_TRUE(back.ok()) << back.status().message();
  EXPECT_EQ(Rows(back.value()), (std::vector<std::vector<int>>{{0, 2}, {}, {0, 1, 2}}));
}

TEST(LdpcMatrixFile, PegCodeRoundTrips) {
  PegSpec spec;
  spec.length = 504;
  spec.checks = 252;
  spec.degrees = ParseVariableDegrees("2:0.3,3:0.5,6:0.2").value();
  const LdpcCode code = BuildPegCode(spec).value();
  Result<LdpcCode> back = ReadLdpcMatrix(WriteLdpcMatrix(code), "mem");
  ASSERT_TRUE(back.ok()) << back.status().message();
  ExpectSameCode(code, back.value());
}

TEST(LdpcMatrixFile, LiftedCodeRoundTripsWithItsLifting) {
  const BaseMatrix base =
      ReadBaseMatrixFile(CAPGAP_SOURCE_DIR "/configs/codes/qc_r1-2_24x12.txt").value();
  const LdpcCode code = LiftBaseMatrix(base, 84).value();
  const std::string text = WriteLdpcMatrix(code);
  EXPECT_NE(text.find("parity-check columns 2016 rows 1008 lifting 84\n"), std::string::npos);
  Result<LdpcCode> back = ReadLdpcMatrix(text, "mem");
  ASSERT_TRUE(back.ok()) << back.status().message();
  ExpectSameCode(code, back.value());
}

TEST(LdpcMatrixFile, FileRoundTripLeavesNoTemporary) {
  const LdpcCode code = LdpcCode::FromRows(4, {{0, 1, 2}, {1, 2, 3}}).value();
  const std::string path = std::string(CAPGAP_BINARY_DIR) + "/ldpc_matrix_file_test_code.txt";
  std::remove(path.c_str());
  ASSERT_TRUE(WriteLdpcMatrixFile(path, code).ok());
  EXPECT_FALSE(std::ifstream(path + ".tmp").good());
  Result<LdpcCode> back = ReadLdpcMatrixFile(path);
  ASSERT_TRUE(back.ok()) << back.status().message();
  EXPECT_EQ(Rows(back.value()), Rows(code));
  std::remove(path.c_str());
  EXPECT_EQ(ReadLdpcMatrixFile(path).status().message(), path + ": cannot open file");
  EXPECT_FALSE(WriteLdpcMatrixFile("/nonexistent-dir/x.txt", code).ok());
}

TEST(LdpcMatrixFile, ErrorsNameSourceLineAndValue) {
  auto msg = [](const std::string& text) {
    return ReadLdpcMatrix(text, "f.txt").status().message();
  };
  EXPECT_EQ(msg("# only a comment\n"), "f.txt: no 'parity-check' header line");
  EXPECT_EQ(msg("ldpc n 3 m 1\n"),
            "f.txt:1: header 'ldpc n 3 m 1': expected 'parity-check columns <N> rows <M>' or "
            "'parity-check columns <N> rows <M> lifting <Z>'");
  // The format of earlier versions is refused naming the new one.
  EXPECT_EQ(msg("# old\nldpc-matrix n 3 m 1\n3: 0 1 2\n"),
            "f.txt:2: the 'ldpc-matrix' format (rows written '<degree>: <columns>') is no longer "
            "read; write the header 'parity-check columns <N> rows <M> [lifting <Z>]' and each "
            "row as its column indices only (the degree is their count, '-' for an empty row); "
            "README, \"Sparse parity-check files\"");
  EXPECT_EQ(msg("parity-check columns x rows 1\n"), "f.txt:1: columns 'x': must be an integer >= 1");
  EXPECT_EQ(msg("parity-check columns 3 rows 0\n"), "f.txt:1: rows '0': must be an integer >= 1");
  EXPECT_EQ(msg("parity-check columns 4 rows 2 lifting 3\n"),
            "f.txt:1: lifting '3': must divide columns = 4 and rows = 2");
  EXPECT_EQ(msg("parity-check columns 3 rows 1\n3: 0 1 2\n"),
            "f.txt:2: check 0: '3:': a row lists column indices only (the degree is their count; "
            "no '<d>:' prefix)");
  EXPECT_EQ(msg("parity-check columns 3 rows 1\n0 1 3\n"), "f.txt:2: column '3': must be in [0, 3)");
  EXPECT_EQ(msg("parity-check columns 3 rows 1\n0 1 -1\n"), "f.txt:2: column '-1': must be in [0, 3)");
  EXPECT_EQ(msg("parity-check columns 3 rows 1\n0 1 b\n"), "f.txt:2: column 'b': not an integer");
  EXPECT_EQ(msg("parity-check columns 3 rows 1\n- 1\n"), "f.txt:2: column '-': not an integer");
  EXPECT_EQ(msg("parity-check columns 3 rows 1\n0 1 1\n"), "f.txt:2: column '1': listed twice in check 0");
  EXPECT_EQ(msg("parity-check columns 3 rows 2\n0 1 2\n"), "f.txt: ends after 1 of 2 check lines");
  EXPECT_EQ(msg("parity-check columns 3 rows 1\n0 1 2\n\n# c\n0\n"),
            "f.txt:5: text '0' after the 1 check lines");
  EXPECT_EQ(msg("parity-check columns 3 rows 1\n0 2\n"), "f.txt: column 1 is in no check");
  // Lifting 2: checks 0 and 1 form block row 0 and may not share column 1.
  EXPECT_EQ(
      msg("parity-check columns 4 rows 2 lifting 2\n0 1\n1 2 3\n"),
      "f.txt:3: column '1': check 1 shares it with check 0 of the same block row (lifting 2)");
}

TEST(LdpcTextHelpers, SplitsLinesStripsCommentsAndParsesInts) {
  const std::vector<LdpcTextLine> lines = SplitLdpcTextLines("a b # c\n\n  # d\n\te\tf \r\ng");
  ASSERT_EQ(lines.size(), 3u);
  EXPECT_EQ(lines[0].number, 1);
  EXPECT_EQ(lines[0].content, "a b");
  EXPECT_EQ(lines[0].words, (std::vector<std::string_view>{"a", "b"}));
  EXPECT_EQ(lines[1].number, 4);
  EXPECT_EQ(lines[1].words, (std::vector<std::string_view>{"e", "f"}));
  EXPECT_EQ(lines[2].number, 5);
  int v = 0;
  EXPECT_TRUE(ParseLdpcInt("-17", &v));
  EXPECT_EQ(v, -17);
  EXPECT_FALSE(ParseLdpcInt("12x", &v));
  EXPECT_FALSE(ParseLdpcInt("", &v));
  EXPECT_FALSE(ParseLdpcInt("99999999999", &v));  // overflows int
  EXPECT_FALSE(ParseLdpcInt("+3", &v));
}

}  // namespace
}  // namespace capgap

namespace capgap {
namespace {

// Hostile paths: devices, links to them and FIFOs are refused without being
// read (a FIFO without waiting for a writer), oversized files without being
// read whole, and a header declaring absurd sizes allocates nothing.
TEST(LdpcMatrixFile, NonFilesAndHugeFilesAreRefusedWithoutReading) {
  const std::filesystem::path dir = std::filesystem::temp_directory_path() /
                                    ("capgap_ldpc_hostile_" + std::to_string(::getpid()));
  std::filesystem::remove_all(dir);
  std::filesystem::create_directories(dir);
  const std::string fifo = (dir / "fifo.txt").string();
  ASSERT_EQ(::mkfifo(fifo.c_str(), 0600), 0);
  const std::string link = (dir / "zero.txt").string();
  std::filesystem::create_symlink("/dev/zero", link);
  const auto matrix = [](const std::string& p) {
    auto r = ReadLdpcMatrixFile(p);
    return r.ok() ? std::string("OK") : r.status().message();
  };
  const auto base = [](const std::string& p) {
    auto r = ReadBaseMatrixFile(p);
    return r.ok() ? std::string("OK") : r.status().message();
  };
  EXPECT_EQ(matrix("/dev/zero"), "/dev/zero: is not a regular file (a character device)");
  EXPECT_EQ(matrix(link), link + ": is not a regular file (a character device)");
  EXPECT_EQ(matrix(fifo), fifo + ": is not a regular file (a FIFO)");
  EXPECT_EQ(matrix(dir.string()), dir.string() + ": is a directory, not a matrix file");
  EXPECT_EQ(base("/dev/zero"), "/dev/zero: is not a regular file (a character device)");
  EXPECT_EQ(base(fifo), fifo + ": is not a regular file (a FIFO)");
  EXPECT_EQ(base(dir.string()), dir.string() + ": is a directory, not a base matrix file");
  const std::string huge = (dir / "huge.txt").string();
  { std::ofstream(huge) << "parity-check columns 4 rows 2\n"; }
  std::filesystem::resize_file(huge, kMaxLdpcMatrixFileBytes + 1);  // sparse
  EXPECT_EQ(matrix(huge), huge + ": is " + std::to_string(kMaxLdpcMatrixFileBytes + 1) +
                              " bytes; a matrix file may have at most " +
                              std::to_string(kMaxLdpcMatrixFileBytes) + " bytes");
  std::filesystem::resize_file(huge, kMaxBaseMatrixFileBytes + 1);
  EXPECT_EQ(base(huge), huge + ": is " + std::to_string(kMaxBaseMatrixFileBytes + 1) +
                            " bytes; a base matrix file may have at most " +
                            std::to_string(kMaxBaseMatrixFileBytes) + " bytes");
  std::filesystem::remove_all(dir);
}

TEST(LdpcMatrixFile, AbsurdHeaderSizesAllocateNothing) {
  auto msg = [](const std::string& text) {
    auto r = ReadLdpcMatrix(text, "f.txt");
    return r.ok() ? std::string("OK") : r.status().message();
  };
  // 2^31 - 1 columns, two listed: refused before the per-column marks exist.
  EXPECT_EQ(msg("parity-check columns 2147483647 rows 1\n0 1\n"),
            "f.txt:1: columns 2147483647 but the row lines list 2 entries; every column "
            "must be in a check");
  EXPECT_EQ(msg("parity-check columns 2 rows 2147483647\n0 1\n"),
            "f.txt: ends after 1 of 2147483647 check lines");
  auto base = [](const std::string& text) {
    auto r = ParseBaseMatrix(text, "b.txt");
    return r.ok() ? std::string("OK") : r.status().message();
  };
  EXPECT_EQ(base("rows 100000 cols 2000000 lifting 65536\n0 1\n"),
            "b.txt:2: base row 0 has 2 entries: expected cols = 2000000");
  EXPECT_EQ(base("rows 2147483646 cols 2147483647 lifting 1\n"),
            "b.txt: ends after 0 of 2147483646 base rows");
}

}  // namespace
}  // namespace capgap
