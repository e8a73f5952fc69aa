// Tests of analysis/bisection.h: the bracket shrinks to the requested width
// around the predicate's change point and keeps the predicate at each end.
#include "analysis/bisection.h"

#include <gtest/gtest.h>

#include <cmath>

namespace capgap::analysis {
namespace {

TEST(Bisect, FindsTheChangePointOfAMonotonePredicate) {
  int calls = 0;
  const auto below_root2 = [&](double x) {
    ++calls;
    return x * x < 2.0;
  };
  const Bracket b = Bisect(1.0, 2.0, 1e-12, below_root2);
  EXPECT_TRUE(below_root2(b.lo));
  EXPECT_FALSE(below_root2(b.hi));
  EXPECT_LE(b.hi - b.lo, 1e-12);
  EXPECT_LE(b.lo, std::sqrt(2.0));
  EXPECT_GE(b.hi, std::sqrt(2.0));
  // Width 1 halved to <= 1e-12 takes ceil(log2(1e12)) = 40 halvings (+2 checks above).
  EXPECT_EQ(calls, 40 + 2);
}

TEST(Bisect, ABracketAlreadyNarrowEnoughIsReturnedAsIs) {
  const Bracket b = Bisect(3.0, 3.5, 1.0, [](double) -> bool { ADD_FAILURE(); return true; });
  EXPECT_EQ(b.lo, 3.0);
  EXPECT_EQ(b.hi, 3.5);
}

TEST(Bisect, MidpointLocatesTheChangeOnASignedAxis) {
  // As UncodedEbnoDbAtBer uses it: "BER above target" holds below the answer.
  const Bracket b = Bisect(-10.0, 20.0, 1e-9, [](double x) { return x < 4.25; });
  EXPECT_NEAR(0.5 * (b.lo + b.hi), 4.25, 1e-9);
}

}  // namespace
}  // namespace capgap::analysis
