// Short binary linear block codes in the code-family role (channel_code.h):
// a BlockCode (k <= 16, block_code.h) with its exhaustive maximum-likelihood
// soft decoder (block_ml_decoder.h). A frame is one codeword: info_bits() =
// k, coded_bits() = n, rate() = k / n. Decoding takes a whole work unit per
// call (codewords across SIMD lanes inside the decoder); each frame's
// decision is the ML codeword, the same on every CPU, whatever the batch.
#ifndef CAPGAP_BLOCKS_FEC_BLOCK_CHANNEL_CODE_H_
#define CAPGAP_BLOCKS_FEC_BLOCK_CHANNEL_CODE_H_

#include <memory>

#include "blocks/core/status.h"
#include "blocks/fec/block_code.h"
#include "blocks/fec/block_ml_decoder.h"
#include "blocks/fec/channel_code.h"

namespace capgap {

class BlockChannelCode final : public ChannelCode {
 public:
  static Result<std::shared_ptr<const BlockChannelCode>> Create(const BlockCode& code);

  const BlockCode& code() const { return decoder_.code(); }
  const BlockMlDecoder& decoder() const { return decoder_; }

  std::size_t info_bits() const override { return static_cast<std::size_t>(code().k()); }
  std::size_t coded_bits() const override { return static_cast<std::size_t>(code().n()); }
  double rate() const override { return code().rate(); }
  std::uint32_t batch_frames(std::uint32_t unit_frames) const override { return unit_frames; }
  std::unique_ptr<Workspace> MakeWorkspace(std::uint32_t max_frames) const override;
  void Encode(std::span<const Bit> info, std::span<Bit> coded, Workspace& ws) const override;
  void Decode(std::span<const float> llrs, std::span<Bit> info,
              std::span<FrameDecodeResult> results, Workspace& ws) const override;

 private:
  explicit BlockChannelCode(BlockMlDecoder decoder) : decoder_(std::move(decoder)) {}
  BlockMlDecoder decoder_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_BLOCK_CHANNEL_CODE_H_
