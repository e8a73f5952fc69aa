// Small text helpers of the block-level parsers (code generator lists, degree
// specs, sparse-matrix and base-matrix files), written once.
#ifndef CAPGAP_BLOCKS_CORE_TEXT_H_
#define CAPGAP_BLOCKS_CORE_TEXT_H_

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

// `w` in single quotes, as error messages show a value: 'w'.
inline std::string Quoted(std::string_view w) {
  std::string s;
  s.reserve(w.size() + 2);
  s += '\'';
  s.append(w);
  s += '\'';
  return s;
}

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CORE_TEXT_H_
