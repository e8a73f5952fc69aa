// The key tables of the scheme file: [sweep] and [scheme.NAME]. Each group of
// keys is its own KeySpec array (config_keys.cc): kSweepKeys; the scheme's
// common keys kSchemeKeys, kShapingKeys, kImpairmentKeys and the code choice
// kCodeChoiceKeys; one array per code family (kConvKeys, kLdpcKeys) wrapped
// in a KeyTable that applies only with its `code` word. A family's array and
// table can move to the family's own file; the scheme's table list then
// gains one line per family.
#ifndef CAPGAP_SIM_CONFIG_CONFIG_KEYS_H_
#define CAPGAP_SIM_CONFIG_CONFIG_KEYS_H_

#include <span>
#include <string>
#include <vector>

#include "sim/config/key_table.h"

namespace capgap {

// The [sweep] tables.
std::span<const KeyTable> SweepKeyTables();

// The [scheme.NAME] tables in resolved-text order: common keys, shaping,
// impairments, code choice, then each code family's table (conv, ldpc).
std::span<const KeyTable> SchemeKeyTables();

// Eb/N0 points from "FROM to TO by STEP" (inclusive, STEP > 0, TO >= FROM,
// at most 10000 points) or a comma list, increasing; messages are rules only
// ("STEP must be > 0"). ParseDbList (config.h) adds the key and value.
Result<std::vector<double>> ParseDbPoints(const std::string& text);

// Rule-only check of an Eb/N0 point list (syntax of ParseDbList, points in
// [-20, 60] dB); used by both ebno_db keys.
Status CheckEbnoList(const std::string& value);

}  // namespace capgap

#endif  // CAPGAP_SIM_CONFIG_CONFIG_KEYS_H_
