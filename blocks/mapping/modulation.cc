// Modulation words: parsing, canonical spelling and the list of valid words.
// ParseModulation and ValidateModulation share one rule set, so config, CLI,
// HDF5 and Mapper::Create agree on what a modulation is.
#include "blocks/mapping/modulation.h"

#include <bit>
#include <cctype>
#include <string>

namespace capgap {
namespace {

constexpr int kMaxPskOrder = 64;
constexpr int kMaxQamOrder = 1024;

bool IsPowerOfTwo(int x) { return x > 0 && std::has_single_bit(static_cast<unsigned>(x)); }
// 4^k: a power of two with an even exponent.
bool IsPowerOfFour(int x) {
  return IsPowerOfTwo(x) && std::countr_zero(static_cast<unsigned>(x)) % 2 == 0;
}

// The rule M must satisfy for `family`, or "" when M is fine.
std::string OrderRule(ModulationFamily family, int order) {
  if (family == ModulationFamily::kPsk) {
    if (order < 2 || order > kMaxPskOrder || !IsPowerOfTwo(order)) {
      return "must be a power of 2 in 2..64";
    }
  } else {
    if (order < 4 || order > kMaxQamOrder || !IsPowerOfFour(order)) {
      return "must be a power of 4 in 4..1024";
    }
  }
  return "";
}

std::string Lowercase(std::string_view word) {
  std::string out(word);
  for (char& ch : out) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
  return out;
}

Status UnknownWord(std::string_view word) {
  return Status::Error("unknown modulation '" + std::string(word) +
                       "'; valid: " + ModulationChoices());
}

}  // namespace

int Modulation::bits_per_symbol() const {
  return order > 0 ? std::countr_zero(static_cast<unsigned>(order)) : 0;
}

Status ValidateModulation(const Modulation& modulation) {
  if (modulation.family != ModulationFamily::kPsk && modulation.family != ModulationFamily::kQam) {
    return Status::Error("modulation: unknown family " +
                         std::to_string(static_cast<int>(modulation.family)));
  }
  const std::string rule = OrderRule(modulation.family, modulation.order);
  if (!rule.empty()) {
    return Status::Error(std::string("modulation ") +
                         (modulation.family == ModulationFamily::kPsk ? "psk" : "qam") +
                         ": M = " + std::to_string(modulation.order) + ": " + rule);
  }
  return Status::Ok();
}

Result<Modulation> ParseModulation(std::string_view word) {
  const std::string w = Lowercase(word);
  if (w == "bpsk") return Modulation{ModulationFamily::kPsk, 2};
  if (w == "qpsk") return Modulation{ModulationFamily::kPsk, 4};

  // General form: decimal M (no sign, no leading zero) followed by psk or qam.
  std::size_t digits = 0;
  while (digits < w.size() && w[digits] >= '0' && w[digits] <= '9') ++digits;
  const std::string_view suffix = std::string_view(w).substr(digits);
  ModulationFamily family;
  if (suffix == "psk") {
    family = ModulationFamily::kPsk;
  } else if (suffix == "qam") {
    family = ModulationFamily::kQam;
  } else {
    return UnknownWord(word);
  }
  if (digits == 0 || w[0] == '0' || digits > 6) return UnknownWord(word);
  const int order = std::stoi(w.substr(0, digits));
  const std::string rule = OrderRule(family, order);
  if (!rule.empty()) {
    return Status::Error("unsupported modulation '" + std::string(word) + "': M = " +
                         std::to_string(order) + " " + rule + "; valid: " + ModulationChoices());
  }
  return Modulation{family, order};
}

std::string ToString(const Modulation& modulation) {
  if (modulation.family == ModulationFamily::kPsk) {
    if (modulation.order == 2) return "bpsk";
    if (modulation.order == 4) return "qpsk";
    return std::to_string(modulation.order) + "psk";
  }
  return std::to_string(modulation.order) + "qam";
}

std::string ModulationChoices() {
  return "bpsk, qpsk, 8psk, 16qam, 64qam, 256qam, <M>psk (M = 2..64, power of 2), "
         "<M>qam (M = 4..1024, power of 4)";
}

}  // namespace capgap
