// Text helpers shared by the config reader, the checkpoint reader and the CLI:
// trimming, quoting a user's value for an error message (escaped and
// shortened so that a binary or huge value cannot flood a terminal), and the
// one set of number parsers used everywhere in sim/.
//
// Number syntax is deliberately narrow: integers are decimal digits only (no
// sign for unsigned, no exponent, no point), numbers are decimal notation
// (e.g. 2.5, -3, 1e-6, .5), never hexadecimal, and finite unless the caller
// allows inf/nan. On failure the Status message is a rule with no key or
// value in it ("not an integer", "exceeds 18446744073709551615"), so that the
// caller can prefix "FILE: KEY = 'VALUE': ".
#ifndef CAPGAP_SIM_CONFIG_TEXT_H_
#define CAPGAP_SIM_CONFIG_TEXT_H_

#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

#include "blocks/core/status.h"
#include "blocks/core/text.h"

namespace capgap {

// Trim, Printable, QuoteValue: blocks/core/text.h.

// Decimal digits, optionally preceded by '-' (ParseInt64); the whole
// 64-bit range. Messages: "empty; expected an integer", "not an integer",
// "not an integer (decimal digits only, no point or exponent)" when the text
// is a number such as 1e3 or 2.0, "exceeds 18446744073709551615",
// "below -9223372036854775808" (ParseInt64), and for ParseUint64 of a
// negative integer "must be >= 0".
Result<std::int64_t> ParseInt64(std::string_view text);
Result<std::uint64_t> ParseUint64(std::string_view text);

// Decimal notation: [+-] digits [. digits] [e|E [+-] digits] (".5" and "5."
// too). Refuses hexadecimal ("not a decimal number (no hexadecimal)"),
// inf/nan ("not a finite number") unless `allow_nonfinite`, values beyond
// the double range ("out of the range of a double", also for values so small
// they would underflow to zero or a subnormal) and anything else ("not a
// number").
Result<double> ParseDouble(std::string_view text, bool allow_nonfinite = false);

// Shortest decimal text that reads back as exactly `value` (2.5, 0.1, 86400,
// 1e-07); used to print rule bounds.
std::string FormatDouble(double value);

}  // namespace capgap

#endif  // CAPGAP_SIM_CONFIG_TEXT_H_
