// The key-table engine: rule texts, value checks, applicability and defaults
// of a section, and help text, all derived from KeySpec tables (see
// key_table.h).
#include "sim/config/key_table.h"

#include <algorithm>
#include <set>
#include <vector>

#include "sim/config/text.h"

namespace capgap {
namespace {

std::string Join(std::span<const std::string_view> words, const char* separator) {
  std::string out;
  for (std::string_view w : words) {
    if (!out.empty()) out += separator;
    out += w;
  }
  return out;
}

// "[0, 0.5)", "(0, 1]"
std::string Interval(const KeyRule& rule) {
  return std::string(rule.low.open ? "(" : "[") + FormatDouble(rule.low.value) + ", " +
         FormatDouble(rule.high.value) + (rule.high.open ? ")" : "]");
}

// "an integer in [1, 256]", "an integer > 0", "an integer >= 3", plus note.
std::string IntegerRuleText(const KeyRule& rule) {
  std::string text;
  if (rule.max_integer == std::numeric_limits<std::uint64_t>::max()) {
    text = rule.min_integer == 1 ? "an integer > 0"
                                 : "an integer >= " + std::to_string(rule.min_integer);
  } else {
    text = "an integer in [" + std::to_string(rule.min_integer) + ", " +
           std::to_string(rule.max_integer) + "]";
  }
  if (rule.note) text += std::string(" (") + rule.note + ")";
  return text;
}

// "in [0, 86400] seconds"
std::string NumberRangeText(const KeyRule& rule) {
  std::string text = "in " + Interval(rule);
  if (rule.note) text += std::string(" ") + rule.note;
  return text;
}

bool Contains(std::span<const std::string_view> words, std::string_view w) {
  for (std::string_view x : words) {
    if (x == w) return true;
  }
  return false;
}

// "only with code = conv", "not with code = ldpc"
std::string ConditionText(const KeyCondition& c) {
  return std::string(c.negate ? "not with " : "only with ") + c.key + " = " +
         Join(c.values, " or ");
}

}  // namespace

std::string RuleText(const KeyRule& rule) {
  switch (rule.kind) {
    case RuleKind::kInteger:
      return IntegerRuleText(rule);
    case RuleKind::kNumber:
      return rule.bounded ? "a number " + NumberRangeText(rule) : "a finite number";
    case RuleKind::kWords:
      return Join(rule.words, ", ");
    case RuleKind::kText:
    case RuleKind::kCustom:
      return rule.syntax ? rule.syntax : "text";
  }
  return "";
}

Status CheckValue(const KeyRule& rule, const std::string& value) {
  switch (rule.kind) {
    case RuleKind::kInteger: {
      const std::string must = "must be " + IntegerRuleText(rule);
      if (value.empty()) return Status::Error("empty; " + must);
      if (value.size() > 1 && value[0] == '-' && ParseInt64(value).ok()) return Status::Error(must);
      auto v = ParseUint64(value);
      if (!v.ok()) return Status::Error(v.status().message() + "; " + must);
      if (v.value() < rule.min_integer || v.value() > rule.max_integer) return Status::Error(must);
      return Status::Ok();
    }
    case RuleKind::kNumber: {
      if (value.empty()) {
        return Status::Error(rule.bounded ? "empty; must be " + NumberRangeText(rule)
                                          : "empty; expected a finite number");
      }
      auto v = ParseDouble(value);
      if (!v.ok()) {
        if (!rule.bounded) return v.status();
        return Status::Error(v.status().message() + "; must be " + NumberRangeText(rule));
      }
      if (!rule.bounded) return Status::Ok();
      const double x = v.value();
      const bool above_low = rule.low.open ? x > rule.low.value : x >= rule.low.value;
      const bool below_high = rule.high.open ? x < rule.high.value : x <= rule.high.value;
      if (!above_low || !below_high) return Status::Error("must be " + NumberRangeText(rule));
      return Status::Ok();
    }
    case RuleKind::kWords:
      if (Contains(rule.words, value)) return Status::Ok();
      return Status::Error(std::string(rule.words_label) + ": " + Join(rule.words, ", "));
    case RuleKind::kText:
      if (rule.empty_message && value.empty()) return Status::Error(rule.empty_message);
      return Status::Ok();
    case RuleKind::kCustom:
      return rule.check ? rule.check(value) : Status::Ok();
  }
  return Status::Ok();
}

const KeySpec* FindKey(std::span<const KeyTable> tables, std::string_view name) {
  for (const KeyTable& t : tables) {
    for (const KeySpec& k : t.keys) {
      if (name == k.name) return &k;
    }
  }
  return nullptr;
}

std::string KeyNames(std::span<const KeyTable> tables) {
  std::string out;
  std::set<std::string_view> seen;  // a key declared by several tables once
  for (const KeyTable& t : tables) {
    for (const KeySpec& k : t.keys) {
      if (!seen.insert(k.name).second) continue;
      if (!out.empty()) out += ", ";
      out += k.name;
    }
  }
  return out;
}

namespace {

// Levenshtein distance, capped: returns cap + 1 once it exceeds cap.
std::size_t EditDistance(std::string_view a, std::string_view b, std::size_t cap) {
  if ((a.size() > b.size() ? a.size() - b.size() : b.size() - a.size()) > cap) return cap + 1;
  std::vector<std::size_t> row(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    std::size_t diag = row[0];
    row[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t up = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, diag + (a[i - 1] == b[j - 1] ? 0 : 1)});
      diag = up;
    }
  }
  return std::min(row[b.size()], cap + 1);
}

}  // namespace

std::string NearKeyNames(std::span<const KeyTable> tables, std::string_view key) {
  const std::string_view stem = key.substr(0, key.find('_'));
  std::vector<std::pair<std::size_t, std::string_view>> near;
  std::set<std::string_view> seen;
  for (const KeyTable& t : tables) {
    for (const KeySpec& k : t.keys) {
      const std::string_view name = k.name;
      if (!seen.insert(name).second) continue;
      const std::size_t d = EditDistance(key, name, 2);
      const bool same_stem = stem.size() >= 3 && name.substr(0, name.find('_')) == stem;
      if (d <= 2 || same_stem) near.emplace_back(d, name);
    }
  }
  std::stable_sort(near.begin(), near.end(),
                   [](const auto& x, const auto& y) { return x.first < y.first; });
  std::string out;
  for (std::size_t i = 0; i < near.size() && i < 5; ++i) {
    out += (out.empty() ? "'" : ", '") + std::string(near[i].second) + "'";
  }
  return out;
}

std::string OnResumeText(OnResume rule) {
  switch (rule) {
    case OnResume::kFixed: return "";
    case OnResume::kFree: return "may change on --resume";
    case OnResume::kMayGrow: return "may only grow on --resume";
    case OnResume::kAppendPoints: return "points may be appended on --resume";
  }
  return "";
}

std::string KeyHelp(std::span<const KeyTable> tables, const std::string& section) {
  std::string out = section + "\n";
  for (std::size_t i = 0; i < tables.size(); ++i) {
    const KeyTable& t = tables[i];
    if (i > 0) {
      out += std::string("  -- ") + t.title;
      if (t.when.key) out += " (" + ConditionText(t.when) + ")";
      out += "\n";
    }
    for (const KeySpec& k : t.keys) {
      out += std::string("  ") + k.name;
      if (!k.default_value) {
        out += " (required)";
      } else if (*k.default_value) {
        out += std::string(" = ") + k.default_value;
      } else {
        out += " (optional)";
      }
      out += "\n      " + RuleText(k.rule) + "; " + k.help;
      if (k.when.key) out += " (" + ConditionText(k.when) + ")";
      if (k.on_resume != OnResume::kFixed) out += " [" + OnResumeText(k.on_resume) + "]";
      out += "\n";
    }
  }
  return out;
}

bool ResolvedKeys::has(std::string_view name) const {
  for (const auto& e : entries_) {
    if (e.first == name) return true;
  }
  return false;
}

const std::string& ResolvedKeys::text(std::string_view name) const {
  for (const auto& e : entries_) {
    if (e.first == name) return e.second;
  }
  static const std::string kEmpty;
  return kEmpty;
}

std::uint64_t ResolvedKeys::integer(std::string_view name) const {
  auto v = ParseUint64(text(name));
  return v.ok() ? v.value() : 0;
}

double ResolvedKeys::number(std::string_view name) const {
  auto v = ParseDouble(text(name));
  return v.ok() ? v.value() : 0;
}

Status ResolvedKeys::Fail(std::string_view name, const std::string& rule) const {
  return Status::Error(source_ + ": " + prefix_ + std::string(name) + " = " +
                       QuoteValue(text(name)) + ": " + rule);
}

Status ResolvedKeys::Validate() const {
  for (std::size_t i = 0; i < entries_.size(); ++i) {
    if (Status s = CheckValue(specs_[i]->rule, entries_[i].second); !s.ok()) {
      return Fail(entries_[i].first, s.message());
    }
  }
  return Status::Ok();
}

namespace {

// Applicability of the entries of one section. A condition names another
// key; its value is the given one, else its default if it applies, else "".
class Applicability {
 public:
  Applicability(std::span<const KeyTable> tables, const std::map<std::string, std::string>& given)
      : tables_(tables), given_(given) {}

  bool Holds(const KeyCondition& c, int depth) const {
    if (!c.key) return true;
    const bool in = Contains(c.values, Value(c.key, depth + 1));
    return c.negate ? !in : in;
  }

  bool Applies(const KeyTable& t, const KeySpec& k, int depth) const {
    return Holds(t.when, depth) && Holds(k.when, depth);
  }

  // The first entry named `name` that applies, or nullptr.
  const KeySpec* ApplicableSpec(std::string_view name, int depth) const {
    // Conditions refer to other keys; the tables have no cycles, a depth
    // limit keeps a faulty table from recursing forever.
    if (depth > 16) return nullptr;
    for (const KeyTable& t : tables_) {
      for (const KeySpec& k : t.keys) {
        if (name == k.name && Applies(t, k, depth)) return &k;
      }
    }
    return nullptr;
  }

  // The value of `name` in this section: given, else its default ("" when
  // no entry applies or the key is required or optional).
  std::string Value(std::string_view name, int depth) const {
    const KeySpec* k = ApplicableSpec(name, depth);
    if (!k) return "";
    const auto it = given_.find(k->name);
    if (it != given_.end()) return it->second;
    return k->default_value ? k->default_value : "";
  }

  bool AnyApplies(std::string_view name) const {
    for (const KeyTable& t : tables_) {
      for (const KeySpec& k : t.keys) {
        if (name == k.name && Applies(t, k, 0)) return true;
      }
    }
    return false;
  }

 private:
  std::span<const KeyTable> tables_;
  const std::map<std::string, std::string>& given_;
};

}  // namespace

Result<ResolvedKeys> ResolveKeys(std::span<const KeyTable> tables,
                                 const std::map<std::string, std::string>& given,
                                 const std::string& source, const std::string& prefix,
                                 const std::string& noun) {
  const Applicability applicability(tables, given);
  ResolvedKeys out;
  out.source_ = source;
  out.prefix_ = prefix;
  for (const KeyTable& t : tables) {
    for (const KeySpec& k : t.keys) {
      const std::string full = prefix + k.name;
      const auto it = given.find(k.name);
      const bool is_given = it != given.end();
      const KeyCondition* failed = nullptr;
      for (const KeyCondition* c : {&t.when, &k.when}) {
        if (!failed && !applicability.Holds(*c, 0)) failed = c;
      }
      if (failed) {
        // Refused only if no other entry of the same name applies (a key
        // such as `decoder` is declared by several code families).
        if (is_given && !applicability.AnyApplies(k.name)) {
          const KeyCondition& c = *failed;
          const std::string have = applicability.Value(c.key, 0);
          // A condition key with a bad value (shaping = gauss) is the real
          // error: report it rather than the keys that depend on it.
          if (const KeySpec* other = applicability.ApplicableSpec(c.key, 0)) {
            if (Status s = CheckValue(other->rule, have); !s.ok()) {
              return Status::Error(source + ": " + prefix + c.key + " = " + QuoteValue(have) +
                                   ": " + s.message());
            }
          }
          if (c.negate) {
            return Status::Error(source + ": " + full + " does not apply with " + c.key + " = " +
                                 have + (c.reason ? std::string(" (") + c.reason + ")" : ""));
          }
          return Status::Error(source + ": " + full + " applies only with " + c.key + " = " +
                               Join(c.values, " or ") + " (" + noun + " has " + c.key + " = " +
                               have + ")");
        }
        continue;
      }
      if (!is_given) {
        if (!k.default_value) {
          return Status::Error(source + ": missing required key '" + full + "' (" +
                               RuleText(k.rule) + ")");
        }
        if (!*k.default_value) continue;  // optional, absent
      }
      out.entries_.emplace_back(k.name, is_given ? it->second : std::string(k.default_value));
      out.specs_.push_back(&k);
    }
  }
  return out;
}

}  // namespace capgap
