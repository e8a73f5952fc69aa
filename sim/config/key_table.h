// Key tables: one declaration per config key (name, default, typed rule,
// help line, when it applies) from which the engine below derives the
// checks, the error messages and the help text, so that a rule is written
// once. A group of keys is a KeyTable (an array of KeySpec, optionally
// applying only under a condition, e.g. a code family's keys with code =
// conv); a section is resolved against a list of tables.
//
// Messages have the form "FILE: PREFIX.KEY = 'VALUE': RULE", e.g.
//   "cfg.ini: scheme.q.frame_bits = '0': must be an integer in [1, 16777216]"
// with the value quoted by QuoteValue (escaped, long values shortened).
//
// Declaring a table (constexpr, at namespace scope):
//   constexpr std::string_view kTerminationWords[] = {"tail", "tailbiting"};
//   constexpr KeySpec kConvKeys[] = {
//       {"constraint_length", "7", IntegerIn(3, 9), "K"},
//       {"termination", "tail", OneOf(kTerminationWords), "trellis termination"},
//   };
//   constexpr std::string_view kConvWord[] = {"conv"};
//   constexpr KeyTable kConvTable{"convolutional code", kConvKeys, OnlyWith("code", kConvWord)};
#ifndef CAPGAP_SIM_CONFIG_KEY_TABLE_H_
#define CAPGAP_SIM_CONFIG_KEY_TABLE_H_

#include <cstdint>
#include <limits>
#include <map>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "blocks/core/status.h"

namespace capgap {

enum class RuleKind {
  kInteger,  // decimal digits, within [min_integer, max_integer]
  kNumber,   // decimal number, finite, optionally within bounds
  kWords,    // one of `words`
  kText,     // any text (parsed later by a block); optionally non-empty
  kCustom,   // `check` decides
};

// End of a number range: open (excluded) or closed (included).
struct Bound {
  double value = 0;
  bool open = false;
};
constexpr Bound Open(double v) { return Bound{v, true}; }
constexpr Bound Closed(double v) { return Bound{v, false}; }

// The values a key accepts; build one with the functions below.
struct KeyRule {
  RuleKind kind = RuleKind::kText;
  std::uint64_t min_integer = 0;
  std::uint64_t max_integer = std::numeric_limits<std::uint64_t>::max();
  bool bounded = false;  // kNumber: false = any finite number
  Bound low;
  Bound high;
  std::span<const std::string_view> words;  // kWords
  const char* words_label = "valid";        // kWords: "valid: a, b, c"
  // kText, kCustom: what the value looks like, for messages and help.
  const char* syntax = nullptr;
  // kText: message when the value is empty (nullptr: empty allowed).
  const char* empty_message = nullptr;
  // kCustom: OK or the rule broken (no key or value in it).
  Status (*check)(const std::string& value) = nullptr;
  // kInteger: meaning of special values, "0: automatic"; kNumber: unit,
  // "seconds" (both appended to the rule text).
  const char* note = nullptr;
};

constexpr KeyRule IntegerIn(std::uint64_t lo, std::uint64_t hi, const char* note = nullptr) {
  KeyRule r;
  r.kind = RuleKind::kInteger;
  r.min_integer = lo;
  r.max_integer = hi;
  r.note = note;
  return r;
}
constexpr KeyRule IntegerAtLeast(std::uint64_t lo, const char* note = nullptr) {
  return IntegerIn(lo, std::numeric_limits<std::uint64_t>::max(), note);
}
constexpr KeyRule NumberIn(Bound lo, Bound hi, const char* unit = nullptr) {
  KeyRule r;
  r.kind = RuleKind::kNumber;
  r.bounded = true;
  r.low = lo;
  r.high = hi;
  r.note = unit;
  return r;
}
constexpr KeyRule AnyFiniteNumber() {
  KeyRule r;
  r.kind = RuleKind::kNumber;
  return r;
}
constexpr KeyRule OneOf(std::span<const std::string_view> words, const char* label = "valid") {
  KeyRule r;
  r.kind = RuleKind::kWords;
  r.words = words;
  r.words_label = label;
  return r;
}
constexpr KeyRule Text(const char* syntax, const char* empty_message = nullptr) {
  KeyRule r;
  r.kind = RuleKind::kText;
  r.syntax = syntax;
  r.empty_message = empty_message;
  return r;
}
constexpr KeyRule Custom(const char* syntax, Status (*check)(const std::string&)) {
  KeyRule r;
  r.kind = RuleKind::kCustom;
  r.syntax = syntax;
  r.check = check;
  return r;
}

// When a key (or a whole table) applies: always (key == nullptr), only when
// another key of the section has one of `values`, or (negate) only when it
// has none of them. The other key is looked up with its default, so it may
// be declared anywhere in the section's tables.
struct KeyCondition {
  const char* key = nullptr;
  std::span<const std::string_view> values;
  bool negate = false;
  // Said when a key is given but refused under a negated condition:
  // "X does not apply with code = ldpc (REASON)".
  const char* reason = nullptr;
};
constexpr KeyCondition Always() { return KeyCondition{}; }
constexpr KeyCondition OnlyWith(const char* key, std::span<const std::string_view> values) {
  return KeyCondition{key, values, false, nullptr};
}
constexpr KeyCondition NotWith(const char* key, std::span<const std::string_view> values,
                               const char* reason) {
  return KeyCondition{key, values, true, reason};
}

// What `capgap run --resume` allows for a key against the configuration the
// checkpoint stored (CheckResumable, sim/io/checkpoint.h). A key that is not
// marked is fixed, so that a new key which changes the random streams or the
// counted work is never let through by omission.
enum class OnResume {
  kFixed,         // must keep its value (start a new output file to change it)
  kFree,          // may change: it alters neither the streams nor the recorded work
  kMayGrow,       // an integer stopping limit that may only be raised
  kAppendPoints,  // an Eb/N0 list: recorded points keep their values, new ones may follow
};

struct KeySpec {
  const char* name;
  // nullptr: required; "": optional, absent from the result unless given.
  const char* default_value;
  KeyRule rule;
  const char* help;  // meaning, one line (the rule is printed beside it)
  KeyCondition when = {};
  OnResume on_resume = OnResume::kFixed;
};

struct KeyTable {
  const char* title;  // help heading, e.g. "convolutional code"
  std::span<const KeySpec> keys;
  KeyCondition when = {};  // the whole table applies only under this
};

// Text of a rule as it appears in messages and help: "an integer in [1,
// 256]", "an integer >= 0 (0: automatic)", "a number in (0, 1]", "a number in
// [0, 86400] seconds", "a finite number", "a, b, c", or the syntax text.
std::string RuleText(const KeyRule& rule);

// OK, or the rule the value breaks ("must be an integer in [3, 9]",
// "not an integer; must be an integer > 0", "valid: tail, tailbiting", ...).
Status CheckValue(const KeyRule& rule, const std::string& value);

// Help text of a resume rule: "" (kFixed), "may change on --resume", "may
// only grow on --resume", "points may be appended on --resume".
std::string OnResumeText(OnResume rule);

// First entry named `name` in `tables`, or nullptr.
const KeySpec* FindKey(std::span<const KeyTable> tables, std::string_view name);

// Every key name of `tables` in table order, each once: "a, b, c".
std::string KeyNames(std::span<const KeyTable> tables);

// For an unknown key: the declared keys nearest to it (edit distance at most
// 2, or sharing its first word before '_'), at most five, as "'a', 'b'"; empty
// when none is near. Keeps error lines short however many keys the families
// declare.
std::string NearKeyNames(std::span<const KeyTable> tables, std::string_view key);

// Help text of `tables` under a heading line `section` ("[sweep]"), each
// table after the first under "  -- TITLE (only with KEY = V)": per key
// "  NAME = DEFAULT" (or "(required)", "(optional)") and an indented line
// "RULE; HELP" ending "(only with KEY = V)" or "(not with KEY = V)" where the
// key has a condition, then "[OnResumeText]" for a key that is not fixed.
std::string KeyHelp(std::span<const KeyTable> tables, const std::string& section);

// The keys of one section after applicability and defaults: the applicable
// keys in table order with their values; optional keys not given are absent.
class ResolvedKeys {
 public:
  const std::vector<std::pair<std::string, std::string>>& entries() const { return entries_; }
  bool has(std::string_view name) const;
  // REQUIRES: has(name). integer()/number() also require the key's rule to be
  // kInteger/kNumber and Validate() to have passed.
  const std::string& text(std::string_view name) const;
  std::uint64_t integer(std::string_view name) const;
  double number(std::string_view name) const;
  // "SOURCE: PREFIXNAME = 'VALUE': RULE" for checks that span keys.
  Status Fail(std::string_view name, const std::string& rule) const;
  // Checks every value against its rule, in table order.
  Status Validate() const;

 private:
  friend Result<ResolvedKeys> ResolveKeys(std::span<const KeyTable>,
                                          const std::map<std::string, std::string>&,
                                          const std::string&, const std::string&,
                                          const std::string&);
  std::string source_;
  std::string prefix_;
  std::vector<std::pair<std::string, std::string>> entries_;
  std::vector<const KeySpec*> specs_;  // parallel to entries_
};

// Resolves a section: `given` maps key names (without prefix) to values,
// every one of them known to `tables` (the caller reports unknown keys with
// KeyNames). Refuses a given key that does not apply ("FILE: PREFIXKEY
// applies only with code = conv (this scheme has code = none)", "... does
// not apply with code = ldpc (REASON)") and a missing required key ("FILE:
// missing required key 'PREFIXKEY' (RULE)"). `noun` names the section in
// messages ("this scheme"). Values are not checked until Validate().
Result<ResolvedKeys> ResolveKeys(std::span<const KeyTable> tables,
                                 const std::map<std::string, std::string>& given,
                                 const std::string& source, const std::string& prefix,
                                 const std::string& noun);

}  // namespace capgap

#endif  // CAPGAP_SIM_CONFIG_KEY_TABLE_H_
