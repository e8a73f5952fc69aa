// Modulation names: the one ParseModulation / ToString pair used by config,
// CLI and HDF5 so that every error message can list the valid words.
#ifndef CAPGAP_BLOCKS_MAPPING_MODULATION_H_
#define CAPGAP_BLOCKS_MAPPING_MODULATION_H_

#include <string>
#include <string_view>

#include "blocks/core/status.h"

namespace capgap {

enum class ModulationFamily { kPsk, kQam };

// A constellation family and its order M. BPSK is PSK with M = 2 (real axis),
// QPSK is PSK with M = 4. QPSK and 4-QAM have the same four points and are both
// Gray labelled, but their bit order differs: QPSK's first bit picks the sign of
// Im x, 4-QAM's the sign of Re x (see mapper.h); their BER is identical.
struct Modulation {
  ModulationFamily family = ModulationFamily::kPsk;
  int order = 2;  // M
  int bits_per_symbol() const;  // log2(M)
  bool operator==(const Modulation&) const = default;
};

// Accepted words: bpsk, qpsk, 8psk, 16qam, 64qam, 256qam, and the general forms
// "<M>psk" (M = 2^k, 2 <= M <= 64) and "<M>qam" (M = 4^k, 4 <= M <= 1024), M
// written in decimal without leading zeros ("2psk" is bpsk, "4psk" is qpsk,
// "4qam" is 4-QAM). Letters are matched case-insensitively ("16QAM" works).
// Error messages quote the word and end with ModulationChoices().
Result<Modulation> ParseModulation(std::string_view word);
// OK when `modulation` is one ParseModulation can return; otherwise an error
// naming the family, M and the rule. Mapper::Create uses it.
Status ValidateModulation(const Modulation& modulation);
// Canonical word (the first spelling above, e.g. "bpsk", "16qam").
std::string ToString(const Modulation& modulation);
// Human list of accepted words for error messages.
std::string ModulationChoices();

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_MAPPING_MODULATION_H_
