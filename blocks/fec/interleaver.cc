// Random and row-column bit interleavers (interleaver.h).
#include "blocks/fec/interleaver.h"

#include <numeric>
#include <string>
#include <utility>

namespace capgap {

Result<Interleaver> Interleaver::Create(const InterleaverSpec& spec, std::size_t length,
                                        PhiloxKey key) {
  if (length == 0 || length >= (std::size_t{1} << 32)) {
    return Status::Error("interleaver length " + std::to_string(length) +
                         ": must be in [1, 2^32)");
  }
  Interleaver il;
  il.perm_.resize(length);
  switch (spec.kind) {
    case InterleaverKind::kNone:
      return Status::Error("interleaver = none: no interleaver to build");
    case InterleaverKind::kRandom: {
      std::iota(il.perm_.begin(), il.perm_.end(), 0u);
      RngStream stream(key, kInterleaverPointIndex, 0, Substream::kCode);
      for (std::size_t i = length - 1; i > 0; --i) {
        const std::size_t j = static_cast<std::size_t>(stream.NextU64() % (i + 1));
        std::swap(il.perm_[i], il.perm_[j]);
      }
      break;
    }
    case InterleaverKind::kRows: {
      const std::size_t rows = spec.rows;
      if (rows == 0 || length % rows != 0) {
        return Status::Error("interleaver_rows = " + std::to_string(rows) +
                             ": must divide the interleaved bits (" + std::to_string(length) +
                             " = coded bits per frame x interleaver_frames)");
      }
      const std::size_t cols = length / rows;
      for (std::size_t c = 0; c < cols; ++c) {
        for (std::size_t r = 0; r < rows; ++r) {
          il.perm_[c * rows + r] = static_cast<std::uint32_t>(r * cols + c);
        }
      }
      break;
    }
  }
  return il;
}

void Interleaver::Interleave(std::span<const Bit> in, std::span<Bit> out) const {
  CAPGAP_DCHECK(in.size() == perm_.size() && out.size() == perm_.size());
  const std::uint32_t* p = perm_.data();
  for (std::size_t i = 0; i < perm_.size(); ++i) out[i] = in[p[i]];
}

void Interleaver::Deinterleave(std::span<const float> in, std::span<float> out) const {
  CAPGAP_DCHECK(in.size() == perm_.size() && out.size() == perm_.size());
  const std::uint32_t* p = perm_.data();
  for (std::size_t i = 0; i < perm_.size(); ++i) out[p[i]] = in[i];
}

}  // namespace capgap
