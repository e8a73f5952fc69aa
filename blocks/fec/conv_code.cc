// Convolutional encoder, puncturing, parsing of generator and pattern text,
// and the Create()-time checks (ranges, pattern shape, catastrophic codes).
#include "blocks/fec/conv_code.h"

#include <algorithm>
#include <bit>
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <string>
#include <vector>

#include "blocks/core/text.h"

namespace capgap {
namespace {

std::vector<std::string_view> SplitComma(std::string_view text) {
  std::vector<std::string_view> words;
  std::size_t start = 0;
  while (true) {
    const std::size_t comma = text.find(',', start);
    if (comma == std::string_view::npos) {
      words.push_back(TrimBlanks(text.substr(start)));
      break;
    }
    words.push_back(TrimBlanks(text.substr(start, comma - start)));
    start = comma + 1;
  }
  return words;
}

int Parity(std::uint32_t x) { return std::popcount(x) & 1; }

}  // namespace

Result<Termination> ParseTermination(std::string_view word) {
  if (word == "tail") return Termination::kTerminated;
  if (word == "tailbiting") return Termination::kTailBiting;
  return Status::Error("unknown termination '" + std::string(word) + "'; valid: tail, tailbiting");
}

std::string ToString(Termination termination) {
  return termination == Termination::kTailBiting ? "tailbiting" : "tail";
}

Result<std::vector<std::uint32_t>> ParseGenerators(std::string_view text) {
  const std::string prefix = "generators '" + std::string(text) + "': ";
  std::vector<std::uint32_t> out;
  for (std::string_view word : SplitComma(text)) {
    if (word.empty()) return Status::Error(prefix + "empty word");
    if (word.size() > 4) {
      return Status::Error(prefix + "'" + std::string(word) +
                           "' has more than 4 octal digits (K <= 9)");
    }
    std::uint32_t value = 0;
    for (char c : word) {
      if (c < '0' || c > '7') {
        return Status::Error(prefix + "'" + std::string(word) + "' is not an octal number");
      }
      value = value * 8u + static_cast<std::uint32_t>(c - '0');
    }
    out.push_back(value);
  }
  return out;
}

std::string GeneratorsToString(std::span<const std::uint32_t> generators) {
  std::string s;
  for (std::size_t i = 0; i < generators.size(); ++i) {
    if (i > 0) s += ',';
    char buf[16];
    std::snprintf(buf, sizeof(buf), "%o", generators[i]);
    s += buf;
  }
  return s;
}

Result<PuncturePattern> ParsePuncturePattern(std::string_view text) {
  const std::string prefix = "puncture pattern '" + std::string(text) + "': ";
  PuncturePattern p;
  for (std::string_view word : SplitComma(text)) {
    if (word.empty()) return Status::Error(prefix + "empty row");
    std::vector<std::uint8_t> row;
    for (char c : word) {
      if (c != '0' && c != '1') {
        return Status::Error(prefix + "row '" + std::string(word) + "' may hold only 0 and 1");
      }
      row.push_back(static_cast<std::uint8_t>(c - '0'));
    }
    if (!p.rows.empty() && row.size() != p.rows[0].size()) {
      return Status::Error(prefix + "row '" + std::string(word) + "' has " +
                           std::to_string(row.size()) + " columns, the first row " +
                           std::to_string(p.rows[0].size()));
    }
    p.rows.push_back(std::move(row));
  }
  return p;
}

std::string ToString(const PuncturePattern& pattern) {
  std::string s;
  for (std::size_t i = 0; i < pattern.rows.size(); ++i) {
    if (i > 0) s += ',';
    for (std::uint8_t b : pattern.rows[i]) s += b ? '1' : '0';
  }
  return s;
}

Result<ConvCode> ConvCode::Create(const ConvCodeSpec& spec) {
  const std::string gtext = GeneratorsToString(spec.generators);
  const std::string prefix = "conv code (" + gtext + "): ";
  const int n = static_cast<int>(spec.generators.size());
  if (n < kMinOutputs || n > kMaxOutputs) {
    return Status::Error(prefix + "number of generators = " + std::to_string(n) +
                         ": must be in [2, 4] (rate 1/n)");
  }
  int highest = 0;
  for (std::uint32_t g : spec.generators) {
    if (g == 0) return Status::Error(prefix + "generator 0 has no taps");
    highest = std::max(highest, static_cast<int>(std::bit_width(g)));
  }
  const int k = spec.constraint_length == 0 ? highest : spec.constraint_length;
  if (k < kMinConstraintLength || k > kMaxConstraintLength) {
    return Status::Error(prefix + "constraint length K = " + std::to_string(k) +
                         ": must be in [3, 9]");
  }
  if (highest > k) {
    return Status::Error(prefix + "a generator has a tap beyond K = " + std::to_string(k));
  }
  bool msb = false, lsb = false;
  for (std::uint32_t g : spec.generators) {
    msb |= ((g >> (k - 1)) & 1u) != 0;
    lsb |= (g & 1u) != 0;
  }
  if (!msb || !lsb) {
    return Status::Error(prefix + "no generator taps the " +
                         std::string(!msb ? "current input" : "oldest register bit") +
                         " (the code has a smaller K)");
  }
  int period = 1;
  int kept = n;
  if (!spec.puncture.empty()) {
    const PuncturePattern& p = spec.puncture;
    if (static_cast<int>(p.rows.size()) != n) {
      return Status::Error(prefix + "puncture pattern '" + ToString(p) + "' has " +
                           std::to_string(p.rows.size()) + " rows: must have one per generator (" +
                           std::to_string(n) + ")");
    }
    period = p.period();
    kept = 0;
    for (const auto& row : p.rows) {
      if (static_cast<int>(row.size()) != period || period == 0) {
        return Status::Error(prefix + "puncture pattern '" + ToString(p) +
                             "': rows must be non-empty and of equal length");
      }
      for (std::uint8_t b : row) kept += b ? 1 : 0;
    }
    if (kept < period) {
      return Status::Error(prefix + "puncture pattern '" + ToString(p) + "' keeps " +
                           std::to_string(kept) + " bits per " + std::to_string(period) +
                           " information bits: rate must be <= 1");
    }
  }

  ConvCode code;
  code.spec_ = spec;
  code.k_ = k;
  code.n_ = n;
  code.period_ = period;
  code.kept_per_period_ = kept;
  code.labels_.resize(std::size_t{1} << k);
  for (std::uint32_t reg = 0; reg < (1u << k); ++reg) {
    std::uint32_t label = 0;
    for (int i = 0; i < n; ++i) {
      label |= static_cast<std::uint32_t>(Parity(spec.generators[static_cast<std::size_t>(i)] & reg))
               << i;
    }
    code.labels_[reg] = label;
  }

  // Catastrophic test on the period-P trellis: nodes (state, phase); the
  // zero-output-weight edges (except state 0 -> 0 with input 0) must form an
  // acyclic graph (Kahn's algorithm). A zero-weight cycle would let an
  // infinite-weight input path produce a finite-weight output.
  const int states = 1 << (k - 1);
  const int nodes = states * period;
  std::vector<int> indegree(static_cast<std::size_t>(nodes), 0);
  auto out_weight = [&](int s, int u, int phase) {
    const std::uint32_t label = code.BranchLabel(s, u);
    int w = 0;
    for (int i = 0; i < n; ++i) {
      if (((label >> i) & 1u) && code.Kept(i, static_cast<std::size_t>(phase))) ++w;
    }
    return w;
  };
  auto for_zero_edges = [&](auto&& f) {
    for (int ph = 0; ph < period; ++ph) {
      for (int s = 0; s < states; ++s) {
        for (int u = 0; u < 2; ++u) {
          if (s == 0 && u == 0) continue;
          if (out_weight(s, u, ph) == 0) {
            f(ph * states + s, ((ph + 1) % period) * states + code.NextState(s, u));
          }
        }
      }
    }
  };
  std::vector<std::vector<int>> adj(static_cast<std::size_t>(nodes));
  for_zero_edges([&](int a, int b) {
    adj[static_cast<std::size_t>(a)].push_back(b);
    ++indegree[static_cast<std::size_t>(b)];
  });
  std::vector<int> queue;
  for (int v = 0; v < nodes; ++v) {
    if (indegree[static_cast<std::size_t>(v)] == 0) queue.push_back(v);
  }
  std::size_t removed = 0;
  while (removed < queue.size()) {
    const int v = queue[removed++];
    for (int w : adj[static_cast<std::size_t>(v)]) {
      if (--indegree[static_cast<std::size_t>(w)] == 0) queue.push_back(w);
    }
  }
  if (removed != static_cast<std::size_t>(nodes)) {
    return Status::Error(prefix + (spec.puncture.empty()
                                       ? std::string("catastrophic code")
                                       : "catastrophic with puncture pattern '" +
                                             ToString(spec.puncture) + "'") +
                         " (a zero-weight trellis cycle)");
  }
  return code;
}

std::size_t ConvCode::TrellisSteps(std::size_t info_bits) const {
  return spec_.termination == Termination::kTerminated
             ? info_bits + static_cast<std::size_t>(k_ - 1)
             : info_bits;
}

std::size_t ConvCode::MotherLength(std::size_t info_bits) const {
  return static_cast<std::size_t>(n_) * TrellisSteps(info_bits);
}

std::size_t ConvCode::CodedLength(std::size_t info_bits) const {
  const std::size_t steps = TrellisSteps(info_bits);
  if (!punctured()) return static_cast<std::size_t>(n_) * steps;
  const std::size_t p = static_cast<std::size_t>(period_);
  std::size_t len = (steps / p) * static_cast<std::size_t>(kept_per_period_);
  for (std::size_t t = 0; t < steps % p; ++t) {
    for (int i = 0; i < n_; ++i) len += Kept(i, t) ? 1u : 0u;
  }
  return len;
}

double ConvCode::EffectiveRate(std::size_t info_bits) const {
  return static_cast<double>(info_bits) / static_cast<double>(CodedLength(info_bits));
}

void ConvCode::Encode(std::span<const Bit> info, std::span<Bit> coded) const {
  CAPGAP_DCHECK(coded.size() == CodedLength(info.size()));
  const std::size_t len = info.size();
  const std::size_t steps = TrellisSteps(len);
  int state = 0;
  if (spec_.termination == Termination::kTailBiting) {
    CAPGAP_DCHECK(len >= static_cast<std::size_t>(k_ - 1));
    // Start in the state the last K-1 bits leave: s = (u_{L-1} ... u_{L-K+1}).
    for (std::size_t j = len - static_cast<std::size_t>(k_ - 1); j < len; ++j) {
      state = NextState(state, info[j] & 1);
    }
  }
  std::size_t pos = 0;
  for (std::size_t t = 0; t < steps; ++t) {
    const int u = t < len ? (info[t] & 1) : 0;
    const std::uint32_t label = BranchLabel(state, u);
    for (int i = 0; i < n_; ++i) {
      if (Kept(i, t)) coded[pos++] = static_cast<Bit>((label >> i) & 1u);
    }
    state = NextState(state, u);
  }
  CAPGAP_DCHECK(pos == coded.size());
  CAPGAP_DCHECK(spec_.termination == Termination::kTailBiting || state == 0);
}

void ConvCode::Depuncture(std::span<const float> llrs, std::span<float> mother_llrs) const {
  CAPGAP_DCHECK(mother_llrs.size() % static_cast<std::size_t>(n_) == 0);
  const std::size_t steps = mother_llrs.size() / static_cast<std::size_t>(n_);
  if (!punctured()) {
    CAPGAP_DCHECK(llrs.size() == mother_llrs.size());
    std::copy(llrs.begin(), llrs.end(), mother_llrs.begin());
    return;
  }
  std::size_t pos = 0;
  for (std::size_t t = 0; t < steps; ++t) {
    for (int i = 0; i < n_; ++i) {
      mother_llrs[t * static_cast<std::size_t>(n_) + static_cast<std::size_t>(i)] =
          Kept(i, t) ? llrs[pos++] : 0.0f;
    }
  }
  CAPGAP_DCHECK(pos == llrs.size());
}

}  // namespace capgap
