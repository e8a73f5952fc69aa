// Checkpoint text format: writer, strict reader (every line checked, FNV-1a
// checksum over the body), and the resume compatibility rules.
#include "sim/io/checkpoint.h"

#include <algorithm>
#include <cerrno>
#include <cinttypes>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <map>
#include <optional>
#include <set>
#include <span>
#include <sstream>

#include "blocks/core/file_read.h"
#include "blocks/core/hash.h"
#include "sim/config/config_keys.h"
#include "sim/config/key_table.h"
#include "sim/config/text.h"
#include "sim/io/atomic_file.h"

namespace capgap {
namespace {

std::string Double17(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.17g", v);
  return buf;
}

// The shared decimal parsers (sim/config/text.h) as out-parameter tests.
bool ParseU64(const std::string& s, std::uint64_t* out) {
  auto v = ParseUint64(s);
  if (v.ok()) *out = v.value();
  return v.ok();
}

bool ParseDouble(const std::string& s, double* out) {
  auto v = capgap::ParseDouble(s);
  if (v.ok()) *out = v.value();
  return v.ok();
}

std::vector<std::string> Words(const std::string& line) {
  std::vector<std::string> out;
  std::istringstream in(line);
  std::string w;
  while (in >> w) out.push_back(w);
  return out;
}

// Sequential reader over the body with line numbers for messages.
class LineReader {
 public:
  LineReader(const std::string& bytes, std::size_t end, const std::string& source)
      : bytes_(bytes), end_(end), source_(source) {}
  bool Next(std::string* line) {
    if (pos_ >= end_) return false;
    const std::size_t nl = bytes_.find('\n', pos_);
    if (nl == std::string::npos || nl >= end_) return false;
    *line = bytes_.substr(pos_, nl - pos_);
    pos_ = nl + 1;
    ++line_no_;
    return true;
  }
  bool Take(std::size_t n, std::string* out) {
    if (end_ - pos_ < n) return false;
    *out = bytes_.substr(pos_, n);
    for (char c : *out) line_no_ += c == '\n';
    pos_ += n;
    return true;
  }
  Status Error(const std::string& what) const {
    return Status::Error(source_ + ": line " + std::to_string(line_no_) + ": " + what);
  }
  bool at_end() const { return pos_ == end_; }

 private:
  const std::string& bytes_;
  std::size_t end_;
  const std::string& source_;
  std::size_t pos_ = 0;
  int line_no_ = 0;
};

// "KEY VALUE" line with a fixed key; VALUE is the rest of the line.
bool KeyLine(LineReader& r, const char* key, std::string* value) {
  std::string line;
  if (!r.Next(&line)) return false;
  const std::string k = std::string(key) + " ";
  if (line.rfind(k, 0) != 0) return false;
  *value = line.substr(k.size());
  return true;
}

std::map<std::string, std::string> SectionEntries(const RunConfig& cfg, const std::string& prefix) {
  std::map<std::string, std::string> out;
  for (const auto& [key, value] : cfg.resolved) {
    if (key.rfind(prefix, 0) == 0) out[key] = value;
  }
  return out;
}

std::string Quoted(const std::string& v) { return "'" + v + "'"; }

std::string Is(const char* a, std::uint64_t x, const char* rel, const char* b, std::uint64_t y) {
  return std::string(a) + " = " + std::to_string(x) + " " + rel + " " + b + " = " +
         std::to_string(y);
}

// "" when a point record's numbers can be the sum of real units, else the
// broken rule (a checksum proves the file undamaged, not its numbers sound).
std::string CountsRule(const PointRecord& p) {
  const UnitCounts& c = p.counts;
  if (!std::isfinite(p.ebno_db)) return "ebno_db is not finite";
  if (!std::isfinite(p.seconds) || p.seconds < 0) return "seconds must be finite and >= 0";
  if (c.bit_errors > c.bits) return Is("bit_errors", c.bit_errors, ">", "bits", c.bits);
  if (c.frame_errors > c.frames) {
    return Is("frame_errors", c.frame_errors, ">", "frames", c.frames);
  }
  if (c.undetected_frame_errors > c.frame_errors) {
    return Is("undetected_frame_errors", c.undetected_frame_errors, ">", "frame_errors",
              c.frame_errors);
  }
  if ((c.frames == 0) != (c.bits == 0)) {
    return Is("frames", c.frames, "and", "bits", c.bits) + ": both zero or both positive";
  }
  if (p.units == 0 && c.frames != 0) {
    return Is("units", 0, "but", "frames", c.frames) + ": an empty prefix counts nothing";
  }
  if (p.units != 0 && c.frames < p.units) {
    return Is("frames", c.frames, "<", "units", p.units) + ": every unit has a frame";
  }
  if (c.frame_errors == 0 && c.bit_errors != 0) {
    return Is("bit_errors", c.bit_errors, "but", "frame_errors", 0);
  }
  if (c.frame_errors > c.bit_errors) {
    return Is("frame_errors", c.frame_errors, ">", "bit_errors", c.bit_errors) +
           ": an erroneous frame has a bit error";
  }
  // Iterations: the largest of one frame never exceeds the sum, and the sum
  // never exceeds frames times the largest.
  const std::uint64_t max_it = c.max_decoder_iterations;
  if (max_it > c.decoder_iterations) {
    return Is("max_decoder_iterations", max_it, ">", "decoder_iterations", c.decoder_iterations);
  }
  if (max_it == 0 ? c.decoder_iterations != 0 : c.decoder_iterations / max_it > c.frames) {
    return Is("decoder_iterations", c.decoder_iterations, ">", "frames x max_decoder_iterations",
              c.frames) +
           " x " + std::to_string(max_it);
  }
  return "";
}

}  // namespace

void PackCounts(const UnitCounts& c, std::uint64_t* words) {
  std::size_t i = 0;
  ForEachCountField(c, [&](const char*, const auto& field) {
    words[i++] = static_cast<std::uint64_t>(field);
  });
}

UnitCounts UnpackCounts(const std::uint64_t* words) {
  UnitCounts c;
  std::size_t i = 0;
  ForEachCountField(c, [&](const char*, auto& field) {
    field = static_cast<std::remove_reference_t<decltype(field)>>(words[i++]);
  });
  return c;
}

SchemeRecord* Checkpoint::Find(const std::string& name) {
  for (auto& s : schemes) {
    if (s.name == name) return &s;
  }
  return nullptr;
}

const SchemeRecord* Checkpoint::Find(const std::string& name) const {
  for (const auto& s : schemes) {
    if (s.name == name) return &s;
  }
  return nullptr;
}

std::size_t Checkpoint::FinishedPoints() const {
  std::size_t n = 0;
  for (const auto& s : schemes) {
    for (const auto& p : s.points) n += p.finished;
  }
  return n;
}

std::size_t Checkpoint::RecordedPoints() const {
  std::size_t n = 0;
  for (const auto& s : schemes) n += s.points.size();
  return n;
}

std::string CheckpointPath(const std::string& output_path) { return output_path + ".ckpt"; }

std::string UpgradeV1ConfigText(const std::string& text) {
  std::string out;
  std::string section;
  std::size_t pos = 0;
  while (pos < text.size()) {
    std::size_t end = text.find('\n', pos);
    const bool has_nl = end != std::string::npos;
    if (!has_nl) end = text.size();
    std::string line = text.substr(pos, end - pos);
    pos = has_nl ? end + 1 : end;
    const std::string trimmed = Trim(line);
    if (!trimmed.empty() && trimmed.front() == '[') section = trimmed;
    const std::size_t eq = line.find('=');
    if (eq != std::string::npos) {
      const std::string key = Trim(std::string_view(line).substr(0, eq));
      const std::string value = Trim(std::string_view(line).substr(eq + 1));
      if (section == "[sweep]" && key == "target_errors") {
        line = "stop_bit_errors = " + value;
      } else if (section == "[sweep]" && key == "max_bits") {
        line = "stop_bits = " + value;
      } else if (key == "ebno_db" && std::count(value.begin(), value.end(), ':') == 2) {
        const std::size_t a = value.find(':');
        const std::size_t b = value.find(':', a + 1);
        line = "ebno_db = " + Trim(std::string_view(value).substr(0, a)) + " to " +
               Trim(std::string_view(value).substr(b + 1)) + " by " +
               Trim(std::string_view(value).substr(a + 1, b - a - 1));
      }
    }
    out += line;
    if (has_nl) out += '\n';
  }
  return out;
}

std::string SerializeCheckpoint(const Checkpoint& c) {
  std::string out;
  out += std::string(kCheckpointFormat) + " " + std::to_string(kCheckpointVersion) + "\n";
  out += std::string("state ") + (c.complete ? "complete" : "running") + "\n";
  out += "seed " + std::to_string(c.seed) + "\n";
  out += "kernel_target " + (c.kernel_target.empty() ? std::string("unknown") : c.kernel_target) + "\n";
  out += "updated_utc " + (c.updated_utc.empty() ? std::string("unknown") : c.updated_utc) + "\n";
  out += "config_bytes " + std::to_string(c.config_text.size()) + "\n";
  out += c.config_text;
  if (!c.config_text.empty() && c.config_text.back() != '\n') out += "\n";
  out += "schemes " + std::to_string(c.schemes.size()) + "\n";
  for (const SchemeRecord& s : c.schemes) {
    out += "scheme " + s.name + " " + std::to_string(s.points.size()) + "\n";
    for (std::size_t i = 0; i < s.points.size(); ++i) {
      const PointRecord& p = s.points[i];
      out += "point " + std::to_string(i) + " ebno_db=" + Double17(p.ebno_db) +
             " units=" + std::to_string(p.units) + " finished=" + (p.finished ? "1" : "0") +
             " stop=" + ToString(p.stop_reason) + " seconds=" + Double17(p.seconds);
      ForEachCountField(p.counts, [&](const char* name, const auto& field) {
        out += std::string(" ") + name + "=" + std::to_string(field);
      });
      out += "\n";
    }
  }
  // FNV-1a 64 (blocks/core/hash.h) detects a damaged file; a kill cannot
  // produce one (the file is replaced atomically).
  char sum[40];
  std::snprintf(sum, sizeof sum, "checksum %016" PRIx64 "\n", Fnv1a64(out));
  out += sum;
  return out;
}

Result<Checkpoint> ParseCheckpoint(const std::string& bytes, const std::string& source) {
  // The checksum line closes the file; everything before it is the body.
  const std::string key = "checksum ";
  if (bytes.empty() || bytes.back() != '\n') {
    return Status::Error(source + ": truncated checkpoint (no final checksum line)");
  }
  const std::size_t last = bytes.rfind('\n', bytes.size() - 2);
  const std::size_t body_end = last == std::string::npos ? 0 : last + 1;
  const std::string tail = bytes.substr(body_end, bytes.size() - 1 - body_end);
  if (tail.rfind(key, 0) != 0) {
    if (bytes.rfind(std::string(kCheckpointFormat), 0) != 0) {
      return Status::Error(source + ": not a capgap checkpoint (first line is not '" +
                           std::string(kCheckpointFormat) + " N')");
    }
    return Status::Error(source + ": truncated checkpoint (no final checksum line)");
  }
  char expected[20];
  std::snprintf(expected, sizeof expected, "%016" PRIx64,
                Fnv1a64(std::string_view(bytes).substr(0, body_end)));
  if (tail.substr(key.size()) != expected) {
    return Status::Error(source + ": checksum mismatch (file damaged): stored " +
                         tail.substr(key.size()) + ", computed " + expected);
  }

  LineReader r(bytes, body_end, source);
  Checkpoint c;
  std::string v;
  if (!KeyLine(r, kCheckpointFormat, &v)) {
    return Status::Error(source + ": not a capgap checkpoint (first line is not '" +
                         std::string(kCheckpointFormat) + " N')");
  }
  const bool v1 = v == "1";
  if (v != std::to_string(kCheckpointVersion) && !v1) {
    return Status::Error(source + ": checkpoint version " + v + " is not supported (this program reads 1 and " +
                         std::to_string(kCheckpointVersion) + ")");
  }
  if (!KeyLine(r, "state", &v) || (v != "running" && v != "complete")) {
    return r.Error("expected 'state running' or 'state complete'");
  }
  c.complete = v == "complete";
  if (!KeyLine(r, "seed", &v) || !ParseU64(v, &c.seed)) return r.Error("expected 'seed <integer>'");
  if (!KeyLine(r, "kernel_target", &c.kernel_target)) return r.Error("expected 'kernel_target <name>'");
  if (!KeyLine(r, "updated_utc", &c.updated_utc)) return r.Error("expected 'updated_utc <time>'");
  std::uint64_t config_bytes = 0;
  if (!KeyLine(r, "config_bytes", &v) || !ParseU64(v, &config_bytes)) {
    return r.Error("expected 'config_bytes <integer>'");
  }
  if (!r.Take(static_cast<std::size_t>(config_bytes), &c.config_text)) {
    return r.Error("config text shorter than config_bytes");
  }
  if (!c.config_text.empty() && c.config_text.back() != '\n') {
    std::string nl;
    if (!r.Take(1, &nl) || nl != "\n") return r.Error("config text not followed by a newline");
  }
  if (v1) c.config_text = UpgradeV1ConfigText(c.config_text);
  std::uint64_t scheme_count = 0;
  if (!KeyLine(r, "schemes", &v) || !ParseU64(v, &scheme_count)) {
    return r.Error("expected 'schemes <count>'");
  }
  for (std::uint64_t s = 0; s < scheme_count; ++s) {
    std::string line;
    if (!r.Next(&line)) return r.Error("expected 'scheme NAME POINTS'");
    const auto w = Words(line);
    std::uint64_t npoints = 0;
    if (w.size() != 3 || w[0] != "scheme" || !ParseU64(w[2], &npoints)) {
      return r.Error("expected 'scheme NAME POINTS', got '" + line + "'");
    }
    SchemeRecord rec;
    rec.name = w[1];
    for (std::uint64_t i = 0; i < npoints; ++i) {
      if (!r.Next(&line)) return r.Error("expected 'point " + std::to_string(i) + " ...'");
      const auto pw = Words(line);
      if (pw.size() < 2 || pw[0] != "point" || pw[1] != std::to_string(i)) {
        return r.Error("expected 'point " + std::to_string(i) + " ...', got '" + line + "'");
      }
      std::map<std::string, std::string> kv;
      for (std::size_t k = 2; k < pw.size(); ++k) {
        const auto eq = pw[k].find('=');
        if (eq == std::string::npos || !kv.emplace(pw[k].substr(0, eq), pw[k].substr(eq + 1)).second) {
          return r.Error("malformed or repeated field '" + pw[k] + "'");
        }
      }
      PointRecord p;
      std::set<std::string> used;
      auto field = [&](const std::string& name) -> const std::string* {
        auto it = kv.find(name);
        if (it == kv.end()) return nullptr;
        used.insert(name);
        return &it->second;
      };
      auto missing = [&](const std::string& name) {
        return r.Error("point " + std::to_string(i) + ": field '" + name + "' missing or invalid");
      };
      const std::string* f = field("ebno_db");
      if (!f || !ParseDouble(*f, &p.ebno_db)) return missing("ebno_db");
      std::uint64_t u = 0;
      f = field("units");
      if (!f || !ParseU64(*f, &u) || u > UINT32_MAX) return missing("units");
      p.units = static_cast<std::uint32_t>(u);
      f = field("finished");
      if (!f || (*f != "0" && *f != "1")) return missing("finished");
      p.finished = *f == "1";
      f = field("stop");
      if (!f) return missing("stop");
      // Version 1 named two stop reasons after the keys of that time.
      const std::string stop_word =
          !v1 ? *f : *f == "target_errors" ? "stop_bit_errors" : *f == "max_bits" ? "stop_bits" : *f;
      auto reason = ParseStopReason(stop_word);
      if (!reason.ok()) return missing("stop");
      p.stop_reason = reason.value();
      f = field("seconds");
      if (!f || !ParseDouble(*f, &p.seconds)) return missing("seconds");
      Status counts_status = Status::Ok();
      ForEachCountField(p.counts, [&](const char* name, auto& value) {
        if (!counts_status.ok()) return;
        const std::string* text = field(name);
        std::uint64_t x = 0;
        using T = std::remove_reference_t<decltype(value)>;
        if (!text || !ParseU64(*text, &x) || x > static_cast<std::uint64_t>(static_cast<T>(-1))) {
          counts_status = missing(name);
          return;
        }
        value = static_cast<T>(x);
      });
      if (!counts_status.ok()) return counts_status;
      for (const auto& [name, value] : kv) {
        if (!used.count(name)) return r.Error("point " + std::to_string(i) + ": unknown field '" + name + "'");
      }
      if (p.finished == (p.stop_reason == StopReason::kInterrupted)) {
        return r.Error("point " + std::to_string(i) + ": finished and stop disagree");
      }
      if (std::string why = CountsRule(p); !why.empty()) {
        return r.Error("scheme " + rec.name + " point " + std::to_string(i) + ": " + why);
      }
      rec.points.push_back(p);
    }
    c.schemes.push_back(std::move(rec));
  }
  if (!r.at_end()) return r.Error("unexpected text after the last point");
  return c;
}

Status WriteCheckpoint(const std::string& path, const Checkpoint& c) {
  return WriteFileAtomically(path, SerializeCheckpoint(c));
}

Result<Checkpoint> ReadCheckpoint(const std::string& path) {
  Result<std::string> bytes = ReadRegularFile(path, kMaxCheckpointBytes, "checkpoint");
  if (!bytes.ok()) return bytes.status();
  return ParseCheckpoint(bytes.value(), path);
}

Status CheckRecordedCounts(const Checkpoint& ckpt, const std::vector<Chain>& chains,
                           const std::string& ckpt_path) {
  for (const Chain& chain : chains) {
    const SchemeRecord* rec = ckpt.Find(chain.scheme().name);
    if (!rec) continue;
    const std::uint64_t unit_frames = chain.unit_frames();
    const std::uint64_t frame_bits = chain.scheme().frame_bits;
    for (std::size_t i = 0; i < rec->points.size(); ++i) {
      const PointRecord& p = rec->points[i];
      const std::string head = "cannot resume from " + ckpt_path + ": scheme " + rec->name +
                               " point " + std::to_string(i) + ": ";
      // Overflow-free: frames / unit_frames == units with no remainder.
      if (p.counts.frames % unit_frames != 0 || p.counts.frames / unit_frames != p.units) {
        return Status::Error(head + Is("frames", p.counts.frames, "!=", "units", p.units) + " x " +
                             std::to_string(unit_frames) + " frames per unit");
      }
      if (p.counts.bits % frame_bits != 0 || p.counts.bits / frame_bits != p.counts.frames) {
        return Status::Error(head + Is("bits", p.counts.bits, "!=", "frames", p.counts.frames) +
                             " x " + std::to_string(frame_bits) + " bits per frame");
      }
    }
  }
  return Status::Ok();
}

Status CheckResumable(const Checkpoint& ckpt, const RunConfig& cfg, const std::string& ckpt_path) {
  const std::string head = "cannot resume from " + ckpt_path + ": ";
  auto old_or = ParseRunConfig(ckpt.config_text, ckpt_path + " (stored configuration)", {});
  if (!old_or.ok()) {
    return Status::Error(head + "its stored configuration does not load with this version (" +
                         old_or.status().message() + "); start a new output file");
  }
  const RunConfig& old = old_or.value();
  const std::string fixed =
      "; it fixes the random streams of the recorded work (start a new output file to change "
      "it)";

  // Each key's resume rule comes from its key table (OnResume, key_table.h):
  // fixed unless marked, so that a future key that changes the streams is
  // not let through by omission. The seed is compared as a number first.
  if (old.sweep.seed != cfg.sweep.seed) {
    return Status::Error(head + "sweep.seed changed from " + std::to_string(old.sweep.seed) +
                         " to " + std::to_string(cfg.sweep.seed) + fixed);
  }
  // Error targets (kErrorTarget): 0 or absent is "none", i.e. infinite; the
  // scheme's effective stop_frame_errors (its own key, else the sweep's) may
  // only be raised or removed, like stop_bit_errors.
  const auto target_word = [](std::uint64_t t) {
    return t == 0 ? std::string("(none)") : std::to_string(t);
  };
  const auto lowered = [](std::uint64_t was, std::uint64_t now) {
    return now != 0 && (was == 0 || now < was);
  };
  if (lowered(old.sweep.stop_bit_errors, cfg.sweep.stop_bit_errors)) {
    return Status::Error(head + "sweep.stop_bit_errors decreased from " +
                         target_word(old.sweep.stop_bit_errors) + " to " +
                         target_word(cfg.sweep.stop_bit_errors) +
                         "; a resume may only raise it (finished points may already hold more "
                         "than the new value)");
  }
  for (const SchemeRecord& s : ckpt.schemes) {
    for (std::size_t i = 0; i < cfg.schemes.size(); ++i) {
      if (cfg.schemes[i].name != s.name) continue;
      std::size_t j = 0;
      while (j < old.schemes.size() && old.schemes[j].name != s.name) ++j;
      if (j == old.schemes.size()) continue;  // refused below (scheme keys)
      const std::uint64_t was = old.SweepFor(j).stop_frame_errors;
      const std::uint64_t now = cfg.SweepFor(i).stop_frame_errors;
      if (lowered(was, now)) {
        return Status::Error(head + "stop_frame_errors of scheme " + s.name + " decreased from " +
                             target_word(was) + " to " + target_word(now) +
                             "; a resume may only raise it (finished points may hold more frame "
                             "errors than the new target)");
      }
    }
  }
  // Eb/N0 lists (kAppendPoints): the recorded points of every scheme keep
  // their values, whichever key (scheme.NAME.ebno_db, else sweep.ebno_db)
  // gives them now.
  for (const SchemeRecord& s : ckpt.schemes) {
    const std::vector<double>* points = &cfg.sweep.ebno_db;
    bool own = false;
    for (const SchemeConfig& sc : cfg.schemes) {
      if (sc.name == s.name) points = &sc.ebno_db;
    }
    for (const auto& [key, value] : cfg.resolved) own |= key == "scheme." + s.name + ".ebno_db";
    const std::string where = own ? "scheme." + s.name + ".ebno_db" : "sweep.ebno_db";
    for (std::size_t i = 0; i < s.points.size() && i < points->size(); ++i) {
      if (std::fabs(s.points[i].ebno_db - (*points)[i]) > 1e-9) {
        return Status::Error(head + where + " point " + std::to_string(i) + " (scheme " +
                             s.name + ") changed from " + Double17(s.points[i].ebno_db) +
                             " dB to " + Double17((*points)[i]) +
                             " dB; recorded points keep their Eb/N0 (append new points at the end)");
      }
    }
  }
  // One section's keys against the stored ones, in the new config's order;
  // then keys that went away (e.g. the shaping keys when shaping changed).
  const auto compare = [&](const std::string& prefix, std::span<const KeyTable> tables) -> Status {
    // Families may declare keys of the same name (length, decoder): a key is
    // fixed if any table declaring it says so.
    const auto rule = [&](const std::string& key) {
      const std::string_view name = std::string_view(key).substr(prefix.size());
      std::optional<OnResume> found;
      for (const KeyTable& t : tables) {
        for (const KeySpec& k : t.keys) {
          if (name != k.name) continue;
          if (k.on_resume == OnResume::kFixed) return OnResume::kFixed;
          found = k.on_resume;
        }
      }
      return found.value_or(OnResume::kFixed);
    };
    const auto was = SectionEntries(old, prefix);
    const auto now = SectionEntries(cfg, prefix);
    // Changed values first (in config order), then keys that appeared.
    for (const bool appeared : {false, true}) {
      for (const auto& [key, value] : cfg.resolved) {
        if (key.rfind(prefix, 0) != 0) continue;
        const auto it = was.find(key);
        if ((it == was.end()) != appeared) continue;
        const OnResume r = rule(key);
        // Points and error targets: checked above.
        if (r == OnResume::kFree || r == OnResume::kAppendPoints || r == OnResume::kErrorTarget) {
          continue;
        }
        if (r == OnResume::kMayGrow && !appeared) {
          auto a = ParseUint64(it->second);
          auto b = ParseUint64(value);
          if (a.ok() && b.ok()) {
            if (b.value() >= a.value()) continue;
            return Status::Error(head + key + " decreased from " + it->second + " to " + value +
                                 "; a resume may only raise it (finished points may already "
                                 "hold more than the new value)");
          }
        }
        if (appeared || it->second != value) {
          return Status::Error(head + key + " changed from " +
                               (appeared ? "(absent)" : Quoted(it->second)) + " to " +
                               Quoted(value) + fixed);
        }
      }
    }
    for (const auto& [key, value] : old.resolved) {
      if (key.rfind(prefix, 0) == 0 && !now.count(key) && rule(key) == OnResume::kFixed) {
        return Status::Error(head + key + " changed from " + Quoted(value) + " to (absent)" + fixed);
      }
    }
    return Status::Ok();
  };
  if (Status s = compare("sweep.", SweepKeyTables()); !s.ok()) return s;

  // Schemes: every recorded scheme must still be there, defined identically
  // but for the keys its tables let change.
  for (const SchemeRecord& s : ckpt.schemes) {
    bool present = false;
    for (const SchemeConfig& sc : cfg.schemes) present |= sc.name == s.name;
    if (!present) {
      return Status::Error(head + "scheme '" + s.name +
                           "' is recorded in the checkpoint but missing from the configuration");
    }
    if (Status st = compare("scheme." + s.name + ".", SchemeKeyTables()); !st.ok()) return st;
  }
  return Status::Ok();
}

}  // namespace capgap
