// Code family `conv`: convolutional codes (generators, constraint_length,
// puncture, termination, decoder, traceback) built into a ConvChannelCode.
#include <memory>

#include <algorithm>

#include "blocks/fec/conv_channel_code.h"
#include "blocks/fec/distance_spectrum.h"
#include "sim/families/families.h"

namespace capgap {
namespace {

Result<ConvDecoderKind> ParseConvDecoder(const std::string& word) {
  if (word == "viterbi_soft") return ConvDecoderKind::kViterbiSoft;
  if (word == "viterbi_hard") return ConvDecoderKind::kViterbiHard;
  if (word == "bcjr") return ConvDecoderKind::kBcjr;
  return Status::Error("valid: viterbi_soft, viterbi_hard, bcjr");
}

}  // namespace

Result<std::shared_ptr<const ChannelCode>> BuildConv(const SchemeConfig& scheme,
                                                     const std::string& p) {
  const ConvSchemeConfig& c = scheme.conv;
  ConvCodeSpec spec;
  auto gens = ParseGenerators(c.generators);
  if (!gens.ok()) {
    return Status::Error(p + "generators = '" + c.generators + "': " + gens.status().message());
  }
  spec.generators = gens.value();
  spec.constraint_length = c.constraint_length;
  if (c.puncture != "none") {
    auto pat = ParsePuncturePattern(c.puncture);
    if (!pat.ok()) {
      return Status::Error(p + "puncture = '" + c.puncture + "': " + pat.status().message());
    }
    spec.puncture = pat.value();
  }
  spec.termination =
      c.termination == "tailbiting" ? Termination::kTailBiting : Termination::kTerminated;
  auto code = ConvCode::Create(spec);
  if (!code.ok()) return Status::Error(p + "generators/puncture: " + code.status().message());
  auto kind = ParseConvDecoder(c.decoder);
  if (!kind.ok()) return Status::Error(p + "decoder = '" + c.decoder + "': " + kind.status().message());
  auto built = ConvChannelCode::Create(code.value(), kind.value(),
                                       c.traceback == 0 ? -1 : c.traceback, scheme.frame_bits);
  if (!built.ok()) {
    return Status::Error(p + "decoder = '" + c.decoder + "': " + built.status().message());
  }
  const std::size_t coded = built.value()->coded_bits();
  const auto m = static_cast<std::size_t>(scheme.modulation.bits_per_symbol());
  if (coded % m != 0) {
    return Status::Error(p + "frame_bits = " + std::to_string(scheme.frame_bits) + ": gives " +
                         std::to_string(coded) + " coded bits, not a multiple of " +
                         std::to_string(m) + " bits per symbol of " + ToString(scheme.modulation) +
                         "; choose frame_bits so that the coded length is");
  }
  return std::shared_ptr<const ChannelCode>(std::move(built).value());
}

// The free distance and distance spectrum, and the soft-decision union
// bound on BER beside the curve where it applies.
void AnalyseConv(const ChannelCode& code, const SchemeConfig& scheme, SchemeResult& r) {
  const auto& conv = static_cast<const ConvChannelCode&>(code);
  const Modulation& mod = scheme.modulation;
  {
    auto spectrum = ComputeDistanceSpectrum(conv.code(), 10);
    if (spectrum.ok()) {
      const DistanceSpectrum& d = spectrum.value();
      r.code.present = true;
      r.code.free_distance = d.free_distance;
      r.code.spectrum_distance = d.distances;
      r.code.spectrum_info_weight = d.info_weight;
      r.code.spectrum_events = d.num_events;
      // The bound assumes binary antipodal signalling per coded bit: BPSK, or
      // Gray QPSK (two independent BPSK channels). Other mappers: omitted.
      const bool binary = mod.family == ModulationFamily::kPsk && mod.order <= 4;
      if (binary) {
        r.theory.bound_channel =
            "soft-decision union bound, 10 terms, BPSK/QPSK on AWGN, effective rate (tail "
            "and puncturing included)";
        for (double x : r.theory.ebno_db) {
          r.theory.ber_bound.push_back(std::min(0.5, UnionBoundBer(d, x, r.code_rate)));
        }
      }
    }
  }

}

}  // namespace capgap
