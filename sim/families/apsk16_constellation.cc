// Constellation `16apsk`: two concentric rings in the style of DVB-S2 16APSK
// (ETSI EN 302 307): 4 points on the inner ring at phases pi/4 + k pi/2, 12 on
// the outer ring at phases pi/12 + k pi/6, radius ratio gamma = R2/R1 = 2.85
// (the value that standard lists for code rate 3/4; from memory). Unit
// average energy: (4 R1^2 + 12 R2^2) / 16 = 1.
//
// Labels (our own, Gray-like; bit 0 = MSB as in mapper.h): b0 b1 name the
// quadrant in Gray order (00, 01, 11, 10 counter-clockwise from the first);
// b2 b3 name the point inside the quadrant: 11 for the inner point, and for
// the three outer points 01, 00, 10 counted counter-clockwise in the first
// and third quadrants, reversed in the second and fourth, so the outer points
// either side of a quadrant boundary carry the same b2 b3. Hence every pair
// of neighbours on a ring (including the inner ring's, the closest pairs of
// the constellation at gamma = 2.85) differs in exactly one bit; the inner
// point differs from its two outer neighbours at +-30 degrees in one bit and
// from the outer point at its own phase in two (four pairs per quadrant
// cannot all be one bit apart with two bits).
//
// It is a generic constellation (ModulationFamily::kGeneric): brute-force
// demapping, uncoded theory by the union bound over its pairwise distances,
// CM/BICM capacity by quadrature over its points, no fading-average theory.
#include "sim/families/apsk16_constellation.h"

#include <cctype>
#include <cmath>
#include <cstdint>
#include <numbers>
#include <string>

namespace capgap {
namespace {

constexpr char kWord[] = "16apsk";

bool Claims(std::string_view word) {
  if (word.size() != sizeof(kWord) - 1) return false;
  for (std::size_t i = 0; i < word.size(); ++i) {
    if (std::tolower(static_cast<unsigned char>(word[i])) != kWord[i]) return false;
  }
  return true;
}

Result<Modulation> Parse(std::string_view) { return MakeGenericModulation(Make16Apsk()); }

std::string Choices() { return "16apsk (4+12 rings, ratio 2.85)"; }

}  // namespace

GenericConstellation Make16Apsk() {
  constexpr double kPi = std::numbers::pi;
  const double g = k16ApskRingRatio;
  const double r1 = std::sqrt(16.0 / (4.0 + 12.0 * g * g));
  const double r2 = g * r1;
  constexpr std::uint32_t kQuadrant[4] = {0b00, 0b01, 0b11, 0b10};
  // b2 b3 of the outer points of a quadrant, counter-clockwise, in the first
  // and third quadrants (reversed in the second and fourth).
  constexpr std::uint32_t kOuter[3] = {0b01, 0b00, 0b10};
  constexpr std::uint32_t kInner = 0b11;
  GenericConstellation c;
  c.name = kWord;
  for (int k = 0; k < 12; ++k) {
    const double phase = kPi / 12.0 + k * kPi / 6.0;
    const int q = k / 3;
    const int j = (q % 2 == 0) ? k % 3 : 2 - k % 3;
    c.points.emplace_back(static_cast<float>(r2 * std::cos(phase)),
                          static_cast<float>(r2 * std::sin(phase)));
    c.labels.push_back((kQuadrant[q] << 2) | kOuter[j]);
  }
  for (int q = 0; q < 4; ++q) {
    const double phase = kPi / 4.0 + q * kPi / 2.0;
    c.points.emplace_back(static_cast<float>(r1 * std::cos(phase)),
                          static_cast<float>(r1 * std::sin(phase)));
    c.labels.push_back((kQuadrant[q] << 2) | kInner);
  }
  return c;
}

const ConstellationFamily k16ApskConstellation = {"16apsk", "16apsk", &Choices, &Claims, &Parse};

}  // namespace capgap
