// SC polar decoder with frames across lanes: the per-target instantiations
// of polar_sc_kernels-inl.h (compiled once per instruction set through
// hwy/foreach_target.h), the dispatch table (dispatch.h: one target per
// process) and the entry points of polar_sc_kernels.h.
#include "blocks/kernels/polar_sc_kernels.h"

#include <cstddef>
#include <cstdint>

#include "blocks/kernels/dispatch.h"

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/polar_sc_kernels.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/polar_sc_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {

void PolarScDecodeEntry(const PolarScTree& tree, const float* llr, std::size_t frames,
                        const int* positions, std::size_t count, bool from_x, Bit* out,
                        float* scratch) {
  PolarScDecodeKernel(tree, llr, frames, positions, count, from_x, out, scratch);
}
std::size_t PolarScLanesEntry() { return PolarScLanesKernel(); }

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {

struct PolarScTable {
  void (*decode)(const PolarScTree&, const float*, std::size_t, const int*, std::size_t,
                 bool, Bit*, float*);
  std::size_t (*lanes)();
  static PolarScTable Resolve();
};
#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(PolarScDecodeEntry);
HWY_EXPORT(PolarScLanesEntry);
PolarScTable PolarScTable::Resolve() {
  return {&HWY_DYNAMIC_DISPATCH(PolarScDecodeEntry), &HWY_DYNAMIC_DISPATCH(PolarScLanesEntry)};
}
static const auto& Chosen() { return kernel_dispatch::ChosenKernels<PolarScTable>(); }
#endif  // CAPGAP_FORCE_SCALAR

bool PolarScKernelActive() {
#ifndef CAPGAP_FORCE_SCALAR
  return !ScalarKernelsForced();
#else
  return false;
#endif
}

std::size_t PolarScKernelLanes() {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) return Chosen().lanes();
#endif
  return 1;
}

std::size_t PolarScScratch(int m) {
  // Input, tree levels, x and u: 4 N values per lane.
  return 4 * (std::size_t{1} << m) * PolarScKernelLanes();
}

void PolarScDecodeFrames(const PolarScTree& tree, const float* llr, std::size_t frames,
                         const int* positions, std::size_t count, bool from_x, Bit* out,
                         float* scratch) {
#ifndef CAPGAP_FORCE_SCALAR
  Chosen().decode(tree, llr, frames, positions, count, from_x, out, scratch);
#else
  (void)tree, (void)llr, (void)frames, (void)positions, (void)count, (void)from_x, (void)out,
      (void)scratch;
#endif
}

const char* PolarScKernelTarget() { return kernel_dispatch::KernelTargetName<PolarScTable>(); }

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
