// Text helpers of every parser (config, checkpoint, code generator lists,
// degree specs, sparse-matrix, base-matrix and generator files), written
// once: trimming, and quoting a user's value for an error message, escaped
// and shortened so that a binary or huge value cannot flood a terminal.
#ifndef CAPGAP_BLOCKS_CORE_TEXT_H_
#define CAPGAP_BLOCKS_CORE_TEXT_H_

#include <cstddef>
#include <string>
#include <string_view>

namespace capgap {

// Spaces and tabs: the blanks of a word list.
inline constexpr std::string_view kBlanks = " \t";

// `s` without leading and trailing characters from `blanks`.
constexpr std::string_view TrimBlanks(std::string_view s, std::string_view blanks = kBlanks) {
  while (!s.empty() && blanks.find(s.front()) != std::string_view::npos) s.remove_prefix(1);
  while (!s.empty() && blanks.find(s.back()) != std::string_view::npos) s.remove_suffix(1);
  return s;
}

// Removes leading and trailing spaces, tabs, CR and LF.
std::string Trim(std::string_view text);

// Most characters of a value shown in a message; longer values are cut.
inline constexpr std::size_t kMaxShownBytes = 80;

// `text` made printable for a message: control bytes, DEL and bytes >= 0x80
// become \xNN, a backslash becomes \\. If that takes more than `max_bytes`
// characters, only the bytes that fit are shown, followed by "... (N
// bytes)" with N the length of `text`.
std::string Printable(std::string_view text, std::size_t max_bytes = kMaxShownBytes);

// Printable(text) in single quotes: 'abc'; a shortened value reads
// 'first bytes...' (10485760 bytes).
std::string QuoteValue(std::string_view text, std::size_t max_bytes = kMaxShownBytes);

// A value in single quotes as error messages show it (QuoteValue).
inline std::string Quoted(std::string_view w) { return QuoteValue(w); }

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CORE_TEXT_H_
