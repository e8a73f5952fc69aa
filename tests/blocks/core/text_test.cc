// Tests of blocks/core/text.h: trimming and quoting as the parsers use them.
#include "blocks/core/text.h"

#include <gtest/gtest.h>

namespace capgap {
namespace {

TEST(TrimBlanks, RemovesSpacesAndTabsAtBothEndsOnly) {
  EXPECT_EQ(TrimBlanks("  \t133, 171 \t"), "133, 171");
  EXPECT_EQ(TrimBlanks("x"), "x");
  EXPECT_EQ(TrimBlanks(""), "");
  EXPECT_EQ(TrimBlanks(" \t "), "");
  // A CR is not a blank by default; the LDPC file reader passes its own set.
  EXPECT_EQ(TrimBlanks("3:0.5\r"), "3:0.5\r");
  EXPECT_EQ(TrimBlanks(" 3:0.5\r", " \t\r"), "3:0.5");
}

TEST(TrimBlanks, IsUsableAtCompileTime) {
  static_assert(TrimBlanks("  a b  ") == "a b");
}

TEST(Quoted, WrapsInSingleQuotes) {
  EXPECT_EQ(Quoted("0.5"), "'0.5'");
  EXPECT_EQ(Quoted(""), "''");
}

}  // namespace
}  // namespace capgap
