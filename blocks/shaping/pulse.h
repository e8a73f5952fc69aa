// Nyquist pulse design: raised-cosine (RC) and root-raised-cosine (RRC) FIR
// taps for a pulse-shaped chain at S samples per symbol.
//
// Time is measured in symbol periods (T = 1). With roll-off a in (0, 1]:
//   RC   p(t) = sinc(t) cos(pi a t) / (1 - (2 a t)^2),   p(0) = 1, and
//        p(k) = 0 for every nonzero integer k (the Nyquist criterion);
//   RRC  g(t) = [sin(pi t (1 - a)) + 4 a t cos(pi t (1 + a))]
//               / [pi t (1 - (4 a t)^2)],                 integral g^2 = 1,
//        and g * g = p (the RRC is the spectral square root of the RC).
// Special points, taken as exact limits (Proakis & Salehi, Digital
// Communications, 5th ed., ch. 9 for the pulses; the limits are L'Hopital on
// the formulas above and are re-checked numerically in pulse_test.cc):
//   RC  at |t| = 1/(2a): p = (pi / 4) sinc(1 / (2a));
//   RRC at t = 0:        g = 1 - a + 4 a / pi;
//   RRC at |t| = 1/(4a): g = (a / sqrt 2) [(1 + 2/pi) sin(pi/(4a))
//                                          + (1 - 2/pi) cos(pi/(4a))].
//
// Taps: span_symbols * S + 1 of them, tap m sampled at
// t_m = (m - span_symbols * S / 2) / S, so the filter is symmetric about its
// centre, which lies on a sample when span_symbols * S is even (else half-way
// between two samples; the cascade of two such filters is still centred on a
// sample). Taps are scaled to unit energy, sum h[m]^2 = 1, the normalisation
// of blocks/core/energy.h: with the matched filter and N0 of noise per sample,
// the symbol-instant noise variance is N0.
#ifndef CAPGAP_BLOCKS_SHAPING_PULSE_H_
#define CAPGAP_BLOCKS_SHAPING_PULSE_H_

#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"

namespace capgap {

enum class PulseShape { kNone, kRaisedCosine, kRootRaisedCosine };

// Accepted words: none, rc, rrc (case-insensitive). Error message:
//   "unknown pulse shape 'WORD'; valid: none, rc, rrc"
Result<PulseShape> ParsePulseShape(std::string_view word);
// Canonical word: "none", "rc", "rrc".
std::string ToString(PulseShape shape);
// "none, rc, rrc"
std::string PulseShapeChoices();

inline constexpr int kMaxSpanSymbols = 256;
inline constexpr int kMaxSamplesPerSymbol = 64;

struct PulseSpec {
  PulseShape shape = PulseShape::kRootRaisedCosine;
  double rolloff = 0.35;        // a, in (0, 1]
  int span_symbols = 16;        // filter length in symbols, 1..kMaxSpanSymbols
  int samples_per_symbol = 8;   // S, 2..kMaxSamplesPerSymbol
};

// OK or the first broken rule, messages exactly:
//   "pulse: shape = none: has no taps (a chain without shaping skips the shaper)"
//   "pulse: rolloff = V: must be in (0, 1]"
//   "pulse: span_symbols = V: must be in 1..256"
//   "pulse: samples_per_symbol = V: must be in 2..64"
Status ValidatePulseSpec(const PulseSpec& spec);

// The continuous pulses above, t in symbol periods. REQUIRES 0 < a <= 1.
double RaisedCosinePulse(double t, double rolloff);
double RootRaisedCosinePulse(double t, double rolloff);

// Number of taps, span_symbols * S + 1.
int PulseTapCount(const PulseSpec& spec);

// Unit-energy taps of `spec`. With time_shift_symbols = tau != 0, tap m is the
// same pulse sampled at t_m + tau with the *unshifted* scale factor (the
// fractional-delay matched filter of fir_filter.h: evaluating the filter at a
// phase shifted by tau symbols). REQUIRES |tau| <= 1 when shifted.
Result<std::vector<float>> DesignPulseTaps(const PulseSpec& spec,
                                           double time_shift_symbols = 0.0);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_SHAPING_PULSE_H_
