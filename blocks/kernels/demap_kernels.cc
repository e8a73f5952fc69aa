// Demap kernels: per-target instantiations of demap_kernels-inl.h (Google
// Highway dynamic dispatch, compiled once per instruction set through
// hwy/foreach_target.h), the dispatch table and the public entry points of
// demap_kernels.h. The target is chosen once per process (first call), by the
// shared rule of dispatch.h. ForceScalarKernels(true) or a CAPGAP_FORCE_SCALAR
// build routes every call to the oracle of demap_reference.h, with identical
// results. This file is compiled with -ffp-contract=off (blocks/CMakeLists.txt):
// a fused multiply-add would round differently from the oracle.
#include "blocks/kernels/demap_kernels.h"

#include <cstddef>

#include "blocks/kernels/demap_reference.h"
#include "blocks/kernels/dispatch.h"

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/demap_kernels.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/demap_kernels-inl.h"
// clang-format on
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {

// Dispatch table (dispatch.h).
struct DemapTable {
  void (*soft)(const DemapKernelArgs&, bool, const float*, std::size_t, float, float*);
  void (*hard)(const DemapKernelArgs&, const float*, std::size_t, float*, Bit*);
  static DemapTable Resolve();
};
#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(DemapSoftKernel);
HWY_EXPORT(DemapHardKernel);
DemapTable DemapTable::Resolve() {
  return {&HWY_DYNAMIC_DISPATCH(DemapSoftKernel), &HWY_DYNAMIC_DISPATCH(DemapHardKernel)};
}
static const auto& Chosen() { return kernel_dispatch::ChosenKernels<DemapTable>(); }
#endif  // CAPGAP_FORCE_SCALAR

void DemapSoft(const DemapKernelArgs& args, bool exact, const float* y, std::size_t n, float n0,
               float* llrs) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    Chosen().soft(args, exact, y, n, n0, llrs);
    return;
  }
#endif
  reference::DemapSoft(args, exact, y, n, n0, llrs);
}

void DemapHard(const DemapKernelArgs& args, const float* y, std::size_t n, float* signs,
               Bit* bits) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    Chosen().hard(args, y, n, signs, bits);
    return;
  }
#endif
  reference::DemapHard(args, y, n, signs, bits);
}

const char* DemapKernelTarget() { return kernel_dispatch::KernelTargetName<DemapTable>(); }

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
