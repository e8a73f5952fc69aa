// Words of the channel and interleaver keys (blocks/channel/channel_spec.h
// enums): one Parse/ToString pair per enum, and the word lists the config key
// tables (sim/families/channel_keys.cc) and the output (/<scheme>/channel)
// both use, so the key a user writes and the attribute a file carries agree.
#ifndef CAPGAP_BLOCKS_CHANNEL_CHANNEL_WORDS_H_
#define CAPGAP_BLOCKS_CHANNEL_CHANNEL_WORDS_H_

#include <span>
#include <string>
#include <string_view>

#include "blocks/channel/channel_spec.h"
#include "blocks/core/status.h"

namespace capgap {

// Index i of each list is the enum value i.
inline constexpr std::string_view kFadingLawWords[] = {"awgn", "rayleigh", "rician", "nakagami"};
inline constexpr std::string_view kFadedLawWords[] = {"rayleigh", "rician", "nakagami"};
inline constexpr std::string_view kFadingTimeWords[] = {"fast", "block", "doppler"};
inline constexpr std::string_view kCombiningWords[] = {"mrc", "selection"};
inline constexpr std::string_view kInterleaverWords[] = {"none", "random", "rows"};

// Errors list the valid words ("valid: awgn, rayleigh, rician, nakagami").
Result<FadingLaw> ParseFadingLaw(std::string_view word);
std::string ToString(FadingLaw law);
Result<FadingTime> ParseFadingTime(std::string_view word);
std::string ToString(FadingTime time);
Result<Combining> ParseCombining(std::string_view word);
std::string ToString(Combining combining);
Result<InterleaverKind> ParseInterleaverKind(std::string_view word);
std::string ToString(InterleaverKind kind);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CHANNEL_CHANNEL_WORDS_H_
