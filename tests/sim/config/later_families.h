// Config tests pin messages that list the code families' words; families
// registered after none, conv and ldpc (sim/chain/registry.cc) extend those
// lists, so the tests check the first three word for word and take the rest
// from the registry.
#ifndef CAPGAP_TESTS_SIM_CONFIG_LATER_FAMILIES_H_
#define CAPGAP_TESTS_SIM_CONFIG_LATER_FAMILIES_H_

#include <cstddef>
#include <string>

#include "sim/chain/registry.h"

namespace capgap {

// ", block, ..." for the families after the first three.
inline std::string LaterCodeWords() {
  std::string s;
  const auto words = CodeFamilyWords();
  for (std::size_t i = 3; i < words.size(); ++i) s += ", " + std::string(words[i]);
  return s;
}

}  // namespace capgap

#endif  // CAPGAP_TESTS_SIM_CONFIG_LATER_FAMILIES_H_
