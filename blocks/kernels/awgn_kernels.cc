// Gaussian noise kernels: the per-target instantiations of
// awgn_kernels-inl.h (Google Highway dynamic dispatch: this file is compiled
// once per instruction set through hwy/foreach_target.h), the dispatch table,
// and the public entry points of awgn_kernels.h.
//
// The target is chosen once per process, on the first call of any entry point
// (or of NoiseKernelTarget()): the best target that is both compiled in and
// supported by the running CPU, so no instruction the CPU lacks is ever
// executed. ForceScalarKernels(true), or building with CAPGAP_FORCE_SCALAR
// (which compiles no SIMD code here at all), routes every call to the scalar
// oracle of awgn_reference.h, reported as "SCALAR". The stream is advanced by
// the same rule on every path: ceil(n / 2) blocks for n real normals.
#include "blocks/kernels/awgn_kernels.h"

#include <atomic>
#include <complex>
#include <cstddef>
#include <cstdint>
#include <span>

#include "blocks/kernels/awgn_reference.h"
#include "hwy/targets.h"

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
namespace capgap {
namespace HWY_NAMESPACE {

// Plain signatures for the dispatch table.
void NormalKernelEntry(float* x, std::size_t n, float sigma, bool add, PhiloxKey key,
                       const PhiloxCounter& counter) {
  NormalKernel(x, n, sigma, add, key, counter);
}
std::int64_t CompiledTargetEntry() { return NoiseKernelCompiledTarget(); }

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {
namespace {

std::atomic<bool> g_force_scalar{false};

#ifndef CAPGAP_FORCE_SCALAR
bool UseScalar() { return g_force_scalar.load(std::memory_order_relaxed); }

HWY_EXPORT(NormalKernelEntry);
HWY_EXPORT(CompiledTargetEntry);

using KernelFn = void (*)(float*, std::size_t, float, bool, PhiloxKey, const PhiloxCounter&);
struct ChosenKernel {
  KernelFn fn;
  const char* name;
};

// Resolved once (thread-safe static initialisation); later changes to
// Highway's chosen-target state (e.g. tests that mock the CPU) do not move it.
const ChosenKernel& Chosen() {
  static const ChosenKernel chosen = [] {
    hwy::GetChosenTarget().Update(hwy::SupportedTargets());
    ChosenKernel c;
    c.fn = &HWY_DYNAMIC_DISPATCH(NormalKernelEntry);
    c.name = hwy::TargetName(HWY_DYNAMIC_DISPATCH(CompiledTargetEntry)());
    return c;
  }();
  return chosen;
}
#endif  // CAPGAP_FORCE_SCALAR

void Run(std::span<float> x, float sigma, bool add, RngStream& stream) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!UseScalar()) {
    Chosen().fn(x.data(), x.size(), sigma, add, stream.key(), stream.counter());
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
#ifndef CAPGAP_FORCE_SCALAR
  if (!UseScalar()) return Chosen().name;
#endif
  return hwy::TargetName(HWY_SCALAR);
}

bool ForceScalarKernels(bool force) { return g_force_scalar.exchange(force); }

bool ScalarKernelsForced() {
#ifdef CAPGAP_FORCE_SCALAR
  return true;
#else
  return UseScalar();
#endif
}

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
