// BlockMlDecoder: decisions against an independent brute-force ML decoder in
// double precision (>= 2000 random LLR vectors each for the extended Hamming
// (8, 4), the extended Golay (24, 12) and a random (40, 16) code), correction
// of every error pattern of weight t = floor((d - 1) / 2) on hard (+-large)
// LLRs, batching, the forced scalar path and Create()'s rule.
#include "blocks/fec/block_ml_decoder.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstdint>
#include <limits>
#include <random>
#include <vector>

#include "blocks/kernels/awgn_kernels.h"

namespace capgap {
namespace {

BlockCode MustBuiltIn(const char* name) {
  Result<BlockCode> r = BlockCode::BuiltIn(name);
  EXPECT_TRUE(r.ok()) << r.status().message();
  return std::move(r).value();
}

BlockMlDecoder MustDecoder(const BlockCode& code, int frames_per_call = 64) {
  Result<BlockMlDecoder> r = BlockMlDecoder::Create(code, BlockMlOptions{frames_per_call});
  EXPECT_TRUE(r.ok()) << r.status().message();
  return std::move(r).value();
}

BlockCode RandomCode(int n, int k, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::vector<Bit> g(static_cast<std::size_t>(n * k));
  do {
    for (Bit& b : g) b = static_cast<Bit>(rng() & 1u);
  } while (BlockCode::FirstDependentRow(n, k, g) >= 0);
  Result<BlockCode> r = BlockCode::Create(n, k, g, "random");
  EXPECT_TRUE(r.ok());
  return std::move(r).value();
}

// Brute-force ML in double, written independently of the decoder: codewords
// by Gray-code stepping through u (one generator row XORed per step, n <= 64
// bits in one word), metric = sum L - 2 sum_{c_i = 1} L_i from per-byte
// tables. Returns the best u and the gap to the runner-up metric.
struct BruteForce {
  std::uint32_t best_u = 0;
  double best = 0.0;
  double gap = 0.0;  // best minus second best
};

BruteForce BruteForceMl(const BlockCode& c, const float* llr) {
  const int n = c.n(), k = c.k();
  std::vector<std::uint64_t> rows(static_cast<std::size_t>(k), 0);
  for (int t = 0; t < k; ++t) {
    for (int i = 0; i < n; ++i) {
      if (c.generator()[static_cast<std::size_t>(t * n + i)] != 0) {
        rows[static_cast<std::size_t>(t)] |= std::uint64_t{1} << i;
      }
    }
  }
  const int bytes = (n + 7) / 8;
  std::vector<double> table(static_cast<std::size_t>(bytes) * 256, 0.0);
  double sum = 0.0;
  for (int i = 0; i < n; ++i) sum += static_cast<double>(llr[i]);
  for (int b = 0; b < bytes; ++b) {
    for (int v = 0; v < 256; ++v) {
      double s = 0.0;
      for (int x = 0; x < 8 && 8 * b + x < n; ++x) {
        if ((v >> x) & 1) s -= 2.0 * static_cast<double>(llr[8 * b + x]);
      }
      table[static_cast<std::size_t>(b * 256 + v)] = s;
    }
  }
  BruteForce r;
  r.best = -std::numeric_limits<double>::infinity();
  double second = -std::numeric_limits<double>::infinity();
  std::uint64_t cw = 0;
  for (std::uint32_t step = 0; step < (1u << k); ++step) {
    if (step > 0) cw ^= rows[static_cast<std::size_t>(std::countr_zero(step))];
    const std::uint32_t u = step ^ (step >> 1);  // Gray code: cw = u G
    double m = sum;
    for (int b = 0; b < bytes; ++b)
      m += table[static_cast<std::size_t>(b * 256) + ((cw >> (8 * b)) & 0xFFu)];
    if (m > r.best) {
      second = r.best;
      r.best = m;
      r.best_u = u;
    } else if (m > second) {
      second = m;
    }
  }
  r.gap = r.best - second;
  return r;
}

// Double-precision metric of codeword index j.
double MetricOf(const BlockCode& c, std::uint32_t j, const float* llr) {
  double m = 0.0;
  for (int i = 0; i < c.n(); ++i) {
    m += (c.CodewordBit(j, i) != 0 ? -1.0 : 1.0) * static_cast<double>(llr[i]);
  }
  return m;
}

void ExpectMatchesBruteForce(const BlockCode& c, std::size_t frames, std::uint64_t seed) {
  const BlockMlDecoder dec = MustDecoder(c, 37);  // a batch size that does not divide frames
  BlockMlDecoder::Workspace ws = dec.MakeWorkspace();
  const auto n = static_cast<std::size_t>(c.n());
  std::mt19937_64 rng(seed);
  std::normal_distribution<float> noise(0.0f, 1.0f);
  std::vector<float> llrs(frames * n);
  // BPSK-like LLRs of random codewords at a moderate SNR (mean 4, spread
  // 2.8) so that many frames carry errors and the decision is not trivial.
  for (std::size_t f = 0; f < frames; ++f) {
    const auto j = static_cast<std::uint32_t>(rng() % c.num_codewords());
    for (std::size_t i = 0; i < n; ++i) {
      const float x = c.CodewordBit(j, static_cast<int>(i)) != 0 ? -1.0f : 1.0f;
      llrs[f * n + i] = 4.0f * x + 2.8f * noise(rng);
    }
  }
  std::vector<std::uint32_t> got(frames, 0xFFFFFFFFu);
  dec.DecodeIndices(llrs, got, ws);
  // Where the double-precision runner-up is within kTol of the best, float
  // rounding (about n 2^-24 |L| per metric) may legitimately order them
  // differently: there the decision must be one of the near-best codewords.
  constexpr double kTol = 1e-3;
  int near_ties = 0;
  for (std::size_t f = 0; f < frames; ++f) {
    const BruteForce bf = BruteForceMl(c, llrs.data() + f * n);
    if (bf.gap > kTol) {
      ASSERT_EQ(got[f], bf.best_u) << c.name() << " frame " << f;
    } else {
      ++near_ties;
      ASSERT_GE(MetricOf(c, got[f], llrs.data() + f * n), bf.best - kTol)
          << c.name() << " frame " << f;
    }
  }
  EXPECT_LT(near_ties, 5) << c.name();
  // Decode gives the same decisions as information bits.
  std::vector<Bit> info(frames * static_cast<std::size_t>(c.k()), 7);
  dec.Decode(llrs, info, ws);
  for (std::size_t f = 0; f < frames; ++f) {
    const auto k = static_cast<std::size_t>(c.k());
    ASSERT_EQ(c.InfoToIndex(std::span<const Bit>(info).subspan(f * k, k)), got[f]);
  }
}

TEST(BlockMlDecoder, ExtendedHammingMatchesBruteForceMl) {
  ExpectMatchesBruteForce(MustBuiltIn("hamming8"), 4000, 11u);
}

TEST(BlockMlDecoder, GolayMatchesBruteForceMl) {
  ExpectMatchesBruteForce(MustBuiltIn("golay24"), 2500, 12u);
}

TEST(BlockMlDecoder, RandomK16N40CodeMatchesBruteForceMl) {
  ExpectMatchesBruteForce(RandomCode(40, 16, 13u), 2000, 13u);
}

// Hard LLRs of magnitude 20 for codeword j with the bits in `flips`
// inverted.
void HardLlrs(const BlockCode& c, std::uint32_t j, const std::vector<int>& flips, float* out) {
  for (int i = 0; i < c.n(); ++i) out[i] = c.CodewordBit(j, i) != 0 ? -20.0f : 20.0f;
  for (const int i : flips) out[i] = -out[i];
}

TEST(BlockMlDecoder, CorrectsEveryErrorPatternOfWeightUpToT) {
  // With equal-magnitude LLRs the correlation is A (n - 2 d_H), so ML is
  // minimum Hamming distance and corrects every pattern of weight <=
  // t = floor((d - 1) / 2) (common practice). Exhaustive over patterns.
  for (const char* name : {"hamming8", "golay24"}) {
    const BlockCode c = MustBuiltIn(name);
    const BlockMlDecoder dec = MustDecoder(c);
    BlockMlDecoder::Workspace ws = dec.MakeWorkspace();
    const int n = c.n(), t = (c.min_distance() - 1) / 2;
    ASSERT_EQ(t, c.n() == 8 ? 1 : 3);
    std::mt19937_64 rng(5u);
    std::vector<std::vector<int>> patterns = {{}};
    for (int a = 0; a < n; ++a) {
      if (t >= 1) patterns.push_back({a});
      for (int b = a + 1; b < n && t >= 2; ++b) {
        patterns.push_back({a, b});
        for (int e = b + 1; e < n && t >= 3; ++e) patterns.push_back({a, b, e});
      }
    }
    std::vector<float> llrs(patterns.size() * static_cast<std::size_t>(n));
    std::vector<std::uint32_t> sent(patterns.size()), got(patterns.size());
    for (std::size_t p = 0; p < patterns.size(); ++p) {
      sent[p] = static_cast<std::uint32_t>(rng() % c.num_codewords());
      HardLlrs(c, sent[p], patterns[p], llrs.data() + p * static_cast<std::size_t>(n));
    }
    dec.DecodeIndices(llrs, got, ws);
    EXPECT_EQ(got, sent) << name << ": " << patterns.size() << " patterns";
  }
}

TEST(BlockMlDecoder, RandomCodeCorrectsRandomPatternsOfWeightT) {
  const BlockCode c = RandomCode(40, 16, 13u);
  const BlockMlDecoder dec = MustDecoder(c);
  BlockMlDecoder::Workspace ws = dec.MakeWorkspace();
  const int t = (c.min_distance() - 1) / 2;
  ASSERT_GE(t, 1) << "d = " << c.min_distance();
  std::mt19937_64 rng(6u);
  const std::size_t frames = 300;
  std::vector<float> llrs(frames * 40);
  std::vector<std::uint32_t> sent(frames), got(frames);
  for (std::size_t f = 0; f < frames; ++f) {
    std::vector<int> flips;
    while (static_cast<int>(flips.size()) < t) {
      const int i = static_cast<int>(rng() % 40);
      if (std::find(flips.begin(), flips.end(), i) == flips.end()) flips.push_back(i);
    }
    sent[f] = static_cast<std::uint32_t>(rng() % c.num_codewords());
    HardLlrs(c, sent[f], flips, llrs.data() + f * 40);
  }
  dec.DecodeIndices(llrs, got, ws);
  EXPECT_EQ(got, sent);
}

TEST(BlockMlDecoder, DecisionsDoNotDependOnBatchingOrForcedScalar) {
  const BlockCode c = MustBuiltIn("golay24");
  std::mt19937_64 rng(8u);
  std::normal_distribution<float> g(0.0f, 2.0f);
  const std::size_t frames = 203;
  std::vector<float> llrs(frames * 24);
  for (float& x : llrs) x = g(rng);
  std::vector<std::uint32_t> one(frames), batched(frames), scalar(frames);
  const BlockMlDecoder dec1 = MustDecoder(c, 1);
  BlockMlDecoder::Workspace ws1 = dec1.MakeWorkspace();
  EXPECT_EQ(ws1.frames_per_call(), 1u);
  dec1.DecodeIndices(llrs, one, ws1);
  const BlockMlDecoder dec64 = MustDecoder(c, 64);
  BlockMlDecoder::Workspace ws64 = dec64.MakeWorkspace();
  dec64.DecodeIndices(llrs, batched, ws64);
  const bool was = ForceScalarKernels(true);
  EXPECT_STREQ(dec64.KernelTarget(), "SCALAR");
  dec64.DecodeIndices(llrs, scalar, ws64);
  ForceScalarKernels(was);
  EXPECT_EQ(one, batched);
  EXPECT_EQ(scalar, batched);
  // Zero frames is a no-op.
  dec64.DecodeIndices({}, {}, ws64);
}

TEST(BlockMlDecoder, CreateRefusesFramesPerCallOutOfRange) {
  const BlockCode c = MustBuiltIn("hamming8");
  for (const int f : {0, -3, BlockMlDecoder::kMaxFramesPerCall + 1}) {
    Result<BlockMlDecoder> r = BlockMlDecoder::Create(c, BlockMlOptions{f});
    ASSERT_FALSE(r.ok());
    EXPECT_EQ(r.status().message(), "block ML decoder: frames_per_call = " + std::to_string(f) +
                                        ": must be in [1, 65536]");
  }
}

}  // namespace
}  // namespace capgap
