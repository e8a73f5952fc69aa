// Text helpers: trimming, message quoting (escaped, shortened) and the
// decimal-only number parsers, with exact messages.
#include "sim/config/text.h"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <string>

namespace capgap {
namespace {

std::string ErrorOf(const Result<std::uint64_t>& r) { return r.ok() ? "OK" : r.status().message(); }
std::string ErrorOf(const Result<std::int64_t>& r) { return r.ok() ? "OK" : r.status().message(); }
std::string ErrorOf(const Result<double>& r) { return r.ok() ? "OK" : r.status().message(); }

TEST(Trim, RemovesSpacesTabsAndLineEndsAtBothEnds) {
  EXPECT_EQ(Trim(" \t a b \r\n"), "a b");
  EXPECT_EQ(Trim(" \t\r\n"), "");
  EXPECT_EQ(Trim(""), "");
}

TEST(QuoteValue, EscapesControlAndNonAsciiBytes) {
  EXPECT_EQ(QuoteValue("qpsk"), "'qpsk'");
  EXPECT_EQ(QuoteValue(std::string("a\x01\x7f\xff\tb", 6)), "'a\\x01\\x7F\\xFF\\x09b'");
  EXPECT_EQ(QuoteValue("a\\b"), "'a\\\\b'");
  EXPECT_EQ(QuoteValue(std::string("\0", 1)), "'\\x00'");
}

TEST(QuoteValue, ShortensLongValuesAndStatesTheirLength) {
  const std::string exact(kMaxShownBytes, 'x');
  EXPECT_EQ(QuoteValue(exact), "'" + exact + "'");
  const std::string huge = std::string("\x02", 1) + std::string(10 * 1024 * 1024, 'A');
  const std::string q = QuoteValue(huge);
  // At most kMaxShownBytes characters of the value, escapes included.
  EXPECT_EQ(q, "'\\x02" + std::string(kMaxShownBytes - 4, 'A') + "...' (10485761 bytes)");
  EXPECT_EQ(Printable(huge, 6), "\\x02AA... (10485761 bytes)");
  EXPECT_EQ(Printable(huge, 3), "... (10485761 bytes)");
  // Binary bytes take four characters each, and the bound still holds.
  const std::string binary(1000, '\xff');
  std::string twenty_escapes;
  for (int i = 0; i < 20; ++i) twenty_escapes += "\\xFF";
  EXPECT_EQ(QuoteValue(binary), "'" + twenty_escapes + "...' (1000 bytes)");
}

TEST(ParseUint64, AcceptsTheFullRangeExactly) {
  EXPECT_EQ(ParseUint64("0").value(), 0u);
  // 2^53 + 1 is not a double; it must come through unrounded.
  EXPECT_EQ(ParseUint64("9007199254740993").value(), 9007199254740993u);
  EXPECT_EQ(ParseUint64("18446744073709551615").value(), std::numeric_limits<std::uint64_t>::max());
  EXPECT_EQ(ParseUint64("007").value(), 7u);
}

TEST(ParseUint64, RefusesOverflowSignsPointsExponentsAndHex) {
  EXPECT_EQ(ErrorOf(ParseUint64("18446744073709551616")), "exceeds 18446744073709551615");
  EXPECT_EQ(ErrorOf(ParseUint64("99999999999999999999999")), "exceeds 18446744073709551615");
  EXPECT_EQ(ErrorOf(ParseUint64("-3")), "must be >= 0");
  EXPECT_EQ(ErrorOf(ParseUint64("1e3")),
            "not an integer (decimal digits only, no point or exponent)");
  EXPECT_EQ(ErrorOf(ParseUint64("2.0")),
            "not an integer (decimal digits only, no point or exponent)");
  EXPECT_EQ(ErrorOf(ParseUint64("+5")),
            "not an integer (decimal digits only, no point or exponent)");
  EXPECT_EQ(ErrorOf(ParseUint64("0x10")), "not an integer");
  EXPECT_EQ(ErrorOf(ParseUint64(" 5")), "not an integer");
  EXPECT_EQ(ErrorOf(ParseUint64("abc")), "not an integer");
  EXPECT_EQ(ErrorOf(ParseUint64("")), "empty; expected an integer");
}

TEST(ParseInt64, AcceptsBothEndsAndRefusesBeyond) {
  EXPECT_EQ(ParseInt64("-9223372036854775808").value(), std::numeric_limits<std::int64_t>::min());
  EXPECT_EQ(ParseInt64("9223372036854775807").value(), std::numeric_limits<std::int64_t>::max());
  EXPECT_EQ(ParseInt64("-42").value(), -42);
  EXPECT_EQ(ErrorOf(ParseInt64("9223372036854775808")), "exceeds 9223372036854775807");
  EXPECT_EQ(ErrorOf(ParseInt64("-9223372036854775809")), "below -9223372036854775808");
  EXPECT_EQ(ErrorOf(ParseInt64("-")), "not an integer");
  EXPECT_EQ(ErrorOf(ParseInt64("-1.5")),
            "not an integer (decimal digits only, no point or exponent)");
}

TEST(ParseDouble, AcceptsDecimalNotation) {
  EXPECT_EQ(ParseDouble("2.5").value(), 2.5);
  EXPECT_EQ(ParseDouble("-3").value(), -3.0);
  EXPECT_EQ(ParseDouble("+0.25").value(), 0.25);
  EXPECT_EQ(ParseDouble(".5").value(), 0.5);
  EXPECT_EQ(ParseDouble("5.").value(), 5.0);
  EXPECT_EQ(ParseDouble("1e-7").value(), 1e-7);
  EXPECT_EQ(ParseDouble("1E+3").value(), 1000.0);
}

TEST(ParseDouble, RefusesHexNonFiniteOutOfRangeAndJunk) {
  EXPECT_EQ(ErrorOf(ParseDouble("0x10")), "not a decimal number (no hexadecimal)");
  EXPECT_EQ(ErrorOf(ParseDouble("-0X1p3")), "not a decimal number (no hexadecimal)");
  EXPECT_EQ(ErrorOf(ParseDouble("inf")), "not a finite number");
  EXPECT_EQ(ErrorOf(ParseDouble("-Infinity")), "not a finite number");
  EXPECT_EQ(ErrorOf(ParseDouble("nan")), "not a finite number");
  EXPECT_EQ(ErrorOf(ParseDouble("1e999")), "out of the range of a double");
  EXPECT_EQ(ErrorOf(ParseDouble("1e-999")), "out of the range of a double");
  EXPECT_EQ(ErrorOf(ParseDouble("1e")), "not a number");
  EXPECT_EQ(ErrorOf(ParseDouble(".")), "not a number");
  EXPECT_EQ(ErrorOf(ParseDouble("2.5 ")), "not a number");
  EXPECT_EQ(ErrorOf(ParseDouble("1,5")), "not a number");
  EXPECT_EQ(ErrorOf(ParseDouble("")), "empty; expected a number");
}

TEST(ParseDouble, AllowsInfAndNanOnlyWhenAsked) {
  EXPECT_EQ(ParseDouble("-inf", true).value(), -std::numeric_limits<double>::infinity());
  EXPECT_TRUE(std::isnan(ParseDouble("NaN", true).value()));
  EXPECT_EQ(ErrorOf(ParseDouble("0x1", true)), "not a decimal number (no hexadecimal)");
}

TEST(FormatDouble, PrintsTheShortestExactText) {
  EXPECT_EQ(FormatDouble(0.5), "0.5");
  EXPECT_EQ(FormatDouble(86400), "86400");
  EXPECT_EQ(FormatDouble(-0.5), "-0.5");
  EXPECT_EQ(FormatDouble(0.1), "0.1");
}

}  // namespace
}  // namespace capgap
