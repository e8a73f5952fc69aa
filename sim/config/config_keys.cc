// The key tables of [sweep] and [scheme.NAME] (see config_keys.h): one
// declaration per key gives its default, rule, help line and applicability;
// sim/config/key_table.cc turns them into checks, messages and help.
#include "sim/config/config_keys.h"

#include <vector>

#include "sim/chain/registry.h"

#include <cmath>
#include <sstream>
#include <string_view>

#include "blocks/mapping/demapper.h"
#include "blocks/mapping/modulation.h"
#include "sim/config/config.h"
#include "sim/config/text.h"
#include "sim/families/channel_keys.h"

namespace capgap {
namespace {

// True when `value` can be quoted whole in a message (short, printable);
// every valid word is. Block parsers quote the word they refuse, so a value
// that is not goes without it.
bool Quotable(const std::string& value) { return Printable(value) == value; }

Status CheckModulation(const std::string& value) {
  if (!Quotable(value)) return Status::Error("not a modulation; valid: " + ConstellationChoices());
  return ParseConstellation(value).status();
}

Status CheckDemapper(const std::string& value) {
  if (!Quotable(value)) return Status::Error("not a demap method; valid: " + DemapMethodChoices());
  return ParseDemapMethod(value).status();
}

// ---------------------------------------------------------------- [sweep]
constexpr KeySpec kSweepKeys[] = {
    {"ebno_db", nullptr,
     Custom("FROM to TO by STEP (inclusive) or a comma list, in dB", CheckEbnoList),
     "Eb/N0 points (per information bit), increasing, within [-20, 60] dB", Always(),
     OnResume::kAppendPoints},
    {"stop_bit_errors", "116", IntegerAtLeast(0, "0: no bit-error target"),
     "bit errors that end a point (default: the fewest errors whose 95 % interval lies within "
     "+-20 % of the BER); with stop_frame_errors a point stops at the first unit where either "
     "target is reached",
     Always(), OnResume::kErrorTarget},
    {"stop_frame_errors", "", IntegerAtLeast(1),
     "frame errors that end a point (absent: no frame-error target; at least one of "
     "stop_bit_errors, stop_frame_errors)",
     Always(), OnResume::kErrorTarget},
    {"stop_bits", "30000000", IntegerAtLeast(1),
     "information bits that end a point (default: no error in that many bits puts the 95 % "
     "upper bound below the default ber_floor 1e-7)",
     Always(),
     OnResume::kMayGrow},
    {"ber_floor", "1e-7", NumberIn(Closed(0), Open(0.5)),
     "a scheme's sweep stops after a point below it", Always(), OnResume::kFree},
    {"target_ber", "1e-5", NumberIn(Open(0), Open(0.5)), "BER at which the summary is taken",
     Always(), OnResume::kFree},
    {"target_fer", "1e-4", NumberIn(Open(0), Open(1)),
     "FER at which the summary and the finite-length limits are taken", Always(),
     OnResume::kFree},
    {"seed", "1", IntegerAtLeast(0), "master seed"},
    {"threads", "0", IntegerIn(0, 4096, "0: all cores"), "worker threads", Always(),
     OnResume::kFree},
    {"checkpoint_seconds", "60", NumberIn(Closed(0), Closed(86400), "seconds"),
     "time between checkpoints while a point runs (0: only when a point finishes or the run "
     "stops)",
     Always(), OnResume::kFree},
};

constexpr KeyTable kSweepTables[] = {{"sweep", kSweepKeys}};

// ------------------------------------------------------- [scheme.NAME]

std::span<const KeySpec> SchemeCommonKeys() {
  static const KeySpec keys[] = {
    {"modulation", nullptr,
     Custom(ConstellationSyntax(), CheckModulation),
     "constellation (the registry's; README, \"Constellations\"), unit average energy"},
    {"ebno_db", "", Custom("FROM to TO by STEP (inclusive) or a comma list, in dB", CheckEbnoList),
     "this scheme's points instead of sweep.ebno_db", Always(), OnResume::kAppendPoints},
    {"stop_frame_errors", "", IntegerAtLeast(1), "this scheme's sweep.stop_frame_errors",
     Always(), OnResume::kErrorTarget},
    {"target_fer", "", NumberIn(Open(0), Open(1)), "this scheme's sweep.target_fer", Always(),
     OnResume::kFree},
    {"frame_bits", "1920", IntegerIn(1, 16777216),
     "information bits per frame, a multiple of bits per symbol",
     NotWith("code", FixedFrameCodeWords(),
             "a frame is one codeword; the code sets its information bits")},
    {"demapper", "maxlog", Custom("hard, maxlog, logmap", CheckDemapper),
     "hard decisions, max-log or exact log-MAP LLRs"},
    {"source", "random", OneOf(kSourceKindWords), "i.i.d. random bits or an ITU-T O.150 sequence"},
    {"unit_frames", "0", IntegerIn(0, 1u << 20, "0: automatic"),
     "frames per work unit (automatic: about 64 kbit)"},
  };
  return keys;
}

constexpr std::string_view kShapingWords[] = {"none", "rc", "rrc"};
constexpr std::string_view kShapedWords[] = {"rc", "rrc"};

constexpr KeySpec kShapingKeys[] = {
    {"shaping", "none", OneOf(kShapingWords),
     "pulse shaping: none (one sample per symbol), raised cosine, root raised cosine"},
    {"rolloff", "0.35", NumberIn(Open(0), Closed(1)), "roll-off factor",
     OnlyWith("shaping", kShapedWords)},
    {"span", "16", IntegerIn(1, 256), "filter length in symbols",
     OnlyWith("shaping", kShapedWords)},
    {"samples_per_symbol", "8", IntegerIn(2, 64), "oversampling factor",
     OnlyWith("shaping", kShapedWords)},
    {"timing_offset", "0", NumberIn(Closed(-0.5), Closed(0.5), "symbols"),
     "receiver sampling offset", OnlyWith("shaping", kShapedWords)},
};

constexpr KeySpec kImpairmentKeys[] = {
    {"phase_offset_deg", "0", AnyFiniteNumber(), "carrier phase offset in degrees"},
    {"frequency_offset", "0", NumberIn(Closed(-0.5), Closed(0.5), "cycles per symbol"),
     "carrier frequency offset"},
};



}  // namespace

std::span<const KeyTable> SweepKeyTables() { return kSweepTables; }

std::span<const KeyTable> SchemeKeyTables() {
  // The code choice and each family's own table come from the registry
  // (sim/chain/registry.cc): a new family adds its keys there, not here.
  static const KeySpec code_choice[] = {
      {"code", "none", OneOf(CodeFamilyWords()), "channel code, decoded from the demapper's LLRs"},
  };
  static const std::vector<KeyTable> tables = [] {
    std::vector<KeyTable> t = {
        {"common", SchemeCommonKeys()},
        {"pulse shaping", kShapingKeys},
        {"carrier impairments", kImpairmentKeys},
        {"channel code", code_choice},
    };
    for (const KeyTable& table : ChannelKeyTables()) t.push_back(table);
    for (const CodeFamily* f : CodeFamilies()) {
      if (f->keys) t.push_back(*f->keys);
    }
    return t;
  }();
  return tables;
}

namespace {

// Whitespace-separated words of `text`.
std::vector<std::string> SplitWords(const std::string& text) {
  std::vector<std::string> words;
  std::stringstream ss(text);
  std::string w;
  while (ss >> w) words.push_back(w);
  return words;
}

}  // namespace

Result<std::vector<double>> ParseDbPoints(const std::string& text_in) {
  const std::string text = Trim(text_in);
  const auto parse_one = [](const std::string& s, double& out) {
    auto v = ParseDouble(Trim(s));
    if (v.ok()) out = v.value();
    return v.status();
  };
  std::vector<double> out;
  if (text.find(':') != std::string::npos) {
    // The colon form of earlier versions is refused, with the value
    // rewritten in the range syntax when it had three parts.
    std::vector<std::string> parts;
    std::stringstream ss(text);
    std::string part;
    while (std::getline(ss, part, ':')) parts.push_back(Trim(part));
    std::string hint = "FROM to TO by STEP";
    if (parts.size() == 3) hint = parts[0] + " to " + parts[2] + " by " + parts[1];
    return Status::Error("the START:STEP:STOP form is no longer accepted; write a range as "
                         "FROM to TO by STEP (inclusive), here '" + hint + "', or a comma list");
  }
  const std::vector<std::string> words = SplitWords(text);
  const bool is_range = words.size() > 1 && (words[1] == "to" || text.find(',') == std::string::npos);
  if (is_range) {
    double from = 0, to = 0, step = 0;
    if (words.size() != 5 || words[1] != "to" || words[3] != "by" ||
        !parse_one(words[0], from).ok() || !parse_one(words[2], to).ok() ||
        !parse_one(words[4], step).ok()) {
      return Status::Error("expected FROM to TO by STEP (numbers, in dB, e.g. '0 to 12 by 0.5') "
                           "or a comma list");
    }
    if (!(step > 0)) return Status::Error("STEP must be > 0");
    if (to < from) return Status::Error("TO must be >= FROM");
    // TO is included when it lies on the grid up to 1e-9 steps, so that
    // '0 to 1 by 0.1' ends at 1 although 1 / 0.1 is 9.999999999999998 in
    // binary floating point.
    const double count = std::floor((to - from) / step + 1e-9) + 1;
    if (count > 10000) return Status::Error("more than 10000 points");
    for (int i = 0; i < static_cast<int>(count); ++i) {
      // Round to 1e-9 dB so that 0 to 1 by 0.1 gives 0.3, not 0.30000000000000004.
      out.push_back(std::round((from + i * step) * 1e9) / 1e9);
    }
  } else {
    std::stringstream ss(text);
    std::string part;
    while (std::getline(ss, part, ',')) {
      double v = 0;
      if (Status s = parse_one(part, v); !s.ok()) {
        // A one-item list is the value itself, which the caller quotes.
        const bool single = text.find(',') == std::string::npos;
        return Status::Error((single ? "" : QuoteValue(Trim(part)) + " is ") + s.message() +
                             "; expected FROM to TO by STEP or a comma list");
      }
      out.push_back(v);
    }
    if (out.empty()) return Status::Error("empty list");
  }
  for (std::size_t i = 1; i < out.size(); ++i) {
    if (!(out[i] > out[i - 1])) return Status::Error("points must increase");
  }
  return out;
}

Status CheckEbnoList(const std::string& value) {
  auto points = ParseDbPoints(value);
  if (!points.ok()) return points.status();
  for (double x : points.value()) {
    if (x < -20 || x > 60) return Status::Error("points must lie in [-20, 60] dB");
  }
  return Status::Ok();
}

}  // namespace capgap
