// FIR kernels: per-target instantiations of fir_kernels-inl.h (Google Highway
// dynamic dispatch, compiled once per instruction set through
// hwy/foreach_target.h), the dispatch choice, the plan builders and the public
// entry points of fir_kernels.h.
//
// The target is chosen once per process (first use), by the shared rule of
// dispatch.h. The decimator's tap
// table is built by that same target when a plan is made. ForceScalarKernels
// (awgn_kernels.h) is read on every call and routes it to the oracle of
// fir_reference.h, whatever the plan; a CAPGAP_FORCE_SCALAR build compiles no
// SIMD code here and always runs the oracle.
#include "blocks/kernels/fir_kernels.h"

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <span>

#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/dispatch.h"
#include "blocks/kernels/fir_reference.h"

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/fir_kernels.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/fir_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {

// Plain signatures for the dispatch table.
void FirInterpolateEntry(const FirInterpolatorPlan& plan, const cf32* x, std::size_t n,
                         cf32* out) {
  FirInterpolateKernel(plan, x, n, out);
}
void FirDecimateEntry(const FirDecimatorPlan& plan, const cf32* in, std::size_t n_out,
                      cf32* out) {
  FirDecimateKernel(plan, in, n_out, out);
}
void FirBuildTableEntry(FirDecimatorPlan& plan) { FirBuildDecimatorTableKernel(plan); }
std::size_t FirFloatsEntry() { return FirKernelFloats(); }

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {

// Dispatch table (dispatch.h).
struct FirTable {
  void (*interpolate)(const FirInterpolatorPlan&, const cf32*, std::size_t, cf32*);
  void (*decimate)(const FirDecimatorPlan&, const cf32*, std::size_t, cf32*);
  void (*build)(FirDecimatorPlan&);
  std::size_t floats;  // 0: the chosen target has no vector kernel
  static FirTable Resolve();
};
#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(FirInterpolateEntry);
HWY_EXPORT(FirDecimateEntry);
HWY_EXPORT(FirBuildTableEntry);
HWY_EXPORT(FirFloatsEntry);
FirTable FirTable::Resolve() {
  return {&HWY_DYNAMIC_DISPATCH(FirInterpolateEntry), &HWY_DYNAMIC_DISPATCH(FirDecimateEntry),
          &HWY_DYNAMIC_DISPATCH(FirBuildTableEntry), HWY_DYNAMIC_DISPATCH(FirFloatsEntry)()};
}
static const auto& Chosen() { return kernel_dispatch::ChosenKernels<FirTable>(); }
#endif  // CAPGAP_FORCE_SCALAR

std::size_t FirInterpolatorPlan::history() const {
  const auto s = static_cast<std::size_t>(factor);
  return (static_cast<std::size_t>(tap_count) + s - 1) / s;
}

// The widest vector (kFirMaxComplexLanes samples) ends at most c / S + 1
// symbols past the last one it outputs (fir_kernels-inl.h), plus one spare.
std::size_t FirInterpolatorPlan::lookahead() const {
  return kFirMaxComplexLanes / static_cast<std::size_t>(factor) + 2;
}

// Padded window P <= L + max(S, c) - 1 samples ending at the output's own
// sample; the last (partial) group of c outputs reads up to c - 1 outputs past
// the last one, i.e. < c S samples.
std::size_t FirDecimatorPlan::history() const {
  return static_cast<std::size_t>(tap_count) +
         std::max(static_cast<std::size_t>(factor), kFirMaxComplexLanes);
}

std::size_t FirDecimatorPlan::lookahead() const {
  return kFirMaxComplexLanes * static_cast<std::size_t>(factor);
}

FirInterpolatorPlan MakeFirInterpolatorPlan(std::span<const float> taps, int factor) {
  CAPGAP_DCHECK(!taps.empty() && factor >= 1);
  FirInterpolatorPlan plan;
  plan.factor = factor;
  plan.tap_count = static_cast<int>(taps.size());
  plan.taps.assign(taps.begin(), taps.end());
  // Term ranges reach c + S - 2 taps before 0 and past L - 1 (fir_kernels-inl.h).
  plan.pad = kFirMaxComplexLanes + static_cast<std::size_t>(factor);
  plan.padded.assign(2 * (plan.pad + taps.size() + plan.pad), 0.0f);
  for (std::size_t m = 0; m < taps.size(); ++m) {
    plan.padded[2 * (plan.pad + m)] = taps[m];
    plan.padded[2 * (plan.pad + m) + 1] = taps[m];
  }
  return plan;
}

FirDecimatorPlan MakeFirDecimatorPlan(std::span<const float> taps, int factor) {
  CAPGAP_DCHECK(!taps.empty() && factor >= 1);
  FirDecimatorPlan plan;
  plan.factor = factor;
  plan.tap_count = static_cast<int>(taps.size());
  plan.taps.assign(taps.begin(), taps.end());
  plan.padded_taps = taps.size();
#ifndef CAPGAP_FORCE_SCALAR
  if (Chosen().floats > 0) Chosen().build(plan);
#endif
  return plan;
}

void FirInterpolate(const FirInterpolatorPlan& plan, const cf32* x, std::size_t n, cf32* out) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    Chosen().interpolate(plan, x, n, out);
    return;
  }
#endif
  reference::FirInterpolate(plan.taps, plan.factor, x, n, out);
}

void FirDecimate(const FirDecimatorPlan& plan, const cf32* in, std::size_t n_out, cf32* out) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced() && plan.vector_floats > 0) {
    Chosen().decimate(plan, in, n_out, out);
    return;
  }
#endif
  reference::FirDecimate(plan.taps, plan.factor, in, n_out, out);
}

const char* FirKernelTarget() {
  return kernel_dispatch::KernelTargetName<FirTable>(
      [](const FirTable& t) { return t.floats > 0; });
}

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
