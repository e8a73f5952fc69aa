// Exhaustive ML block decoder: the table builder, the per-target
// instantiations of block_ml_kernels-inl.h (Google Highway dynamic dispatch,
// compiled once per instruction set through hwy/foreach_target.h), the
// dispatch choice and the public entry points of block_ml_kernels.h. The
// target is chosen once per process (first call), by the shared rule of
// dispatch.h. ForceScalarKernels(true) or a CAPGAP_FORCE_SCALAR build routes every call to the
// oracle of block_ml_reference.h, with identical decisions.
#include "blocks/kernels/block_ml_kernels.h"

#include <cstddef>
#include <cstdint>

#include "blocks/core/types.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/block_ml_reference.h"
#include "blocks/kernels/dispatch.h"

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/block_ml_kernels.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/block_ml_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {

std::size_t BlockMlLanesEntry() { return BlockMlKernelLanes(); }
bool BlockMlDecodeEntry(const BlockMlView& v, const float* llrs, std::size_t frames,
                        std::uint32_t* best, void* workspace) {
  return BlockMlDecodeKernel(v, llrs, frames, best, workspace);
}

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {

// Dispatch table (dispatch.h).
struct BlockMlTable {
  bool (*decode)(const BlockMlView&, const float*, std::size_t, std::uint32_t*, void*);
  std::size_t lanes;  // 0: the target does not run the kernel
  static BlockMlTable Resolve();
};
#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(BlockMlDecodeEntry);
HWY_EXPORT(BlockMlLanesEntry);
BlockMlTable BlockMlTable::Resolve() {
  return {&HWY_DYNAMIC_DISPATCH(BlockMlDecodeEntry), HWY_DYNAMIC_DISPATCH(BlockMlLanesEntry)()};
}
static const auto& Chosen() { return kernel_dispatch::ChosenKernels<BlockMlTable>(); }
#endif  // CAPGAP_FORCE_SCALAR

namespace {

#ifndef CAPGAP_FORCE_SCALAR
bool UseSimd(std::size_t lanes) {
  return !ScalarKernelsForced() && Chosen().lanes > 0 && Chosen().lanes == lanes;
}
#endif  // CAPGAP_FORCE_SCALAR

// Packed XOR of a generator row into a codeword.
void XorRow(std::uint64_t* c, const std::uint64_t* row) {
  for (int w = 0; w < kBlockMlWords; ++w) c[w] ^= row[w];
}

std::uint32_t SignWord(const std::uint64_t* c, int i) {
  return ((c[i >> 6] >> (i & 63)) & 1u) != 0 ? 0x80000000u : 0u;
}

}  // namespace

BlockMlTables BlockMlTables::Build(int n, int k, const std::uint64_t* rows, std::size_t lanes) {
  CAPGAP_DCHECK(n >= 1 && n <= kBlockMlMaxLength && k >= 1 && k <= kBlockMlMaxInfoBits);
  CAPGAP_DCHECK((lanes & (lanes - 1)) == 0);
  BlockMlTables t;
  t.n_ = n;
  t.k_ = k;
  const std::size_t count = std::size_t{1} << k;
  constexpr auto kWords = static_cast<std::size_t>(kBlockMlWords);
  t.codewords_.assign(count * kWords, 0);
  // Codeword j = sum_t bit_t(j) row_t: from j with its lowest set bit t
  // cleared, plus row t.
  for (std::size_t j = 1; j < count; ++j) {
    std::size_t t_bit = 0;
    while (((j >> t_bit) & 1u) == 0) ++t_bit;
    const std::size_t prev = j & (j - 1);
    std::uint64_t* c = &t.codewords_[j * kWords];
    for (std::size_t w = 0; w < kWords; ++w) c[w] = t.codewords_[prev * kWords + w];
    XorRow(c, rows + t_bit * kWords);
  }
  if (lanes == 0) return t;

  int log_lanes = 0;
  while ((std::size_t{1} << log_lanes) < lanes) ++log_lanes;
  t.lanes_ = lanes;
  t.low_bits_ = log_lanes < k ? log_lanes : k;
  const auto un = static_cast<std::size_t>(n);
  // Low part: lane l carries c(l) for l < 2^b0, codeword 0's pattern above.
  t.low_masks_.assign(un * lanes, 0u);
  const std::size_t low_count = std::size_t{1} << t.low_bits_;
  for (std::size_t l = 0; l < lanes && l < low_count; ++l) {
    const std::uint64_t* c = &t.codewords_[l * kWords];
    for (int i = 0; i < n; ++i) {
      t.low_masks_[static_cast<std::size_t>(i) * lanes + l] = SignWord(c, i);
    }
  }
  // High part: block b is codeword b 2^b0 (its low index bits are zero).
  const std::size_t blocks = count >> t.low_bits_;
  t.high_masks_.assign(blocks * un, 0u);
  for (std::size_t b = 0; b < blocks; ++b) {
    const std::uint64_t* c = &t.codewords_[(b << t.low_bits_) * kWords];
    for (int i = 0; i < n; ++i) {
      t.high_masks_[b * un + static_cast<std::size_t>(i)] = SignWord(c, i);
    }
  }
  return t;
}

BlockMlView BlockMlTables::view() const {
  BlockMlView v;
  v.n = n_;
  v.k = k_;
  v.codewords = codewords_.data();
  v.lanes = lanes_;
  v.low_bits = low_bits_;
  v.low_masks = lanes_ > 0 ? low_masks_.data() : nullptr;
  v.high_masks = lanes_ > 0 ? high_masks_.data() : nullptr;
  return v;
}

std::size_t BlockMlMaxLanes() {
#ifndef CAPGAP_FORCE_SCALAR
  return Chosen().lanes;
#else
  return 0;
#endif
}

std::size_t BlockMlWorkspaceBytes(int n, std::size_t lanes) {
  return static_cast<std::size_t>(n) * (lanes > 0 ? lanes : 1) * sizeof(float) + 64;
}

void BlockMlDecode(const BlockMlView& view, const float* llrs, std::size_t frames,
                   std::uint32_t* best, void* workspace) {
#ifndef CAPGAP_FORCE_SCALAR
  if (UseSimd(view.lanes) && Chosen().decode(view, llrs, frames, best, workspace)) return;
#endif
  (void)workspace;
  reference::BlockMlDecode(view, llrs, frames, best);
}

const char* BlockMlKernelTarget(std::size_t lanes) {
  return kernel_dispatch::KernelTargetName<BlockMlTable>(
      [lanes](const BlockMlTable& t) { return t.lanes > 0 && t.lanes == lanes; });
}

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
