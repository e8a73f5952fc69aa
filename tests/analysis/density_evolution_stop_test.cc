// Quantized density evolution gives up when its stop flag is set
// (QuantizedDeOptions::stop), and a clear flag changes nothing.
#include <atomic>

#include <gtest/gtest.h>

#include "analysis/density_evolution.h"

namespace capgap::analysis {
namespace {

TEST(DensityEvolutionStop, SetFlagReturnsStopped) {
  const EdgeDistribution d = RegularEdgeDistribution(3, 6).value();
  const std::atomic<bool> stop{true};
  QuantizedDeOptions o;
  o.stop = &stop;
  const auto r = QuantizedThreshold(d, 0.5, o);
  ASSERT_FALSE(r.ok());
  EXPECT_TRUE(r.status().stopped());
  EXPECT_EQ(r.status().message(), "quantized density evolution: stopped");
}

TEST(DensityEvolutionStop, ClearFlagGivesTheSameThreshold) {
  const EdgeDistribution d = RegularEdgeDistribution(3, 6).value();
  const std::atomic<bool> go{false};
  QuantizedDeOptions o;
  o.llr_step = 0.1;  // coarse grid: the comparison, not the value, matters
  const auto plain = QuantizedThreshold(d, 0.5, o);
  o.stop = &go;
  const auto watched = QuantizedThreshold(d, 0.5, o);
  ASSERT_TRUE(plain.ok() && watched.ok());
  EXPECT_EQ(plain.value().sigma, watched.value().sigma);
}

}  // namespace
}  // namespace capgap::analysis
