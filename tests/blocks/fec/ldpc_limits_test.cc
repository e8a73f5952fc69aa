// Resource limits of the LDPC blocks: constructions that give up when their
// stop flag is set (PEG, the encoder's elimination), size checks made before
// anything large is allocated (lifting products, file headers), the encoder's
// memory formula and the decoder batch size of LdpcChannelCode.
#include <atomic>
#include <climits>
#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "blocks/fec/ldpc_channel_code.h"
#include "blocks/fec/ldpc_construction.h"
#include "blocks/fec/ldpc_encoder.h"
#include "blocks/fec/ldpc_matrix_file.h"
#include "gtest/gtest.h"

namespace capgap {
namespace {

PegSpec Spec(int n) {
  PegSpec spec;
  spec.length = n;
  spec.checks = ChecksForRate(n, 0.5);
  spec.degrees = ParseVariableDegrees("3").value();
  spec.seed = 1;
  return spec;
}

TEST(LdpcStop, PegReturnsStoppedWhenTheFlagIsSet) {
  const std::atomic<bool> stop{true};
  PegSpec spec = Spec(4096);
  spec.stop = &stop;
  const Result<LdpcCode> code = BuildPegCode(spec);
  ASSERT_FALSE(code.ok());
  EXPECT_TRUE(code.status().stopped());
  EXPECT_EQ(code.status().message(), "peg: stopped after placing 0 of 4096 variables");
}

TEST(LdpcStop, PegWithAClearFlagBuildsTheSameCode) {
  const std::atomic<bool> stop{false};
  PegSpec spec = Spec(256);
  const Result<LdpcCode> plain = BuildPegCode(spec);
  spec.stop = &stop;
  const Result<LdpcCode> watched = BuildPegCode(spec);
  ASSERT_TRUE(plain.ok() && watched.ok());
  const auto a = plain.value().edge_variable(), b = watched.value().edge_variable();
  EXPECT_EQ(std::vector<int>(a.begin(), a.end()), std::vector<int>(b.begin(), b.end()));
  const auto ra = plain.value().row_start(), rb = watched.value().row_start();
  EXPECT_EQ(std::vector<int>(ra.begin(), ra.end()), std::vector<int>(rb.begin(), rb.end()));
}

TEST(LdpcStop, EncoderEliminationReturnsStoppedWhenTheFlagIsSet) {
  auto code = std::make_shared<const LdpcCode>(BuildPegCode(Spec(512)).value());
  const std::atomic<bool> stop{true};
  const Result<LdpcEncoder> enc = LdpcEncoder::Create(code, LdpcEncoder::Method::kGeneral, &stop);
  ASSERT_FALSE(enc.ok());
  EXPECT_TRUE(enc.status().stopped());
  EXPECT_EQ(enc.status().message(),
            "LDPC encoder: stopped during the elimination (0 of 512 columns done)");
  // LdpcChannelCode passes the kind on, with its prefix.
  const auto cc = LdpcChannelCode::Create(code, LdpcDecoderOptions{}, &stop);
  ASSERT_FALSE(cc.ok());
  EXPECT_TRUE(cc.status().stopped());
  EXPECT_EQ(cc.status().message().rfind("code: LDPC encoder: stopped", 0), 0u)
      << cc.status().message();
  // A clear flag changes nothing.
  const std::atomic<bool> go{false};
  EXPECT_TRUE(LdpcEncoder::Create(code, LdpcEncoder::Method::kGeneral, &go).ok());
}

TEST(LdpcStop, StatusWithPrefixKeepsTheKind) {
  const Status s = Status::Stopped("x").WithPrefix("scheme.a.");
  EXPECT_TRUE(s.stopped());
  EXPECT_FALSE(s.ok());
  EXPECT_EQ(s.message(), "scheme.a.x");
  EXPECT_FALSE(Status::Error("y").WithPrefix("p: ").stopped());
  EXPECT_TRUE(Status::Ok().WithPrefix("p: ").ok());
}

// Arithmetic: the bit-packed m x n elimination matrix is m ceil(n/64) words,
// the nibble tables ceil(rank/512) chunks of ceil(k/4) groups of 16 entries
// of 8 words, plus n pivot flags. n = 2^20, m = 2^19 (rate 1/2):
// 2^19 * 2^14 * 8 = 64 GiB, 2^10 * 2^17 * 16 * 64 = 128 GiB, + 1 MiB.
TEST(LdpcLimits, EncoderGeneralPathBytesFollowTheDenseLayout) {
  EXPECT_EQ(LdpcEncoder::GeneralPathBytes(1 << 20, 1 << 19),
            (std::uint64_t{64} << 30) + (std::uint64_t{128} << 30) + (std::uint64_t{1} << 20));
  // n = 100, m = 50: 50 rows of 2 words, one chunk of 13 groups, 100 flags.
  EXPECT_EQ(LdpcEncoder::GeneralPathBytes(100, 50), 50u * 16 + 13u * 16 * 64 + 100);
  EXPECT_EQ(LdpcEncoder::GeneralPathBytes(0, 5), 0u);
}

TEST(LdpcLimits, DualDiagonalPathIsFoundWithoutBuildingTheEncoder) {
  auto base = ReadBaseMatrixFile(std::string(CAPGAP_SOURCE_DIR) + "/configs/codes/qc_r1-2_24x12.txt");
  ASSERT_TRUE(base.ok()) << base.status().message();
  const LdpcCode qc = LiftBaseMatrix(base.value(), 84).value();
  EXPECT_TRUE(LdpcEncoder::HasDualDiagonalPath(qc));
  EXPECT_FALSE(LdpcEncoder::HasDualDiagonalPath(BuildPegCode(Spec(256)).value()));
}

TEST(LdpcLimits, LiftingProductsBeyondIntAreRefusedBeforeAllocating) {
  BaseMatrix base;
  base.rows = 1;
  base.cols = 40000;
  base.design_lifting = 65536;
  base.shifts.assign(40000, 0);
  base.source_name = "b.txt";
  const Result<LdpcCode> code = LiftBaseMatrix(base, 65536);
  ASSERT_FALSE(code.ok());
  EXPECT_EQ(code.status().message(),
            "b.txt: lifting 65536: n = cols x lifting = 2621440000: must be at most 2147483647");
}

// A header alone must not make the readers allocate what it promises.
TEST(LdpcLimits, AbsurdHeadersAreRefusedWithoutAllocating) {
  const Result<BaseMatrix> base =
      ParseBaseMatrix("rows 100000 cols 2000000 lifting 65536\n", "f.txt");
  ASSERT_FALSE(base.ok());
  EXPECT_EQ(base.status().message(), "f.txt: ends after 0 of 100000 base rows");

  Result<LdpcCode> h = ReadLdpcMatrix("parity-check columns 2000000000 rows 1000000000\n", "f.txt");
  ASSERT_FALSE(h.ok());
  EXPECT_EQ(h.status().message(),
            "f.txt:1: columns 2000000000 but the row lines list 0 entries; every column "
            "must be in a check");
  h = ReadLdpcMatrix("parity-check columns 3 rows 1000000000\n0 1\n2\n", "f.txt");
  ASSERT_FALSE(h.ok());
  EXPECT_EQ(h.status().message(), "f.txt: ends after 2 of 1000000000 check lines");
}

TEST(LdpcLimits, DecoderBatchHoldsAboutAMegabitAndSeveralLaneLoads) {
  // The whole unit when it is small.
  EXPECT_EQ(LdpcChannelCode::BatchFrames(64, 2016, 64), 64u);
  // 2^20 / 2016 = 520 frames, rounded down to whole lane loads: 512.
  EXPECT_EQ(LdpcChannelCode::BatchFrames(100000, 2016, 64), 512u);
  // Long codes: at least four lane loads.
  EXPECT_EQ(LdpcChannelCode::BatchFrames(100000, 65536, 32), 128u);
  // The float decoder (one lane): 520 frames.
  EXPECT_EQ(LdpcChannelCode::BatchFrames(100000, 2016, 1), 520u);
}

}  // namespace
}  // namespace capgap
