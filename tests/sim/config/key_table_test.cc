// Key-table engine: rule texts and exact messages from one declaration per
// key, applicability (conditions on other keys, with defaults, in any
// order), defaults and required keys, help text; then the scheme tables
// through ParseRunConfig: exact 64-bit integers, decimal-only numbers, and
// huge or binary values echoed shortened.
#include "sim/config/key_table.h"

#include <gtest/gtest.h>

#include <map>
#include <string>

#include "sim/chain/registry.h"
#include "sim/config/config.h"
#include "sim/config/config_keys.h"

namespace capgap {
namespace {

// A toy section: `mode` selects which keys apply.
Status CheckEven(const std::string& v) {
  return !v.empty() && (v.back() - '0') % 2 == 0 ? Status::Ok() : Status::Error("must be even");
}

constexpr std::string_view kModeWords[] = {"plain", "fancy", "odd"};
constexpr std::string_view kFancy[] = {"fancy"};
constexpr std::string_view kOdd[] = {"odd"};
constexpr std::string_view kExtraWord[] = {"extra"};

constexpr KeySpec kToyKeys[] = {
    // Depends on `mode`, declared later in the list: conditions see defaults.
    {"width", "4", IntegerIn(1, 64, "1: narrow"), "width in cells",
     NotWith("mode", kOdd, "odd has no width")},
    {"name", nullptr, Text("a name", "must name something"), "what it is called"},
    {"mode", "plain", OneOf(kModeWords), "how it looks"},
    {"gain", "0.5", NumberIn(Open(0), Closed(1), "volts"), "gain", OnlyWith("mode", kFancy)},
    {"tilt", "0", AnyFiniteNumber(), "tilt in degrees"},
    {"count", "2", Custom("an even digit", CheckEven), "how many"},
    {"label", "", Text("any text"), "optional label"},
};
constexpr KeySpec kExtraKeys[] = {
    {"gain", "7", IntegerAtLeast(0), "gain steps"},
};
constexpr KeyTable kToy[] = {
    {"toy", kToyKeys},
    {"extra", kExtraKeys, OnlyWith("mode", kExtraWord)},
};

std::string Resolve(const std::map<std::string, std::string>& given) {
  auto r = ResolveKeys(kToy, given, "f.ini", "toy.", "this toy");
  if (!r.ok()) return r.status().message();
  if (Status s = r.value().Validate(); !s.ok()) return s.message();
  std::string out;
  for (const auto& [k, v] : r.value().entries()) out += k + "=" + v + ";";
  return out;
}

TEST(KeyTable, RuleTextsComeFromTheTypedRules) {
  EXPECT_EQ(RuleText(IntegerIn(1, 16777216)), "an integer in [1, 16777216]");
  EXPECT_EQ(RuleText(IntegerAtLeast(1)), "an integer > 0");
  EXPECT_EQ(RuleText(IntegerAtLeast(0, "0: automatic")), "an integer >= 0 (0: automatic)");
  EXPECT_EQ(RuleText(NumberIn(Closed(0), Open(0.5))), "a number in [0, 0.5)");
  EXPECT_EQ(RuleText(NumberIn(Closed(0), Closed(86400), "seconds")),
            "a number in [0, 86400] seconds");
  EXPECT_EQ(RuleText(AnyFiniteNumber()), "a finite number");
  EXPECT_EQ(RuleText(OneOf(kModeWords)), "plain, fancy, odd");
}

TEST(KeyTable, ChecksNameTheBrokenRule) {
  const KeyRule frame = IntegerIn(1, 16777216);
  EXPECT_EQ(CheckValue(frame, "0").message(), "must be an integer in [1, 16777216]");
  EXPECT_EQ(CheckValue(frame, "-3").message(), "must be an integer in [1, 16777216]");
  EXPECT_EQ(CheckValue(frame, "1e3").message(),
            "not an integer (decimal digits only, no point or exponent); must be an integer in "
            "[1, 16777216]");
  EXPECT_EQ(CheckValue(frame, "").message(), "empty; must be an integer in [1, 16777216]");
  EXPECT_EQ(CheckValue(IntegerAtLeast(0), "18446744073709551616").message(),
            "exceeds 18446744073709551615; must be an integer >= 0");
  EXPECT_TRUE(CheckValue(IntegerAtLeast(0), "18446744073709551615").ok());
  const KeyRule half_open = NumberIn(Open(0), Closed(1));
  EXPECT_TRUE(CheckValue(half_open, "1").ok());
  EXPECT_EQ(CheckValue(half_open, "0").message(), "must be in (0, 1]");
  EXPECT_EQ(CheckValue(half_open, "0x1").message(),
            "not a decimal number (no hexadecimal); must be in (0, 1]");
  EXPECT_EQ(CheckValue(AnyFiniteNumber(), "inf").message(), "not a finite number");
  EXPECT_EQ(CheckValue(OneOf(kModeWords), "Plain").message(), "valid: plain, fancy, odd");
  EXPECT_EQ(CheckValue(OneOf(kModeWords, "valid here"), "x").message(),
            "valid here: plain, fancy, odd");
}

TEST(KeyTable, DefaultsFillInAndOptionalKeysStayAbsent) {
  EXPECT_EQ(Resolve({{"name", "a"}}), "width=4;name=a;mode=plain;tilt=0;count=2;");
  EXPECT_EQ(Resolve({{"name", "a"}, {"label", "x"}}),
            "width=4;name=a;mode=plain;tilt=0;count=2;label=x;");
}

TEST(KeyTable, ConditionsSelectKeysWhateverTheirOrder) {
  EXPECT_EQ(Resolve({{"name", "a"}, {"mode", "fancy"}}),
            "width=4;name=a;mode=fancy;gain=0.5;tilt=0;count=2;");
  EXPECT_EQ(Resolve({{"name", "a"}, {"mode", "odd"}}), "name=a;mode=odd;tilt=0;count=2;");
  // A key declared by two tables resolves through the one that applies.
  EXPECT_EQ(Resolve({{"name", "a"}, {"mode", "extra"}, {"gain", "9"}}),
            "f.ini: toy.mode = 'extra': valid: plain, fancy, odd");
}

TEST(KeyTable, RefusalsNameKeyConditionAndRule) {
  EXPECT_EQ(Resolve({}), "f.ini: missing required key 'toy.name' (a name)");
  EXPECT_EQ(Resolve({{"name", "a"}, {"gain", "0.2"}}),
            "f.ini: toy.gain applies only with mode = fancy (this toy has mode = plain)");
  EXPECT_EQ(Resolve({{"name", "a"}, {"mode", "odd"}, {"width", "3"}}),
            "f.ini: toy.width does not apply with mode = odd (odd has no width)");
  // A bad value of the key a condition reads is reported as such.
  EXPECT_EQ(Resolve({{"name", "a"}, {"mode", "fency"}, {"gain", "0.2"}}),
            "f.ini: toy.mode = 'fency': valid: plain, fancy, odd");
  EXPECT_EQ(Resolve({{"name", ""}}), "f.ini: toy.name = '': must name something");
  EXPECT_EQ(Resolve({{"name", "a"}, {"width", "65"}}),
            "f.ini: toy.width = '65': must be an integer in [1, 64] (1: narrow)");
  EXPECT_EQ(Resolve({{"name", "a"}, {"mode", "fancy"}, {"gain", "2"}}),
            "f.ini: toy.gain = '2': must be in (0, 1] volts");
  EXPECT_EQ(Resolve({{"name", "a"}, {"count", "3"}}), "f.ini: toy.count = '3': must be even");
}

TEST(KeyTable, NamesAndHelpComeFromTheSameTables) {
  EXPECT_EQ(KeyNames(kToy), "width, name, mode, gain, tilt, count, label");
  ASSERT_NE(FindKey(kToy, "gain"), nullptr);
  EXPECT_EQ(FindKey(kToy, "gain")->default_value, std::string("0.5"));
  EXPECT_EQ(FindKey(kToy, "nope"), nullptr);
  const std::string help = KeyHelp(kToy, "[toy]");
  EXPECT_EQ(
      help.rfind("[toy]\n  width = 4\n      an integer in [1, 64] (1: narrow); width in cells "
                 "(not with mode = odd)\n  name (required)\n      a name; what it is called\n",
                 0),
      0u)
      << help;
  EXPECT_NE(
      help.find("  gain = 0.5\n      a number in (0, 1] volts; gain (only with mode = fancy)\n"),
      std::string::npos)
      << help;
  EXPECT_NE(help.find("  label (optional)\n"), std::string::npos) << help;
  EXPECT_NE(help.find("  -- extra (only with mode = extra)\n  gain = 7\n"), std::string::npos)
      << help;
}

// ------------------------------------------------------- the scheme tables

constexpr char kBase[] = "[sweep]\nebno_db = 0 to 2 by 1\n[scheme.q]\nmodulation = qpsk\n";

std::string ErrorOf(const std::string& text, const std::vector<std::string>& overrides = {}) {
  auto r = ParseRunConfig(text, "cfg.ini", overrides);
  return r.ok() ? "OK" : r.status().message();
}

TEST(SchemeKeys, SeedKeepsEvery64BitIntegerExactly) {
  // 2^53 + 1: a parser going through double would give 2^53.
  auto r = ParseRunConfig(kBase, "cfg.ini", {"sweep.seed=9007199254740993"});
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value().sweep.seed, 9007199254740993u);
  auto top = ParseRunConfig(kBase, "cfg.ini", {"sweep.seed=18446744073709551615"});
  ASSERT_TRUE(top.ok()) << top.status().message();
  EXPECT_EQ(top.value().sweep.seed, 18446744073709551615u);
  EXPECT_EQ(ErrorOf(kBase, {"sweep.seed=18446744073709551616"}),
            "cfg.ini: sweep.seed = '18446744073709551616': exceeds 18446744073709551615; must be "
            "an integer >= 0");
}

TEST(SchemeKeys, IntegersAreDecimalDigitsAndNumbersDecimalNotation) {
  EXPECT_EQ(ErrorOf(kBase, {"sweep.stop_bit_errors=1e3"}),
            "cfg.ini: sweep.stop_bit_errors = '1e3': not an integer (decimal digits only, no point "
            "or exponent); must be an integer >= 0 (0: no bit-error target)");
  EXPECT_EQ(ErrorOf(kBase, {"sweep.ebno_db=0x10"}),
            "cfg.ini: sweep.ebno_db = '0x10': not a decimal number (no hexadecimal); expected "
            "FROM to TO by STEP or a comma list");
  EXPECT_EQ(ErrorOf(kBase, {"sweep.ebno_db=1,0x10"}),
            "cfg.ini: sweep.ebno_db = '1,0x10': '0x10' is not a decimal number (no hexadecimal); "
            "expected FROM to TO by STEP or a comma list");
  EXPECT_EQ(ErrorOf(kBase, {"scheme.q.ebno_db=1,inf"}),
            "cfg.ini: scheme.q.ebno_db = '1,inf': 'inf' is not a finite number; expected "
            "FROM to TO by STEP or a comma list");
  EXPECT_EQ(
      ErrorOf(kBase, {"sweep.ber_floor=0x1p-3"}),
      "cfg.ini: sweep.ber_floor = '0x1p-3': not a decimal number (no hexadecimal); must be in "
      "[0, 0.5)");
  EXPECT_EQ(ErrorOf(kBase, {"scheme.q.frame_bits=0"}),
            "cfg.ini: scheme.q.frame_bits = '0': must be an integer in [1, 16777216]");
}

TEST(SchemeKeys, RepeatedSectionsAreRefusedNamingBothLines) {
  EXPECT_EQ(ErrorOf(std::string(kBase) + "\n[scheme.q]\nframe_bits = 8\n"),
            "cfg.ini: section [scheme.q] given twice (lines 3 and 6)");
  EXPECT_EQ(ErrorOf(std::string(kBase) + "[sweep]\nseed = 3\n"),
            "cfg.ini: section [sweep] given twice (lines 1 and 5)");
}

TEST(SchemeKeys, HugeAndBinaryValuesAreEchoedShortenedAndEscaped) {
  const std::string huge = std::string("\x01\xff", 2) + std::string(10 * 1000 * 1000, '7');
  const std::string tail = std::string(72, '7') + "...' (10000002 bytes)";
  const std::string a = ErrorOf(std::string(kBase) + "frame_bits = " + huge + "\n");
  EXPECT_EQ(a, "cfg.ini: scheme.q.frame_bits = '\\x01\\xFF" + tail +
                   ": not an integer; must be an integer in [1, 16777216]");
  EXPECT_LT(a.size(), 300u);
  const std::string b = ErrorOf(kBase, {"scheme.q.modulation=" + huge});
  EXPECT_LT(b.size(), 300u) << b.substr(0, 400);
  EXPECT_EQ(b, "cfg.ini: scheme.q.modulation = '\\x01\\xFF" + tail +
                   ": not a modulation; valid: " + ConstellationChoices());
  const std::string c = ErrorOf(kBase, {"sweep.ebno_db=" + huge});
  EXPECT_EQ(c, "cfg.ini: sweep.ebno_db = '\\x01\\xFF" + tail +
                   ": not a number; expected FROM to TO by STEP or a comma list");
  EXPECT_LT(c.size(), 300u);
  const std::string d = ErrorOf(kBase, {"scheme.q." + huge + "=1"});
  // The echoed key is shortened and escaped; no key is near it, so the
  // message only points to the key list.
  EXPECT_EQ(d.rfind("cfg.ini: unknown key '--set scheme.q.\\x01\\xFF777", 0), 0u) << d;
  EXPECT_NE(d.find("7... (10000017 bytes)'; 'capgap run --help' lists the [scheme.NAME] keys"),
            std::string::npos)
      << d;
  EXPECT_LT(d.size(), 300u);
}

TEST(SchemeKeys, HelpListsEveryKeyWithItsDefaultAndRule) {
  const std::string help = ConfigKeysHelp();
  EXPECT_NE(help.find("  frame_bits = 1920\n      an integer in [1, 16777216]; "),
            std::string::npos)
      << help;
  EXPECT_NE(help.find("  -- convolutional code (only with code = conv)\n  generators = 133,171\n"),
            std::string::npos)
      << help;
  EXPECT_NE(help.find("  offset = 0.5\n      a number in [0, 10]; "), std::string::npos) << help;
}

// The resume rules live in the key tables (OnResume) and show in the help:
// the keys --resume may change are marked, a fixed key is not.
TEST(SchemeKeys, ResumeChangeableKeysAreMarkedInTheTables) {
  const auto rule = [](std::span<const KeyTable> tables, const char* name) {
    const KeySpec* k = FindKey(tables, name);
    EXPECT_NE(k, nullptr) << name;
    return k ? k->on_resume : OnResume::kFixed;
  };
  EXPECT_EQ(rule(SchemeKeyTables(), "memory_limit_mb"), OnResume::kFree);
  EXPECT_EQ(rule(SchemeKeyTables(), "ebno_db"), OnResume::kAppendPoints);
  EXPECT_EQ(rule(SchemeKeyTables(), "frame_bits"), OnResume::kFixed);
  EXPECT_EQ(rule(SchemeKeyTables(), "max_iterations"), OnResume::kFixed);
  EXPECT_EQ(rule(SweepKeyTables(), "threads"), OnResume::kFree);
  EXPECT_EQ(rule(SweepKeyTables(), "stop_bit_errors"), OnResume::kErrorTarget);
  EXPECT_EQ(rule(SweepKeyTables(), "stop_frame_errors"), OnResume::kErrorTarget);
  EXPECT_EQ(rule(SchemeKeyTables(), "stop_frame_errors"), OnResume::kErrorTarget);
  EXPECT_EQ(rule(SweepKeyTables(), "target_fer"), OnResume::kFree);
  EXPECT_EQ(rule(SweepKeyTables(), "stop_bits"), OnResume::kMayGrow);
  EXPECT_EQ(rule(SweepKeyTables(), "seed"), OnResume::kFixed);
  const std::string help = ConfigKeysHelp();
  EXPECT_NE(help.find("larger, in MiB [may change on --resume]\n"), std::string::npos) << help;
  EXPECT_NE(help.find("below the default ber_floor 1e-7) [may only grow on --resume]\n"),
            std::string::npos)
      << help;
  EXPECT_NE(help.find("either target is reached [may only grow or be removed on --resume]\n"),
            std::string::npos)
      << help;
  EXPECT_EQ(help.find("master seed ["), std::string::npos) << help;
}

}  // namespace
}  // namespace capgap
