// Viterbi ACS kernel: per-target instantiations of viterbi_kernels-inl.h
// (Google Highway dynamic dispatch, compiled once per instruction set through
// hwy/foreach_target.h), the dispatch choice and the public entry points of
// viterbi_kernels.h. The target is chosen once per process (first call), by
// the shared rule of dispatch.h. ForceScalarKernels(true) (awgn_kernels.h) or a
// CAPGAP_FORCE_SCALAR build routes every call to the oracle of
// viterbi_reference.h, as does a K the chosen target does not handle (K < 5).
#include "blocks/kernels/viterbi_kernels.h"

#include <cstddef>
#include <cstdint>

#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/dispatch.h"
#include "blocks/kernels/viterbi_reference.h"

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/viterbi_kernels.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/viterbi_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {

std::size_t ViterbiLanesEntry(int k) { return ViterbiKernelLanes(k); }
bool ViterbiAcsEntry(const ViterbiAcsArgs& args, std::int16_t* metrics, const std::int16_t* q,
                     std::size_t steps, std::uint8_t* decisions) {
  return ViterbiAcsKernel(args, metrics, q, steps, decisions);
}
void ViterbiQuantiseEntry(const float* x, std::size_t n, float scale, std::int16_t* q) {
  ViterbiQuantiseKernel(x, n, scale, q);
}

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {

// Dispatch table (dispatch.h).
struct ViterbiTable {
  bool (*acs)(const ViterbiAcsArgs&, std::int16_t*, const std::int16_t*, std::size_t,
              std::uint8_t*);
  void (*quant)(const float*, std::size_t, float, std::int16_t*);
  std::size_t (*lanes)(int);
  static ViterbiTable Resolve();
};
#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(ViterbiAcsEntry);
HWY_EXPORT(ViterbiLanesEntry);
HWY_EXPORT(ViterbiQuantiseEntry);
ViterbiTable ViterbiTable::Resolve() {
  return {&HWY_DYNAMIC_DISPATCH(ViterbiAcsEntry), &HWY_DYNAMIC_DISPATCH(ViterbiQuantiseEntry),
          &HWY_DYNAMIC_DISPATCH(ViterbiLanesEntry)};
}
static const auto& Chosen() { return kernel_dispatch::ChosenKernels<ViterbiTable>(); }
#endif  // CAPGAP_FORCE_SCALAR

void ViterbiAcsInt16(const ViterbiAcsArgs& args, std::int16_t* metrics, const std::int16_t* q,
                     std::size_t steps, std::uint8_t* decisions) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced() && Chosen().acs(args, metrics, q, steps, decisions)) return;
#endif
  reference::ViterbiAcsInt16(args, metrics, q, steps, decisions);
}

void ViterbiQuantise(const float* x, std::size_t n, float scale, std::int16_t* q) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    Chosen().quant(x, n, scale, q);
    return;
  }
#endif
  reference::ViterbiQuantise(x, n, scale, q);
}

const char* ViterbiKernelTarget(int constraint_length) {
  return kernel_dispatch::KernelTargetName<ViterbiTable>(
      [&](const ViterbiTable& t) { return t.lanes(constraint_length) > 0; });
}

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
