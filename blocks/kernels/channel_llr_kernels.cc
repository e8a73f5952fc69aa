// Fused channel-LLR kernels: the per-target instantiations of
// channel_llr_kernels-inl.h (Google Highway dynamic dispatch), the dispatch
// table, and the public entry points of channel_llr_kernels.h. The target is
// chosen once per process by the shared rule of dispatch.h, so these kernels
// and AddRealNoise / AddComplexNoise run the same target's arithmetic; with
// the scalar kernels forced the oracle of channel_llr_reference.h runs,
// matching the scalar noise and demap paths. Every path advances the noise
// stream by ceil(n / 2) blocks for n real samples.
#include "blocks/kernels/channel_llr_kernels.h"

#include <cstddef>
#include <cstdint>

#include "blocks/kernels/awgn_reference.h"
#include "blocks/kernels/channel_llr_reference.h"
#include "blocks/kernels/dispatch.h"

#ifndef CAPGAP_FORCE_SCALAR
// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "blocks/kernels/channel_llr_kernels.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/channel_llr_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {

// Plain signatures for the dispatch table.
void BpskLlrEntry(const Bit* bits, std::size_t n, float sigma, float scale, PhiloxKey key,
                  const PhiloxCounter& counter, float* llrs) {
  BpskChannelLlrsKernel(bits, n, sigma, scale, key, counter, llrs);
}
void QpskLlrEntry(const Bit* bits, std::size_t n_symbols, const float* re, const float* im,
                  float sigma, float gain, PhiloxKey key, const PhiloxCounter& counter,
                  float* llrs) {
  QpskChannelLlrsKernel(bits, n_symbols, re, im, sigma, gain, key, counter, llrs);
}

std::uint64_t Qam16Entry(const Bit* bits, std::size_t n_symbols, const Qam16Decider& d,
                         float sigma, PhiloxKey key, const PhiloxCounter& counter) {
  return CountQam16ErrorsKernel(bits, n_symbols, d, sigma, key, counter);
}
std::uint64_t PskEntry(const Bit* bits, std::size_t n_symbols, const PskDecider& d, float sigma,
                       PhiloxKey key, const PhiloxCounter& counter) {
  return CountPskErrorsKernel(bits, n_symbols, d, sigma, key, counter);
}
std::uint64_t QamAxisEntry(const Bit* bits, std::size_t n_symbols, const QamAxisDecider& d,
                           float sigma, PhiloxKey key, const PhiloxCounter& counter) {
  return CountQamAxisErrorsKernel(bits, n_symbols, d, sigma, key, counter);
}

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();
#endif  // CAPGAP_FORCE_SCALAR

#if defined(CAPGAP_FORCE_SCALAR) || HWY_ONCE
namespace capgap {

// Dispatch table (dispatch.h).
struct ChannelLlrTable {
  void (*bpsk)(const Bit*, std::size_t, float, float, PhiloxKey, const PhiloxCounter&, float*);
  void (*qpsk)(const Bit*, std::size_t, const float*, const float*, float, float, PhiloxKey,
               const PhiloxCounter&, float*);
  std::uint64_t (*qam16)(const Bit*, std::size_t, const Qam16Decider&, float, PhiloxKey,
                         const PhiloxCounter&);
  std::uint64_t (*qam_axis)(const Bit*, std::size_t, const QamAxisDecider&, float, PhiloxKey,
                            const PhiloxCounter&);
  std::uint64_t (*psk)(const Bit*, std::size_t, const PskDecider&, float, PhiloxKey,
                       const PhiloxCounter&);
  static ChannelLlrTable Resolve();
};
#ifndef CAPGAP_FORCE_SCALAR
HWY_EXPORT(BpskLlrEntry);
HWY_EXPORT(QpskLlrEntry);
HWY_EXPORT(Qam16Entry);
HWY_EXPORT(QamAxisEntry);
HWY_EXPORT(PskEntry);
ChannelLlrTable ChannelLlrTable::Resolve() {
  return {&HWY_DYNAMIC_DISPATCH(BpskLlrEntry), &HWY_DYNAMIC_DISPATCH(QpskLlrEntry),
          &HWY_DYNAMIC_DISPATCH(Qam16Entry), &HWY_DYNAMIC_DISPATCH(QamAxisEntry),
          &HWY_DYNAMIC_DISPATCH(PskEntry)};
}
static const auto& Chosen() { return kernel_dispatch::ChosenKernels<ChannelLlrTable>(); }
#endif  // CAPGAP_FORCE_SCALAR

void BpskChannelLlrs(const Bit* bits, std::size_t n, float sigma, float scale, RngStream& noise,
                     float* llrs) {
  CAPGAP_DCHECK((n + 1) / 2 <= std::size_t{0xFFFFFFFFu});
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    Chosen().bpsk(bits, n, sigma, scale, noise.key(), noise.counter(), llrs);
    noise.Advance(reference::BlocksForNormals(n));
    return;
  }
#endif
  reference::BpskChannelLlrs(bits, n, sigma, scale, noise, llrs);
}

void QpskChannelLlrs(const Bit* bits, std::size_t n_symbols, const float* points_re,
                     const float* points_im, float sigma, float gain, RngStream& noise,
                     float* llrs) {
  CAPGAP_DCHECK(n_symbols <= std::size_t{0xFFFFFFFFu});
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    Chosen().qpsk(bits, n_symbols, points_re, points_im, sigma, gain, noise.key(),
                  noise.counter(), llrs);
    noise.Advance(reference::BlocksForNormals(2 * n_symbols));
    return;
  }
#endif
  reference::QpskChannelLlrs(bits, n_symbols, points_re, points_im, sigma, gain, noise, llrs);
}

// The demapper's constants (demap_kernels-inl.h Pam4MaxLog, demap_reference.h),
// formed with the same float operations in the same order.
Qam16Decider MakeQam16Decider(const float* levels, float level_scale, float n0, bool maxlog) {
  Qam16Decider d{};
  for (int l = 0; l < 4; ++l) d.levels[l] = levels[l];
  d.maxlog = maxlog;
  const float s = level_scale;
  const float inv_n0 = 1.0f / n0;
  const float inv_s = 1.0f / s;
  const float scale = s * s * inv_n0;
  d.inv_s = inv_s;
  d.ka = 8.0f * scale * inv_s;
  d.kb = 2.0f * scale * inv_s;
  d.kc = 4.0f * scale * inv_s;
  d.kd = 8.0f * scale;
  d.two_s = 2.0f * s;
  return d;
}

std::uint64_t CountQam16Errors(const Bit* bits, std::size_t n_symbols, const Qam16Decider& d,
                               float sigma, RngStream& noise) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    const std::uint64_t errors =
        Chosen().qam16(bits, n_symbols, d, sigma, noise.key(), noise.counter());
    noise.Advance(reference::BlocksForNormals(2 * n_symbols));
    return errors;
  }
#endif
  return reference::CountQam16Errors(bits, n_symbols, d, sigma, noise);
}

// The demapper's constants (demap_reference.h, DemapSoft and HardLabel of
// kPam), formed with the same float operations.
QamAxisDecider MakeQamAxisDecider(int axis_bits, const float* levels, float level_scale, float n0,
                                  bool maxlog) {
  CAPGAP_DCHECK(axis_bits == 3 || axis_bits == 4);
  QamAxisDecider d{};
  d.axis_bits = axis_bits;
  for (int l = 0; l < 16; ++l) d.levels[l] = l < (1 << axis_bits) ? levels[l] : 0.0f;
  d.maxlog = maxlog;
  const float s = level_scale;
  const float inv_n0 = 1.0f / n0;
  d.inv_s = 1.0f / s;
  d.two_inv_s = 2.0f * d.inv_s;
  d.scale = s * s * inv_n0;
  return d;
}

std::uint64_t CountQamAxisErrors(const Bit* bits, std::size_t n_symbols, const QamAxisDecider& d,
                                 float sigma, RngStream& noise) {
  CAPGAP_DCHECK(d.axis_bits == 3 || d.axis_bits == 4);
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    const std::uint64_t errors =
        Chosen().qam_axis(bits, n_symbols, d, sigma, noise.key(), noise.counter());
    noise.Advance(reference::BlocksForNormals(2 * n_symbols));
    return errors;
  }
#endif
  return reference::CountQamAxisErrors(bits, n_symbols, d, sigma, noise);
}

PskDecider MakePskDecider(int bits, const cf32* points, const float* metric_re,
                          const float* metric_im, const float* boundary_cos,
                          const float* boundary_sin, float n0, bool maxlog) {
  CAPGAP_DCHECK(bits == 3 || bits == 4);
  PskDecider d{};
  d.bits = bits;
  const int order = 1 << bits;
  for (int l = 0; l < 16; ++l) {
    const bool used = l < order;
    d.point_re[l] = used ? points[l].real() : 0.0f;
    d.point_im[l] = used ? points[l].imag() : 0.0f;
    d.metric_re[l] = used ? metric_re[l] : 0.0f;
    d.metric_im[l] = used ? metric_im[l] : 0.0f;
  }
  for (int i = 0; i < 8; ++i) {
    d.boundary_cos[i] = i < order / 2 ? boundary_cos[i] : 0.0f;
    d.boundary_sin[i] = i < order / 2 ? boundary_sin[i] : 0.0f;
  }
  d.maxlog = maxlog;
  d.inv_n0 = 1.0f / n0;
  return d;
}

std::uint64_t CountPskErrors(const Bit* bits, std::size_t n_symbols, const PskDecider& d,
                             float sigma, RngStream& noise) {
  CAPGAP_DCHECK(d.bits == 3 || d.bits == 4);
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced()) {
    const std::uint64_t errors =
        Chosen().psk(bits, n_symbols, d, sigma, noise.key(), noise.counter());
    noise.Advance(reference::BlocksForNormals(2 * n_symbols));
    return errors;
  }
#endif
  return reference::CountPskErrors(bits, n_symbols, d, sigma, noise);
}

const char* ChannelLlrKernelTarget() {
  return kernel_dispatch::KernelTargetName<ChannelLlrTable>();
}

}  // namespace capgap
#endif  // CAPGAP_FORCE_SCALAR || HWY_ONCE
