// BlockChannelCode: a short block code and its exhaustive ML decoder behind
// the code-family role.
#include "blocks/fec/block_channel_code.h"

#include <algorithm>

namespace capgap {
namespace {

class BlockWorkspace final : public ChannelCode::Workspace {
 public:
  explicit BlockWorkspace(BlockMlDecoder::Workspace ws) : decoder(std::move(ws)) {}
  BlockMlDecoder::Workspace decoder;
};

}  // namespace

Result<std::shared_ptr<const BlockChannelCode>> BlockChannelCode::Create(const BlockCode& code) {
  auto decoder = BlockMlDecoder::Create(code);
  if (!decoder.ok()) return decoder.status();
  return std::shared_ptr<const BlockChannelCode>(
      new BlockChannelCode(std::move(decoder).value()));
}

std::unique_ptr<ChannelCode::Workspace> BlockChannelCode::MakeWorkspace(std::uint32_t) const {
  return std::make_unique<BlockWorkspace>(decoder_.MakeWorkspace());
}

void BlockChannelCode::Encode(std::span<const Bit> info, std::span<Bit> coded, Workspace&) const {
  code().Encode(info, coded);
}

void BlockChannelCode::Decode(std::span<const float> llrs, std::span<Bit> info,
                              std::span<FrameDecodeResult> results, Workspace& base) const {
  auto& ws = static_cast<BlockWorkspace&>(base);
  decoder_.Decode(llrs, info, ws.decoder);
  std::fill(results.begin(), results.end(), FrameDecodeResult{});
}

}  // namespace capgap
