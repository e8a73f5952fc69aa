// Modulation words: parsing, canonical spelling and the list of valid words.
// ParseModulation and ValidateModulation share one rule set, so config, CLI,
// HDF5 and Mapper::Create agree on what a modulation is.
#include "blocks/mapping/modulation.h"

#include <bit>
#include <cctype>
#include <cmath>
#include <string>
#include <utility>

namespace capgap {
namespace {

constexpr int kMaxPskOrder = 64;
constexpr int kMaxQamOrder = 1024;
constexpr int kMinGenericOrder = 4;
constexpr int kMaxGenericOrder = 64;
constexpr double kEnergyTolerance = 1e-4;

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

// The rules of GenericConstellation, or "" when they hold.
std::string GenericRule(const GenericConstellation& c) {
  const std::size_t order = c.points.size();
  if (c.name.empty()) return "has no name";
  if (order < static_cast<std::size_t>(kMinGenericOrder) ||
      order > static_cast<std::size_t>(kMaxGenericOrder) ||
      !IsPowerOfTwo(static_cast<int>(order))) {
    return "M = " + std::to_string(order) + " points: must be a power of 2 in 4..64";
  }
  if (c.labels.size() != order) {
    return std::to_string(c.labels.size()) + " labels for " + std::to_string(order) +
           " points: need one label per point";
  }
  std::vector<bool> seen(order, false);
  for (std::uint32_t l : c.labels) {
    if (l >= order || seen[l]) {
      return "label " + std::to_string(l) + " repeated or >= M: labels must be a permutation of 0.." +
             std::to_string(order - 1);
    }
    seen[l] = true;
  }
  double energy = 0.0;
  for (std::size_t i = 0; i < order; ++i) {
    const cf32 x = c.points[i];
    if (!std::isfinite(x.real()) || !std::isfinite(x.imag())) {
      return "point " + std::to_string(i) + " is not finite";
    }
    for (std::size_t j = 0; j < i; ++j) {
      if (c.points[j] == x) {
        return "points " + std::to_string(j) + " and " + std::to_string(i) + " coincide";
      }
    }
    energy += static_cast<double>(std::norm(x));
  }
  energy /= static_cast<double>(order);
  if (std::fabs(energy - 1.0) > kEnergyTolerance) {
    return "average energy " + std::to_string(energy) + ": must be 1 (within 1e-4)";
  }
  return "";
}

Status UnknownWord(std::string_view word) {
  return Status::Error("unknown modulation '" + std::string(word) +
                       "'; valid: " + ModulationChoices());
}

}  // namespace

Modulation::Modulation(std::shared_ptr<const GenericConstellation> c)
    : family(ModulationFamily::kGeneric),
      order(c ? static_cast<int>(c->points.size()) : 0),
      generic(std::move(c)) {}

bool Modulation::operator==(const Modulation& other) const {
  if (family != other.family || order != other.order) return false;
  if (family != ModulationFamily::kGeneric || generic == other.generic) return true;
  if (!generic || !other.generic) return false;
  return generic->name == other.generic->name && generic->points == other.generic->points &&
         generic->labels == other.generic->labels;
}

Result<Modulation> MakeGenericModulation(GenericConstellation constellation) {
  if (std::string rule = GenericRule(constellation); !rule.empty()) {
    return Status::Error("constellation '" + constellation.name + "': " + rule);
  }
  return Modulation(std::make_shared<const GenericConstellation>(std::move(constellation)));
}

int Modulation::bits_per_symbol() const {
  return order > 0 ? std::countr_zero(static_cast<unsigned>(order)) : 0;
}

Status ValidateModulation(const Modulation& modulation) {
  if (modulation.family == ModulationFamily::kGeneric) {
    if (!modulation.generic) return Status::Error("modulation: generic without points");
    if (std::string rule = GenericRule(*modulation.generic); !rule.empty()) {
      return Status::Error("constellation '" + modulation.generic->name + "': " + rule);
    }
    if (modulation.order != static_cast<int>(modulation.generic->points.size())) {
      return Status::Error("constellation '" + modulation.generic->name + "': M = " +
                           std::to_string(modulation.order) + " but " +
                           std::to_string(modulation.generic->points.size()) + " points");
    }
    return Status::Ok();
  }
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
  if (modulation.family == ModulationFamily::kGeneric) {
    return modulation.generic ? modulation.generic->name : "generic";
  }
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
