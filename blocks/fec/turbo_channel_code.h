// Turbo codes in the code-family role (channel_code.h): a TurboCode
// (turbo_code.h: constituents, interleaver, termination, puncturing) and the
// iterative decoder (turbo_decoder.h). A frame is K = info_bits()
// information bits; coded_bits() includes the 4m tail bits, so rate() =
// K / (kept(K) + 4m) is the effective rate with the tail counted.
// Iterative: FrameDecodeResult carries the iterations (full iterations,
// a stop after decoder 1 counting as a whole one) and `converged` = the
// decisions of two consecutive half-iterations agreed before max_iterations.
#ifndef CAPGAP_BLOCKS_FEC_TURBO_CHANNEL_CODE_H_
#define CAPGAP_BLOCKS_FEC_TURBO_CHANNEL_CODE_H_

#include <memory>

#include "blocks/core/status.h"
#include "blocks/fec/channel_code.h"
#include "blocks/fec/turbo_code.h"
#include "blocks/fec/turbo_decoder.h"

namespace capgap {

class TurboChannelCode final : public ChannelCode {
 public:
  static Result<std::shared_ptr<const TurboChannelCode>> Create(
      const TurboCode& code, const TurboDecoderOptions& options);

  const TurboCode& code() const { return decoder_.code(); }
  const TurboDecoder& decoder() const { return decoder_; }

  std::size_t info_bits() const override { return code().info_bits(); }
  std::size_t coded_bits() const override { return code().coded_bits(); }
  double rate() const override { return code().rate(); }
  bool iterative() const override { return true; }
  std::unique_ptr<Workspace> MakeWorkspace(std::uint32_t max_frames) const override;
  void Encode(std::span<const Bit> info, std::span<Bit> coded, Workspace& ws) const override;
  void Decode(std::span<const float> llrs, std::span<Bit> info,
              std::span<FrameDecodeResult> results, Workspace& ws) const override;

 private:
  explicit TurboChannelCode(TurboDecoder decoder) : decoder_(std::move(decoder)) {}
  TurboDecoder decoder_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_TURBO_CHANNEL_CODE_H_
