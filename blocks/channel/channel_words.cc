// Channel key words: one table per enum, indexed by the enum value.
#include "blocks/channel/channel_words.h"

#include <cstddef>

namespace capgap {
namespace {

template <typename E>
Result<E> ParseWord(std::span<const std::string_view> words, std::string_view word) {
  for (std::size_t i = 0; i < words.size(); ++i) {
    if (word == words[i]) return static_cast<E>(i);
  }
  std::string list;
  for (std::string_view w : words) list += (list.empty() ? "" : ", ") + std::string(w);
  return Status::Error("valid: " + list);
}

template <typename E>
std::string Word(std::span<const std::string_view> words, E value) {
  const auto i = static_cast<std::size_t>(value);
  return i < words.size() ? std::string(words[i]) : "?";
}

}  // namespace

Result<FadingLaw> ParseFadingLaw(std::string_view w) { return ParseWord<FadingLaw>(kFadingLawWords, w); }
std::string ToString(FadingLaw v) { return Word(std::span<const std::string_view>(kFadingLawWords), v); }
Result<FadingTime> ParseFadingTime(std::string_view w) {
  return ParseWord<FadingTime>(kFadingTimeWords, w);
}
std::string ToString(FadingTime v) { return Word(std::span<const std::string_view>(kFadingTimeWords), v); }
Result<Combining> ParseCombining(std::string_view w) { return ParseWord<Combining>(kCombiningWords, w); }
std::string ToString(Combining v) { return Word(std::span<const std::string_view>(kCombiningWords), v); }
Result<InterleaverKind> ParseInterleaverKind(std::string_view w) {
  return ParseWord<InterleaverKind>(kInterleaverWords, w);
}
std::string ToString(InterleaverKind v) {
  return Word(std::span<const std::string_view>(kInterleaverWords), v);
}

}  // namespace capgap
