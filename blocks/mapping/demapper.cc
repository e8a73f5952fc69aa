// Demapper: parameter checks, the constellation tables the kernels need
// (built once in Create) and the calls into blocks/kernels/demap_kernels.h,
// where the inner loops live (Highway dispatch, scalar oracle
// demap_reference.h). Symbols with a per-symbol channel state go to the
// brute-force metric of generic_demapper.h.
#include "blocks/mapping/demapper.h"

#include <cctype>
#include <cmath>
#include <cstddef>
#include <numbers>
#include <string>

#include "blocks/mapping/generic_demapper.h"

namespace capgap {
namespace {

std::string Lowercase(std::string_view word) {
  std::string out(word);
  for (char& ch : out) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
  return out;
}

}  // namespace

Result<DemapMethod> ParseDemapMethod(std::string_view word) {
  const std::string w = Lowercase(word);
  if (w == "hard") return DemapMethod::kHard;
  if (w == "maxlog") return DemapMethod::kMaxLog;
  if (w == "logmap") return DemapMethod::kLogMap;
  return Status::Error("unknown demap method '" + std::string(word) +
                       "'; valid: " + DemapMethodChoices());
}

std::string ToString(DemapMethod method) {
  switch (method) {
    case DemapMethod::kHard:
      return "hard";
    case DemapMethod::kMaxLog:
      return "maxlog";
    case DemapMethod::kLogMap:
      return "logmap";
  }
  return "unknown";
}

std::string DemapMethodChoices() { return "hard, maxlog, logmap"; }

Result<Demapper> Demapper::Create(const Mapper& mapper, DemapMethod method) {
  if (method != DemapMethod::kHard && method != DemapMethod::kMaxLog &&
      method != DemapMethod::kLogMap) {
    return Status::Error("demapper: unknown method " + std::to_string(static_cast<int>(method)));
  }
  if (Status status = ValidateModulation(mapper.modulation()); !status.ok()) {
    return Status::Error("demapper: " + status.message());
  }
  Demapper d;
  d.method_ = method;
  d.modulation_ = mapper.modulation();
  d.bits_per_symbol_ = mapper.bits_per_symbol();
  d.points_.assign(mapper.points().begin(), mapper.points().end());
  d.pam_levels_.assign(mapper.pam_levels().begin(), mapper.pam_levels().end());
  const int order = d.modulation_.order;
  if (d.modulation_.family == ModulationFamily::kGeneric) {
    d.generic_ = true;  // brute force over the points (GenericDemapSymbol)
  } else if (d.modulation_.family == ModulationFamily::kQam) {
    d.path_ = DemapKernelPath::kPam;
    d.axis_bits_ = d.bits_per_symbol_ / 2;
    // The largest level, L - 1 on the odd-integer grid, has axis label 0.
    d.level_scale_ = d.pam_levels_[0] / static_cast<float>((1 << d.axis_bits_) - 1);
  } else if (order == 2) {
    d.path_ = DemapKernelPath::kBpsk;
  } else if (order == 4) {
    d.path_ = DemapKernelPath::kQpsk;
  } else {
    d.path_ = DemapKernelPath::kPsk;
    for (const cf32& x : d.points_) {
      d.point_re_.push_back(x.real());
      d.point_im_.push_back(x.imag());
    }
    for (int i = 0; i < order / 2; ++i) {
      const double phi = 2.0 * std::numbers::pi * i / order;
      d.boundary_cos_.push_back(static_cast<float>(std::cos(phi)));
      d.boundary_sin_.push_back(static_cast<float>(std::sin(phi)));
    }
  }
  return d;
}

DemapKernelArgs Demapper::kernel_args() const {
  DemapKernelArgs args;
  args.path = path_;
  args.bits_per_symbol = bits_per_symbol_;
  args.axis_bits = axis_bits_;
  args.level_scale = level_scale_;
  args.point_re = point_re_.data();
  args.point_im = point_im_.data();
  args.boundary_cos = boundary_cos_.data();
  args.boundary_sin = boundary_sin_.data();
  return args;
}

void Demapper::Demap(std::span<const cf32> received, float n0, std::span<float> llrs) const {
  CAPGAP_DCHECK(llrs.size() == static_cast<std::size_t>(bits_per_symbol_) * received.size());
  CAPGAP_DCHECK(n0 > 0.0f);
  // std::complex<float> is array-compatible with float[2] ([complex.numbers]).
  if (generic_) {
    const auto m = static_cast<std::size_t>(bits_per_symbol_);
    for (std::size_t s = 0; s < received.size(); ++s) {
      GenericDemapSymbol(points_, method_, received[s], cf32(1.0f, 0.0f), n0,
                         llrs.subspan(m * s, m));
    }
    return;
  }
  const float* y = reinterpret_cast<const float*>(received.data());
  if (method_ == DemapMethod::kHard) {
    DemapHard(kernel_args(), y, received.size(), llrs.data(), nullptr);
  } else {
    DemapSoft(kernel_args(), method_ == DemapMethod::kLogMap, y, received.size(), n0, llrs.data());
  }
}

void Demapper::Demap(std::span<const cf32> received, const ChannelStateView& state,
                     std::span<float> llrs) const {
  CAPGAP_DCHECK(state.gain.empty() || state.gain.size() == received.size());
  CAPGAP_DCHECK(state.n0.empty() || state.n0.size() == received.size());
  if (state.uniform()) {
    Demap(received, state.n0_uniform, llrs);
    return;
  }
  CAPGAP_DCHECK(llrs.size() == static_cast<std::size_t>(bits_per_symbol_) * received.size());
  const auto m = static_cast<std::size_t>(bits_per_symbol_);
  if (state.gain.empty()) {
    // Gain 1 with per-symbol N0 (an equalised combiner output, e.g.
    // blocks/channel/fading_channel.h): the fast kernels apply. Max-log
    // LLRs are linear in 1 / N0, so one call at N0 = 1 and a per-symbol
    // scale give them; hard outputs do not depend on N0; log-MAP is not
    // linear and takes one kernel call per symbol.
    const float* y = reinterpret_cast<const float*>(received.data());
    const std::size_t n = received.size();
    if (method_ == DemapMethod::kLogMap && !state.n0.empty()) {
      for (std::size_t s = 0; s < n; ++s) {
        DemapSoft(kernel_args(), true, y + 2 * s, 1, state.n0[s], llrs.data() + m * s);
      }
      return;
    }
    Demap(received, 1.0f, llrs);
    if (method_ == DemapMethod::kHard) return;
    float* l = llrs.data();
    for (std::size_t s = 0; s < n; ++s) {
      const float inv = 1.0f / (state.n0.empty() ? state.n0_uniform : state.n0[s]);
      for (std::size_t k = 0; k < m; ++k) l[m * s + k] *= inv;
    }
    return;
  }
  for (std::size_t s = 0; s < received.size(); ++s) {
    const cf32 h = state.gain.empty() ? cf32(1.0f, 0.0f) : state.gain[s];
    const float n0 = state.n0.empty() ? state.n0_uniform : state.n0[s];
    GenericDemapSymbol(points_, method_, received[s], h, n0, llrs.subspan(m * s, m));
  }
}

void Demapper::HardDecide(std::span<const cf32> received, std::span<Bit> bits) const {
  CAPGAP_DCHECK(bits.size() == static_cast<std::size_t>(bits_per_symbol_) * received.size());
  if (generic_) {
    // The hard "LLRs" of the nearest point are +1 (bit 0) / -1 (bit 1); n0
    // only scales metrics and does not move the nearest point.
    const auto m = static_cast<std::size_t>(bits_per_symbol_);
    float signs[kMaxGenericBits];
    for (std::size_t s = 0; s < received.size(); ++s) {
      GenericDemapSymbol(points_, DemapMethod::kHard, received[s], cf32(1.0f, 0.0f), 1.0f,
                         std::span<float>(signs, m));
      for (std::size_t k = 0; k < m; ++k) bits[m * s + k] = signs[k] < 0.0f ? 1 : 0;
    }
    return;
  }
  DemapHard(kernel_args(), reinterpret_cast<const float*>(received.data()), received.size(),
            nullptr, bits.data());
}

void LlrToBits(std::span<const float> llrs, std::span<Bit> bits) {
  CAPGAP_DCHECK(llrs.size() == bits.size());
  const float* l = llrs.data();
  Bit* b = bits.data();
  const std::size_t n = llrs.size();
  for (std::size_t i = 0; i < n; ++i) b[i] = l[i] < 0.0f ? Bit{1} : Bit{0};
}

}  // namespace capgap
