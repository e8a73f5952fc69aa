// Float LDPC kernel: per-target instantiations of ldpc_float_kernels-inl.h
// (Google Highway dynamic dispatch, compiled once per instruction set through
// hwy/foreach_target.h), the dispatch choice and the public entry points of
// ldpc_float_kernels.h. The target is chosen once per process (first call),
// by the shared rule of dispatch.h. ForceScalarKernels(true) or a
// CAPGAP_FORCE_SCALAR build routes every call to the one-frame oracles
// (ldpc_reference.h for min-sum, ldpc_spa_reference.h for sum-product), frame
// after frame, with identical results. This file is compiled with
// -ffp-contract=off (blocks/CMakeLists.txt): a fused multiply-add would round
// differently from the oracles.
#include "blocks/kernels/ldpc_float_kernels.h"

#include <algorithm>
#include <cstddef>
#include <cstdint>

#include "blocks/kernels/dispatch.h"
#include "blocks/kernels/ldpc_reference.h"
#include "blocks/kernels/ldpc_spa_reference.h"

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/ldpc_float_kernels.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/ldpc_float_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {

bool LdpcFloatDecodeEntry(const LdpcFloatKernelArgs& args, const float* llrs, std::size_t frames,
                          Bit* decided, LdpcFrameResult* results, void* workspace) {
  return LdpcDecodeFloatLanesKernel(args, llrs, frames, decided, results, workspace);
}
std::size_t LdpcFloatLanesEntry(LdpcFloatRule rule) { return LdpcFloatKernelLanes(rule); }

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {

// Dispatch table (dispatch.h).
struct LdpcFloatTable {
  bool (*decode)(const LdpcFloatKernelArgs&, const float*, std::size_t, Bit*, LdpcFrameResult*,
                 void*);
  std::size_t lanes;      // min-sum; 0: the target does not run the kernel
  std::size_t spa_lanes;  // float32 sum-product (0 without a native FMA)
  std::size_t Lanes(LdpcFloatRule rule) const {
    return rule == LdpcFloatRule::kSumProduct32 ? spa_lanes : lanes;
  }
  static LdpcFloatTable Resolve();
};
#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(LdpcFloatDecodeEntry);
HWY_EXPORT(LdpcFloatLanesEntry);
LdpcFloatTable LdpcFloatTable::Resolve() {
  return {&HWY_DYNAMIC_DISPATCH(LdpcFloatDecodeEntry),
          HWY_DYNAMIC_DISPATCH(LdpcFloatLanesEntry)(LdpcFloatRule::kMinSumNormalized),
          HWY_DYNAMIC_DISPATCH(LdpcFloatLanesEntry)(LdpcFloatRule::kSumProduct32)};
}
static const auto& Chosen() { return kernel_dispatch::ChosenKernels<LdpcFloatTable>(); }

namespace {
bool UseSimd(LdpcFloatRule rule) { return !ScalarKernelsForced() && Chosen().Lanes(rule) > 0; }
}  // namespace
#endif  // CAPGAP_FORCE_SCALAR

namespace {

// The min-sum oracle's arguments.
reference::LdpcFloatArgs MinSumArgs(const LdpcFloatKernelArgs& a) {
  reference::LdpcFloatArgs r;
  r.graph = a.graph;
  r.rule = a.rule == LdpcFloatRule::kMinSumOffset ? LdpcCheckRule::kMinSumOffset
                                                  : LdpcCheckRule::kMinSumNormalized;
  r.layered = a.layered;
  r.max_iterations = a.max_iterations;
  r.early_stop = a.early_stop;
  r.normalization = a.normalization;
  r.offset = a.offset;
  return r;
}

// Bytes of the oracles' one-frame workspace (floats, then doubles).
std::size_t OracleBytes(const LdpcGraph& g) {
  const std::size_t floats = std::max(reference::LdpcSpaFrameWorkspaceFloats(g),
                                      reference::LdpcFloatFrameWorkspaceFloats(g));
  return (floats + 1) * sizeof(float) + reference::LdpcFloatFrameWorkspaceDoubles(g) * sizeof(double);
}

}  // namespace

std::size_t LdpcFloatMaxLanes(LdpcFloatRule rule) {
#ifndef CAPGAP_FORCE_SCALAR
  if (Chosen().Lanes(rule) > 0) return Chosen().Lanes(rule);
#endif
  (void)rule;
  return 1;
}

std::size_t LdpcFloatLanes(LdpcFloatRule rule) {
#ifndef CAPGAP_FORCE_SCALAR
  if (UseSimd(rule)) return Chosen().Lanes(rule);
#endif
  (void)rule;
  return 1;
}

std::size_t LdpcFloatWorkspaceBytes(const LdpcFloatKernelArgs& args, std::size_t lanes) {
  const LdpcGraph& g = args.graph;
  const std::size_t rows = 2 * static_cast<std::size_t>(g.n) + static_cast<std::size_t>(g.edges) +
                           4 * static_cast<std::size_t>(g.max_row_degree);
  const std::size_t kernel = rows * (lanes > 0 ? lanes : 1) * sizeof(float);
  return std::max(kernel, OracleBytes(g)) + 64;
}

void LdpcDecodeFloatLanes(const LdpcFloatKernelArgs& args, const float* llrs, std::size_t frames,
                          Bit* decided, LdpcFrameResult* results, void* workspace) {
  CAPGAP_DCHECK(frames >= 1);
  CAPGAP_DCHECK(args.rule != LdpcFloatRule::kSumProduct32 ||
                args.graph.max_row_degree <= kLdpcSpaMaxRowDegree);
#ifndef CAPGAP_FORCE_SCALAR
  if (UseSimd(args.rule) && Chosen().decode(args, llrs, frames, decided, results, workspace)) {
    return;
  }
#endif
  // The oracles, frame by frame, in the (aligned) start of the workspace.
  const LdpcGraph& g = args.graph;
  const auto n = static_cast<std::size_t>(g.n);
  auto base = reinterpret_cast<std::uintptr_t>(workspace);
  base = (base + 63u) & ~std::uintptr_t{63u};
  auto* fws = reinterpret_cast<float*>(base);
  const std::size_t floats = std::max(reference::LdpcSpaFrameWorkspaceFloats(g),
                                      reference::LdpcFloatFrameWorkspaceFloats(g));
  // Doubles after the floats, 8-byte aligned.
  auto* dws = reinterpret_cast<double*>(
      (reinterpret_cast<std::uintptr_t>(fws + floats) + 7u) & ~std::uintptr_t{7u});
  if (args.rule == LdpcFloatRule::kSumProduct32) {
    for (std::size_t f = 0; f < frames; ++f) {
      reference::LdpcDecodeSpaFrame(args, llrs + f * n, decided + f * n, &results[f].iterations,
                                    &results[f].converged, fws);
    }
    return;
  }
  const reference::LdpcFloatArgs ms = MinSumArgs(args);
  for (std::size_t f = 0; f < frames; ++f) {
    reference::LdpcDecodeFloatFrame(ms, llrs + f * n, decided + f * n, nullptr,
                                    &results[f].iterations, &results[f].converged, fws, dws);
  }
}

const char* LdpcFloatKernelTarget(LdpcFloatRule rule) {
  return kernel_dispatch::KernelTargetName<LdpcFloatTable>(
      [rule](const LdpcFloatTable& t) { return t.Lanes(rule) > 0; });
}

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
