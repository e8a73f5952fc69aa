// Code family `conv`: convolutional codes (generators, constraint_length,
// puncture, termination, decoder, traceback) built into a ConvChannelCode.
#include "sim/families/conv_family.h"

#include <memory>

#include <algorithm>

#include "blocks/fec/conv_channel_code.h"
#include "blocks/fec/distance_spectrum.h"
#include "sim/chain/scheme_result.h"
#include "sim/config/key_table.h"

namespace capgap {
namespace {

// The keys of code = conv.
constexpr std::string_view kConvWord[] = {"conv"};
constexpr std::string_view kTerminationWords[] = {"tail", "tailbiting"};
constexpr std::string_view kConvDecoderWords[] = {"viterbi_soft", "viterbi_hard", "bcjr"};

constexpr KeySpec kConvKeys[] = {
    {"generators", "133,171", Text("octal generator list, one per coded output, e.g. 133,171"),
     "generator polynomials, MSB = tap on the current input bit"},
    {"constraint_length", "7", IntegerIn(3, 9), "constraint length K"},
    {"puncture", "none",
     Text("none, or pattern rows separated by ',' (one row of 0/1 per generator), e.g. 110,101"),
     "puncturing pattern; punctured positions reach the decoder as erasures"},
    {"termination", "tail", OneOf(kTerminationWords),
     "K-1 zero tail bits (counted in the rate) or tail-biting"},
    {"decoder", "viterbi_soft", OneOf(kConvDecoderWords), "decoder (bcjr: max-log, tail only)"},
    {"traceback", "0", IntegerIn(0, 100000, "0: automatic"),
     "Viterbi traceback depth in trellis steps (automatic: 5 K, 10 K when punctured)"},
};

constexpr KeyTable kConvKeyTable = {"convolutional code", kConvKeys, OnlyWith("code", kConvWord)};

Status ParseConv(const ResolvedKeys& k, const std::string& /*source*/, SchemeConfig& s) {
  ConvSchemeConfig& c = s.conv;
  c.generators = k.text("generators");
  c.constraint_length = static_cast<int>(k.integer("constraint_length"));
  c.puncture = k.text("puncture");
  // The key table admitted only its words; each enum has one ParseX.
  auto termination = ParseTermination(k.text("termination"));
  if (!termination.ok()) return k.Fail("termination", termination.status().message());
  c.termination = termination.value();
  auto decoder = ParseConvDecoderKind(k.text("decoder"));
  if (!decoder.ok()) return k.Fail("decoder", decoder.status().message());
  c.decoder = decoder.value();
  c.traceback = static_cast<int>(k.integer("traceback"));
  return Status::Ok();
}

Result<std::shared_ptr<const ChannelCode>> BuildConv(const SchemeConfig& scheme,
                                                     const std::string& p,
                                                     const BuildContext& /*context*/) {
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
  spec.termination = c.termination;
  auto code = ConvCode::Create(spec);
  if (!code.ok()) return Status::Error(p + "generators/puncture: " + code.status().message());
  auto built = ConvChannelCode::Create(code.value(), c.decoder,
                                       c.traceback == 0 ? -1 : c.traceback, scheme.frame_bits);
  if (!built.ok()) {
    return Status::Error(p + "decoder = '" + ToString(c.decoder) + "': " +
                         built.status().message());
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
void AnalyseConv(const ChannelCode& code, const SchemeConfig& scheme, SchemeResult& r,
                 const std::atomic<bool>* /*stop*/) {
  const auto& conv = static_cast<const ConvChannelCode&>(code);
  const ConvSchemeConfig& c = scheme.conv;
  auto spectrum = ComputeDistanceSpectrum(conv.code(), 10);
  if (!spectrum.ok()) return;
  const DistanceSpectrum& d = spectrum.value();
  CodeReport& out = r.code;
  out.Add("free_distance", d.free_distance);
  out.Add("generators", c.generators);
  out.Add("constraint_length", c.constraint_length);
  out.Add("puncture", c.puncture);
  out.Add("termination", ToString(c.termination));
  out.Add("decoder", ToString(c.decoder));
  out.Add("traceback", c.traceback);
  out.Add("code_rate_basis",
          std::string("effective rate: information bits / transmitted coded bits per frame, tail "
                      "bits and puncturing included"));
  out.AddSeries("spectrum_distance",
                std::vector<std::int32_t>(d.distances.begin(), d.distances.end()));
  out.AddSeries("spectrum_info_weight", d.info_weight);
  out.AddSeries("spectrum_events", d.num_events);
  // The bound assumes binary antipodal signalling per coded bit: BPSK, or
  // Gray QPSK (two independent BPSK channels). Other mappers: omitted.
  const Modulation& mod = scheme.modulation;
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

}  // namespace

const CodeFamily kConvFamily = {"conv",     &kConvKeyTable, /*fixed_frame=*/false,
                                /*unit_frames_multiple=*/1, &ParseConv, &BuildConv,
                                &AnalyseConv};

}  // namespace capgap
