// Validation of the receiver impairments and the carrier phase / frequency
// rotation (see impairments.h).
#include "blocks/shaping/impairments.h"

#include <cmath>
#include <complex>
#include <numbers>
#include <sstream>
#include <string>

namespace capgap {
namespace {

std::string Format(double v) {
  std::ostringstream os;
  os << v;
  return os.str();
}

}  // namespace

Status ValidateImpairmentSpec(const ImpairmentSpec& spec) {
  if (!(std::abs(spec.timing_offset_symbols) <= 0.5)) {
    return Status::Error("impairments: timing_offset_symbols = " +
                         Format(spec.timing_offset_symbols) + ": must be in [-0.5, 0.5]");
  }
  if (!std::isfinite(spec.phase_offset_deg)) {
    return Status::Error("impairments: phase_offset_deg = " + Format(spec.phase_offset_deg) +
                         ": must be finite");
  }
  if (!(std::abs(spec.frequency_offset_cycles_per_symbol) <= 0.5)) {
    return Status::Error("impairments: frequency_offset_cycles_per_symbol = " +
                         Format(spec.frequency_offset_cycles_per_symbol) +
                         ": must be in [-0.5, 0.5]");
  }
  return Status::Ok();
}

Result<CarrierOffset> CarrierOffset::Create(double phase_offset_deg,
                                            double frequency_offset_cycles_per_symbol,
                                            int samples_per_symbol) {
  ImpairmentSpec spec;
  spec.phase_offset_deg = phase_offset_deg;
  spec.frequency_offset_cycles_per_symbol = frequency_offset_cycles_per_symbol;
  if (Status s = ValidateImpairmentSpec(spec); !s.ok()) return s;
  if (samples_per_symbol < 1) {
    return Status::Error("impairments: samples_per_symbol = " +
                         std::to_string(samples_per_symbol) + ": must be >= 1");
  }
  return CarrierOffset(phase_offset_deg * std::numbers::pi / 180.0,
                       frequency_offset_cycles_per_symbol / samples_per_symbol);
}

void CarrierOffset::Apply(std::span<cf32> samples, State& state) const {
  if (is_identity()) return;
  constexpr double kTwoPi = 2.0 * std::numbers::pi;
  std::complex<double> z = std::polar(1.0, phase_rad_ + kTwoPi * state.cycles);
  const std::complex<double> w = std::polar(1.0, kTwoPi * step_cycles_);
  for (cf32& v : samples) {
    const std::complex<double> r = std::complex<double>(v) * z;
    v = cf32(static_cast<float>(r.real()), static_cast<float>(r.imag()));
    z *= w;
  }
  const double advanced = state.cycles + step_cycles_ * static_cast<double>(samples.size());
  state.cycles = advanced - std::floor(advanced);
}

}  // namespace capgap
