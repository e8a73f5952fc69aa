// Exhaustive ML block decoder: tables at Create, kernel calls in Decode.
#include "blocks/fec/block_ml_decoder.h"

#include <string>
#include <utility>

namespace capgap {

Result<BlockMlDecoder> BlockMlDecoder::Create(const BlockCode& code,
                                              const BlockMlOptions& options) {
  if (options.frames_per_call < 1 || options.frames_per_call > kMaxFramesPerCall) {
    return Status::Error(
        "block ML decoder: frames_per_call = " + std::to_string(options.frames_per_call) +
        ": must be in [1, " + std::to_string(kMaxFramesPerCall) + "]");
  }
  BlockMlDecoder d(code);
  d.frames_per_call_ = options.frames_per_call;
  d.tables_ =
      BlockMlTables::Build(code.n(), code.k(), code.packed_rows().data(), BlockMlMaxLanes());
  return d;
}

BlockMlDecoder::Workspace BlockMlDecoder::MakeWorkspace() const {
  Workspace ws;
  ws.scratch_.assign(BlockMlWorkspaceBytes(code_.n(), BlockMlMaxLanes()), 0);
  ws.index_.assign(static_cast<std::size_t>(frames_per_call_), 0);
  return ws;
}

const char* BlockMlDecoder::KernelTarget() const {
  return BlockMlKernelTarget(tables_.view().lanes);
}

void BlockMlDecoder::DecodeIndices(std::span<const float> llrs, std::span<std::uint32_t> index,
                                   Workspace& ws) const {
  const auto n = static_cast<std::size_t>(code_.n());
  CAPGAP_DCHECK(llrs.size() == index.size() * n);
  CAPGAP_DCHECK(ws.scratch_.size() >= BlockMlWorkspaceBytes(code_.n(), BlockMlMaxLanes()));
  const BlockMlView v = tables_.view();
  const std::size_t frames = index.size();
  const auto chunk = static_cast<std::size_t>(frames_per_call_);
  for (std::size_t f = 0; f < frames; f += chunk) {
    const std::size_t count = frames - f < chunk ? frames - f : chunk;
    BlockMlDecode(v, llrs.data() + f * n, count, index.data() + f, ws.scratch_.data());
  }
}

void BlockMlDecoder::Decode(std::span<const float> llrs, std::span<Bit> info, Workspace& ws) const {
  const auto n = static_cast<std::size_t>(code_.n());
  const auto k = static_cast<std::size_t>(code_.k());
  const std::size_t frames = info.size() / k;
  CAPGAP_DCHECK(info.size() == frames * k && llrs.size() == frames * n);
  CAPGAP_DCHECK(ws.index_.size() == static_cast<std::size_t>(frames_per_call_));
  const auto chunk = static_cast<std::size_t>(frames_per_call_);
  for (std::size_t f = 0; f < frames; f += chunk) {
    const std::size_t count = frames - f < chunk ? frames - f : chunk;
    std::span<std::uint32_t> idx(ws.index_.data(), count);
    DecodeIndices(llrs.subspan(f * n, count * n), idx, ws);
    for (std::size_t g = 0; g < count; ++g) {
      code_.IndexToInfo(idx[g], info.subspan((f + g) * k, k));
    }
  }
}

}  // namespace capgap
