// Text helpers of the parsers and their messages (text.h).
#include "blocks/core/text.h"

#include <cstdio>
#include <cstring>

namespace capgap {
namespace {

// The escaped form of the longest prefix of `text` that fits in
// `max_chars` characters; *shown = bytes of `text` it covers.
std::string EscapedPrefix(std::string_view text, std::size_t max_chars, std::size_t* shown) {
  std::string out;
  std::size_t i = 0;
  for (; i < text.size(); ++i) {
    const char c = text[i];
    const auto u = static_cast<unsigned char>(c);
    char buf[8] = {c, '\0'};
    if (u < 0x20 || u >= 0x7f) {
      std::snprintf(buf, sizeof buf, "\\x%02X", static_cast<unsigned>(u));
    } else if (c == '\\') {
      std::snprintf(buf, sizeof buf, "\\\\");
    }
    const std::size_t n = std::strlen(buf);
    if (out.size() + n > max_chars) break;
    out.append(buf, n);
  }
  *shown = i;
  return out;
}

}  // namespace

std::string Trim(std::string_view text) { return std::string(TrimBlanks(text, " \t\r\n")); }

std::string Printable(std::string_view text, std::size_t max_bytes) {
  std::size_t shown = 0;
  std::string out = EscapedPrefix(text, max_bytes, &shown);
  if (shown < text.size()) out += "... (" + std::to_string(text.size()) + " bytes)";
  return out;
}

std::string QuoteValue(std::string_view text, std::size_t max_bytes) {
  std::size_t shown = 0;
  std::string out = "'";
  out += EscapedPrefix(text, max_bytes, &shown);
  if (shown < text.size()) {
    out += "...' (";
    out += std::to_string(text.size());
    out += " bytes)";
  } else {
    out += '\'';
  }
  return out;
}

}  // namespace capgap
