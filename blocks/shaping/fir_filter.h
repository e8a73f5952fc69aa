// Streaming FIR filters of a pulse-shaped chain: the interpolating transmit
// filter (upsample by S, then filter) and the decimating matched filter
// (filter, then keep one sample per symbol), each by direct convolution or by
// FFTW overlap-save, with the filter state carried across the frames of a
// stream so that frame edges cause no transient.
//
// Definitions (stream indices count from the start of a stream, i.e. from the
// last FirWorkspace::Reset(); the history before it is zero):
//   interpolating: y[n] = sum_m h[m] u[n - m],  u[jS] = x_j, u = 0 elsewhere;
//   decimating:    z_k  = sum_m g[m] r[kS - m]  (the filter output at stream
//                  indices that are multiples of S).
// Both are exact causal convolutions; the direct and FFT paths compute the
// same numbers up to float rounding (fir_filter_test.cc). Overlap-save: block
// FFT of size N = bit_ceil(4 L) for L taps (at least bit_ceil(L - 1 + S), so
// that a block holds a symbol period), B = N - L + 1 new samples per block,
// the last L - 1 input samples kept as history (Oppenheim & Schafer,
// Discrete-Time Signal Processing, 3rd ed., sec. 8.7; from memory). Plans are
// FFTW_ESTIMATE (repeatable) and are made in Create().
//
// Direct path: the SIMD kernels of blocks/kernels/fir_kernels.h (Highway
// dynamic dispatch; the double-accumulating oracle of fir_reference.h under
// ForceScalarKernels / CAPGAP_FORCE_SCALAR), fed from a line buffer
// [history | staged samples | lookahead] in the workspace; the decimator
// reads the bulk of a call straight from its input and stages only the first
// and last outputs' samples. Each target sums in a fixed order, so a stream's
// samples do not depend on how it is cut into frames; they differ in the last
// bits between targets (and FFTW picks SIMD codelets by CPU, so FFT-path
// samples can differ between machines too).
//
// Method choice (FirMethod::kAuto): the direct path costs ~2 ceil(L/S) / F
// vector multiply-adds per high-rate sample (F floats per vector), the FFT
// path a slowly growing amount (log N, then cache misses as N = bit_ceil(4 L)
// leaves L1/L2, with jumps where N doubles). kAuto picks the FFT when the
// taps per polyphase branch, Q = ceil(L / S) (= span in symbols + 1 for a
// pulse), reach FftMinTapsPerPhase(S, decimating), a crossover measured on
// this project's machine: a fixed rule, not a per-run timing, keeps a run's
// numbers repeatable. The rule, in taps per branch:
//   S = 4: 161 (kFftMinTapsPerPhase); S = 8, 16, ... (powers of two >= 8): 513;
//   S = 1, 2: transmitter 97, receiver 49; other S: transmitter 33, receiver 49.
// Every pulse of span <= 16 (all the configs) runs the direct path.
// The measurements behind the rule: docs/performance_notes.md, "Streaming FIR".
//
// Transmitter / Receiver: the RRC (or RC) pulse of pulse.h as transmit filter
// and its matched filter (the same symmetric taps). The cascade is centred at
// L - 1 = span * S samples, so receiver output k (stream index) is the
// estimate of transmitted symbol k - D with D = span_symbols: the receiver
// lags by D symbols. Recipe for a Monte Carlo work unit (each unit
// independent, fresh workspaces, nothing counted from a transient):
//   1. Prime: shape D guard symbols (random, from the unit's own stream), pass
//      them through the channel and the receiver, and push them into a
//      DelayLine<T> of delay D holding the reference (symbols or bits x m).
//      The receiver's D outputs of this step precede symbol 0: discard them.
//   2. Every frame: shape its N symbols, channel, Receive -> N outputs; the
//      reference for them is the frame pushed through the delay line (the
//      first D are the previous frame's last symbols, or the guard). Every
//      output of step 2 is counted and every one has seen a full history.
// The last D symbols of a unit are never decided (cost: D guard symbols per
// unit). A coded chain whose decoder needs whole frames buffers N outputs.
// Fractional timing offset tau (in symbols, |tau| <= 1/2): the receiver
// evaluates its matched filter at the shifted phase, i.e. uses the pulse
// sampled at t_m + tau (DesignPulseTaps with a shift), so z_k is the
// matched-filter output at time (k + tau) T after the cascade delay. With an
// RRC pair z_k = sum_j x_j p_RC((k - D - j + tau) T), up to truncation.
#ifndef CAPGAP_BLOCKS_SHAPING_FIR_FILTER_H_
#define CAPGAP_BLOCKS_SHAPING_FIR_FILTER_H_

#include <algorithm>
#include <cstddef>
#include <memory>
#include <span>
#include <string>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/kernels/fir_kernels.h"
#include "blocks/shaping/fftw_plan.h"
#include "blocks/shaping/pulse.h"

namespace capgap {

enum class FirMethod { kAuto, kDirect, kFft };
std::string ToString(FirMethod method);

// kAuto uses overlap-save from this many taps per polyphase branch on
// (ceil(L / S); a pulse of span D symbols has D + 1) at S = 4, the chain's
// usual factor: 161, i.e. spans of 160 symbols and more.
extern const int kFftMinTapsPerPhase;

// The crossover kAuto applies for factor S >= 1, per filter kind (the rule
// above): the FFT path from this many taps per polyphase branch on.
int FftMinTapsPerPhase(int factor, bool decimating);

struct FftKernel;  // plans + the filter's spectrum; immutable, shared

// Mutable state of one stream through one filter. Made by the filter's
// MakeWorkspace(); one per thread (or per work unit); Reset() starts a new
// stream (zero history).
class FirWorkspace {
 public:
  FirWorkspace() = default;
  void Reset();

 private:
  friend class StreamingFir;
  friend class InterpolatingFir;
  friend class DecimatingFir;
  std::vector<cf32> line_;     // direct: [history | chunk | lookahead]; FFT: history only
  std::size_t history_ = 0;    // length of the history at line_'s front
  FftwBuffer time_;            // FFT path: N samples
  FftwBuffer freq_;            // FFT path: N bins
};

// What the two streaming filters share: the validated taps and factor, the
// resolved method, the overlap-save kernel, the workspace set-up and the
// overlap-save block loop. Not made on its own (no public constructor).
class StreamingFir {
 public:
  int factor() const { return factor_; }
  int tap_count() const { return static_cast<int>(taps_.size()); }
  FirMethod method() const { return method_; }  // kDirect or kFft, never kAuto
  int fft_size() const;                          // 0 on the direct path
  std::span<const float> taps() const { return taps_; }

 protected:
  StreamingFir() = default;
  // Validates (who names the filter in the message), resolves kAuto, keeps
  // the taps and, on the FFT path, makes the overlap-save kernel.
  Status Init(std::span<const float> taps, int factor, FirMethod method, bool decimating,
              const char* who);
  // Direct path: a zeroed line of line_size samples, the first history of
  // them the history. FFT path: history L - 1 and the two transform buffers.
  FirWorkspace MakeDirectWorkspace(std::size_t history, std::size_t line_size) const;
  FirWorkspace MakeFftWorkspace() const;
  // Overlap-save over `symbols` symbols in chunks of B / S (fir_filter.cc).
  // Per chunk [c0, c0 + cs): fill(t, count, c0, cs) writes the count = N - H
  // transform inputs after the history H; drain(t, c0, cs) reads the outputs
  // from t (the first sample after the history) on.
  template <typename Fill, typename Drain>
  void OverlapSave(std::size_t symbols, FirWorkspace& ws, Fill&& fill, Drain&& drain) const;

  int factor_ = 1;
  FirMethod method_ = FirMethod::kDirect;
  std::vector<float> taps_;
  std::shared_ptr<const FftKernel> fft_;
};

class InterpolatingFir : public StreamingFir {
 public:
  // taps non-empty, finite; factor S >= 1; method kAuto / kDirect / kFft.
  static Result<InterpolatingFir> Create(std::span<const float> taps, int factor,
                                         FirMethod method = FirMethod::kAuto);
  FirWorkspace MakeWorkspace() const;
  // REQUIRES: out.size() == factor() * in.size(); ws from MakeWorkspace().
  void Process(std::span<const cf32> in, std::span<cf32> out, FirWorkspace& ws) const;

 private:
  void ProcessDirect(std::span<const cf32> in, std::span<cf32> out, FirWorkspace& ws) const;
  void ProcessFft(std::span<const cf32> in, std::span<cf32> out, FirWorkspace& ws) const;
  FirInterpolatorPlan direct_;      // direct path: the kernels' tap layout
};

class DecimatingFir : public StreamingFir {
 public:
  static Result<DecimatingFir> Create(std::span<const float> taps, int factor,
                                      FirMethod method = FirMethod::kAuto);
  FirWorkspace MakeWorkspace() const;
  // REQUIRES: in.size() == factor() * out.size().
  void Process(std::span<const cf32> in, std::span<cf32> out, FirWorkspace& ws) const;

 private:
  void ProcessDirect(std::span<const cf32> in, std::span<cf32> out, FirWorkspace& ws) const;
  void ProcessFft(std::span<const cf32> in, std::span<cf32> out, FirWorkspace& ws) const;
  FirDecimatorPlan direct_;         // direct path: the kernels' tap layout
};

// Symbols -> S samples per symbol through the unit-energy pulse.
class Transmitter {
 public:
  static Result<Transmitter> Create(const PulseSpec& spec, FirMethod method = FirMethod::kAuto);
  FirWorkspace MakeWorkspace() const { return filter_.MakeWorkspace(); }
  // REQUIRES: samples.size() == samples_per_symbol() * symbols.size().
  void Shape(std::span<const cf32> symbols, std::span<cf32> samples, FirWorkspace& ws) const {
    filter_.Process(symbols, samples, ws);
  }
  const PulseSpec& spec() const { return spec_; }
  int samples_per_symbol() const { return spec_.samples_per_symbol; }
  const InterpolatingFir& filter() const { return filter_; }

 private:
  Transmitter(const PulseSpec& spec, InterpolatingFir filter) : spec_(spec), filter_(std::move(filter)) {}
  PulseSpec spec_;
  InterpolatingFir filter_;
};

// Matched filter + one sample per symbol; lags the transmitter by
// delay_symbols() (see the recipe above).
class Receiver {
 public:
  // |timing_offset_symbols| <= 0.5; message:
  //   "receiver: timing_offset_symbols = V: must be in [-0.5, 0.5]"
  static Result<Receiver> Create(const PulseSpec& spec, double timing_offset_symbols = 0.0,
                                 FirMethod method = FirMethod::kAuto);
  FirWorkspace MakeWorkspace() const { return filter_.MakeWorkspace(); }
  // REQUIRES: samples.size() == samples_per_symbol() * symbols.size().
  void Receive(std::span<const cf32> samples, std::span<cf32> symbols, FirWorkspace& ws) const {
    filter_.Process(samples, symbols, ws);
  }
  int delay_symbols() const { return spec_.span_symbols; }
  double timing_offset_symbols() const { return timing_offset_symbols_; }
  const PulseSpec& spec() const { return spec_; }
  int samples_per_symbol() const { return spec_.samples_per_symbol; }
  const DecimatingFir& filter() const { return filter_; }

 private:
  Receiver(const PulseSpec& spec, double tau, DecimatingFir filter)
      : spec_(spec), timing_offset_symbols_(tau), filter_(std::move(filter)) {}
  PulseSpec spec_;
  double timing_offset_symbols_ = 0.0;
  DecimatingFir filter_;
};

// Fixed delay of a stream of T (reference symbols or bits): out[i] is the
// input D positions earlier in the stream, T{} before the stream began. This
// object *is* the state: one per stream; allocation only in the constructor.
template <typename T>
class DelayLine {
 public:
  explicit DelayLine(std::size_t delay) : buffer_(delay) {}
  std::size_t delay() const { return buffer_.size(); }
  // REQUIRES: out.size() == in.size(); in and out do not overlap.
  void Process(std::span<const T> in, std::span<T> out) {
    CAPGAP_DCHECK(out.size() == in.size());
    const std::size_t d = buffer_.size();
    const std::size_t n = in.size();
    if (d == 0) {
      std::copy(in.begin(), in.end(), out.begin());
      return;
    }
    for (std::size_t i = 0; i < n; ++i) {
      out[i] = buffer_[head_];
      buffer_[head_] = in[i];
      head_ = head_ + 1 == d ? 0 : head_ + 1;
    }
  }

 private:
  std::vector<T> buffer_;
  std::size_t head_ = 0;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_SHAPING_FIR_FILTER_H_
