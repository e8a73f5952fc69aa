// Constellations `bpsk`, `qpsk`, `<M>psk`, `<M>qam`: Gray M-PSK and square
// M-QAM (points by blocks/mapping/mapper.h, fast demapper kernels, exact
// uncoded theory in analysis/uncoded_theory.h). The words and their rules are
// ParseModulation's (blocks/mapping/modulation.h).
#include "sim/families/psk_qam_constellation.h"

#include <cctype>
#include <cstddef>
#include <string>

#include "blocks/mapping/modulation.h"

namespace capgap {
namespace {

bool EndsWithNoCase(std::string_view word, std::string_view suffix) {
  if (word.size() < suffix.size()) return false;
  const std::string_view tail = word.substr(word.size() - suffix.size());
  for (std::size_t i = 0; i < suffix.size(); ++i) {
    if (std::tolower(static_cast<unsigned char>(tail[i])) != suffix[i]) return false;
  }
  return true;
}

// bpsk, qpsk, or decimal digits followed by psk or qam (any case): the words
// whose errors ParseModulation reports (an order it refuses, say).
bool Claims(std::string_view word) {
  if (word.size() == 4 && (EndsWithNoCase(word, "bpsk") || EndsWithNoCase(word, "qpsk"))) {
    return true;
  }
  if (!EndsWithNoCase(word, "psk") && !EndsWithNoCase(word, "qam")) return false;
  const std::string_view digits = word.substr(0, word.size() - 3);
  if (digits.empty()) return false;
  for (char ch : digits) {
    if (ch < '0' || ch > '9') return false;
  }
  return true;
}

Result<Modulation> Parse(std::string_view word) { return ParseModulation(word); }

}  // namespace

const ConstellationFamily kPskQamConstellation = {
    "psk_qam", "bpsk, qpsk, 8psk, 16qam, 64qam, 256qam, <M>psk, <M>qam", &ModulationChoices,
    &Claims, &Parse};

}  // namespace capgap
