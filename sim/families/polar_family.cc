// Code family `polar`: info_bits information bits (+ crc_bits CRC) on a
// polar code of mother length N = 2^m >= length, rate-matched to `length`
// transmitted bits (blocks/fec/polar_construction.h for the construction and
// rate matching, polar_channel_code.h for the rest). A frame is one
// codeword; rate = info_bits / length. The /<scheme>/code group holds the
// resolved choices and the frozen and information sets.
#include "sim/families/polar_family.h"

#include <any>
#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "blocks/core/text.h"
#include "blocks/fec/polar_channel_code.h"
#include "blocks/kernels/dispatch.h"
#include "blocks/kernels/polar_sc_kernels.h"
#include "sim/chain/scheme_result.h"
#include "sim/config/key_table.h"

namespace capgap {
namespace {

constexpr std::string_view kPolarWord[] = {"polar"};
constexpr std::string_view kConstructionWords[] = {"ga", "bhattacharyya", "beta"};
constexpr std::string_view kSnrConstructionWords[] = {"ga", "bhattacharyya"};
constexpr std::string_view kRateMatchingWords[] = {"auto", "puncture", "shorten"};
constexpr std::string_view kDecoderWords[] = {"sc", "scl"};
constexpr std::string_view kSclWord[] = {"scl"};
constexpr std::string_view kYesNo[] = {"yes", "no"};

// Default CRC polynomials by width: those of 3GPP TS 38.212 §5.1 (CRC6,
// CRC11, CRC16, CRC24C; leading term implied).
struct DefaultCrc {
  int bits;
  std::uint32_t polynomial;
};
constexpr DefaultCrc kDefaultCrcs[] = {{6, 0x21}, {11, 0x621}, {16, 0x1021}, {24, 0xB2B117}};

// "0x621", "0X621" or "621": 1 to 6 hexadecimal digits.
Result<std::uint32_t> ParseHexPolynomial(const std::string& text) {
  std::string_view t = text;
  if (t.size() >= 2 && t[0] == '0' && (t[1] == 'x' || t[1] == 'X')) t.remove_prefix(2);
  if (t.empty() || t.size() > 6) return Status::Error("1 to 6 hexadecimal digits, e.g. 0x621");
  std::uint32_t v = 0;
  for (char ch : t) {
    int d = -1;
    if (ch >= '0' && ch <= '9') d = ch - '0';
    if (ch >= 'a' && ch <= 'f') d = ch - 'a' + 10;
    if (ch >= 'A' && ch <= 'F') d = ch - 'A' + 10;
    if (d < 0) return Status::Error("not hexadecimal; e.g. 0x621");
    v = (v << 4) | static_cast<std::uint32_t>(d);
  }
  return v;
}

Status CheckHexPolynomial(const std::string& value) {
  auto v = ParseHexPolynomial(value);
  return v.ok() ? Status::Ok() : Status::Error("must be " + v.status().message());
}

constexpr KeySpec kPolarKeys[] = {
    {"info_bits", nullptr, IntegerIn(1, 32768), "information bits k per codeword (CRC not included)"},
    {"length", nullptr, IntegerIn(5, 32768),
     "transmitted bits E per codeword; mother length N = smallest power of two >= E (8..32768); "
     "a multiple of bits per symbol"},
    {"polar_construction", "ga", OneOf(kConstructionWords),
     "reliability order: Gaussian approximation (Trifonov 2012), Bhattacharyya, or beta "
     "expansion (beta = 2^(1/4), He et al. 2017)"},
    {"design_ebno_db", "2", NumberIn(Closed(-20), Closed(40), "dB"),
     "design Eb/N0 of the construction (design Ec/N0 = Eb/N0 + 10 log10(info_bits / length))",
     OnlyWith("polar_construction", kSnrConstructionWords)},
    {"rate_matching", "auto", OneOf(kRateMatchingWords),
     "when length < N: puncture the first or shorten the last N - length coded bits; auto: "
     "puncture iff (info_bits + crc_bits) / length <= 7/16 (3GPP TS 38.212 §5.4.1.1)"},
    {"crc_bits", "0", IntegerIn(0, 24), "CRC bits appended to the information bits"},
    {"crc_polynomial", "",
     Custom("hexadecimal, leading term implied, e.g. 0x621", &CheckHexPolynomial),
     "CRC generator (default for crc_bits = 6, 11, 16, 24: 0x21, 0x621, 0x1021, 0xB2B117 of 3GPP "
     "TS 38.212 §5.1)"},
    {"decoder", "scl", OneOf(kDecoderWords, "valid with code = polar"),
     "successive cancellation, or SC list with LLR path metrics (CRC-aided when crc_bits > 0)"},
    {"list_size", "8", IntegerIn(1, 32), "paths kept by the list decoder",
     OnlyWith("decoder", kSclWord)},
    {"systematic", "no", OneOf(kYesNo),
     "systematic encoding (information bits on the codeword, same frozen set)"},
};
constexpr KeyTable kPolarKeyTable = {"polar code", kPolarKeys, OnlyWith("code", kPolarWord)};

Status ParsePolar(const ResolvedKeys& k, const std::string& /*source*/, SchemeConfig& s) {
  PolarCodeOptions o;
  if (Status st = CheckMultipleOfBitsPerSymbol(k, "length", s.modulation); !st.ok()) return st;
  o.info_bits = static_cast<int>(k.integer("info_bits"));
  o.length = static_cast<int>(k.integer("length"));
  o.construction = ParsePolarConstruction(k.text("polar_construction")).value();
  if (k.has("design_ebno_db")) o.design_ebno_db = k.number("design_ebno_db");
  o.rate_matching = ParsePolarRateMatching(k.text("rate_matching")).value();
  o.crc_bits = static_cast<int>(k.integer("crc_bits"));
  if (o.info_bits + o.crc_bits > o.length) {
    return k.Fail("info_bits", "info_bits + crc_bits = " + std::to_string(o.info_bits + o.crc_bits) +
                                   " must be <= length = " + std::to_string(o.length));
  }
  const bool given_poly = k.has("crc_polynomial") && !k.text("crc_polynomial").empty();
  if (o.crc_bits == 0 && given_poly) {
    return k.Fail("crc_polynomial", "applies only with crc_bits > 0 (crc_bits = 0)");
  }
  if (o.crc_bits > 0) {
    if (given_poly) {
      o.crc_polynomial = ParseHexPolynomial(k.text("crc_polynomial")).value();
      auto crc = Crc::Create(o.crc_bits, o.crc_polynomial);
      if (!crc.ok()) {
        return k.Fail("crc_polynomial", "with crc_bits = " + std::to_string(o.crc_bits) + ": " +
                                            crc.status().message());
      }
    } else {
      bool found = false;
      for (const DefaultCrc& d : kDefaultCrcs) {
        if (d.bits == o.crc_bits) {
          o.crc_polynomial = d.polynomial;
          found = true;
        }
      }
      if (!found) {
        return k.Fail("crc_bits", "has no default polynomial (defaults exist for 6, 11, 16, 24); "
                                  "give crc_polynomial");
      }
    }
  }
  o.decoder = k.text("decoder") == "sc" ? PolarDecoderKind::kSc : PolarDecoderKind::kScl;
  if (k.has("list_size")) o.list_size = static_cast<int>(k.integer("list_size"));
  o.systematic = k.text("systematic") == "yes";
  s.code_options = o;
  return Status::Ok();
}

std::string Hex(std::uint32_t v) {
  static constexpr char kDigits[] = "0123456789ABCDEF";
  std::string out;
  do {
    out.insert(out.begin(), kDigits[v & 15u]);
    v >>= 4;
  } while (v != 0);
  return "0x" + out;
}

Result<std::shared_ptr<const ChannelCode>> BuildPolar(const SchemeConfig& scheme,
                                                      const std::string& p,
                                                      const BuildContext& /*context*/) {
  const auto* o = std::any_cast<PolarCodeOptions>(&scheme.code_options);
  if (!o) return Status::Error(p + "info_bits: options not parsed");
  auto built = PolarChannelCode::Create(*o);
  if (!built.ok()) {
    const std::string key = o->systematic && built.status().message().find("systematic") !=
                                                 std::string::npos
                                ? "systematic = yes"
                                : "length = " + std::to_string(o->length);
    return Status::Error(p + key + ": " + built.status().message());
  }
  return std::shared_ptr<const ChannelCode>(std::move(built).value());
}

void AnalysePolar(const ChannelCode& channel_code, const SchemeConfig& /*scheme*/,
                  SchemeResult& r, const std::atomic<bool>* /*stop*/) {
  const auto& polar = static_cast<const PolarChannelCode&>(channel_code);
  const PolarCodeOptions& o = polar.options();
  const PolarCode& c = polar.code();
  CodeReport& out = r.code;
  out.Add("info_bits", o.info_bits);
  out.Add("length", o.length);
  out.Add("mother_length", c.mother_length);
  out.Add("polar_construction", std::string(ToString(o.construction)));
  if (o.construction != PolarConstruction::kBeta) out.Add("design_ebno_db", o.design_ebno_db);
  out.Add("rate_matching", std::string(ToString(c.rate_matching)));
  out.Add("crc_bits", o.crc_bits);
  if (o.crc_bits > 0) out.Add("crc_polynomial", Hex(o.crc_polynomial));
  out.Add("decoder", std::string(o.decoder == PolarDecoderKind::kSc ? "sc" : "scl"));
  if (o.decoder == PolarDecoderKind::kScl) out.Add("list_size", o.list_size);
  // SC runs the frames-across-lanes kernel; SCL is scalar.
  out.Add("kernel_target", std::string(o.decoder == PolarDecoderKind::kSc
                                           ? PolarScKernelTarget()
                                           : kernel_dispatch::ScalarTargetName()));
  out.Add("systematic", std::string(o.systematic ? "yes" : "no"));
  out.Add("bit_order",
          std::string("x = u F^(x)m, F = [[1,0],[1,1]], no bit reversal; punctured: first "
                      "mother positions, shortened: last"));
  out.Add("code_rate_basis", std::string("information bits / transmitted bits (CRC counted "
                                         "against the rate)"));
  std::vector<std::int32_t> frozen_set, info_set(c.info_positions.begin(), c.info_positions.end());
  for (std::size_t i = 0; i < c.frozen.size(); ++i) {
    if (c.frozen[i]) frozen_set.push_back(static_cast<std::int32_t>(i));
  }
  out.AddSeries("frozen_set", std::move(frozen_set));
  out.AddSeries("information_set", std::move(info_set));
  out.AddSeries("reliability", c.reliability);
}

}  // namespace

const CodeFamily kPolarFamily = {"polar",     &kPolarKeyTable, /*fixed_frame=*/true,
                                 /*unit_frames_multiple=*/1, &ParsePolar, &BuildPolar,
                                 &AnalysePolar};

}  // namespace capgap
