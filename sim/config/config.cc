// Config loading: INI text -> (section.key, value) pairs via
// Boost.Program_options, overrides, then typed validation of every key with
// messages of the form "FILE: KEY = VALUE: RULE".
#include "sim/config/config.h"

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>

#include <boost/program_options/parsers.hpp>
#include <boost/program_options/options_description.hpp>

namespace capgap {
namespace {

namespace po = boost::program_options;

struct KeySpec {
  const char* key;
  const char* default_value;  // nullptr: required
  const char* rule;           // human description used in messages and --help
  const char* code = nullptr;  // only valid with this `code` value (nullptr: always)
  bool shaped = false;         // only valid with shaping = rc or rrc
  // Only valid when another key of the scheme has a value, "key=value"
  // (that key comes earlier in kSchemeKeys).
  const char* when = nullptr;
  const char* except_code = nullptr;  // not valid with this `code` value
};

// The keys of [sweep], with defaults. Order is the order of the resolved text.
constexpr KeySpec kSweepKeys[] = {
    {"ebno_db", nullptr, "START:STEP:STOP (inclusive) or a comma list, in dB"},
    {"target_errors", "100", "integer > 0: bit errors that end a point"},
    {"max_bits", "100000000", "integer > 0: information bits that end a point"},
    {"ber_floor", "1e-7", "number in [0, 0.5): the sweep stops after a point below it"},
    {"target_ber", "1e-5", "number in (0, 0.5): BER at which the summary is taken"},
    {"seed", "1", "integer >= 0"},
    {"threads", "0", "integer >= 0 (0: all cores)"},
    {"checkpoint_seconds", "60",
     "number in [0, 86400]: seconds between checkpoints while a point runs (0: only when a "
     "point finishes or the run stops)"},
};

constexpr KeySpec kSchemeKeys[] = {
    {"modulation", nullptr, "bpsk, qpsk, 8psk, 16qam, 64qam, 256qam, <M>psk, <M>qam"},
    // Empty default: absent unless given (then the scheme uses sweep.ebno_db).
    {"ebno_db", "", "START:STEP:STOP or a comma list in dB: this scheme's points instead of sweep.ebno_db"},
    {"frame_bits", "1920", "integer in [1, 16777216], a multiple of bits per symbol", nullptr, false,
     nullptr, "ldpc"},
    {"demapper", "maxlog", "hard, maxlog, logmap"},
    {"source", "random", "random, prbs9, prbs15, prbs23, prbs31"},
    {"unit_frames", "0", "integer >= 0: frames per work unit (0: automatic, ~64 kbit)"},
    {"shaping", "none", "none, rc, rrc"},
    {"rolloff", "0.35", "number in (0, 1]", nullptr, true},
    {"span", "16", "integer in [1, 256]: filter length in symbols", nullptr, true},
    {"samples_per_symbol", "8", "integer in [2, 64]", nullptr, true},
    {"timing_offset", "0", "number in [-0.5, 0.5]: receiver sampling offset in symbols", nullptr, true},
    {"phase_offset_deg", "0", "finite number: carrier phase offset in degrees"},
    {"frequency_offset", "0", "number in [-0.5, 0.5]: carrier frequency offset in cycles per symbol"},
    {"code", "none", "none, conv, ldpc"},
    {"generators", "133,171", "octal generator list, one per coded output, e.g. 133,171", "conv"},
    {"constraint_length", "7", "integer in [3, 9]", "conv"},
    {"puncture", "none", "none, or pattern rows separated by ',' (one row of 0/1 per generator), e.g. 110,101", "conv"},
    {"termination", "tail", "tail, tailbiting", "conv"},
    {"decoder", "viterbi_soft", "viterbi_soft, viterbi_hard, bcjr", "conv"},
    {"traceback", "0", "integer >= 0: Viterbi traceback depth in trellis steps (0: automatic)", "conv"},
    {"construction", "peg", "peg, qc, file", "ldpc"},
    {"length", "2016", "integer in [8, 1048576]: code length n", "ldpc", false, "construction=peg"},
    {"rate", "0.5", "number in (0, 1): design rate, m = round(n (1 - rate)) checks", "ldpc", false,
     "construction=peg"},
    {"degrees", "3", "variable-node degrees: D (all nodes) or D:FRACTION,... of nodes, e.g. 2:0.5,3:0.3,8:0.2",
     "ldpc", false, "construction=peg"},
    {"construction_seed", "1", "integer >= 0: seed of the PEG construction", "ldpc", false,
     "construction=peg"},
    {"base_matrix", nullptr, "path of a base-matrix file (relative to the config file), e.g. codes/qc_r1-2_24x12.txt",
     "ldpc", false, "construction=qc"},
    {"lifting", "0", "integer in [0, 65536]: lifting size Z (0: the base matrix file's own)", "ldpc",
     false, "construction=qc"},
    {"matrix_file", nullptr, "path of a parity-check matrix file (relative to the config file)", "ldpc",
     false, "construction=file"},
    {"decoder", "min_sum_normalized", "sum_product, min_sum_normalized, min_sum_offset", "ldpc"},
    {"schedule", "layered", "flooding, layered", "ldpc"},
    {"max_iterations", "50", "integer in [1, 1000]", "ldpc"},
    {"arithmetic", "auto", "auto, int8, int16, float: decoder arithmetic (auto: fixed point for min-sum, float for sum-product)",
     "ldpc"},
    {"normalization", "0.75", "number in (0, 1]: normalised min-sum factor", "ldpc", false,
     "decoder=min_sum_normalized"},
    {"offset", "0.5", "number in [0, 10]: offset min-sum offset in LLR units", "ldpc", false,
     "decoder=min_sum_offset"},
};

// True if some entry for `key` applies to schemes with this code value.
template <std::size_t N>
bool KeyAppliesToCode(const KeySpec (&keys)[N], const char* key, const std::string& code) {
  for (const auto& k : keys) {
    if (std::string(k.key) != key) continue;
    if ((!k.code || code == k.code) && !(k.except_code && code == k.except_code)) return true;
  }
  return false;
}

std::string Trim(const std::string& s) {
  const auto b = s.find_first_not_of(" \t\r\n");
  if (b == std::string::npos) return "";
  const auto e = s.find_last_not_of(" \t\r\n");
  return s.substr(b, e - b + 1);
}

template <std::size_t N>
std::string KeyList(const KeySpec (&keys)[N]) {
  std::string out;
  std::set<std::string> seen;  // a key with entries for several codes once
  for (const auto& k : keys) {
    if (!seen.insert(k.key).second) continue;
    if (!out.empty()) out += ", ";
    out += k.key;
  }
  return out;
}

template <std::size_t N>
const KeySpec* FindKey(const KeySpec (&keys)[N], const std::string& key) {
  for (const auto& k : keys) {
    if (key == k.key) return &k;
  }
  return nullptr;
}

class Validator {
 public:
  Validator(const std::string& source, const std::map<std::string, std::string>& values)
      : source_(source), values_(values) {}

  Status Fail(const std::string& key, const std::string& rule) const {
    auto it = values_.find(key);
    const std::string value = it == values_.end() ? "" : it->second;
    return Status::Error(source_ + ": " + key + " = '" + value + "': " + rule);
  }

  const std::string& Get(const std::string& key) const { return values_.at(key); }

  Result<double> Number(const std::string& key) const {
    const std::string& text = Get(key);
    errno = 0;
    char* end = nullptr;
    const double v = std::strtod(text.c_str(), &end);
    if (text.empty() || end != text.c_str() + text.size() || errno == ERANGE ||
        !std::isfinite(v)) {
      return Fail(key, "not a number");
    }
    return v;
  }

  Result<std::uint64_t> Integer(const std::string& key, std::uint64_t min_value,
                                std::uint64_t max_value, const char* rule) const {
    const std::string& text = Get(key);
    if (text.empty() || text[0] == '-') {
      if (!text.empty()) return Fail(key, std::string("must be ") + rule);
    }
    Result<double> v = Number(key);
    if (!v.ok()) return Fail(key, std::string("not an integer; must be ") + rule);
    const double d = v.value();
    if (d < 0 || d != std::floor(d) || d > 9007199254740992.0) {
      return Fail(key, std::string("must be ") + rule);
    }
    const auto u = static_cast<std::uint64_t>(d);
    if (u < min_value || u > max_value) return Fail(key, std::string("must be ") + rule);
    return u;
  }

 private:
  const std::string& source_;
  const std::map<std::string, std::string>& values_;
};

Result<SourceKind> ParseSource(const std::string& word) {
  if (word == "random") return SourceKind::kRandom;
  if (word == "prbs9") return SourceKind::kPrbs9;
  if (word == "prbs15") return SourceKind::kPrbs15;
  if (word == "prbs23") return SourceKind::kPrbs23;
  if (word == "prbs31") return SourceKind::kPrbs31;
  return Status::Error("valid: random, prbs9, prbs15, prbs23, prbs31");
}

}  // namespace

std::string ToString(SourceKind kind) {
  switch (kind) {
    case SourceKind::kRandom: return "random";
    case SourceKind::kPrbs9: return "prbs9";
    case SourceKind::kPrbs15: return "prbs15";
    case SourceKind::kPrbs23: return "prbs23";
    case SourceKind::kPrbs31: return "prbs31";
  }
  return "random";
}

std::string LdpcSchemeConfig::ResolvePath(const std::string& path) const {
  const std::filesystem::path p(path);
  if (p.is_absolute() || config_dir.empty()) return path;
  return (std::filesystem::path(config_dir) / p).string();
}

std::uint32_t SchemeConfig::ResolvedUnitFrames() const {
  if (unit_frames > 0) return unit_frames;
  constexpr std::uint32_t kUnitBits = 65536;
  if (code == "ldpc") {
    // A multiple of 64 frames, so the decoder's SIMD batches (16 to 64
    // codewords across lanes) are full on every target; frame_bits is the
    // code's k once the chain has built the code (0 before: one batch).
    const std::uint32_t frames =
        frame_bits == 0 ? 64 : (kUnitBits + frame_bits - 1) / frame_bits;
    return (frames + 63) / 64 * 64;
  }
  return std::max<std::uint32_t>(1, (kUnitBits + frame_bits - 1) / std::max<std::uint32_t>(frame_bits, 1));
}

Result<std::vector<double>> ParseDbList(const std::string& text_in, const std::string& what) {
  const std::string text = Trim(text_in);
  auto fail = [&](const std::string& rule) {
    return Status::Error(what + " = '" + text + "': " + rule);
  };
  auto parse_one = [](const std::string& s, double& out) {
    const std::string t = Trim(s);
    char* end = nullptr;
    errno = 0;
    out = std::strtod(t.c_str(), &end);
    return !t.empty() && end == t.c_str() + t.size() && errno != ERANGE && std::isfinite(out);
  };
  std::vector<double> out;
  if (text.find(':') != std::string::npos) {
    std::vector<std::string> parts;
    std::stringstream ss(text);
    std::string part;
    while (std::getline(ss, part, ':')) parts.push_back(part);
    double start = 0, step = 0, stop = 0;
    if (parts.size() != 3 || !parse_one(parts[0], start) || !parse_one(parts[1], step) ||
        !parse_one(parts[2], stop)) {
      return fail("expected START:STEP:STOP (numbers, in dB) or a comma list");
    }
    if (!(step > 0)) return fail("STEP must be > 0");
    if (stop < start) return fail("STOP must be >= START");
    const double count = std::floor((stop - start) / step + 1e-9) + 1;
    if (count > 10000) return fail("more than 10000 points");
    for (int i = 0; i < static_cast<int>(count); ++i) {
      // Round to 1e-9 dB so that 0:0.1:1 gives 0.3, not 0.30000000000000004.
      out.push_back(std::round((start + i * step) * 1e9) / 1e9);
    }
  } else {
    std::stringstream ss(text);
    std::string part;
    while (std::getline(ss, part, ',')) {
      double v = 0;
      if (!parse_one(part, v)) return fail("'" + Trim(part) + "' is not a number; expected START:STEP:STOP or a comma list");
      out.push_back(v);
    }
    if (out.empty()) return fail("empty list");
  }
  for (std::size_t i = 1; i < out.size(); ++i) {
    if (!(out[i] > out[i - 1])) return fail("points must increase");
  }
  return out;
}

SweepConfig RunConfig::SweepFor(std::size_t i) const {
  SweepConfig s = sweep;
  s.ebno_db = schemes.at(i).ebno_db;
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
  // 1. Raw pairs, in file order.
  std::vector<std::pair<std::string, std::string>> raw;
  try {
    std::istringstream in(text);
    po::options_description none;
    po::parsed_options parsed = po::parse_config_file(in, none, /*allow_unregistered=*/true);
    for (const auto& opt : parsed.options) {
      raw.emplace_back(opt.string_key, opt.value.empty() ? "" : Trim(opt.value[0]));
    }
  } catch (const std::exception& e) {
    return Status::Error(source + ": " + e.what());
  }

  // 2. Classify keys, find schemes in order, reject unknown sections and keys.
  std::map<std::string, std::string> values;
  std::vector<std::string> scheme_names;
  auto classify = [&](const std::string& full, bool from_override) -> Status {
    const std::string where = from_override ? "--set " + full : full;
    const auto dot = full.rfind('.');
    if (dot == std::string::npos) {
      return Status::Error(source + ": key '" + full +
                           "' is outside a section; sections: [sweep], [scheme.NAME]");
    }
    const std::string section = full.substr(0, dot);
    const std::string key = full.substr(dot + 1);
    if (section == "sweep") {
      if (!FindKey(kSweepKeys, key)) {
        return Status::Error(source + ": unknown key '" + where + "'; [sweep] keys: " +
                             KeyList(kSweepKeys));
      }
      return Status::Ok();
    }
    if (section.rfind("scheme.", 0) == 0 && section.size() > 7) {
      const std::string name = section.substr(7);
      for (char ch : name) {
        if (!(std::isalnum(static_cast<unsigned char>(ch)) || ch == '_' || ch == '-')) {
          return Status::Error(source + ": scheme name '" + name +
                               "' may contain only letters, digits, '_' and '-'");
        }
      }
      if (!FindKey(kSchemeKeys, key)) {
        return Status::Error(source + ": unknown key '" + where + "'; [scheme.NAME] keys: " +
                             KeyList(kSchemeKeys));
      }
      if (std::find(scheme_names.begin(), scheme_names.end(), name) == scheme_names.end()) {
        if (from_override) {
          std::string list;
          for (const auto& n : scheme_names) list += (list.empty() ? "" : ", ") + n;
          return Status::Error("--set " + full + ": no scheme '" + name + "' in " + source +
                               "; schemes: " + list);
        }
        scheme_names.push_back(name);
      }
      return Status::Ok();
    }
    return Status::Error(source + ": unknown section [" + section +
                         "]; sections: [sweep], [scheme.NAME]");
  };
  for (const auto& [key, value] : raw) {
    if (Status s = classify(key, false); !s.ok()) return s;
    if (values.count(key)) return Status::Error(source + ": key '" + key + "' given twice");
    values[key] = value;
  }
  for (const std::string& ov : overrides) {
    const auto eq = ov.find('=');
    if (eq == std::string::npos || eq == 0) {
      return Status::Error("--set '" + ov + "': expected KEY=VALUE, e.g. sweep.target_errors=500");
    }
    const std::string key = Trim(ov.substr(0, eq));
    if (Status s = classify(key, true); !s.ok()) return s;
    values[key] = Trim(ov.substr(eq + 1));
  }
  if (scheme_names.empty()) {
    return Status::Error(source + ": no [scheme.NAME] section; at least one scheme is required");
  }

  // 3. Defaults and required keys.
  RunConfig config;
  config.source_name = source;
  for (const auto& k : kSweepKeys) {
    const std::string full = std::string("sweep.") + k.key;
    if (!values.count(full)) {
      if (!k.default_value) {
        return Status::Error(source + ": missing required key '" + full + "' (" + k.rule + ")");
      }
      values[full] = k.default_value;
    }
    config.resolved.emplace_back(full, values[full]);
  }
  for (const auto& name : scheme_names) {
    const std::string code_key = "scheme." + name + ".code";
    const std::string code = values.count(code_key) ? values[code_key] : "none";
    const std::string shaping_key = "scheme." + name + ".shaping";
    const std::string shaping = values.count(shaping_key) ? values[shaping_key] : "none";
    for (const auto& k : kSchemeKeys) {
      const std::string full = "scheme." + name + "." + k.key;
      if (k.shaped && shaping == "none") {
        if (values.count(full)) {
          return Status::Error(source + ": " + full +
                               " applies only with shaping = rc or rrc (this scheme has shaping = "
                               "none)");
        }
        continue;
      }
      if ((k.code && code != k.code) || (k.except_code && code == k.except_code)) {
        // A key with an entry for another code (decoder) is checked there.
        if (values.count(full) && !KeyAppliesToCode(kSchemeKeys, k.key, code)) {
          if (k.except_code) {
            return Status::Error(source + ": " + full + " does not apply with code = " + code +
                                 " (a frame is one codeword; the code sets its information bits)");
          }
          return Status::Error(source + ": " + full + " applies only with code = " + k.code +
                               " (this scheme has code = " + code + ")");
        }
        continue;
      }
      if (k.when) {
        const std::string cond = k.when;
        const auto eq = cond.find('=');
        const std::string other = "scheme." + name + "." + cond.substr(0, eq);
        const std::string want = cond.substr(eq + 1);
        const std::string have = values.count(other) ? values[other] : "";
        if (have != want) {
          if (values.count(full)) {
            return Status::Error(source + ": " + full + " applies only with " + cond.substr(0, eq) +
                                 " = " + want + " (this scheme has " + cond.substr(0, eq) +
                                 " = " + have + ")");
          }
          continue;
        }
      }
      if (!values.count(full)) {
        if (!k.default_value) {
          return Status::Error(source + ": missing required key '" + full + "' (" + k.rule + ")");
        }
        if (!*k.default_value) continue;  // optional, absent
        values[full] = k.default_value;
      }
      config.resolved.emplace_back(full, values[full]);
    }
  }

  // 4. Typed validation.
  Validator v(source, values);
  {
    auto list = ParseDbList(values["sweep.ebno_db"], source + ": sweep.ebno_db");
    if (!list.ok()) return list.status();
    config.sweep.ebno_db = list.value();
    for (double x : config.sweep.ebno_db) {
      if (x < -20 || x > 60) return v.Fail("sweep.ebno_db", "points must lie in [-20, 60] dB");
    }
    auto te = v.Integer("sweep.target_errors", 1, UINT64_MAX, "an integer > 0");
    if (!te.ok()) return te.status();
    config.sweep.target_errors = te.value();
    auto mb = v.Integer("sweep.max_bits", 1, UINT64_MAX, "an integer > 0");
    if (!mb.ok()) return mb.status();
    config.sweep.max_bits = mb.value();
    auto floor = v.Number("sweep.ber_floor");
    if (!floor.ok()) return floor.status();
    if (!(floor.value() >= 0 && floor.value() < 0.5)) return v.Fail("sweep.ber_floor", "must be in [0, 0.5)");
    config.sweep.ber_floor = floor.value();
    auto tb = v.Number("sweep.target_ber");
    if (!tb.ok()) return tb.status();
    if (!(tb.value() > 0 && tb.value() < 0.5)) return v.Fail("sweep.target_ber", "must be in (0, 0.5)");
    config.sweep.target_ber = tb.value();
    auto seed = v.Integer("sweep.seed", 0, UINT64_MAX, "an integer >= 0");
    if (!seed.ok()) return seed.status();
    config.sweep.seed = seed.value();
    auto th = v.Integer("sweep.threads", 0, 4096, "an integer in [0, 4096] (0: all cores)");
    if (!th.ok()) return th.status();
    config.sweep.threads = static_cast<int>(th.value());
    auto cs = v.Number("sweep.checkpoint_seconds");
    if (!cs.ok()) return cs.status();
    if (!(cs.value() >= 0 && cs.value() <= 86400)) {
      return v.Fail("sweep.checkpoint_seconds", "must be in [0, 86400] seconds");
    }
    config.sweep.checkpoint_seconds = cs.value();
  }
  for (const auto& name : scheme_names) {
    const std::string p = "scheme." + name + ".";
    SchemeConfig s;
    s.name = name;
    s.ebno_db = config.sweep.ebno_db;
    if (values.count(p + "ebno_db")) {
      auto list = ParseDbList(values[p + "ebno_db"], source + ": " + p + "ebno_db");
      if (!list.ok()) return list.status();
      for (double x : list.value()) {
        if (x < -20 || x > 60) return v.Fail(p + "ebno_db", "points must lie in [-20, 60] dB");
      }
      s.ebno_db = list.value();
    }
    auto mod = ParseModulation(values[p + "modulation"]);
    if (!mod.ok()) return v.Fail(p + "modulation", mod.status().message());
    s.modulation = mod.value();
    auto dm = ParseDemapMethod(values[p + "demapper"]);
    if (!dm.ok()) return v.Fail(p + "demapper", dm.status().message());
    s.demapper = dm.value();
    auto src = ParseSource(values[p + "source"]);
    if (!src.ok()) return v.Fail(p + "source", src.status().message());
    s.source = src.value();
    const int m = s.modulation.bits_per_symbol();
    s.code = values[p + "code"];
    if (s.code != "ldpc") {
      auto fb = v.Integer(p + "frame_bits", 1, 16777216, "an integer in [1, 16777216]");
      if (!fb.ok()) return fb.status();
      s.frame_bits = static_cast<std::uint32_t>(fb.value());
      if (s.frame_bits % static_cast<std::uint32_t>(m) != 0) {
        return v.Fail(p + "frame_bits", "must be a multiple of " + std::to_string(m) +
                                            " (bits per symbol of " + ToString(s.modulation) + ")");
      }
    }
    auto uf = v.Integer(p + "unit_frames", 0, 1u << 20, "an integer in [0, 1048576] (0: automatic)");
    if (!uf.ok()) return uf.status();
    s.unit_frames = static_cast<std::uint32_t>(uf.value());
    auto shape = ParsePulseShape(values[p + "shaping"]);
    if (!shape.ok()) return v.Fail(p + "shaping", "valid: none, rc, rrc");
    s.shaping = shape.value();
    if (s.shaping != PulseShape::kNone) {
      auto a = v.Number(p + "rolloff");
      if (!a.ok()) return a.status();
      if (!(a.value() > 0 && a.value() <= 1)) return v.Fail(p + "rolloff", "must be in (0, 1]");
      s.rolloff = a.value();
      auto span = v.Integer(p + "span", 1, 256, "an integer in [1, 256]");
      if (!span.ok()) return span.status();
      s.span = static_cast<int>(span.value());
      auto sps = v.Integer(p + "samples_per_symbol", 2, 64, "an integer in [2, 64]");
      if (!sps.ok()) return sps.status();
      s.samples_per_symbol = static_cast<int>(sps.value());
      auto to = v.Number(p + "timing_offset");
      if (!to.ok()) return to.status();
      if (!(to.value() >= -0.5 && to.value() <= 0.5)) {
        return v.Fail(p + "timing_offset", "must be in [-0.5, 0.5] symbols");
      }
      s.timing_offset = to.value();
    }
    auto ph = v.Number(p + "phase_offset_deg");
    if (!ph.ok()) return ph.status();
    s.phase_offset_deg = ph.value();
    auto fo = v.Number(p + "frequency_offset");
    if (!fo.ok()) return fo.status();
    if (!(fo.value() >= -0.5 && fo.value() <= 0.5)) {
      return v.Fail(p + "frequency_offset", "must be in [-0.5, 0.5] cycles per symbol");
    }
    s.frequency_offset = fo.value();
    if (s.code == "conv") {
      ConvSchemeConfig& c = s.conv;
      c.generators = values[p + "generators"];
      auto k = v.Integer(p + "constraint_length", 3, 9, "an integer in [3, 9]");
      if (!k.ok()) return k.status();
      c.constraint_length = static_cast<int>(k.value());
      c.puncture = values[p + "puncture"];
      c.termination = values[p + "termination"];
      if (c.termination != "tail" && c.termination != "tailbiting") {
        return v.Fail(p + "termination", "valid: tail, tailbiting");
      }
      c.decoder = values[p + "decoder"];
      if (c.decoder != "viterbi_soft" && c.decoder != "viterbi_hard" && c.decoder != "bcjr") {
        return v.Fail(p + "decoder", "valid: viterbi_soft, viterbi_hard, bcjr");
      }
      auto tb = v.Integer(p + "traceback", 0, 100000, "an integer in [0, 100000] (0: automatic)");
      if (!tb.ok()) return tb.status();
      c.traceback = static_cast<int>(tb.value());
    } else if (s.code == "ldpc") {
      LdpcSchemeConfig& c = s.ldpc;
      c.config_dir = std::filesystem::path(source).parent_path().string();
      c.construction = values[p + "construction"];
      if (c.construction == "peg") {
        auto n = v.Integer(p + "length", 8, 1u << 20, "an integer in [8, 1048576]");
        if (!n.ok()) return n.status();
        c.length = static_cast<int>(n.value());
        if (c.length % m != 0) {
          return v.Fail(p + "length", "must be a multiple of " + std::to_string(m) +
                                          " (bits per symbol of " + ToString(s.modulation) + ")");
        }
        auto r = v.Number(p + "rate");
        if (!r.ok()) return r.status();
        if (!(r.value() > 0 && r.value() < 1)) return v.Fail(p + "rate", "must be in (0, 1)");
        c.rate = r.value();
        c.degrees = values[p + "degrees"];
        auto cs = v.Integer(p + "construction_seed", 0, UINT64_MAX, "an integer >= 0");
        if (!cs.ok()) return cs.status();
        c.construction_seed = cs.value();
      } else if (c.construction == "qc") {
        c.base_matrix = values[p + "base_matrix"];
        if (c.base_matrix.empty()) return v.Fail(p + "base_matrix", "must name a base-matrix file");
        auto z = v.Integer(p + "lifting", 0, 65536, "an integer in [0, 65536] (0: the file's own)");
        if (!z.ok()) return z.status();
        c.lifting = static_cast<int>(z.value());
      } else if (c.construction == "file") {
        c.matrix_file = values[p + "matrix_file"];
        if (c.matrix_file.empty()) return v.Fail(p + "matrix_file", "must name a matrix file");
      } else {
        return v.Fail(p + "construction", "valid: peg, qc, file");
      }
      c.decoder = values[p + "decoder"];
      if (c.decoder != "sum_product" && c.decoder != "min_sum_normalized" &&
          c.decoder != "min_sum_offset") {
        return v.Fail(p + "decoder", "valid with code = ldpc: sum_product, min_sum_normalized, min_sum_offset");
      }
      c.schedule = values[p + "schedule"];
      if (c.schedule != "flooding" && c.schedule != "layered") {
        return v.Fail(p + "schedule", "valid: flooding, layered");
      }
      auto it = v.Integer(p + "max_iterations", 1, 1000, "an integer in [1, 1000]");
      if (!it.ok()) return it.status();
      c.max_iterations = static_cast<int>(it.value());
      c.arithmetic = values[p + "arithmetic"];
      if (c.arithmetic != "auto" && c.arithmetic != "int8" && c.arithmetic != "int16" &&
          c.arithmetic != "float") {
        return v.Fail(p + "arithmetic", "valid: auto, int8, int16, float");
      }
      if (c.decoder == "sum_product" && (c.arithmetic == "int8" || c.arithmetic == "int16")) {
        return v.Fail(p + "arithmetic", "sum_product runs in float only (valid with it: auto, float)");
      }
      if (c.decoder == "min_sum_normalized") {
        auto a = v.Number(p + "normalization");
        if (!a.ok()) return a.status();
        if (!(a.value() > 0 && a.value() <= 1)) return v.Fail(p + "normalization", "must be in (0, 1]");
        c.normalization = a.value();
      }
      if (c.decoder == "min_sum_offset") {
        auto b = v.Number(p + "offset");
        if (!b.ok()) return b.status();
        if (!(b.value() >= 0 && b.value() <= 10)) return v.Fail(p + "offset", "must be in [0, 10]");
        c.offset = b.value();
      }
    } else if (s.code != "none") {
      return v.Fail(p + "code", "valid: none, conv, ldpc");
    }
    config.schemes.push_back(s);
  }
  return config;
}

Result<RunConfig> LoadRunConfig(const std::string& path, const std::vector<std::string>& overrides) {
  std::ifstream in(path, std::ios::binary);
  if (!in) return Status::Error(path + ": cannot open config file");
  std::stringstream ss;
  ss << in.rdbuf();
  if (in.bad()) return Status::Error(path + ": read error");
  return ParseRunConfig(ss.str(), path, overrides);
}

}  // namespace capgap
