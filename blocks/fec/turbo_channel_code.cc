// TurboChannelCode: the turbo encoder and decoder behind the code-family role.
#include "blocks/fec/turbo_channel_code.h"

#include <vector>

namespace capgap {
namespace {

class TurboWorkspace final : public ChannelCode::Workspace {
 public:
  std::vector<Bit> scratch;  // encoder: interleaved input and two parities
  TurboDecoder::Workspace decoder;
};

}  // namespace

Result<std::shared_ptr<const TurboChannelCode>> TurboChannelCode::Create(
    const TurboCode& code, const TurboDecoderOptions& options) {
  auto decoder = TurboDecoder::Create(code, options);
  if (!decoder.ok()) return decoder.status();
  return std::shared_ptr<const TurboChannelCode>(
      new TurboChannelCode(std::move(decoder).value()));
}

std::unique_ptr<ChannelCode::Workspace> TurboChannelCode::MakeWorkspace(std::uint32_t) const {
  auto ws = std::make_unique<TurboWorkspace>();
  ws->scratch.resize(3 * info_bits());
  ws->decoder = decoder_.MakeWorkspace();
  return ws;
}

void TurboChannelCode::Encode(std::span<const Bit> info, std::span<Bit> coded,
                              Workspace& base) const {
  auto& ws = static_cast<TurboWorkspace&>(base);
  code().Encode(info, coded, ws.scratch);
}

void TurboChannelCode::Decode(std::span<const float> llrs, std::span<Bit> info,
                              std::span<FrameDecodeResult> results, Workspace& base) const {
  auto& ws = static_cast<TurboWorkspace&>(base);
  const std::size_t n = coded_bits(), k = info_bits();
  for (std::size_t f = 0; f < results.size(); ++f) {
    results[f] = decoder_.Decode(llrs.subspan(f * n, n), info.subspan(f * k, k), ws.decoder);
  }
}

}  // namespace capgap
