// The process-wide force-scalar switch and the Highway calls behind
// dispatch.h (see there). This file is compiled once per instruction set
// (hwy/foreach_target.h, with the same target list as every kernel family) for
// one entry point only, the one that names the target it was compiled for:
// resolved right after a family's table, it names the target that table runs.
#include "blocks/kernels/dispatch.h"

#include <atomic>
#include <cstdint>

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/dispatch.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
std::int64_t DispatchedTargetEntry() { return HWY_TARGET; }
// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();
#else
#include "hwy/targets.h"
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {
namespace {
std::atomic<bool> g_force_scalar{false};
}  // namespace

bool ForceScalarKernels(bool force) { return g_force_scalar.exchange(force); }

bool ScalarKernelsForced() {
#ifdef CAPGAP_FORCE_SCALAR
  return true;
#else
  return g_force_scalar.load(std::memory_order_relaxed);
#endif
}

namespace kernel_dispatch {

const char* ScalarTargetName() { return hwy::TargetName(HWY_SCALAR); }

#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(DispatchedTargetEntry);

void SelectBestTarget() { hwy::GetChosenTarget().Update(hwy::SupportedTargets()); }

const char* DispatchedTargetName() {
  return hwy::TargetName(HWY_DYNAMIC_DISPATCH(DispatchedTargetEntry)());
}
#endif  // CAPGAP_FORCE_SCALAR

}  // namespace kernel_dispatch
}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
