// The LDPC family's memory rule: a code whose estimated memory (H, encoder,
// decoder x threads) exceeds scheme.NAME.memory_limit_mb is refused before
// it is built, with a message naming the keys that fixed its size, the
// estimate and its parts; the limit is a key; the stop flag reaches the
// construction through Chain::Create.
#include <atomic>
#include <cstdint>
#include <filesystem>
#include <string>

#include <gtest/gtest.h>
#include <unistd.h>

#include "blocks/fec/ldpc_construction.h"
#include "blocks/fec/ldpc_matrix_file.h"
#include "sim/chain/chain.h"
#include "sim/config/config.h"
#include "sim/families/ldpc_family.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;

SchemeConfig Scheme(const std::string& keys, const std::string& source = "dir/t.ini") {
  const std::string text =
      "[sweep]\nebno_db = 1\n\n[scheme.a]\nmodulation = bpsk\ncode = ldpc\n" + keys;
  auto r = ParseRunConfig(text, source, {});
  EXPECT_TRUE(r.ok()) << r.status().message();
  return r.ok() ? r.value().schemes[0] : SchemeConfig{};
}

std::string ErrorOf(const SchemeConfig& s, int threads = 1) {
  BuildContext context;
  context.threads = threads;
  auto chain = Chain::Create(s, 1, context);
  return chain.ok() ? "OK" : chain.status().message();
}

std::string Mb(std::uint64_t bytes) { return std::to_string(CeilMegabytes(bytes)) + " MB"; }

// PEG, n = 2^20, rate 1/2, degree 3: m = 2^19 checks, E = 3 n edges. The
// `length` key stops at 32768; a program that fills SchemeConfig itself is
// still refused by the family, before anything is built.
TEST(LdpcMemory, HugePegCodeIsRefusedNamingLengthLimitAndEstimate) {
  SchemeConfig huge = Scheme("");
  huge.ldpc.length = 1 << 20;
  const LdpcMemoryEstimate e =
      EstimateLdpcMemory(1 << 20, 1 << 19, 3 << 20, false, 64, /*threads=*/1);
  // The encoder's part by hand (arithmetic): m n / 8 elimination bits +
  // nibble tables of 16 entries x 512 parity bits per four info bits and 512
  // parity rows, m (n - m) / 2 bytes, + n flags = 64 GiB + 128 GiB + 1 MiB.
  EXPECT_EQ(CeilMegabytes(e.encoder_bytes), 196609u);
  EXPECT_EQ(ErrorOf(huge),
            "scheme.a.length = 1048576 with construction = peg (n = 1048576, m = 524288): needs "
            "an estimated " + Mb(e.total_bytes()) + " (code " + Mb(e.code_bytes) +
                ", encoder elimination matrix 196609 MB, decoder 1 thread(s) x " +
                Mb(e.per_thread_bytes) +
                "), over scheme.a.memory_limit_mb = 4096; use a smaller code, a qc construction "
                "with a dual-diagonal base matrix (linear-time encoder, no dense matrix), fewer "
                "threads, or raise memory_limit_mb");
}

TEST(LdpcMemory, LengthKeyStopsAtWhatBuildsInAboutAMinute) {
  auto r = ParseRunConfig(
      "[sweep]\nebno_db = 1\n[scheme.a]\nmodulation = bpsk\ncode = ldpc\nlength = 32770\n",
      "t.ini", {});
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), "t.ini: scheme.a.length = '32770': must be an integer in [8, 32768]");
}

TEST(LdpcMemory, LimitIsTheMemoryLimitMbKey) {
  // n = 4096: the elimination alone is 2048 x 4096 bits = 1 MiB.
  const LdpcMemoryEstimate e = EstimateLdpcMemory(4096, 2048, 3 * 4096, false, 64, 1);
  ASSERT_GT(CeilMegabytes(e.total_bytes()), 1u);
  ASSERT_LE(CeilMegabytes(e.total_bytes()), 64u);
  const std::string message = ErrorOf(Scheme("length = 4096\nmemory_limit_mb = 1\n"));
  EXPECT_EQ(message.rfind("scheme.a.length = 4096 with construction = peg (n = 4096, m = 2048): "
                          "needs an estimated " + Mb(e.total_bytes()) + " (",
                          0),
            0u)
      << message;
  EXPECT_NE(message.find("over scheme.a.memory_limit_mb = 1; "), std::string::npos) << message;
  EXPECT_EQ(ErrorOf(Scheme("length = 4096\nmemory_limit_mb = 64\n")), "OK");
  // The key's own rule.
  auto r = ParseRunConfig(
      "[sweep]\nebno_db = 1\n[scheme.a]\nmodulation = bpsk\ncode = ldpc\nmemory_limit_mb = 0\n",
      "t.ini", {});
  ASSERT_FALSE(r.ok());
  EXPECT_NE(r.status().message().find("scheme.a.memory_limit_mb = '0'"), std::string::npos)
      << r.status().message();
}

// configs/codes/qc_r1-2_24x12.txt lifted by 65536: n = 24 Z, m = 12 Z, a
// dual-diagonal parity part (no elimination matrix), so the decoder state of
// 8 threads is what goes over the limit.
TEST(LdpcMemory, LargeLiftingIsRefusedBeforeLiftingNamingBaseMatrixAndLifting) {
  const std::string dir = std::string(CAPGAP_SOURCE_DIR) + "/configs/x.ini";
  const SchemeConfig s =
      Scheme("construction = qc\nbase_matrix = codes/qc_r1-2_24x12.txt\nlifting = 65536\n", dir);
  auto base = ReadBaseMatrixFile(std::string(CAPGAP_SOURCE_DIR) + "/configs/codes/qc_r1-2_24x12.txt");
  ASSERT_TRUE(base.ok());
  std::int64_t nonzero = 0;
  for (int v : base.value().shifts) nonzero += v >= 0 ? 1 : 0;
  const LdpcMemoryEstimate e =
      EstimateLdpcMemory(24 * 65536, 12 * 65536, nonzero * 65536, true, 64, 8);
  EXPECT_EQ(e.encoder_bytes, 0u);
  EXPECT_EQ(ErrorOf(s, 8),
            "scheme.a.base_matrix = 'codes/qc_r1-2_24x12.txt' with lifting = 65536 (n = 1572864, "
            "m = 786432): needs an estimated " + Mb(e.total_bytes()) + " (code " +
                Mb(e.code_bytes) + ", decoder 8 thread(s) x " + Mb(e.per_thread_bytes) +
                "), over scheme.a.memory_limit_mb = 4096; use a smaller code, fewer threads, or "
                "raise memory_limit_mb");
}

TEST(LdpcMemory, MatrixFileIsCheckedBeforeTheEncoderIsBuilt) {
  const fs::path dir =
      fs::temp_directory_path() / ("capgap_ldpc_family_" + std::to_string(::getpid()));
  fs::create_directories(dir);
  PegSpec spec;
  spec.length = 4096;
  spec.checks = 2048;
  spec.degrees = ParseVariableDegrees("3").value();
  const LdpcCode code = BuildPegCode(spec).value();
  ASSERT_TRUE(WriteLdpcMatrixFile((dir / "h.txt").string(), code).ok());
  const LdpcMemoryEstimate e = EstimateLdpcMemory(4096, 2048, code.edges(), false, 64, 1);
  const std::string message = ErrorOf(
      Scheme("construction = file\nmatrix_file = h.txt\nmemory_limit_mb = 1\n",
             (dir / "t.ini").string()));
  EXPECT_EQ(message.rfind("scheme.a.matrix_file = 'h.txt' (n = 4096, m = 2048): needs an "
                          "estimated " + Mb(e.total_bytes()) + " (code " + Mb(e.code_bytes) +
                              ", encoder elimination matrix " + Mb(e.encoder_bytes) + ", ",
                          0),
            0u)
      << message;
  fs::remove_all(dir);
}

TEST(LdpcStopFlag, ChainCreateReturnsStoppedFromTheConstruction) {
  const std::atomic<bool> stop{true};
  BuildContext context;
  context.stop = &stop;
  auto chain = Chain::Create(Scheme("length = 4096\n"), 1, context);
  ASSERT_FALSE(chain.ok());
  EXPECT_TRUE(chain.status().stopped());
  EXPECT_EQ(chain.status().message(),
            "scheme.a.length/rate/degrees: peg: stopped after placing 0 of 4096 variables");
}

}  // namespace
}  // namespace capgap
