// Convolutional codes in the code-family role (channel_code.h): a ConvCode
// (terminated or tail-biting, optionally punctured) with its Viterbi decoder
// (soft, or hard on the LLR signs) or max-log BCJR decoder
// (viterbi_decoder.h, bcjr_decoder.h). Frames of info_bits() information
// bits; coded_bits() = CodedLength(info_bits()) (tail and puncturing in);
// rate() = EffectiveRate(info_bits()).
#ifndef CAPGAP_BLOCKS_FEC_CONV_CHANNEL_CODE_H_
#define CAPGAP_BLOCKS_FEC_CONV_CHANNEL_CODE_H_

#include <memory>
#include <optional>
#include <string>
#include <string_view>

#include "blocks/core/status.h"
#include "blocks/fec/bcjr_decoder.h"
#include "blocks/fec/channel_code.h"
#include "blocks/fec/conv_code.h"
#include "blocks/fec/viterbi_decoder.h"

namespace capgap {

enum class ConvDecoderKind { kViterbiSoft, kViterbiHard, kBcjr };

// Words viterbi_soft, viterbi_hard, bcjr; an error message lists them.
Result<ConvDecoderKind> ParseConvDecoderKind(std::string_view word);
std::string ToString(ConvDecoderKind kind);

class ConvChannelCode final : public ChannelCode {
 public:
  // traceback_length as ViterbiOptions (-1: automatic); ignored by BCJR.
  // Messages of the decoders' Create() are passed on.
  static Result<std::shared_ptr<const ConvChannelCode>> Create(const ConvCode& code,
                                                               ConvDecoderKind decoder,
                                                               int traceback_length,
                                                               std::size_t info_bits);

  const ConvCode& code() const { return code_; }
  ConvDecoderKind decoder() const { return decoder_; }

  std::size_t info_bits() const override { return info_bits_; }
  std::size_t coded_bits() const override { return coded_bits_; }
  double rate() const override { return rate_; }
  std::unique_ptr<Workspace> MakeWorkspace(std::uint32_t max_frames) const override;
  void Encode(std::span<const Bit> info, std::span<Bit> coded, Workspace& ws) const override;
  void Decode(std::span<const float> llrs, std::span<Bit> info,
              std::span<FrameDecodeResult> results, Workspace& ws) const override;

 private:
  explicit ConvChannelCode(ConvCode code) : code_(std::move(code)) {}
  ConvCode code_;
  ConvDecoderKind decoder_ = ConvDecoderKind::kViterbiSoft;
  std::optional<ViterbiDecoder> viterbi_;
  std::optional<BcjrDecoder> bcjr_;
  std::size_t info_bits_ = 0, coded_bits_ = 0;
  double rate_ = 1;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_CONV_CHANNEL_CODE_H_
