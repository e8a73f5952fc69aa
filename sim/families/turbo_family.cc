// Code family `turbo`: frame_bits = K information bits, two identical RSC
// constituents (`polynomials` feedback,feedforward in octal), a QPP or
// S-random interleaver, both encoders terminated (4m tail bits counted in the
// rate), optional puncturing of the three streams, and the iterative decoder.
// The /<scheme>/code group holds the resolved choices and the interleaver.
#include "sim/families/turbo_family.h"

#include <any>
#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "blocks/core/rng_stream.h"
#include "blocks/core/text.h"
#include "blocks/fec/turbo_channel_code.h"
#include "sim/chain/scheme_result.h"
#include "sim/config/key_table.h"

namespace capgap {
namespace {

constexpr std::string_view kTurboWord[] = {"turbo"};
constexpr std::string_view kInterleaverWords[] = {"qpp", "s_random"};
constexpr std::string_view kQppWord[] = {"qpp"};
constexpr std::string_view kSRandomWord[] = {"s_random"};
constexpr std::string_view kDecoderWords[] = {"max_log_map", "log_map"};

Status CheckScale(const std::string& value) {
  if (value == "auto") return Status::Ok();
  return CheckValue(NumberIn(Open(0), Closed(1)), value);
}

constexpr KeySpec kTurboKeys[] = {
    {"polynomials", "13,15", Text("feedback,feedforward in octal, memory 2..4, e.g. 13,15"),
     "constituent RSC polynomials, MSB = coefficient of D^0 (13,15: 3GPP TS 36.212 §5.1.3.2)"},
    {"puncture", "none",
     Text("none, or three rows (x, z1, z2) of 0/1 separated by ',', e.g. 11,10,01"),
     "puncturing of systematic and parity streams (tail bits always sent)"},
    {"turbo_interleaver", "qpp", OneOf(kInterleaverWords),
     "QPP (Sun & Takeshita 2005; f1, f2 of 3GPP TS 36.212 Table 5.1.3-3) or S-random "
     "(Dolinar & Divsalar 1995, drawn from the run seed and scheme name)"},
    {"qpp_f1", "0", IntegerIn(0, 16777215, "0: from the table"),
     "QPP coefficient f1 (with qpp_f2; both 0: the table's, shipped for K = 40, 1024, 6144)",
     OnlyWith("turbo_interleaver", kQppWord)},
    {"qpp_f2", "0", IntegerIn(0, 16777215, "0: from the table"), "QPP coefficient f2",
     OnlyWith("turbo_interleaver", kQppWord)},
    {"s_random_spread", "0", IntegerIn(0, 4096, "0: floor(sqrt(K/2))"), "S-random spread S",
     OnlyWith("turbo_interleaver", kSRandomWord)},
    {"decoder", "max_log_map", OneOf(kDecoderWords, "valid with code = turbo"),
     "constituent SISO: max-log-MAP, or log-MAP with the exact Jacobian logarithm"},
    {"extrinsic_scale", "auto", Custom("auto, or a number in (0, 1]", &CheckScale),
     "factor on the extrinsic LLRs passed on (auto: 0.7 for max_log_map, 1 for log_map)"},
    {"max_iterations", "8", IntegerIn(1, 64),
     "full iterations at most; stops early when two consecutive half-iterations decide alike"},
};
constexpr KeyTable kTurboKeyTable = {"turbo code", kTurboKeys, OnlyWith("code", kTurboWord)};

struct TurboOptions {
  std::uint32_t feedback = 0, feedforward = 0;
  std::string polynomials;
  PuncturePattern puncture;
  std::string puncture_text = "none";
  TurboInterleaverSpec interleaver;
  TurboDecoderOptions decoder;
};

Status ParseTurbo(const ResolvedKeys& k, const std::string& /*source*/, SchemeConfig& s) {
  TurboOptions o;
  o.polynomials = k.text("polynomials");
  auto polys = ParseGenerators(o.polynomials);
  if (!polys.ok()) return k.Fail("polynomials", polys.status().message());
  if (polys.value().size() != 2) {
    return k.Fail("polynomials", "needs exactly two octal polynomials, feedback,feedforward");
  }
  o.feedback = polys.value()[0];
  o.feedforward = polys.value()[1];
  if (auto rsc = RscCode::Create(o.feedback, o.feedforward); !rsc.ok()) {
    return k.Fail("polynomials", rsc.status().message());
  }
  o.puncture_text = k.text("puncture");
  if (o.puncture_text != "none") {
    auto pat = ParsePuncturePattern(o.puncture_text);
    if (!pat.ok()) return k.Fail("puncture", pat.status().message());
    if (pat.value().rows.size() != 3) {
      return k.Fail("puncture", "needs 3 rows (x, z1, z2), has " +
                                    std::to_string(pat.value().rows.size()));
    }
    o.puncture = pat.value();
  }
  o.interleaver.kind = ParseTurboInterleaverKind(k.text("turbo_interleaver")).value();
  if (k.has("qpp_f1")) o.interleaver.qpp_f1 = static_cast<std::uint32_t>(k.integer("qpp_f1"));
  if (k.has("qpp_f2")) o.interleaver.qpp_f2 = static_cast<std::uint32_t>(k.integer("qpp_f2"));
  if ((o.interleaver.qpp_f1 == 0) != (o.interleaver.qpp_f2 == 0)) {
    return k.Fail("qpp_f1", "give qpp_f1 and qpp_f2 together (both 0: the table's)");
  }
  if (k.has("s_random_spread")) {
    o.interleaver.spread = static_cast<std::uint32_t>(k.integer("s_random_spread"));
  }
  o.decoder.kind = ParseTurboDecoderKind(k.text("decoder")).value();
  const std::string& scale = k.text("extrinsic_scale");
  o.decoder.extrinsic_scale = static_cast<float>(
      scale == "auto" ? DefaultExtrinsicScale(o.decoder.kind) : k.number("extrinsic_scale"));
  o.decoder.max_iterations = static_cast<int>(k.integer("max_iterations"));
  s.code_options = o;
  return Status::Ok();
}

Result<std::shared_ptr<const ChannelCode>> BuildTurbo(const SchemeConfig& scheme,
                                                      const std::string& p,
                                                      const BuildContext& context) {
  const auto* o = std::any_cast<TurboOptions>(&scheme.code_options);
  if (!o) return Status::Error(p + "polynomials: options not parsed");
  auto rsc = RscCode::Create(o->feedback, o->feedforward);
  if (!rsc.ok()) return Status::Error(p + "polynomials = '" + o->polynomials + "': " +
                                      rsc.status().message());
  const std::string k_text = "frame_bits = " + std::to_string(scheme.frame_bits);
  if (scheme.frame_bits < 8) return Status::Error(p + k_text + ": turbo codes need K >= 8");
  auto il = TurboInterleaver::Create(o->interleaver, scheme.frame_bits, context.key);
  if (!il.ok()) {
    return Status::Error(p + k_text + ", turbo_interleaver = " + ToString(o->interleaver.kind) +
                         ": " + il.status().message());
  }
  auto code = TurboCode::Create(rsc.value(), std::move(il).value(), o->puncture);
  if (!code.ok()) {
    return Status::Error(p + "puncture = '" + o->puncture_text + "': " + code.status().message());
  }
  const std::size_t coded = code.value().coded_bits();
  const auto m = static_cast<std::size_t>(scheme.modulation.bits_per_symbol());
  if (coded % m != 0) {
    return Status::Error(p + k_text + ": gives " + std::to_string(coded) +
                         " coded bits (tail included), not a multiple of " + std::to_string(m) +
                         " bits per symbol of " + ToString(scheme.modulation) +
                         "; choose frame_bits or puncture so that it is");
  }
  auto built = TurboChannelCode::Create(code.value(), o->decoder);
  if (!built.ok()) return Status::Error(p + "decoder: " + built.status().message());
  return std::shared_ptr<const ChannelCode>(std::move(built).value());
}

void AnalyseTurbo(const ChannelCode& channel_code, const SchemeConfig& /*scheme*/,
                  SchemeResult& r, const std::atomic<bool>* /*stop*/) {
  const auto& turbo = static_cast<const TurboChannelCode&>(channel_code);
  const TurboCode& c = turbo.code();
  const TurboDecoderOptions& d = turbo.decoder().options();
  const auto* o = &c;
  CodeReport& out = r.code;
  out.Add("info_bits", static_cast<int>(o->info_bits()));
  out.Add("polynomials", GeneratorsToString(std::vector<std::uint32_t>{
                             c.rsc().feedback(), c.rsc().feedforward()}));
  out.Add("memory", c.rsc().memory());
  out.Add("puncture", c.puncture().empty() ? std::string("none") : ToString(c.puncture()));
  out.Add("tail_bits", static_cast<int>(c.tail_bits()));
  const TurboInterleaver& il = c.interleaver();
  const bool qpp = il.spread() == 0;
  out.Add("turbo_interleaver", std::string(qpp ? "qpp" : "s_random"));
  if (qpp) {
    out.Add("qpp_f1", static_cast<int>(il.f1()));
    out.Add("qpp_f2", static_cast<int>(il.f2()));
  } else {
    out.Add("s_random_spread", static_cast<int>(il.spread()));
  }
  out.Add("decoder", ToString(d.kind));
  out.Add("extrinsic_scale", static_cast<double>(d.extrinsic_scale));
  out.Add("max_iterations", d.max_iterations);
  out.Add("stream_order",
          std::string("per step x, z1, z2 (punctured ones omitted); then x, z tail pairs of "
                      "encoder 1, then of encoder 2; encoder 2 reads u[pi(t)]"));
  out.Add("code_rate_basis", std::string("information bits / transmitted bits, the 4m tail bits "
                                         "of both encoders included"));
  std::vector<std::int32_t> perm(il.permutation().begin(), il.permutation().end());
  out.AddSeries("interleaver", std::move(perm));
}

}  // namespace

const CodeFamily kTurboFamily = {"turbo",     &kTurboKeyTable, /*fixed_frame=*/false,
                                 /*unit_frames_multiple=*/16, &ParseTurbo, &BuildTurbo,
                                 &AnalyseTurbo};

}  // namespace capgap
