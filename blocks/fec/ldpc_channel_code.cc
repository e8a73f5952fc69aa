// LdpcChannelCode: an LDPC code, its encoder and decoder behind the
// code-family role.
#include "blocks/fec/ldpc_channel_code.h"

#include <algorithm>
#include <vector>

namespace capgap {
namespace {

class LdpcWorkspace final : public ChannelCode::Workspace {
 public:
  LdpcDecoder::Workspace decoder;
  std::vector<Bit> decided;                       // codeword decisions, frame-major
  std::vector<LdpcDecoder::FrameResult> results;  // per frame
};

}  // namespace

Result<std::shared_ptr<const LdpcChannelCode>> LdpcChannelCode::Create(
    std::shared_ptr<const LdpcCode> code, const LdpcDecoderOptions& options,
    const std::atomic<bool>* stop) {
  auto encoder = LdpcEncoder::Create(code, LdpcEncoder::Method::kAuto, stop);
  if (!encoder.ok()) return encoder.status().WithPrefix("code: ");
  auto decoder = LdpcDecoder::Create(code, options);
  if (!decoder.ok()) return Status::Error("decoder: " + decoder.status().message());
  return std::shared_ptr<const LdpcChannelCode>(
      new LdpcChannelCode(std::move(code), std::move(encoder).value(), std::move(decoder).value()));
}

std::uint32_t LdpcChannelCode::BatchFrames(std::uint32_t unit_frames, std::size_t coded_bits,
                                           int decoder_lanes) {
  constexpr std::size_t kBatchCodedBits = std::size_t{1} << 20;
  const auto lanes = static_cast<std::size_t>(std::max(decoder_lanes, 1));
  std::size_t frames = kBatchCodedBits / std::max<std::size_t>(coded_bits, 1);
  frames = std::max(frames / lanes * lanes, 4 * lanes);
  return static_cast<std::uint32_t>(std::min<std::size_t>(unit_frames, frames));
}

std::unique_ptr<ChannelCode::Workspace> LdpcChannelCode::MakeWorkspace(
    std::uint32_t max_frames) const {
  auto ws = std::make_unique<LdpcWorkspace>();
  ws->decoder = decoder_.MakeWorkspace();
  ws->decided.resize(static_cast<std::size_t>(max_frames) * coded_bits());
  ws->results.resize(max_frames);
  return ws;
}

void LdpcChannelCode::Encode(std::span<const Bit> info, std::span<Bit> coded, Workspace&) const {
  encoder_.Encode(info, coded);
}

void LdpcChannelCode::Decode(std::span<const float> llrs, std::span<Bit> info,
                             std::span<FrameDecodeResult> results, Workspace& base) const {
  auto& ws = static_cast<LdpcWorkspace&>(base);
  const std::size_t frames = results.size(), n = coded_bits(), k = info_bits();
  const std::span<Bit> decided(ws.decided.data(), frames * n);
  const std::span<LdpcDecoder::FrameResult> r(ws.results.data(), frames);
  decoder_.Decode(llrs, decided, r, ws.decoder);
  const std::span<const int> positions = encoder_.info_positions();
  for (std::size_t f = 0; f < frames; ++f) {
    const Bit* c = decided.data() + f * n;
    Bit* u = info.data() + f * k;
    for (std::size_t j = 0; j < k; ++j) u[j] = c[static_cast<std::size_t>(positions[j])];
    results[f].iterations = static_cast<std::uint32_t>(r[f].iterations);
    results[f].converged = r[f].converged;
  }
}

}  // namespace capgap
