// Channel and interleaver keys (channel_keys.h).
#include "sim/families/channel_keys.h"

#include <cmath>
#include <limits>

#include "blocks/channel/channel_words.h"
#include "blocks/channel/fading_process.h"
#include "sim/config/text.h"

namespace capgap {
namespace {

constexpr std::string_view kRicianWord[] = {"rician"};
constexpr std::string_view kNakagamiWord[] = {"nakagami"};
constexpr std::string_view kBlockWord[] = {"block"};
constexpr std::string_view kDopplerWord[] = {"doppler"};
constexpr std::string_view kRowsWord[] = {"rows"};
constexpr std::string_view kNoInterleaverWord[] = {"none"};

// rician_k_db: a number in [-40, 40] dB, or -inf for K = 0 (Rayleigh).
Status CheckKFactorDb(const std::string& value) {
  if (value == "-inf") return Status::Ok();
  auto v = ParseDouble(value);
  if (!v.ok() || !(v.value() >= -40.0 && v.value() <= 40.0)) {
    return Status::Error("must be a number in [-40, 40] dB, or -inf for K = 0 (Rayleigh)");
  }
  return Status::Ok();
}

constexpr KeySpec kChannelKeys[] = {
    {"channel", "awgn", OneOf(kFadingLawWords),
     "flat channel: no fading, or the amplitude law of the gain h (E|h|^2 = 1, Eb/N0 is the "
     "average per branch; the receiver knows h)"},
    {"branches", "1", IntegerIn(1, 64), "receive branches L (independent gains and noise)"},
    {"combining", "mrc", OneOf(kCombiningWords),
     "diversity combining: maximal ratio, or the branch of largest |h|^2"},
};

constexpr KeySpec kFadingKeys[] = {
    {"fading", "fast", OneOf(kFadingTimeWords),
     "time variation: independent per symbol, constant per block of coherence_symbols, or "
     "Doppler-correlated (sum of sinusoids, Clarke's spectrum)"},
    {"rician_k_db", "6", Custom("a number in [-40, 40] dB, or -inf", CheckKFactorDb),
     "Rician K factor (line-of-sight to scattered power); -inf gives K = 0 (Rayleigh)",
     OnlyWith("channel", kRicianWord)},
    {"nakagami_m", "1", NumberIn(Closed(0.5), Closed(10000)), "Nakagami m (1: Rayleigh)",
     OnlyWith("channel", kNakagamiWord)},
    {"coherence_symbols", "100", IntegerIn(1, 1u << 24),
     "symbols per fading block, counted from the start of each work unit (the frame's symbols: "
     "quasi-static fading per frame)",
     OnlyWith("fading", kBlockWord)},
    {"doppler", "0.01", NumberIn(Open(0), Closed(0.5)),
     "normalised maximum Doppler frequency f_D T_s", OnlyWith("fading", kDopplerWord)},
};

constexpr KeySpec kInterleaverKeys[] = {
    {"interleaver", "none", OneOf(kInterleaverWords),
     "bit interleaver between encoder and mapper (coded schemes): none, one seeded random "
     "permutation, or row-column"},
    {"interleaver_rows", "16", IntegerIn(1, 1u << 20),
     "rows of the row-column interleaver (written by rows, read by columns); must divide the "
     "interleaved bits",
     OnlyWith("interleaver", kRowsWord)},
    {"interleaver_frames", "1", IntegerIn(1, 1024),
     "frames whose coded bits are interleaved together (spreads each codeword over several "
     "fading blocks)",
     NotWith("interleaver", kNoInterleaverWord, "no interleaver")},
};

}  // namespace

std::span<const KeyTable> ChannelKeyTables() {
  static const KeyTable tables[] = {
      {"channel", kChannelKeys},
      {"fading", kFadingKeys, OnlyWith("channel", kFadedLawWords)},
      {"interleaver", kInterleaverKeys},
  };
  return tables;
}

Status ParseChannelKeys(const ResolvedKeys& k, SchemeConfig& s) {
  ChannelSpec& ch = s.channel;
  auto law = ParseFadingLaw(k.text("channel"));
  if (!law.ok()) return k.Fail("channel", law.status().message());
  ch.law = law.value();
  ch.branches = static_cast<int>(k.integer("branches"));
  auto combining = ParseCombining(k.text("combining"));
  if (!combining.ok()) return k.Fail("combining", combining.status().message());
  ch.combining = combining.value();
  if (ch.fading()) {
    auto time = ParseFadingTime(k.text("fading"));
    if (!time.ok()) return k.Fail("fading", time.status().message());
    ch.time = time.value();
    if (k.has("rician_k_db")) {
      const std::string& t = k.text("rician_k_db");
      ch.rician_k_db =
          t == "-inf" ? -std::numeric_limits<double>::infinity() : ParseDouble(t).value();
    }
    if (k.has("nakagami_m")) ch.nakagami_m = k.number("nakagami_m");
    if (k.has("coherence_symbols")) {
      ch.coherence_symbols = static_cast<std::uint32_t>(k.integer("coherence_symbols"));
    }
    if (k.has("doppler")) ch.doppler = k.number("doppler");
  }
  // Shaped chains fade at the symbol rate with one branch (each branch would
  // need its own matched filter).
  if (ch.branches > 1 && s.shaping != PulseShape::kNone) {
    return k.Fail("shaping", "receive diversity runs at one sample per symbol; use "
                             "shaping = none with branches = " + std::to_string(ch.branches) +
                             ", or branches = 1 with shaping");
  }
  if (Status st = FadingProcess::Create(ch).status(); !st.ok()) return k.Fail("channel", st.message());
  InterleaverSpec& il = s.interleaver;
  auto kind = ParseInterleaverKind(k.text("interleaver"));
  if (!kind.ok()) return k.Fail("interleaver", kind.status().message());
  il.kind = kind.value();
  if (il.kind != InterleaverKind::kNone) {
    if (s.code == "none") {
      return k.Fail("interleaver", "applies to coded schemes only (this scheme has code = none); "
                                   "use interleaver = none");
    }
    il.frames = static_cast<std::uint32_t>(k.integer("interleaver_frames"));
    if (s.unit_frames > 0 && s.unit_frames % il.frames != 0) {
      return k.Fail("unit_frames", "must be a multiple of interleaver_frames = " +
                                       std::to_string(il.frames) +
                                       " (an interleaved group never straddles a work unit)");
    }
    if (il.kind == InterleaverKind::kRows) {
      il.rows = static_cast<std::uint32_t>(k.integer("interleaver_rows"));
    }
  }
  return Status::Ok();
}

}  // namespace capgap
