// RC and RRC pulse formulas with their removable singularities handled as
// exact limits, the unit-energy tap design, and the pulse-shape words.
#include "blocks/shaping/pulse.h"

#include <cctype>
#include <cmath>
#include <numbers>
#include <sstream>

namespace capgap {
namespace {

constexpr double kPi = std::numbers::pi;
// Closer than this (in symbol periods) to a removable singularity, the exact
// limit is returned. At 1e-9 away the formulas lose about 1e-16 / 1e-9 = 1e-7
// relative accuracy through cancellation, still far below float resolution.
constexpr double kSingularTolerance = 1e-9;

double Sinc(double x) {
  if (std::abs(x) < 1e-12) return 1.0;
  return std::sin(kPi * x) / (kPi * x);
}

std::string Lowercase(std::string_view word) {
  std::string out(word);
  for (char& ch : out) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
  return out;
}

std::string FormatDouble(double v) {
  std::ostringstream os;
  os.precision(17);
  os << v;
  return os.str();
}

}  // namespace

Result<PulseShape> ParsePulseShape(std::string_view word) {
  const std::string w = Lowercase(word);
  if (w == "none") return PulseShape::kNone;
  if (w == "rc") return PulseShape::kRaisedCosine;
  if (w == "rrc") return PulseShape::kRootRaisedCosine;
  return Status::Error("unknown pulse shape '" + std::string(word) +
                       "'; valid: " + PulseShapeChoices());
}

std::string ToString(PulseShape shape) {
  switch (shape) {
    case PulseShape::kNone: return "none";
    case PulseShape::kRaisedCosine: return "rc";
    case PulseShape::kRootRaisedCosine: return "rrc";
  }
  return "?";
}

std::string PulseShapeChoices() { return "none, rc, rrc"; }

Status ValidatePulseSpec(const PulseSpec& spec) {
  if (spec.shape == PulseShape::kNone) {
    return Status::Error(
        "pulse: shape = none: has no taps (a chain without shaping skips the shaper)");
  }
  if (spec.shape != PulseShape::kRaisedCosine && spec.shape != PulseShape::kRootRaisedCosine) {
    return Status::Error("pulse: shape = " + std::to_string(static_cast<int>(spec.shape)) +
                         ": unknown");
  }
  if (!(spec.rolloff > 0.0 && spec.rolloff <= 1.0)) {
    return Status::Error("pulse: rolloff = " + FormatDouble(spec.rolloff) +
                         ": must be in (0, 1]");
  }
  if (spec.span_symbols < 1 || spec.span_symbols > kMaxSpanSymbols) {
    return Status::Error("pulse: span_symbols = " + std::to_string(spec.span_symbols) +
                         ": must be in 1..256");
  }
  if (spec.samples_per_symbol < 2 || spec.samples_per_symbol > kMaxSamplesPerSymbol) {
    return Status::Error("pulse: samples_per_symbol = " +
                         std::to_string(spec.samples_per_symbol) + ": must be in 2..64");
  }
  return Status::Ok();
}

double RaisedCosinePulse(double t, double rolloff) {
  const double a = rolloff;
  const double edge = 1.0 / (2.0 * a);
  if (std::abs(std::abs(t) - edge) < kSingularTolerance) {
    return (kPi / 4.0) * Sinc(edge);
  }
  const double d = 2.0 * a * t;
  return Sinc(t) * std::cos(kPi * a * t) / (1.0 - d * d);
}

double RootRaisedCosinePulse(double t, double rolloff) {
  const double a = rolloff;
  if (std::abs(t) < kSingularTolerance) return 1.0 - a + 4.0 * a / kPi;
  const double edge = 1.0 / (4.0 * a);
  if (std::abs(std::abs(t) - edge) < kSingularTolerance) {
    const double x = kPi / (4.0 * a);
    return (a / std::numbers::sqrt2) *
           ((1.0 + 2.0 / kPi) * std::sin(x) + (1.0 - 2.0 / kPi) * std::cos(x));
  }
  const double d = 4.0 * a * t;
  return (std::sin(kPi * t * (1.0 - a)) + d * std::cos(kPi * t * (1.0 + a))) /
         (kPi * t * (1.0 - d * d));
}

int PulseTapCount(const PulseSpec& spec) { return spec.span_symbols * spec.samples_per_symbol + 1; }

Result<std::vector<float>> DesignPulseTaps(const PulseSpec& spec, double time_shift_symbols) {
  if (Status s = ValidatePulseSpec(spec); !s.ok()) return s;
  if (!(std::abs(time_shift_symbols) <= 1.0)) {
    return Status::Error("pulse: time shift = " + FormatDouble(time_shift_symbols) +
                         ": must be in [-1, 1] symbol");
  }
  const int n = PulseTapCount(spec);
  const double s = spec.samples_per_symbol;
  const double centre = 0.5 * spec.span_symbols * spec.samples_per_symbol;
  auto pulse = [&](double t) {
    return spec.shape == PulseShape::kRaisedCosine ? RaisedCosinePulse(t, spec.rolloff)
                                                   : RootRaisedCosinePulse(t, spec.rolloff);
  };
  double energy = 0.0;
  for (int m = 0; m < n; ++m) {
    const double v = pulse((m - centre) / s);
    energy += v * v;
  }
  const double scale = 1.0 / std::sqrt(energy);
  std::vector<float> taps(static_cast<std::size_t>(n));
  for (int m = 0; m < n; ++m) {
    taps[static_cast<std::size_t>(m)] =
        static_cast<float>(scale * pulse((m - centre) / s + time_shift_symbols));
  }
  return taps;
}

}  // namespace capgap
