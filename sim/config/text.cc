// Trimming, message quoting and the decimal number parsers (see text.h).
#include "sim/config/text.h"

#include <algorithm>
#include <cerrno>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <limits>

namespace capgap {
namespace {

bool IsDigit(char c) { return c >= '0' && c <= '9'; }

char Lower(char c) { return c >= 'A' && c <= 'Z' ? static_cast<char>(c - 'A' + 'a') : c; }

bool EqualsIgnoreCase(std::string_view a, std::string_view b) {
  if (a.size() != b.size()) return false;
  for (std::size_t i = 0; i < a.size(); ++i) {
    if (Lower(a[i]) != Lower(b[i])) return false;
  }
  return true;
}

// Length of the longest prefix of `t` in decimal notation (see ParseDouble);
// 0 when there is no digit.
std::size_t DecimalNumberLength(std::string_view t) {
  std::size_t i = 0;
  if (i < t.size() && (t[i] == '+' || t[i] == '-')) ++i;
  std::size_t digits = 0;
  while (i < t.size() && IsDigit(t[i])) ++i, ++digits;
  if (i < t.size() && t[i] == '.') {
    ++i;
    while (i < t.size() && IsDigit(t[i])) ++i, ++digits;
  }
  if (digits == 0) return 0;
  if (i < t.size() && (t[i] == 'e' || t[i] == 'E')) {
    std::size_t j = i + 1;
    if (j < t.size() && (t[j] == '+' || t[j] == '-')) ++j;
    std::size_t exp_digits = 0;
    while (j < t.size() && IsDigit(t[j])) ++j, ++exp_digits;
    if (exp_digits > 0) i = j;
  }
  return i;
}

bool IsDecimalNumber(std::string_view t) {
  return !t.empty() && DecimalNumberLength(t) == t.size();
}

// Magnitude of a run of decimal digits, or nullopt-like false on overflow.
bool DigitsToUint64(std::string_view digits, std::uint64_t* out) {
  std::uint64_t v = 0;
  const auto [ptr, ec] = std::from_chars(digits.data(), digits.data() + digits.size(), v, 10);
  if (ec == std::errc::result_out_of_range) return false;
  *out = v;
  return ptr == digits.data() + digits.size();
}

Status NotAnInteger(std::string_view text) {
  if (IsDecimalNumber(text)) {
    return Status::Error("not an integer (decimal digits only, no point or exponent)");
  }
  return Status::Error("not an integer");
}

bool AllDigits(std::string_view t) {
  if (t.empty()) return false;
  for (char c : t) {
    if (!IsDigit(c)) return false;
  }
  return true;
}

}  // namespace

Result<std::uint64_t> ParseUint64(std::string_view text) {
  if (text.empty()) return Status::Error("empty; expected an integer");
  if (text[0] == '-' && AllDigits(text.substr(1))) return Status::Error("must be >= 0");
  if (!AllDigits(text)) return NotAnInteger(text);
  std::uint64_t v = 0;
  if (!DigitsToUint64(text, &v)) {
    return Status::Error("exceeds " + std::to_string(std::numeric_limits<std::uint64_t>::max()));
  }
  return v;
}

Result<std::int64_t> ParseInt64(std::string_view text) {
  if (text.empty()) return Status::Error("empty; expected an integer");
  const bool negative = text[0] == '-';
  const std::string_view digits = negative ? text.substr(1) : text;
  if (!AllDigits(digits)) return NotAnInteger(text);
  std::uint64_t magnitude = 0;
  constexpr auto kMax = static_cast<std::uint64_t>(std::numeric_limits<std::int64_t>::max());
  if (!DigitsToUint64(digits, &magnitude) || magnitude > kMax + (negative ? 1 : 0)) {
    if (negative) {
      return Status::Error("below " + std::to_string(std::numeric_limits<std::int64_t>::min()));
    }
    return Status::Error("exceeds " + std::to_string(std::numeric_limits<std::int64_t>::max()));
  }
  if (!negative) return static_cast<std::int64_t>(magnitude);
  if (magnitude == kMax + 1) return std::numeric_limits<std::int64_t>::min();
  return -static_cast<std::int64_t>(magnitude);
}

Result<double> ParseDouble(std::string_view text, bool allow_nonfinite) {
  if (text.empty()) return Status::Error("empty; expected a number");
  std::string_view body = text;
  if (body[0] == '+' || body[0] == '-') body.remove_prefix(1);
  if (EqualsIgnoreCase(body, "inf") || EqualsIgnoreCase(body, "infinity") ||
      EqualsIgnoreCase(body, "nan")) {
    if (!allow_nonfinite) return Status::Error("not a finite number");
    const bool negative = text[0] == '-';
    if (Lower(body[0]) == 'n') return std::numeric_limits<double>::quiet_NaN();
    return negative ? -std::numeric_limits<double>::infinity()
                    : std::numeric_limits<double>::infinity();
  }
  if (body.size() > 1 && body[0] == '0' && (body[1] == 'x' || body[1] == 'X')) {
    return Status::Error("not a decimal number (no hexadecimal)");
  }
  if (!IsDecimalNumber(text)) return Status::Error("not a number");
  // strtod needs a terminated string; the grammar above already excludes
  // everything strtod would read differently (hex, inf/nan, spaces).
  const std::string copy(text);
  errno = 0;
  char* end = nullptr;
  const double v = std::strtod(copy.c_str(), &end);
  if (end != copy.c_str() + copy.size()) return Status::Error("not a number");
  if (errno == ERANGE || !std::isfinite(v)) return Status::Error("out of the range of a double");
  return v;
}

std::string FormatDouble(double value) {
  char buf[64];
  const auto [ptr, ec] = std::to_chars(buf, buf + sizeof buf, value);
  if (ec != std::errc()) return std::to_string(value);
  return std::string(buf, ptr);
}

}  // namespace capgap
