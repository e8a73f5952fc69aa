// Viterbi ACS kernel: per-target instantiations of viterbi_kernels-inl.h
// (Google Highway dynamic dispatch, compiled once per instruction set through
// hwy/foreach_target.h), the dispatch choice and the public entry points of
// viterbi_kernels.h. The target is chosen once per process (first call): the
// best one compiled in and supported by the running CPU, so no instruction
// the CPU lacks is executed. ForceScalarKernels(true) (awgn_kernels.h) or a
// CAPGAP_FORCE_SCALAR build routes every call to the oracle of
// viterbi_reference.h, as does a K the chosen target does not handle (K < 5).
#include "blocks/kernels/viterbi_kernels.h"

#include <cstddef>
#include <cstdint>

#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/viterbi_reference.h"
#include "hwy/targets.h"

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
namespace capgap {
namespace HWY_NAMESPACE {

bool ViterbiAcsEntry(const ViterbiAcsArgs& args, std::int16_t* metrics, const std::int16_t* q,
                     std::size_t steps, std::uint8_t* decisions) {
  return ViterbiAcsKernel(args, metrics, q, steps, decisions);
}
void ViterbiQuantiseEntry(const float* x, std::size_t n, float scale, std::int16_t* q) {
  ViterbiQuantiseKernel(x, n, scale, q);
}
std::size_t ViterbiLanesEntry(int k) { return ViterbiKernelLanes(k); }
std::int64_t ViterbiTargetEntry() { return HWY_TARGET; }

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {
namespace {

#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(ViterbiAcsEntry);
HWY_EXPORT(ViterbiLanesEntry);
HWY_EXPORT(ViterbiQuantiseEntry);
HWY_EXPORT(ViterbiTargetEntry);

using AcsFn = bool (*)(const ViterbiAcsArgs&, std::int16_t*, const std::int16_t*, std::size_t,
                       std::uint8_t*);
using LanesFn = std::size_t (*)(int);
using QuantFn = void (*)(const float*, std::size_t, float, std::int16_t*);
struct ChosenAcs {
  AcsFn acs;
  QuantFn quant;
  LanesFn lanes;
  const char* name;
};

// Resolved once (thread-safe static initialisation).
const ChosenAcs& Chosen() {
  static const ChosenAcs chosen = [] {
    hwy::GetChosenTarget().Update(hwy::SupportedTargets());
    ChosenAcs c;
    c.acs = &HWY_DYNAMIC_DISPATCH(ViterbiAcsEntry);
    c.quant = &HWY_DYNAMIC_DISPATCH(ViterbiQuantiseEntry);
    c.lanes = &HWY_DYNAMIC_DISPATCH(ViterbiLanesEntry);
    c.name = hwy::TargetName(HWY_DYNAMIC_DISPATCH(ViterbiTargetEntry)());
    return c;
  }();
  return chosen;
}
#endif  // CAPGAP_FORCE_SCALAR

}  // namespace

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
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced() && Chosen().lanes(constraint_length) > 0) return Chosen().name;
#endif
  (void)constraint_length;
  return hwy::TargetName(HWY_SCALAR);
}

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
