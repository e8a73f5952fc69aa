// Code family `block`: a short binary linear block code (k <= 16), built in
// (block_code = hamming8 | golay24) or read from a generator file
// (block_code = file, generator_file = PATH relative to the config file; the
// format is in blocks/fec/block_code_file.h), decoded by exhaustive ML
// correlation over all 2^k codewords. A frame is one codeword. Beside the
// curve: the ML union bounds on FER and BER from the code's weight
// enumerator (analysis/block_code_bound.h), for BPSK and Gray QPSK, where
// every coded bit sees a binary antipodal channel.
#include "sim/families/block_family.h"

#include <algorithm>
#include <any>
#include <filesystem>
#include <memory>
#include <string>

#include "analysis/block_code_bound.h"
#include "blocks/fec/block_channel_code.h"
#include "blocks/fec/block_code_file.h"
#include "sim/chain/scheme_result.h"
#include "sim/config/key_table.h"

namespace capgap {
namespace {

constexpr std::string_view kBlockWord[] = {"block"};
constexpr std::string_view kBlockCodeWords[] = {"hamming8", "golay24", "file"};
constexpr std::string_view kFileWord[] = {"file"};

constexpr KeySpec kBlockKeys[] = {
    {"block_code", "golay24", OneOf(kBlockCodeWords),
     "extended Hamming (8,4), extended Golay (24,12), or a generator matrix file"},
    {"generator_file", nullptr,
     Text("path of a generator matrix file (relative to the config file), k <= 16",
          "must name a generator file"),
     "generator matrix in capgap's block-code text format", OnlyWith("block_code", kFileWord)},
};
constexpr KeyTable kBlockKeyTable = {"block code (exhaustive ML decoding)", kBlockKeys,
                                     OnlyWith("code", kBlockWord)};

// The family's typed options (SchemeConfig::code_options).
struct BlockOptions {
  std::string code;            // hamming8, golay24, file
  std::string generator_file;  // as given
  std::string generator_path;  // resolved against the config file's directory
};

Status ParseBlock(const ResolvedKeys& k, const std::string& source, SchemeConfig& s) {
  BlockOptions o;
  o.code = k.text("block_code");
  if (o.code == "file") {
    o.generator_file = k.text("generator_file");
    const std::filesystem::path p(o.generator_file);
    o.generator_path = p.is_absolute()
                           ? o.generator_file
                           : (std::filesystem::path(source).parent_path() / p).string();
  }
  s.code_options = o;
  return Status::Ok();
}

Result<std::shared_ptr<const ChannelCode>> BuildBlock(const SchemeConfig& scheme,
                                                      const std::string& p,
                                                      const BuildContext& /*context*/) {
  const auto* o = std::any_cast<BlockOptions>(&scheme.code_options);
  if (!o) return Status::Error(p + "block_code: options not parsed");
  Result<BlockCode> code = Status::Error("unset");
  if (o->code == "file") {
    code = ReadBlockCodeFile(o->generator_path);
    if (!code.ok()) return Status::Error(p + "generator_file: " + code.status().message());
  } else {
    code = BlockCode::BuiltIn(o->code);
    if (!code.ok()) {
      return Status::Error(p + "block_code = '" + o->code + "': " + code.status().message());
    }
  }
  const int n = code.value().n();
  const int m = scheme.modulation.bits_per_symbol();
  if (n % m != 0) {
    return Status::Error(p + "block_code = '" + o->code + "': code length n = " +
                         std::to_string(n) + " is not a multiple of " + std::to_string(m) +
                         " bits per symbol of " + ToString(scheme.modulation));
  }
  auto built = BlockChannelCode::Create(code.value());
  if (!built.ok()) return Status::Error(p + "block_code: " + built.status().message());
  return std::shared_ptr<const ChannelCode>(std::move(built).value());
}

void AnalyseBlock(const ChannelCode& channel_code, const SchemeConfig& scheme, SchemeResult& r) {
  const auto& block = static_cast<const BlockChannelCode&>(channel_code);
  const BlockCode& code = block.code();
  const BlockWeightEnumerator& we = code.weight_enumerator();
  const auto* o = std::any_cast<BlockOptions>(&scheme.code_options);
  CodeReport& out = r.code;
  out.Add("block_code", o ? o->code : std::string("?"));
  if (o && !o->generator_file.empty()) out.Add("generator_file", o->generator_file);
  out.Add("name", code.name());
  out.Add("length", code.n());
  out.Add("info_bits", code.k());
  out.Add("min_distance", code.min_distance());
  out.Add("decoder", std::string("exhaustive maximum-likelihood correlation over all 2^k codewords"));
  out.Add("kernel_target", std::string(block.decoder().KernelTarget()));
  out.Add("code_rate_basis", std::string("information bits k / code length n"));
  out.AddSeries("weight_enumerator", we.codewords);
  out.AddSeries("info_weight_enumerator", we.info_weight);
  const Modulation& mod = scheme.modulation;
  if (mod.family == ModulationFamily::kPsk && mod.order <= 4) {
    r.theory.bound_channel =
        "ML union bound from the weight enumerator, BPSK/QPSK on AWGN, rate k/n "
        "(FER: sum_w A_w Q(sqrt(2 w R Eb/N0)); BER: B_w / k in place of A_w)";
    const auto fer = analysis::BlockCodeFerUnionBound(we, r.theory.ebno_db);
    const auto ber = analysis::BlockCodeBerUnionBound(we, r.theory.ebno_db);
    for (double x : fer) r.theory.fer_bound.push_back(std::min(1.0, x));
    for (double x : ber) r.theory.ber_bound.push_back(std::min(0.5, x));
  }
}

}  // namespace

const CodeFamily kBlockFamily = {"block",    &kBlockKeyTable, /*fixed_frame=*/true,
                                 /*unit_frames_multiple=*/1, &ParseBlock, &BuildBlock,
                                 &AnalyseBlock};

}  // namespace capgap
