// Chain::RunUnit for uncoded BPSK with hard decisions, which runs the fused
// kernel of blocks/kernels/bpsk_kernels.h, against the same link composed by
// hand from the public blocks the way the chain composed it before the fused
// kernel existed: bit source (random or PRBS), x = 1 - 2 b,
// AwgnChannel::AddNoiseReal, decision y < 0, bit errors, frame error = any bit
// error. Counts must be identical, unit by unit, at several Eb/N0 values,
// frame sizes (including odd ones), seeds and units, on the dispatched and on
// the forced scalar kernels.
#include "sim/chain/chain.h"

#include <gtest/gtest.h>

#include <cstdint>
#include <string>
#include <vector>

#include "blocks/channel/awgn_channel.h"
#include "blocks/core/energy.h"
#include "blocks/core/rng_stream.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/source/bit_source.h"
#include "sim/config/config.h"

namespace capgap {
namespace {

SchemeConfig BpskHard(std::uint32_t frame_bits, std::uint32_t unit_frames, SourceKind source) {
  SchemeConfig s;
  s.name = "bpsk_hard_" + std::to_string(frame_bits) + "_" + ToString(source);
  s.modulation = ParseModulation("bpsk").value();
  s.demapper = DemapMethod::kHard;
  s.frame_bits = frame_bits;
  s.unit_frames = unit_frames;
  s.source = source;
  return s;
}

AwgnChannel BpskChannel(double ebno_db) {
  NoiseSpec spec;
  spec.ebno_db = ebno_db;
  spec.bits_per_symbol = 1;
  return AwgnChannel(spec);
}

PrbsOrder OrderOf(SourceKind source) {
  switch (source) {
    case SourceKind::kPrbs15:
      return PrbsOrder::k15;
    case SourceKind::kPrbs23:
      return PrbsOrder::k23;
    case SourceKind::kPrbs31:
      return PrbsOrder::k31;
    default:
      return PrbsOrder::k9;
  }
}

// Unit `unit` of point `point`, composed step by step from the public blocks.
UnitCounts HandComposedUnit(const SchemeConfig& s, std::uint64_t seed, const AwgnChannel& channel,
                            std::uint32_t point, std::uint32_t unit) {
  const PhiloxKey key = DeriveKey(seed, s.name);
  RngStream bit_stream(key, point, unit, Substream::kBits);
  RngStream noise_stream(key, point, unit, Substream::kNoise);
  const std::size_t n = s.frame_bits;
  std::vector<Bit> bits(n);
  std::vector<float> y(n);
  UnitCounts counts;
  for (std::uint32_t f = 0; f < s.ResolvedUnitFrames(); ++f) {
    if (s.source == SourceKind::kRandom) {
      GenerateRandomBits(bits, bit_stream);
    } else {
      // One continuous sequence per point (as the chain documents it).
      const PrbsGenerator prbs = PrbsGenerator::Create(OrderOf(s.source)).value();
      const std::uint64_t start =
          (static_cast<std::uint64_t>(unit) * s.ResolvedUnitFrames() + f) * s.frame_bits;
      PrbsGenerator::State state = prbs.StateAt(start % prbs.period());
      prbs.Generate(bits, state);
    }
    for (std::size_t i = 0; i < n; ++i) y[i] = 1.0f - 2.0f * static_cast<float>(bits[i]);
    channel.AddNoiseReal(y, noise_stream);
    std::uint64_t errors = 0;
    for (std::size_t i = 0; i < n; ++i) {
      errors += static_cast<std::uint64_t>(static_cast<Bit>(y[i] < 0.0f) ^ bits[i]);
    }
    counts.bits += n;
    counts.bit_errors += errors;
    counts.frames += 1;
    counts.frame_errors += errors > 0 ? 1 : 0;
  }
  return counts;
}

void ExpectRunUnitEqualsHandComposed(const SchemeConfig& s, std::uint64_t seed,
                                     const std::vector<double>& ebno_db,
                                     std::uint64_t& total_bit_errors,
                                     std::uint64_t& error_free_frames) {
  const Chain chain = Chain::Create(s, seed).value();
  ChainWorkspace ws = chain.MakeWorkspace();
  for (std::size_t p = 0; p < ebno_db.size(); ++p) {
    const AwgnChannel channel = BpskChannel(ebno_db[p]);
    const auto point = static_cast<std::uint32_t>(p);
    for (std::uint32_t unit : {0u, 1u, 7u, 1000u}) {
      SCOPED_TRACE(testing::Message()
                   << s.name << " seed=" << seed << " Eb/N0=" << ebno_db[p] << " unit=" << unit);
      const UnitCounts want = HandComposedUnit(s, seed, channel, point, unit);
      const UnitCounts got = chain.RunUnit(channel, point, unit, ws);
      EXPECT_EQ(got, want);
      total_bit_errors += got.bit_errors;
      error_free_frames += got.frames - got.frame_errors;
    }
  }
}

// Eb/N0 from BER ~0.2 down to ~1e-4 (Q(sqrt(2 Eb/N0)), 8 dB: 1.9e-4), so the
// comparison sees units with many errors and frames without any.
const std::vector<double> kEbnoDb = {-3.0, 0.0, 4.0, 8.0};

TEST(ChainBpskHard, RunUnitEqualsHandComposedChainWithRandomBits) {
  std::uint64_t errors = 0, clean_frames = 0;
  for (std::uint64_t seed : {1u, 20240603u}) {
    for (std::uint32_t frame_bits : {3840u, 1001u, 65u, 1u}) {
      ExpectRunUnitEqualsHandComposed(BpskHard(frame_bits, 3, SourceKind::kRandom), seed, kEbnoDb,
                                      errors, clean_frames);
    }
  }
  EXPECT_GT(errors, 10000u);
  EXPECT_GT(clean_frames, 0u);
}

TEST(ChainBpskHard, RunUnitEqualsHandComposedChainWithPrbsBits) {
  std::uint64_t errors = 0, clean_frames = 0;
  for (SourceKind source : {SourceKind::kPrbs9, SourceKind::kPrbs23}) {
    for (std::uint32_t frame_bits : {3840u, 1001u}) {
      ExpectRunUnitEqualsHandComposed(BpskHard(frame_bits, 2, source), 5u, kEbnoDb, errors,
                                      clean_frames);
    }
  }
  EXPECT_GT(errors, 1000u);
  EXPECT_GT(clean_frames, 0u);
}

// Automatic unit size (65536 bits per unit) and the scalar kernels.
TEST(ChainBpskHard, RunUnitEqualsHandComposedChainOnScalarKernels) {
  const bool before = ForceScalarKernels(true);
  std::uint64_t errors = 0, clean_frames = 0;
  ExpectRunUnitEqualsHandComposed(BpskHard(4097, 0, SourceKind::kRandom), 3u, kEbnoDb, errors,
                                  clean_frames);
  ExpectRunUnitEqualsHandComposed(BpskHard(1001, 2, SourceKind::kPrbs15), 3u, kEbnoDb, errors,
                                  clean_frames);
  ForceScalarKernels(before);
  EXPECT_GT(errors, 1000u);
  EXPECT_GT(clean_frames, 0u);
}

}  // namespace
}  // namespace capgap
