// Config loading: INI text (sim/config/ini_reader.h) -> (section.key, value)
// pairs, overrides, then the key tables (sim/config/config_keys.cc) resolve
// applicability and defaults and check every value; this file adds the
// checks that span keys and fills the typed structs. Messages have the form
// "FILE: KEY = 'VALUE': RULE".
#include "sim/config/config.h"

#include "sim/chain/registry.h"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <numeric>

#include "sim/config/config_keys.h"
#include "sim/config/ini_reader.h"
#include "sim/config/key_table.h"
#include "sim/config/text.h"
#include "sim/families/channel_keys.h"

namespace capgap {
namespace {

constexpr char kSectionsHint[] = "sections: [sweep], [scheme.NAME]";

bool IsSchemeNameChar(char ch) {
  return (ch >= 'a' && ch <= 'z') || (ch >= 'A' && ch <= 'Z') || (ch >= '0' && ch <= '9') ||
         ch == '_' || ch == '-';
}

// The keys given for one run: sweep keys and each scheme's keys (names
// without the section prefix), schemes in order of first appearance.
struct GivenKeys {
  std::map<std::string, std::string> sweep;
  std::vector<std::string> scheme_names;
  std::map<std::string, std::map<std::string, std::string>> schemes;
};

// Keys of earlier versions that were renamed: refused with the new name (no
// silent alias, so that a config means one thing in every version).
struct RenamedKey {
  const char* old_name;
  const char* new_name;
};
constexpr RenamedKey kRenamedKeys[] = {
    {"target_errors", "stop_bit_errors"},
    {"max_bits", "stop_bits"},
};

// "FILE: key 'sweep.target_errors' was renamed: write 'sweep.stop_bit_errors'"
// when `key` is a renamed key, else OK.
Status RefuseRenamedKey(const std::string& source, const std::string& where,
                        const std::string& section, const std::string& key) {
  for (const RenamedKey& r : kRenamedKeys) {
    if (key == r.old_name) {
      return Status::Error(source + ": key '" + where + "' was renamed: write '" + section + "." +
                           r.new_name + "' (same meaning)");
    }
  }
  return Status::Ok();
}

// " (did you mean 'a', 'b'?)" when declared keys are near `key`, then where
// the whole list is (it grows with every family; an error line stays short).
std::string UnknownKeyHint(std::span<const KeyTable> tables, const std::string& key,
                           const char* section) {
  const std::string near = NearKeyNames(tables, key);
  return (near.empty() ? std::string() : " (did you mean " + near + "?)") +
         "; 'capgap run --help' lists the " + section + " keys";
}

// Files `full` ("section.key") under its section; refuses unknown sections,
// keys and (from --set) schemes the file does not define.
Status Classify(const std::string& source, const std::string& full, bool from_override,
                GivenKeys& given, std::map<std::string, std::string>** section_out,
                std::string* key_out) {
  const std::string where = Printable(from_override ? "--set " + full : full);
  const auto dot = full.rfind('.');
  if (dot == std::string::npos) {
    return Status::Error(source + ": key '" + Printable(full) + "' is outside a section; " +
                         kSectionsHint);
  }
  const std::string section = full.substr(0, dot);
  const std::string key = full.substr(dot + 1);
  *key_out = key;
  if (section == "sweep") {
    if (Status s = RefuseRenamedKey(source, where, section, key); !s.ok()) return s;
    if (!FindKey(SweepKeyTables(), key)) {
      return Status::Error(source + ": unknown key '" + where + "'" +
                           UnknownKeyHint(SweepKeyTables(), key, "[sweep]"));
    }
    *section_out = &given.sweep;
    return Status::Ok();
  }
  if (section.rfind("scheme.", 0) == 0 && section.size() > 7) {
    const std::string name = section.substr(7);
    if (!std::all_of(name.begin(), name.end(), IsSchemeNameChar)) {
      return Status::Error(source + ": scheme name '" + Printable(name) +
                           "' may contain only letters, digits, '_' and '-'");
    }
    if (!FindKey(SchemeKeyTables(), key)) {
      if (Status s = RefuseRenamedKey(source, where, "sweep", key); !s.ok()) return s;
      return Status::Error(source + ": unknown key '" + where + "'" +
                           UnknownKeyHint(SchemeKeyTables(), key, "[scheme.NAME]"));
    }
    auto& names = given.scheme_names;
    if (std::find(names.begin(), names.end(), name) == names.end()) {
      if (from_override) {
        std::string list;
        for (const auto& n : names) list += (list.empty() ? "" : ", ") + n;
        return Status::Error("--set " + Printable(full) + ": no scheme '" + Printable(name) +
                             "' in " + source + "; schemes: " + list);
      }
      names.push_back(name);
    }
    *section_out = &given.schemes[name];
    return Status::Ok();
  }
  return Status::Error(source + ": unknown section [" + Printable(section) + "]; " + kSectionsHint);
}

}  // namespace

// `m` divides the value of `key` (frame_bits, LDPC length).
Status CheckMultipleOfBitsPerSymbol(const ResolvedKeys& keys, const char* key,
                                    const Modulation& modulation) {
  const std::uint64_t m = static_cast<std::uint64_t>(modulation.bits_per_symbol());
  if (keys.integer(key) % m == 0) return Status::Ok();
  return keys.Fail(key, "must be a multiple of " + std::to_string(m) + " (bits per symbol of " +
                            ToString(modulation) + ")");
}

namespace {

Result<SweepConfig> BuildSweep(const ResolvedKeys& k) {
  if (Status s = k.Validate(); !s.ok()) return s;
  SweepConfig c;
  auto points = ParseDbPoints(k.text("ebno_db"));
  if (!points.ok()) return k.Fail("ebno_db", points.status().message());
  c.ebno_db = points.value();
  c.stop_bit_errors = k.integer("stop_bit_errors");
  if (k.has("stop_frame_errors")) c.stop_frame_errors = k.integer("stop_frame_errors");
  c.stop_bits = k.integer("stop_bits");
  c.ber_floor = k.number("ber_floor");
  c.target_ber = k.number("target_ber");
  c.target_fer = k.number("target_fer");
  c.seed = k.integer("seed");
  c.threads = static_cast<int>(k.integer("threads"));
  c.checkpoint_seconds = k.number("checkpoint_seconds");
  return c;
}

Result<SchemeConfig> BuildScheme(const std::string& name, const ResolvedKeys& k,
                                 const SweepConfig& sweep, const std::string& source) {
  if (Status st = k.Validate(); !st.ok()) return st;
  SchemeConfig s;
  s.name = name;
  s.ebno_db = sweep.ebno_db;
  if (k.has("ebno_db")) {
    auto points = ParseDbPoints(k.text("ebno_db"));
    if (!points.ok()) return k.Fail("ebno_db", points.status().message());
    s.ebno_db = points.value();
  }
  if (k.has("stop_frame_errors")) s.stop_frame_errors = k.integer("stop_frame_errors");
  if (k.has("target_fer")) s.target_fer = k.number("target_fer");
  if (sweep.stop_bit_errors == 0 && sweep.stop_frame_errors == 0 && s.stop_frame_errors == 0) {
    return Status::Error(source + ": sweep.stop_bit_errors = '0' and no stop_frame_errors for scheme " +
                         name +
                         ": a point needs an error target (set sweep.stop_bit_errors >= 1 or "
                         "stop_frame_errors in [sweep] or [scheme." + name + "])");
  }
  auto modulation = ParseConstellation(k.text("modulation"));
  if (!modulation.ok()) return k.Fail("modulation", modulation.status().message());
  s.modulation = modulation.value();
  auto demapper = ParseDemapMethod(k.text("demapper"));
  if (!demapper.ok()) return k.Fail("demapper", demapper.status().message());
  s.demapper = demapper.value();
  auto kind = ParseSourceKind(k.text("source"));
  if (!kind.ok()) return k.Fail("source", kind.status().message());
  s.source = kind.value();
  s.code = k.text("code");
  if (k.has("frame_bits")) {
    if (Status st = CheckMultipleOfBitsPerSymbol(k, "frame_bits", s.modulation); !st.ok()) {
      return st;
    }
    s.frame_bits = static_cast<std::uint32_t>(k.integer("frame_bits"));
  }
  s.unit_frames = static_cast<std::uint32_t>(k.integer("unit_frames"));
  auto shape = ParsePulseShape(k.text("shaping"));
  if (!shape.ok()) return k.Fail("shaping", shape.status().message());
  s.shaping = shape.value();
  if (s.shaping != PulseShape::kNone) {
    s.rolloff = k.number("rolloff");
    s.span = static_cast<int>(k.integer("span"));
    s.samples_per_symbol = static_cast<int>(k.integer("samples_per_symbol"));
    s.timing_offset = k.number("timing_offset");
  }
  s.phase_offset_deg = k.number("phase_offset_deg");
  s.frequency_offset = k.number("frequency_offset");
  if (Status st = ParseChannelKeys(k, s); !st.ok()) return st;
  // The code family reads its own keys (sim/families/).
  if (const CodeFamily* family = FindCodeFamily(s.code); family && family->parse) {
    if (Status st = family->parse(k, source, s); !st.ok()) return st;
  }
  return s;
}

}  // namespace

Result<SourceKind> ParseSourceKind(std::string_view word) {
  for (std::size_t i = 0; i < std::size(kSourceKindWords); ++i) {
    if (word == kSourceKindWords[i]) return static_cast<SourceKind>(i);
  }
  std::string list;
  for (std::string_view w : kSourceKindWords) list += (list.empty() ? "" : ", ") + std::string(w);
  return Status::Error("valid: " + list);
}

std::string ToString(SourceKind kind) {
  const auto i = static_cast<std::size_t>(kind);
  return i < std::size(kSourceKindWords) ? std::string(kSourceKindWords[i]) : "random";
}

std::string ConfigKeysHelp() {
  return KeyHelp(SweepKeyTables(), "[sweep]") + "\n" + KeyHelp(SchemeKeyTables(), "[scheme.NAME]");
}

std::string LdpcSchemeConfig::ResolvePath(const std::string& path) const {
  const std::filesystem::path p(path);
  if (p.is_absolute() || config_dir.empty()) return path;
  return (std::filesystem::path(config_dir) / p).string();
}

std::uint32_t SchemeConfig::ResolvedUnitFrames() const {
  if (unit_frames > 0) return unit_frames;
  constexpr std::uint32_t kUnitBits = 65536;
  const CodeFamily* family = FindCodeFamily(code);
  std::uint32_t multiple = family ? family->unit_frames_multiple : 1;
  // Interleaved groups of frames never straddle a unit.
  if (interleaver.kind != InterleaverKind::kNone && interleaver.frames > 1) {
    multiple = std::lcm(multiple, interleaver.frames);
  }
  if (multiple > 1) {
    // A multiple of the family's batch (LDPC: 64 frames, so the decoder's
    // SIMD batches of 16 to 64 codewords across lanes are full on every
    // target); frame_bits is the code's k once the chain has built the code
    // (0 before: one batch).
    const std::uint32_t frames =
        frame_bits == 0 ? multiple : (kUnitBits + frame_bits - 1) / frame_bits;
    return (frames + multiple - 1) / multiple * multiple;
  }
  return std::max<std::uint32_t>(
      1, (kUnitBits + frame_bits - 1) / std::max<std::uint32_t>(frame_bits, 1));
}

Result<std::vector<double>> ParseDbList(const std::string& text, const std::string& what) {
  auto points = ParseDbPoints(text);
  if (!points.ok()) {
    return Status::Error(what + " = " + QuoteValue(Trim(text)) + ": " + points.status().message());
  }
  return points;
}

SweepConfig RunConfig::SweepFor(std::size_t i) const {
  SweepConfig s = sweep;
  const SchemeConfig& scheme = schemes.at(i);
  s.ebno_db = scheme.ebno_db;
  if (scheme.stop_frame_errors > 0) s.stop_frame_errors = scheme.stop_frame_errors;
  if (!std::isnan(scheme.target_fer)) s.target_fer = scheme.target_fer;
  return s;
}

std::string RunConfig::ResolvedText() const {
  std::string out;
  std::string section;
  for (const auto& [key, value] : resolved) {
    const auto dot = key.rfind('.');
    const std::string sec = key.substr(0, dot);
    if (sec != section) {
      if (!out.empty()) out += "\n";
      out += "[" + sec + "]\n";
      section = sec;
    }
    out += key.substr(dot + 1) + " = " + value + "\n";
  }
  return out;
}

Result<RunConfig> ParseRunConfig(const std::string& text, const std::string& source,
                                 const std::vector<std::string>& overrides) {
  // 1. Sections and keys in file order (syntax only; repeats are refused
  // after unknown keys and sections, step 2).
  auto sections = ParseIniLines(text, source);
  if (!sections.ok()) return sections.status();

  // 2. Classify keys, find schemes in order, reject unknown sections and keys.
  GivenKeys given;
  for (const IniSection& section : sections.value()) {
    for (const IniEntry& entry : section.entries) {
      std::map<std::string, std::string>* target = nullptr;
      std::string key;
      const std::string full = section.name + "." + entry.key;
      if (Status s = Classify(source, full, false, given, &target, &key); !s.ok()) return s;
      (*target)[key] = entry.value;
    }
  }
  if (Status s = CheckIniUnique(sections.value(), source); !s.ok()) return s;
  for (const std::string& ov : overrides) {
    const auto eq = ov.find('=');
    if (eq == std::string::npos || eq == 0) {
      return Status::Error("--set " + QuoteValue(ov) +
                           ": expected KEY=VALUE, e.g. sweep.stop_bit_errors=500");
    }
    std::map<std::string, std::string>* target = nullptr;
    std::string key;
    const std::string full = Trim(std::string_view(ov).substr(0, eq));
    if (Status s = Classify(source, full, true, given, &target, &key); !s.ok()) return s;
    (*target)[key] = Trim(std::string_view(ov).substr(eq + 1));
  }
  if (given.scheme_names.empty()) {
    return Status::Error(source + ": no [scheme.NAME] section; at least one scheme is required");
  }

  // 3. Applicability, defaults and required keys of every section.
  RunConfig config;
  config.source_name = source;
  auto sweep_keys = ResolveKeys(SweepKeyTables(), given.sweep, source, "sweep.", "the sweep");
  if (!sweep_keys.ok()) return sweep_keys.status();
  for (const auto& [key, value] : sweep_keys.value().entries()) {
    config.resolved.emplace_back("sweep." + key, value);
  }
  std::vector<ResolvedKeys> scheme_keys;
  for (const std::string& name : given.scheme_names) {
    const std::string prefix = "scheme." + name + ".";
    auto keys = ResolveKeys(SchemeKeyTables(), given.schemes[name], source, prefix, "this scheme");
    if (!keys.ok()) return keys.status();
    for (const auto& [key, value] : keys.value().entries()) {
      config.resolved.emplace_back(prefix + key, value);
    }
    scheme_keys.push_back(std::move(keys).value());
  }

  // 4. Every value against its rule, then the checks that span keys.
  auto sweep = BuildSweep(sweep_keys.value());
  if (!sweep.ok()) return sweep.status();
  config.sweep = sweep.value();
  for (std::size_t i = 0; i < scheme_keys.size(); ++i) {
    auto scheme = BuildScheme(given.scheme_names[i], scheme_keys[i], config.sweep, source);
    if (!scheme.ok()) return scheme.status();
    config.schemes.push_back(std::move(scheme).value());
  }
  return config;
}

Result<RunConfig> LoadRunConfig(const std::string& path,
                                const std::vector<std::string>& overrides) {
  auto text = ReadConfigFile(path);
  if (!text.ok()) return text.status();
  return ParseRunConfig(text.value(), path, overrides);
}

}  // namespace capgap
