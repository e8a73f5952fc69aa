// Tests of generic constellations (ModulationFamily::kGeneric: points and
// labels as data, modulation.h): validation messages, Mapper placing point i
// at label labels[i], and the Demapper running the brute-force reference for
// them. The check case is square 16-QAM re-entered as data in a shuffled
// order: it must map exactly like the built-in 16qam and decide like its fast
// path (minimum distance decisions are a property of the points, common
// practice).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <complex>
#include <cstdint>
#include <random>
#include <string>
#include <vector>

#include "blocks/core/types.h"
#include "blocks/mapping/demapper.h"
#include "blocks/mapping/generic_demapper.h"
#include "blocks/mapping/mapper.h"
#include "blocks/mapping/modulation.h"

namespace capgap {
namespace {

// 16-QAM as data: the built-in points, listed in a shuffled order with their
// labels.
GenericConstellation ShuffledQam16() {
  const Mapper qam = Mapper::Create(Modulation{ModulationFamily::kQam, 16}).value();
  GenericConstellation c;
  c.name = "qam16data";
  std::vector<std::uint32_t> order(16);
  for (std::uint32_t i = 0; i < 16; ++i) order[i] = (7 * i + 3) % 16;  // a permutation
  for (std::uint32_t l : order) {
    c.points.push_back(qam.points()[l]);
    c.labels.push_back(l);
  }
  return c;
}

std::string ErrorOf(GenericConstellation c) {
  const Result<Modulation> m = MakeGenericModulation(std::move(c));
  return m.ok() ? "ok" : m.status().message();
}

TEST(GenericConstellation, MapsPointIToLabelsI) {
  const Result<Modulation> m = MakeGenericModulation(ShuffledQam16());
  ASSERT_TRUE(m.ok()) << m.status().message();
  EXPECT_EQ(m.value().family, ModulationFamily::kGeneric);
  EXPECT_EQ(m.value().order, 16);
  EXPECT_EQ(m.value().bits_per_symbol(), 4);
  EXPECT_EQ(ToString(m.value()), "qam16data");
  const Mapper generic = Mapper::Create(m.value()).value();
  const Mapper qam = Mapper::Create(Modulation{ModulationFamily::kQam, 16}).value();
  ASSERT_EQ(generic.points().size(), 16u);
  for (std::size_t l = 0; l < 16; ++l) EXPECT_EQ(generic.points()[l], qam.points()[l]) << l;
  EXPECT_TRUE(generic.pam_levels().empty());
}

TEST(GenericConstellation, EqualityComparesTheData) {
  const Modulation a = MakeGenericModulation(ShuffledQam16()).value();
  const Modulation b = MakeGenericModulation(ShuffledQam16()).value();
  EXPECT_EQ(a, b);  // separate copies of the same data
  GenericConstellation swapped = ShuffledQam16();
  std::swap(swapped.labels[0], swapped.labels[1]);
  EXPECT_FALSE(a == MakeGenericModulation(swapped).value());
  EXPECT_FALSE(a == (Modulation{ModulationFamily::kQam, 16}));
}

TEST(GenericConstellation, RefusesBrokenDataNamingTheRule) {
  GenericConstellation c = ShuffledQam16();
  c.labels[3] = c.labels[4];
  EXPECT_EQ(ErrorOf(c), "constellation 'qam16data': label " + std::to_string(c.labels[4]) +
                            " repeated or >= M: labels must be a permutation of 0..15");
  c = ShuffledQam16();
  c.labels.pop_back();
  EXPECT_EQ(ErrorOf(c), "constellation 'qam16data': 15 labels for 16 points: need one label per "
                        "point");
  c = ShuffledQam16();
  c.points.resize(12);
  c.labels.resize(12);
  EXPECT_EQ(ErrorOf(c), "constellation 'qam16data': M = 12 points: must be a power of 2 in 4..64");
  c = ShuffledQam16();
  for (cf32& x : c.points) x *= 1.1f;
  EXPECT_NE(ErrorOf(c).find("must be 1 (within 1e-4)"), std::string::npos) << ErrorOf(c);
  c = ShuffledQam16();
  c.points[5] = c.points[2];
  EXPECT_EQ(ErrorOf(c), "constellation 'qam16data': points 2 and 5 coincide");
  c = ShuffledQam16();
  c.name.clear();
  EXPECT_EQ(ErrorOf(c), "constellation '': has no name");
  Modulation empty;
  empty.family = ModulationFamily::kGeneric;
  EXPECT_FALSE(Mapper::Create(empty).ok());
}

TEST(GenericConstellation, DemapperRunsTheBruteForceReference) {
  const Modulation m = MakeGenericModulation(ShuffledQam16()).value();
  const Mapper mapper = Mapper::Create(m).value();
  const Mapper qam = Mapper::Create(Modulation{ModulationFamily::kQam, 16}).value();
  std::mt19937_64 rng(20261205);
  std::uniform_int_distribution<std::size_t> pick(0, 15);
  std::normal_distribution<double> noise(0.0, 0.3);
  constexpr std::size_t kSymbols = 501;
  std::vector<cf32> y(kSymbols);
  for (cf32& v : y) {
    v = mapper.points()[pick(rng)] +
        cf32(static_cast<float>(noise(rng)), static_cast<float>(noise(rng)));
  }
  const float n0 = 0.18f;
  for (DemapMethod method : {DemapMethod::kHard, DemapMethod::kMaxLog, DemapMethod::kLogMap}) {
    const Demapper demapper = Demapper::Create(mapper, method).value();
    std::vector<float> llrs(4 * kSymbols, std::nanf(""));
    demapper.Demap(y, n0, llrs);
    std::vector<float> one(4);
    for (std::size_t s = 0; s < kSymbols; ++s) {
      GenericDemapSymbol(mapper.points(), method, y[s], cf32(1.0f, 0.0f), n0, one);
      for (std::size_t k = 0; k < 4; ++k) ASSERT_EQ(llrs[4 * s + k], one[k]) << s << " " << k;
    }
  }
  // Nearest-point decisions equal the built-in 16-QAM slicer's.
  const Demapper generic = Demapper::Create(mapper, DemapMethod::kMaxLog).value();
  const Demapper fast = Demapper::Create(qam, DemapMethod::kMaxLog).value();
  std::vector<Bit> a(4 * kSymbols, 7), b(4 * kSymbols, 9);
  generic.HardDecide(y, a);
  fast.HardDecide(y, b);
  EXPECT_EQ(a, b);
}

}  // namespace
}  // namespace capgap
