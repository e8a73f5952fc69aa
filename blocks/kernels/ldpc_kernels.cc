// Fixed-point min-sum LDPC kernel: per-target instantiations of
// ldpc_kernels-inl.h (Google Highway dynamic dispatch, compiled once per
// instruction set through hwy/foreach_target.h), the dispatch choice and the
// public entry points of ldpc_kernels.h. The target is chosen once per
// process (first call), by the shared rule of dispatch.h. ForceScalarKernels(true)
// (awgn_kernels.h) or a CAPGAP_FORCE_SCALAR build routes every call to the
// one-frame oracle of ldpc_reference.h, frame after frame, with identical
// results.
#include "blocks/kernels/ldpc_kernels.h"

#include <cstddef>
#include <cstdint>

#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/dispatch.h"
#include "blocks/kernels/ldpc_reference.h"

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/ldpc_kernels.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/ldpc_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {

bool LdpcDecodeEntry(const LdpcFixedArgs& args, const float* llrs, std::size_t frames, Bit* decided,
                     LdpcFrameResult* results, void* workspace) {
  return LdpcDecodeFixedKernel(args, llrs, frames, decided, results, workspace);
}
std::size_t LdpcLanesEntry(LdpcLane lane) { return LdpcFixedKernelLanes(lane); }

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {

// Dispatch table (dispatch.h).
struct LdpcTable {
  bool (*decode)(const LdpcFixedArgs&, const float*, std::size_t, Bit*, LdpcFrameResult*, void*);
  std::size_t lanes8;   // int8 lanes; 0: the target does not run the kernel
  std::size_t lanes16;  // int16 lanes
  static LdpcTable Resolve();
};
#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(LdpcDecodeEntry);
HWY_EXPORT(LdpcLanesEntry);
LdpcTable LdpcTable::Resolve() {
  return {&HWY_DYNAMIC_DISPATCH(LdpcDecodeEntry),
          HWY_DYNAMIC_DISPATCH(LdpcLanesEntry)(LdpcLane::kInt8),
          HWY_DYNAMIC_DISPATCH(LdpcLanesEntry)(LdpcLane::kInt16)};
}
static const auto& Chosen() { return kernel_dispatch::ChosenKernels<LdpcTable>(); }

namespace {
std::size_t ChosenLanes(LdpcLane lane) {
  return lane == LdpcLane::kInt8 ? Chosen().lanes8 : Chosen().lanes16;
}
bool UseSimd() { return !ScalarKernelsForced() && Chosen().lanes8 > 0; }
}  // namespace
#endif  // CAPGAP_FORCE_SCALAR

std::size_t LdpcFixedMaxLanes(LdpcLane lane) {
#ifndef CAPGAP_FORCE_SCALAR
  if (ChosenLanes(lane) > 0) return ChosenLanes(lane);
#endif
  (void)lane;
  return 1;
}

std::size_t LdpcFixedLanes(LdpcLane lane) {
#ifndef CAPGAP_FORCE_SCALAR
  if (UseSimd()) return ChosenLanes(lane);
#endif
  (void)lane;
  return 1;
}

std::size_t LdpcFixedWorkspaceBytes(const LdpcFixedArgs& args, std::size_t lanes) {
  const LdpcGraph& g = args.graph;
  const std::size_t rows = 4 * static_cast<std::size_t>(g.n) + static_cast<std::size_t>(g.edges) +
                           static_cast<std::size_t>(g.max_row_degree);
  const std::size_t elem = args.lane == LdpcLane::kInt8 ? 1 : 2;
  return rows * (lanes > 0 ? lanes : 1) * elem + 64;
}

void LdpcDecodeFixed(const LdpcFixedArgs& args, const float* llrs, std::size_t frames, Bit* decided,
                     LdpcFrameResult* results, void* workspace) {
  CAPGAP_DCHECK(frames >= 1);
  CAPGAP_DCHECK(args.channel_clip + args.graph.max_col_degree * args.message_clip <=
                LdpcLaneMax(args.lane));
#ifndef CAPGAP_FORCE_SCALAR
  if (UseSimd() && Chosen().decode(args, llrs, frames, decided, results, workspace)) {
    return;
  }
#endif
  // The oracle, frame by frame, in the (aligned) start of the workspace.
  const auto n = static_cast<std::size_t>(args.graph.n);
  auto base = reinterpret_cast<std::uintptr_t>(workspace);
  base = (base + 63u) & ~std::uintptr_t{63u};
  void* ws = reinterpret_cast<void*>(base);
  for (std::size_t f = 0; f < frames; ++f) {
    reference::LdpcDecodeFixedFrame(args, llrs + f * n, decided + f * n, &results[f].iterations,
                                    &results[f].converged, ws);
  }
}

const char* LdpcKernelTarget() {
  return kernel_dispatch::KernelTargetName<LdpcTable>(
      [](const LdpcTable& t) { return t.lanes8 > 0; });
}

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
