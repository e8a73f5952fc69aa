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
// QPSK is PSK with M = 4 (identical to 4-QAM with Gray labelling).
struct Modulation {
  ModulationFamily family = ModulationFamily::kPsk;
  int order = 2;  // M
  int bits_per_symbol() const;  // log2(M)
  bool operator==(const Modulation&) const = default;
};

// Accepted words: bpsk, qpsk, 8psk, 16qam, 64qam, 256qam, and the general forms
// "<M>psk" (M = 2^k, 2 <= M <= 64) and "<M>qam" (M = 4^k, 4 <= M <= 1024).
Result<Modulation> ParseModulation(std::string_view word);
// Canonical word (the first spelling above, e.g. "bpsk", "16qam").
std::string ToString(const Modulation& modulation);
// Human list of accepted words for error messages.
std::string ModulationChoices();

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_MAPPING_MODULATION_H_
