// Modulation names: the one ParseModulation / ToString pair used by config,
// CLI and HDF5 so that every error message can list the valid words.
#ifndef CAPGAP_BLOCKS_MAPPING_MODULATION_H_
#define CAPGAP_BLOCKS_MAPPING_MODULATION_H_

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"

namespace capgap {

// kPsk and kQam are the Gray PSK / square QAM families (points computed by
// Mapper, fast demapper kernels, closed-form theory). kGeneric is a
// constellation given as data: explicit points and labels (see
// GenericConstellation), demapped by brute force over the points.
enum class ModulationFamily { kPsk, kQam, kGeneric };

// A constellation as data: point i is points[i] and carries label labels[i]
// (m = log2 M bits, bit 0 = MSB, as in mapper.h). The labels are a
// permutation of 0..M-1; the points are distinct, finite and scaled to unit
// average energy over equiprobable labels (checked by ValidateModulation to
// 1e-4). `name` is its modulation word (lowercase, e.g. "16apsk"), the one
// ToString returns.
struct GenericConstellation {
  std::string name;
  std::vector<cf32> points;
  std::vector<std::uint32_t> labels;
};

// A constellation family and its order M. BPSK is PSK with M = 2 (real axis),
// QPSK is PSK with M = 4. QPSK and 4-QAM have the same four points and are both
// Gray labelled, but their bit order differs: QPSK's first bit picks the sign of
// Im x, 4-QAM's the sign of Re x (see mapper.h); their BER is identical.
struct Modulation {
  Modulation() = default;
  Modulation(ModulationFamily f, int m) : family(f), order(m) {}
  // A kGeneric modulation of M = points.size(); not validated here (see
  // MakeGenericModulation).
  explicit Modulation(std::shared_ptr<const GenericConstellation> c);

  ModulationFamily family = ModulationFamily::kPsk;
  int order = 2;  // M
  // The points and labels of a kGeneric modulation (shared, immutable);
  // null for PSK and QAM.
  std::shared_ptr<const GenericConstellation> generic;
  int bits_per_symbol() const;  // log2(M)
  // Same family and order, and for kGeneric the same name, points and labels.
  bool operator==(const Modulation& other) const;
};

// A validated kGeneric modulation (M = 4..64, a power of 2), or an error
// naming the constellation and the broken rule.
Result<Modulation> MakeGenericModulation(GenericConstellation constellation);

// PSK and QAM words (generic constellations are named by the registry of
// sim/chain/registry.h, which calls this for the PSK/QAM family).
// Accepted words: bpsk, qpsk, 8psk, 16qam, 64qam, 256qam, and the general forms
// "<M>psk" (M = 2^k, 2 <= M <= 64) and "<M>qam" (M = 4^k, 4 <= M <= 1024), M
// written in decimal without leading zeros ("2psk" is bpsk, "4psk" is qpsk,
// "4qam" is 4-QAM). Letters are matched case-insensitively ("16QAM" works).
// Error messages quote the word and end with ModulationChoices().
Result<Modulation> ParseModulation(std::string_view word);
// OK when `modulation` is one ParseModulation can return; otherwise an error
// naming the family, M and the rule. Mapper::Create uses it.
Status ValidateModulation(const Modulation& modulation);
// Canonical word (the first spelling above, e.g. "bpsk", "16qam"; a generic
// constellation's name).
std::string ToString(const Modulation& modulation);
// Human list of accepted words for error messages.
std::string ModulationChoices();

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_MAPPING_MODULATION_H_
