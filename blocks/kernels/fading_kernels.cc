// Fading kernels: per-target instantiations of fading_kernels-inl.h (Google
// Highway dynamic dispatch through hwy/foreach_target.h), the dispatch table
// and the entry points of fading_kernels.h. Forced scalar: the oracle.
#include "blocks/kernels/fading_kernels.h"

#include <cstddef>
#include <cstdint>

#include "blocks/kernels/dispatch.h"
#include "blocks/kernels/fading_reference.h"

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/fading_kernels.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/fading_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {
void FadingMultiplyEntry(const float* h, const float* x, float* out, std::size_t n) {
  FadingMultiplyGainKernel(h, x, out, n);
}
void FadingEqualiseEntry(const float* h, float* r, float n0, float* n0_out, std::size_t n) {
  FadingEqualiseOneKernel(h, r, n0, n0_out, n);
}
// The fused 16-QAM count exists on vector targets only (Highway's scalar
// target draws its noise by the double-precision reference, which the
// fused kernel does not reproduce): Supported says which.
bool FadingQam16SupportedEntry() { return HWY_TARGET != HWY_SCALAR; }
std::uint64_t FadingQam16Entry(const Bit* bits, const float* g, const float* z, std::size_t n,
                               float a, float b, float sigma, float n0, const Qam16Decider& d) {
#if HWY_TARGET != HWY_SCALAR
  return FadingQam16ErrorsKernel(bits, g, z, n, a, b, sigma, n0, d);
#else
  (void)bits, (void)g, (void)z, (void)n, (void)a, (void)b, (void)sigma, (void)n0, (void)d;
  return 0;
#endif
}
void FadingMrcEntry(const float* h, const float* r, std::size_t n, std::size_t branches, float n0,
                    float* z, float* n0_out) {
  FadingCombineMrcKernel(h, r, n, branches, n0, z, n0_out);
}
}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {

struct FadingTable {
  void (*multiply)(const float*, const float*, float*, std::size_t);
  void (*equalise)(const float*, float*, float, float*, std::size_t);
  void (*mrc)(const float*, const float*, std::size_t, std::size_t, float, float*, float*);
  bool (*qam16_supported)();
  std::uint64_t (*qam16)(const Bit*, const float*, const float*, std::size_t, float, float, float,
                         float, const Qam16Decider&);
  static FadingTable Resolve();
};
#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(FadingMultiplyEntry);
HWY_EXPORT(FadingEqualiseEntry);
HWY_EXPORT(FadingMrcEntry);
HWY_EXPORT(FadingQam16SupportedEntry);
HWY_EXPORT(FadingQam16Entry);
FadingTable FadingTable::Resolve() {
  return {&HWY_DYNAMIC_DISPATCH(FadingMultiplyEntry), &HWY_DYNAMIC_DISPATCH(FadingEqualiseEntry),
          &HWY_DYNAMIC_DISPATCH(FadingMrcEntry),
          &HWY_DYNAMIC_DISPATCH(FadingQam16SupportedEntry),
          &HWY_DYNAMIC_DISPATCH(FadingQam16Entry)};
}
static const auto& Chosen() { return kernel_dispatch::ChosenKernels<FadingTable>(); }
#endif  // CAPGAP_FORCE_SCALAR

void FadingMultiplyGain(const float* h, const float* x, float* out, std::size_t n) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) return Chosen().multiply(h, x, out, n);
#endif
  reference::MultiplyGain(h, x, out, n);
}

void FadingEqualiseOne(const float* h, float* r, float n0, float* n0_out, std::size_t n) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) return Chosen().equalise(h, r, n0, n0_out, n);
#endif
  reference::EqualiseOne(h, r, n0, n0_out, n);
}

void FadingCombineMrc(const float* h, const float* r, std::size_t n, std::size_t branches,
                      float n0, float* z, float* n0_out) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) return Chosen().mrc(h, r, n, branches, n0, z, n0_out);
#endif
  reference::CombineMrc(h, r, n, branches, n0, z, n0_out);
}

bool FadingQam16Fused() {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) return Chosen().qam16_supported();
#endif
  return false;
}

std::uint64_t FadingQam16Errors(const Bit* bits, const float* g, const float* z, std::size_t n,
                                float a, float b, float sigma, float n0, const Qam16Decider& d) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) return Chosen().qam16(bits, g, z, n, a, b, sigma, n0, d);
#endif
  (void)bits, (void)g, (void)z, (void)n, (void)a, (void)b, (void)sigma, (void)n0, (void)d;
  CAPGAP_DCHECK(false);
  return 0;
}

const char* FadingKernelTarget() { return kernel_dispatch::KernelTargetName<FadingTable>(); }

}  // namespace capgap
#endif
