// Gaussian noise kernels: the per-target instantiations of
// awgn_kernels-inl.h (Google Highway dynamic dispatch: this file is compiled
// once per instruction set through hwy/foreach_target.h), the dispatch table,
// and the public entry points of awgn_kernels.h.
//
// The target is chosen once per process by the shared rule of dispatch.h, on
// the first call of any entry point (or of NoiseKernelTarget()).
// ForceScalarKernels(true), or building with CAPGAP_FORCE_SCALAR (which
// compiles no SIMD code here at all), routes every call to the scalar oracle
// of awgn_reference.h, reported as "SCALAR". The stream is advanced by
// the same rule on every path: ceil(n / 2) blocks for n real normals.
#include "blocks/kernels/awgn_kernels.h"

#include <complex>
#include <cstddef>
#include <cstdint>
#include <span>

#include "blocks/kernels/awgn_reference.h"
#include "blocks/kernels/dispatch.h"

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/awgn_kernels.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/awgn_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {

// Plain signatures for the dispatch table.
void NormalKernelEntry(float* x, std::size_t n, float sigma, bool add, PhiloxKey key,
                       const PhiloxCounter& counter) {
  NormalKernel(x, n, sigma, add, key, counter);
}

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {

// Dispatch table (dispatch.h).
struct NoiseTable {
  void (*normal)(float*, std::size_t, float, bool, PhiloxKey, const PhiloxCounter&);
  static NoiseTable Resolve();
};
#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(NormalKernelEntry);
NoiseTable NoiseTable::Resolve() { return {&HWY_DYNAMIC_DISPATCH(NormalKernelEntry)}; }
static const auto& Chosen() { return kernel_dispatch::ChosenKernels<NoiseTable>(); }
#endif  // CAPGAP_FORCE_SCALAR

namespace {

void Run(std::span<float> x, float sigma, bool add, RngStream& stream) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    Chosen().normal(x.data(), x.size(), sigma, add, stream.key(), stream.counter());
    stream.Advance(reference::BlocksForNormals(x.size()));
    return;
  }
#endif
  if (add) {
    reference::AddRealNoise(x, sigma, stream);
  } else {
    reference::FillStandardNormal(x, stream);
  }
}

}  // namespace

void FillStandardNormal(std::span<float> out, RngStream& stream) {
  Run(out, 1.0f, /*add=*/false, stream);
}

void AddRealNoise(std::span<float> samples, float sigma, RngStream& stream) {
  Run(samples, sigma, /*add=*/true, stream);
}

void AddComplexNoise(std::span<cf32> samples, float sigma_per_dim, RngStream& stream) {
  // Interleaved (re, im) is exactly the real mapping on 2 n floats: complex
  // sample k takes block k. std::complex<float> is layout-compatible with
  // float[2] ([complex.numbers]).
  Run(std::span<float>(reinterpret_cast<float*>(samples.data()), 2 * samples.size()), sigma_per_dim,
      /*add=*/true, stream);
}

const char* NoiseKernelTarget() {
  return kernel_dispatch::KernelTargetName<NoiseTable>();
}

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
