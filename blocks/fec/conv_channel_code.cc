// ConvChannelCode: a convolutional code and its decoder behind the
// code-family role.
#include "blocks/fec/conv_channel_code.h"

#include <vector>

#include "blocks/mapping/demapper.h"

namespace capgap {

Result<ConvDecoderKind> ParseConvDecoderKind(std::string_view word) {
  if (word == "viterbi_soft") return ConvDecoderKind::kViterbiSoft;
  if (word == "viterbi_hard") return ConvDecoderKind::kViterbiHard;
  if (word == "bcjr") return ConvDecoderKind::kBcjr;
  return Status::Error("valid: viterbi_soft, viterbi_hard, bcjr");
}

std::string ToString(ConvDecoderKind kind) {
  switch (kind) {
    case ConvDecoderKind::kViterbiSoft:
      return "viterbi_soft";
    case ConvDecoderKind::kViterbiHard:
      return "viterbi_hard";
    case ConvDecoderKind::kBcjr:
      return "bcjr";
  }
  return "unknown";
}
namespace {

class ConvWorkspace final : public ChannelCode::Workspace {
 public:
  ViterbiDecoder::Workspace viterbi;
  BcjrDecoder::Workspace bcjr;
  std::vector<Bit> coded_hard;    // hard Viterbi: signs of the LLRs
  std::vector<float> info_llrs;   // BCJR: a posteriori LLRs of the info bits
};

}  // namespace

Result<std::shared_ptr<const ConvChannelCode>> ConvChannelCode::Create(const ConvCode& code,
                                                                       ConvDecoderKind decoder,
                                                                       int traceback_length,
                                                                       std::size_t info_bits) {
  std::shared_ptr<ConvChannelCode> c(new ConvChannelCode(code));
  c->decoder_ = decoder;
  if (decoder == ConvDecoderKind::kBcjr) {
    auto dec = BcjrDecoder::Create(code);
    if (!dec.ok()) return dec.status();
    c->bcjr_ = std::move(dec).value();
  } else {
    ViterbiOptions opt;
    opt.traceback_length = traceback_length;
    auto dec = ViterbiDecoder::Create(code, opt);
    if (!dec.ok()) return dec.status();
    c->viterbi_ = std::move(dec).value();
  }
  c->info_bits_ = info_bits;
  c->coded_bits_ = code.CodedLength(info_bits);
  c->rate_ = code.EffectiveRate(info_bits);
  return std::shared_ptr<const ConvChannelCode>(std::move(c));
}

std::unique_ptr<ChannelCode::Workspace> ConvChannelCode::MakeWorkspace(std::uint32_t) const {
  auto ws = std::make_unique<ConvWorkspace>();
  if (viterbi_) ws->viterbi = viterbi_->MakeWorkspace(info_bits_);
  if (bcjr_) {
    ws->bcjr = bcjr_->MakeWorkspace(info_bits_);
    ws->info_llrs.resize(info_bits_);
  }
  if (decoder_ == ConvDecoderKind::kViterbiHard) ws->coded_hard.resize(coded_bits_);
  return ws;
}

void ConvChannelCode::Encode(std::span<const Bit> info, std::span<Bit> coded, Workspace&) const {
  code_.Encode(info, coded);
}

void ConvChannelCode::Decode(std::span<const float> llrs, std::span<Bit> info,
                             std::span<FrameDecodeResult> results, Workspace& base) const {
  auto& ws = static_cast<ConvWorkspace&>(base);
  for (std::size_t f = 0; f < results.size(); ++f) {
    const auto frame_llrs = llrs.subspan(f * coded_bits_, coded_bits_);
    const auto frame_info = info.subspan(f * info_bits_, info_bits_);
    switch (decoder_) {
      case ConvDecoderKind::kBcjr:
        bcjr_->Decode(frame_llrs, ws.info_llrs, ws.bcjr);
        LlrToBits(ws.info_llrs, frame_info);
        break;
      case ConvDecoderKind::kViterbiHard:
        LlrToBits(frame_llrs, ws.coded_hard);
        viterbi_->DecodeHard(ws.coded_hard, frame_info, ws.viterbi);
        break;
      case ConvDecoderKind::kViterbiSoft:
        viterbi_->Decode(frame_llrs, frame_info, ws.viterbi);
        break;
    }
    results[f] = FrameDecodeResult{};
  }
}

}  // namespace capgap
