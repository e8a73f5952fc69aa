// Block code generator text format (blocks/fec/block_code_file.h): round
// trips through text and files, and every rule of the reader with its exact
// message (source, line, rule).
#include "blocks/fec/block_code_file.h"

#include <gtest/gtest.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <random>
#include <string>
#include <vector>

namespace capgap {
namespace {

BlockCode MustBuiltIn(const char* name) {
  Result<BlockCode> r = BlockCode::BuiltIn(name);
  EXPECT_TRUE(r.ok()) << r.status().message();
  return std::move(r).value();
}

std::string Error(std::string_view text) {
  Result<BlockCode> r = ReadBlockCode(text, "g.txt");
  return r.ok() ? std::string("OK") : r.status().message();
}

void ExpectSameCode(const BlockCode& a, const BlockCode& b) {
  EXPECT_EQ(a.n(), b.n());
  EXPECT_EQ(a.k(), b.k());
  EXPECT_EQ(a.name(), b.name());
  EXPECT_TRUE(std::equal(a.generator().begin(), a.generator().end(), b.generator().begin(),
                         b.generator().end()));
  EXPECT_EQ(a.weight_enumerator().codewords, b.weight_enumerator().codewords);
}

TEST(BlockCodeFile, TextRoundTripKeepsGeneratorAndName) {
  std::mt19937_64 rng(3u);
  std::vector<Bit> g(40 * 16);
  do {
    for (Bit& b : g) b = static_cast<Bit>(rng() & 1u);
  } while (BlockCode::FirstDependentRow(40, 16, g) >= 0);
  Result<BlockCode> random = BlockCode::Create(40, 16, g, "random-40.16");
  ASSERT_TRUE(random.ok());
  for (const BlockCode& c : {MustBuiltIn("hamming8"), MustBuiltIn("golay24"), random.value()}) {
    const std::string text = WriteBlockCode(c);
    Result<BlockCode> back = ReadBlockCode(text, "mem");
    ASSERT_TRUE(back.ok()) << back.status().message();
    ExpectSameCode(c, back.value());
  }
}

TEST(BlockCodeFile, WriterFormatIsAsDocumented) {
  Result<BlockCode> c = BlockCode::Create(3, 2, std::vector<Bit>{1, 0, 1, 0, 1, 1}, "a b#c");
  ASSERT_TRUE(c.ok());
  EXPECT_EQ(WriteBlockCode(c.value()),
            "# capgap block code generator: header, name, then k rows of n bits\n"
            "block-code n 3 k 2\n"
            "name a_b_c\n"
            "101\n"
            "011\n");
}

TEST(BlockCodeFile, ReaderAcceptsCommentsBlankLinesAndNoName) {
  Result<BlockCode> r = ReadBlockCode(
      "# a comment\n\nblock-code n 4 k 2   # trailing\r\n  1100 \n\t0011\r\n# end\n", "g.txt");
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value().name(), "g.txt");
  EXPECT_EQ(std::vector<Bit>(r.value().generator().begin(), r.value().generator().end()),
            (std::vector<Bit>{1, 1, 0, 0, 0, 0, 1, 1}));
}

TEST(BlockCodeFile, EveryBadInputRuleHasItsMessage) {
  EXPECT_EQ(Error("# only a comment\n"),
            "g.txt:1: no header line: expected 'block-code n <N> k <K>'");
  EXPECT_EQ(Error("\nblock n 4 k 2\n"),
            "g.txt:2: header 'block n 4 k 2': expected 'block-code n <N> k <K>'");
  EXPECT_EQ(Error("block-code n 300 k 2\n"), "g.txt:1: n = '300': must be an integer in [1, 256]");
  EXPECT_EQ(Error("block-code n x k 2\n"), "g.txt:1: n = 'x': must be an integer in [1, 256]");
  EXPECT_EQ(Error("block-code n 40 k 17\n"),
            "g.txt:1: k = '17': must be an integer in [1, 16] (the ML decoder visits all 2^k "
            "codewords)");
  EXPECT_EQ(Error("block-code n 4 k 5\n"), "g.txt:1: k = 5: must be <= n = 4");
  EXPECT_EQ(Error("block-code n 4 k 2\nname a b\n1100\n0011\n"),
            "g.txt:2: name line 'name a b': expected 'name <word>' (one word)");
  EXPECT_EQ(Error("block-code n 4 k 2\n1100\n"), "g.txt:2: ends after 1 of k = 2 generator rows");
  EXPECT_EQ(Error("block-code n 4 k 2\n1100\n00111\n"),
            "g.txt:3: row 1 has 5 characters: must have n = 4");
  EXPECT_EQ(Error("block-code n 4 k 2\n1100\n001\n"),
            "g.txt:3: row 1 has 3 characters: must have n = 4");
  EXPECT_EQ(Error("block-code n 4 k 2\n1100\n0021\n"),
            "g.txt:3: row 1: character 2 is '2': must be '0' or '1'");
  EXPECT_EQ(Error("block-code n 4 k 2\n1100\n00 11\n"),
            "g.txt:3: row 1 '00 11': must be one word of n = 4 characters '0'/'1' (no spaces)");
  EXPECT_EQ(Error("block-code n 4 k 2\n1100\n0011\n1111\n"),
            "g.txt:4: '1111': unexpected after the k = 2 generator rows");
  // Row 2 (line 5) = row 0 + row 1.
  EXPECT_EQ(Error("block-code n 4 k 3\n1100\n\n0110\n1010\n"),
            "g.txt:5: row 2: is a GF(2) sum of earlier rows: the k rows must be linearly "
            "independent (rank k)");
  EXPECT_EQ(Error("block-code n 4 k 2\n0000\n0011\n"),
            "g.txt:2: row 0: is a GF(2) sum of earlier rows: the k rows must be linearly "
            "independent (rank k)");
}

TEST(BlockCodeFile, FileRoundTripAndFileRules) {
  const std::string dir = std::string(CAPGAP_BINARY_DIR) + "/block_code_file_test";
  std::filesystem::create_directories(dir);
  const std::string path = dir + "/golay.txt";
  const BlockCode golay = MustBuiltIn("golay24");
  ASSERT_TRUE(WriteBlockCodeFile(path, golay).ok());
  EXPECT_FALSE(std::filesystem::exists(path + ".tmp"));
  Result<BlockCode> back = ReadBlockCodeFile(path);
  ASSERT_TRUE(back.ok()) << back.status().message();
  ExpectSameCode(golay, back.value());

  auto msg = [](const Result<BlockCode>& r) {
    return r.ok() ? std::string("OK") : r.status().message();
  };
  EXPECT_EQ(msg(ReadBlockCodeFile(dir + "/missing.txt")), dir + "/missing.txt: cannot open file");
  EXPECT_EQ(msg(ReadBlockCodeFile(dir)),
            dir + ": not a regular file: a generator must be read from one");
  EXPECT_EQ(msg(ReadBlockCodeFile("/dev/null")),
            "/dev/null: not a regular file: a generator must be read from one");
  // One byte over the limit: a valid file followed by a long comment.
  const std::string big = dir + "/big.txt";
  {
    std::string text = WriteBlockCode(golay) + "#";
    text.resize(kMaxBlockCodeFileBytes + 1, 'x');
    std::ofstream(big, std::ios::binary) << text;
  }
  EXPECT_EQ(msg(ReadBlockCodeFile(big)), big + ": 1048577 bytes: must be at most 1048576 (1 MiB)");
  // Exactly at the limit is accepted.
  {
    std::string text = WriteBlockCode(golay) + "#";
    text.resize(kMaxBlockCodeFileBytes, 'x');
    std::ofstream(big, std::ios::binary | std::ios::trunc) << text;
  }
  EXPECT_EQ(msg(ReadBlockCodeFile(big)), "OK");
  // A bad file's message names its path and line.
  const std::string bad = dir + "/bad.txt";
  std::ofstream(bad, std::ios::binary) << "block-code n 4 k 1\n10x0\n";
  EXPECT_EQ(msg(ReadBlockCodeFile(bad)), bad + ":2: row 0: character 2 is 'x': must be '0' or '1'");
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace capgap

namespace capgap {
namespace {

// A FIFO or a link to a device as generator file: refused at once.
TEST(BlockCodeFile, FifosAndDeviceLinksAreRefusedWithoutReading) {
  const std::filesystem::path dir = std::filesystem::temp_directory_path() /
                                    ("capgap_block_hostile_" + std::to_string(::getpid()));
  std::filesystem::remove_all(dir);
  std::filesystem::create_directories(dir);
  const std::string fifo = (dir / "g.fifo").string();
  ASSERT_EQ(::mkfifo(fifo.c_str(), 0600), 0);
  const std::string link = (dir / "zero.txt").string();
  std::filesystem::create_symlink("/dev/zero", link);
  for (const std::string& p : {fifo, link}) {
    const Result<BlockCode> r = ReadBlockCodeFile(p);
    ASSERT_FALSE(r.ok()) << p;
    EXPECT_EQ(r.status().message(), p + ": not a regular file: a generator must be read from one");
  }
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace capgap
