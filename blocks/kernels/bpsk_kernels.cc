// Fused BPSK hard-decision kernel: the per-target instantiations of
// bpsk_kernels-inl.h (Google Highway dynamic dispatch: this file is compiled
// once per instruction set through hwy/foreach_target.h), the dispatch table,
// and the public entry points of bpsk_kernels.h.
//
// The target is chosen once per process, by the shared rule of dispatch.h, so
// the fused kernel and AddRealNoise always run the same target's arithmetic. When the scalar
// kernels are forced (ScalarKernelsForced()) or CAPGAP_FORCE_SCALAR is set,
// the oracle of bpsk_reference.h runs instead, matching the scalar noise
// path. Every path advances the noise stream by ceil(n / 2) blocks.
#include "blocks/kernels/bpsk_kernels.h"

#include <cstddef>
#include <cstdint>
#include <span>

#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/awgn_reference.h"
#include "blocks/kernels/bpsk_reference.h"
#include "blocks/kernels/dispatch.h"

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/bpsk_kernels.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/bpsk_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {

// Plain signatures for the dispatch table.
std::uint64_t BpskBytesEntry(const Bit* bits, std::size_t n, float sigma, PhiloxKey key,
                             const PhiloxCounter& counter) {
  return BpskHardErrorsKernel(bits, n, sigma, key, counter);
}
std::uint64_t BpskRandomEntry(std::size_t n, PhiloxKey bit_key, const PhiloxCounter& bit_counter,
                              float sigma, PhiloxKey noise_key,
                              const PhiloxCounter& noise_counter) {
  return BpskHardErrorsRandomKernel(n, bit_key, bit_counter, sigma, noise_key, noise_counter);
}

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {

// Dispatch table (dispatch.h).
struct BpskTable {
  std::uint64_t (*bytes)(const Bit*, std::size_t, float, PhiloxKey, const PhiloxCounter&);
  std::uint64_t (*random)(std::size_t, PhiloxKey, const PhiloxCounter&, float, PhiloxKey,
                          const PhiloxCounter&);
  static BpskTable Resolve();
};
#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(BpskBytesEntry);
HWY_EXPORT(BpskRandomEntry);
BpskTable BpskTable::Resolve() {
  return {&HWY_DYNAMIC_DISPATCH(BpskBytesEntry), &HWY_DYNAMIC_DISPATCH(BpskRandomEntry)};
}
static const auto& Chosen() { return kernel_dispatch::ChosenKernels<BpskTable>(); }
#endif  // CAPGAP_FORCE_SCALAR

std::uint64_t CountBpskHardErrors(std::span<const Bit> bits, float sigma, RngStream& noise) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    const std::uint64_t errors =
        Chosen().bytes(bits.data(), bits.size(), sigma, noise.key(), noise.counter());
    noise.Advance(reference::BlocksForNormals(bits.size()));
    return errors;
  }
#endif
  return reference::CountBpskHardErrors(bits, sigma, noise);
}

std::uint64_t CountBpskHardErrorsOfRandomBits(std::size_t n_bits, RngStream& bit_stream,
                                              float sigma, RngStream& noise) {
  CAPGAP_DCHECK((n_bits + 1) / 2 <= std::size_t{0xFFFFFFFFu});
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    const std::uint64_t errors = Chosen().random(n_bits, bit_stream.key(), bit_stream.counter(),
                                                 sigma, noise.key(), noise.counter());
    bit_stream.Advance(static_cast<std::uint32_t>((n_bits + 127) / 128));
    noise.Advance(reference::BlocksForNormals(n_bits));
    return errors;
  }
#endif
  return reference::CountBpskHardErrorsOfRandomBits(n_bits, bit_stream, sigma, noise);
}

const char* BpskKernelTarget() {
  return kernel_dispatch::KernelTargetName<BpskTable>();
}

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
