// Direct (SIMD kernels of blocks/kernels/fir_kernels.h) and overlap-save FFT
// paths of the streaming FIR filters, the kAuto rule between them, and the
// pulse transmitter / receiver built on them (see fir_filter.h).
#include "blocks/shaping/fir_filter.h"

#include <bit>
#include <cmath>
#include <cstring>
#include <sstream>
#include <utility>

namespace capgap {

// Crossover of kAuto at S = 4 and the rule for every S: fir_filter.h; the
// measurements behind it: docs/performance_notes.md.
const int kFftMinTapsPerPhase = 161;

int FftMinTapsPerPhase(int factor, bool decimating) {
  if (factor == 4) return kFftMinTapsPerPhase;
  if (factor >= 8 && std::has_single_bit(static_cast<unsigned>(factor))) return 513;
  if (factor <= 2) return decimating ? 49 : 97;
  return decimating ? 49 : 33;
}

namespace {

constexpr std::size_t kDirectChunkSymbols = 512;
constexpr int kMaxTaps = 1 << 16;

Status ValidateTaps(std::span<const float> taps, int factor, const char* who) {
  if (taps.empty() || taps.size() > static_cast<std::size_t>(kMaxTaps)) {
    return Status::Error(std::string(who) + ": tap count = " + std::to_string(taps.size()) +
                         ": must be in 1..65536");
  }
  for (float t : taps) {
    if (!std::isfinite(t)) return Status::Error(std::string(who) + ": taps must be finite");
  }
  if (factor < 1 || factor > 1024) {
    return Status::Error(std::string(who) + ": factor = " + std::to_string(factor) +
                         ": must be in 1..1024");
  }
  return Status::Ok();
}

// Decimator line: [history | staged samples | lookahead], the staged part the
// larger of a chunk, the head of a call (ceil(H / S) S + lookahead samples)
// and its tail (ceil(A / S) S samples).
std::size_t DirectLineSize(const FirDecimatorPlan& plan) {
  const std::size_t s = static_cast<std::size_t>(plan.factor);
  const std::size_t h = plan.history(), a = plan.lookahead();
  const std::size_t staged = std::max({kDirectChunkSymbols * s, (h + s - 1) / s * s + a,
                                       (a + s - 1) / s * s});
  return h + staged + a;
}

FirMethod Resolve(FirMethod method, std::size_t taps, int factor, bool decimating) {
  if (method != FirMethod::kAuto) return method;
  const std::size_t per_phase = (taps + static_cast<std::size_t>(factor) - 1) /
                                static_cast<std::size_t>(factor);
  return per_phase >= static_cast<std::size_t>(FftMinTapsPerPhase(factor, decimating))
             ? FirMethod::kFft
             : FirMethod::kDirect;
}

}  // namespace

// Plans and the filter's spectrum H[k] / N (the 1/N of the inverse FFT folded
// in). Immutable after construction; shared by copies of a filter.
struct FftKernel {
  // N = bit_ceil(4 L), or larger when that leaves fewer than S new samples
  // per block (few taps at a large factor): every block then holds at least
  // one whole symbol period.
  FftKernel(std::span<const float> taps, int factor)
      : n(static_cast<int>(std::bit_ceil(
            std::max(4 * taps.size(), taps.size() - 1 + static_cast<std::size_t>(factor))))),
        block(static_cast<std::size_t>(n) - taps.size() + 1),
        plans(n),
        spectrum(MakeFftwBuffer(static_cast<std::size_t>(n))) {
    FftwBuffer time = MakeFftwBuffer(static_cast<std::size_t>(n));
    for (std::size_t m = 0; m < taps.size(); ++m) time[m][0] = taps[m];
    plans.Forward(time.get(), spectrum.get());
    const float scale = 1.0f / static_cast<float>(n);
    for (int k = 0; k < n; ++k) {
      spectrum[static_cast<std::size_t>(k)][0] *= scale;
      spectrum[static_cast<std::size_t>(k)][1] *= scale;
    }
  }
  int n;
  std::size_t block;  // B = N - L + 1 new samples per transform
  FftwPlanPair plans;
  FftwBuffer spectrum;

  void MultiplySpectrum(fftwf_complex* freq) const {
    for (std::size_t k = 0; k < static_cast<std::size_t>(n); ++k) {
      const float a = freq[k][0], b = freq[k][1];
      const float c = spectrum[k][0], d = spectrum[k][1];
      freq[k][0] = a * c - b * d;
      freq[k][1] = a * d + b * c;
    }
  }
};

std::string ToString(FirMethod method) {
  switch (method) {
    case FirMethod::kAuto: return "auto";
    case FirMethod::kDirect: return "direct";
    case FirMethod::kFft: return "fft";
  }
  return "?";
}

void FirWorkspace::Reset() {
  std::fill(line_.begin(), line_.end(), cf32(0.0f, 0.0f));
}

// ------------------------------------------------------------ shared set-up

Status StreamingFir::Init(std::span<const float> taps, int factor, FirMethod method,
                          bool decimating, const char* who) {
  if (Status s = ValidateTaps(taps, factor, who); !s.ok()) return s;
  factor_ = factor;
  method_ = Resolve(method, taps.size(), factor, decimating);
  taps_.assign(taps.begin(), taps.end());
  if (method_ == FirMethod::kFft) fft_ = std::make_shared<const FftKernel>(taps, factor);
  return Status::Ok();
}

int StreamingFir::fft_size() const { return fft_ ? fft_->n : 0; }

FirWorkspace StreamingFir::MakeDirectWorkspace(std::size_t history, std::size_t line_size) const {
  FirWorkspace ws;
  ws.history_ = history;
  ws.line_.assign(line_size, cf32(0.0f, 0.0f));
  return ws;
}

FirWorkspace StreamingFir::MakeFftWorkspace() const {
  FirWorkspace ws;
  ws.history_ = taps_.size() - 1;
  ws.line_.assign(ws.history_, cf32(0.0f, 0.0f));
  ws.time_ = MakeFftwBuffer(static_cast<std::size_t>(fft_->n));
  ws.freq_ = MakeFftwBuffer(static_cast<std::size_t>(fft_->n));
  return ws;
}

// One transform per chunk: [history | chunk's inputs, zero padded] forward,
// the last H inputs kept as the next history, times the spectrum, inverse;
// outputs from index H on are the chunk's (the first H are wrapped around).
template <typename Fill, typename Drain>
void StreamingFir::OverlapSave(std::size_t symbols, FirWorkspace& ws, Fill&& fill,
                               Drain&& drain) const {
  const FftKernel& k = *fft_;
  const std::size_t s = static_cast<std::size_t>(factor_);
  const std::size_t n = static_cast<std::size_t>(k.n);
  const std::size_t h = ws.history_;
  const std::size_t chunk_symbols = k.block / s;  // >= 1 since B >= S
  fftwf_complex* time = ws.time_.get();
  fftwf_complex* freq = ws.freq_.get();
  for (std::size_t c0 = 0; c0 < symbols; c0 += chunk_symbols) {
    const std::size_t cs = std::min(chunk_symbols, symbols - c0);
    const std::size_t samples = cs * s;
    for (std::size_t i = 0; i < h; ++i) {
      time[i][0] = ws.line_[i].real();
      time[i][1] = ws.line_[i].imag();
    }
    fill(time + h, n - h, c0, cs);
    k.plans.Forward(time, freq);
    for (std::size_t i = 0; i < h; ++i) ws.line_[i] = cf32(time[samples + i][0], time[samples + i][1]);
    k.MultiplySpectrum(freq);
    k.plans.Backward(freq, time);
    drain(static_cast<const fftwf_complex*>(time + h), c0, cs);
  }
}

// ---------------------------------------------------------------- interpolating

Result<InterpolatingFir> InterpolatingFir::Create(std::span<const float> taps, int factor,
                                                  FirMethod method) {
  InterpolatingFir f;
  if (Status s = f.Init(taps, factor, method, /*decimating=*/false, "interpolating filter");
      !s.ok()) {
    return s;
  }
  if (f.method_ == FirMethod::kDirect) f.direct_ = MakeFirInterpolatorPlan(taps, factor);
  return f;
}

FirWorkspace InterpolatingFir::MakeWorkspace() const {
  if (method_ != FirMethod::kDirect) return MakeFftWorkspace();
  return MakeDirectWorkspace(direct_.history(),
                             direct_.history() + kDirectChunkSymbols + direct_.lookahead());
}

void InterpolatingFir::Process(std::span<const cf32> in, std::span<cf32> out,
                               FirWorkspace& ws) const {
  CAPGAP_DCHECK(out.size() == in.size() * static_cast<std::size_t>(factor_));
  if (method_ == FirMethod::kDirect) {
    ProcessDirect(in, out, ws);
  } else {
    ProcessFft(in, out, ws);
  }
}

void InterpolatingFir::ProcessDirect(std::span<const cf32> in, std::span<cf32> out,
                                     FirWorkspace& ws) const {
  const std::size_t s = static_cast<std::size_t>(factor_);
  const std::size_t h = ws.history_;
  const std::size_t ahead = direct_.lookahead();
  CAPGAP_DCHECK(h == direct_.history() && ws.line_.size() == h + kDirectChunkSymbols + ahead);
  cf32* line = ws.line_.data();
  for (std::size_t c0 = 0; c0 < in.size(); c0 += kDirectChunkSymbols) {
    const std::size_t cn = std::min(kDirectChunkSymbols, in.size() - c0);
    std::copy(in.begin() + static_cast<std::ptrdiff_t>(c0),
              in.begin() + static_cast<std::ptrdiff_t>(c0 + cn), line + h);
    // The kernel may read a few symbols past the chunk; they meet zero taps
    // only, and zeros keep every output exact (fir_kernels.h).
    std::fill(line + h + cn, line + h + cn + ahead, cf32(0.0f, 0.0f));
    FirInterpolate(direct_, line + h, cn, out.data() + c0 * s);
    // Keep the last h symbols of [history | chunk] as the new history.
    std::copy(line + cn, line + cn + h, line);
  }
}

// Inputs: the chunk's symbols at every S-th position, zeros between and after.
void InterpolatingFir::ProcessFft(std::span<const cf32> in, std::span<cf32> out,
                                  FirWorkspace& ws) const {
  const std::size_t s = static_cast<std::size_t>(factor_);
  OverlapSave(
      in.size(), ws,
      [&](fftwf_complex* t, std::size_t count, std::size_t c0, std::size_t cs) {
        std::memset(t, 0, count * sizeof(fftwf_complex));
        for (std::size_t j = 0; j < cs; ++j) {
          t[j * s][0] = in[c0 + j].real();
          t[j * s][1] = in[c0 + j].imag();
        }
      },
      [&](const fftwf_complex* t, std::size_t c0, std::size_t cs) {
        cf32* o = out.data() + c0 * s;
        for (std::size_t i = 0; i < cs * s; ++i) o[i] = cf32(t[i][0], t[i][1]);
      });
}

// ------------------------------------------------------------------ decimating

Result<DecimatingFir> DecimatingFir::Create(std::span<const float> taps, int factor,
                                            FirMethod method) {
  DecimatingFir f;
  if (Status s = f.Init(taps, factor, method, /*decimating=*/true, "decimating filter");
      !s.ok()) {
    return s;
  }
  if (f.method_ == FirMethod::kDirect) f.direct_ = MakeFirDecimatorPlan(taps, factor);
  return f;
}

FirWorkspace DecimatingFir::MakeWorkspace() const {
  if (method_ != FirMethod::kDirect) return MakeFftWorkspace();
  return MakeDirectWorkspace(direct_.history(), DirectLineSize(direct_));
}

void DecimatingFir::Process(std::span<const cf32> in, std::span<cf32> out,
                            FirWorkspace& ws) const {
  CAPGAP_DCHECK(in.size() == out.size() * static_cast<std::size_t>(factor_));
  if (method_ == FirMethod::kDirect) {
    ProcessDirect(in, out, ws);
  } else {
    ProcessFft(in, out, ws);
  }
}

// Outputs whose window and lookahead lie inside `in` are computed straight
// from it; only the first (reaching into the history) and the last (reaching
// past the call) go through the line [history | staged samples | lookahead].
// A short call is staged whole, in chunks.
void DecimatingFir::ProcessDirect(std::span<const cf32> in, std::span<cf32> out,
                                  FirWorkspace& ws) const {
  const std::size_t s = static_cast<std::size_t>(factor_);
  const std::size_t h = ws.history_;
  const std::size_t ahead = direct_.lookahead();
  const std::size_t n = out.size();
  CAPGAP_DCHECK(h == direct_.history() && ws.line_.size() == DirectLineSize(direct_));
  cf32* line = ws.line_.data();
  const std::size_t k_lo = (h + s - 1) / s;          // first output not reading the history
  const std::size_t tail = (ahead + s - 1) / s;      // last outputs reading past the call
  if (n > k_lo + tail) {
    const std::size_t k_hi = n - tail;
    std::copy(in.begin(), in.begin() + static_cast<std::ptrdiff_t>(k_lo * s + ahead), line + h);
    FirDecimate(direct_, line + h, k_lo, out.data());
    FirDecimate(direct_, in.data() + k_lo * s, k_hi - k_lo, out.data() + k_lo);
    std::copy(in.begin() + static_cast<std::ptrdiff_t>(k_hi * s - h), in.end(), line);
    std::fill(line + h + tail * s, line + h + tail * s + ahead, cf32(0.0f, 0.0f));
    FirDecimate(direct_, line + h, tail, out.data() + k_hi);
    std::copy(in.end() - static_cast<std::ptrdiff_t>(h), in.end(), line);
    return;
  }
  for (std::size_t c0 = 0; c0 < n; c0 += kDirectChunkSymbols) {
    const std::size_t cs = std::min(kDirectChunkSymbols, n - c0);
    const std::size_t samples = cs * s;
    std::copy(in.begin() + static_cast<std::ptrdiff_t>(c0 * s),
              in.begin() + static_cast<std::ptrdiff_t>(c0 * s + samples), line + h);
    // Read only by outputs past the chunk, which are discarded (fir_kernels.h).
    std::fill(line + h + samples, line + h + samples + ahead, cf32(0.0f, 0.0f));
    FirDecimate(direct_, line + h, cs, out.data() + c0);
    std::copy(line + samples, line + samples + h, line);
  }
}

// Inputs: the chunk's samples, zeros after; outputs: every S-th sample.
void DecimatingFir::ProcessFft(std::span<const cf32> in, std::span<cf32> out,
                               FirWorkspace& ws) const {
  const std::size_t s = static_cast<std::size_t>(factor_);
  OverlapSave(
      out.size(), ws,
      [&](fftwf_complex* t, std::size_t count, std::size_t c0, std::size_t cs) {
        const std::size_t samples = cs * s;
        const cf32* src = in.data() + c0 * s;
        for (std::size_t i = 0; i < samples; ++i) {
          t[i][0] = src[i].real();
          t[i][1] = src[i].imag();
        }
        std::memset(t + samples, 0, (count - samples) * sizeof(fftwf_complex));
      },
      [&](const fftwf_complex* t, std::size_t c0, std::size_t cs) {
        for (std::size_t j = 0; j < cs; ++j) out[c0 + j] = cf32(t[j * s][0], t[j * s][1]);
      });
}

// ------------------------------------------------------- transmitter / receiver

Result<Transmitter> Transmitter::Create(const PulseSpec& spec, FirMethod method) {
  Result<std::vector<float>> taps = DesignPulseTaps(spec);
  if (!taps.ok()) return taps.status();
  Result<InterpolatingFir> f =
      InterpolatingFir::Create(taps.value(), spec.samples_per_symbol, method);
  if (!f.ok()) return f.status();
  return Transmitter(spec, std::move(f).value());
}

Result<Receiver> Receiver::Create(const PulseSpec& spec, double timing_offset_symbols,
                                  FirMethod method) {
  if (Status s = ValidatePulseSpec(spec); !s.ok()) return s;
  if (!(std::abs(timing_offset_symbols) <= 0.5)) {
    std::ostringstream v;
    v << timing_offset_symbols;
    return Status::Error("receiver: timing_offset_symbols = " + v.str() + ": must be in [-0.5, 0.5]");
  }
  Result<std::vector<float>> taps = DesignPulseTaps(spec, timing_offset_symbols);
  if (!taps.ok()) return taps.status();
  Result<DecimatingFir> f = DecimatingFir::Create(taps.value(), spec.samples_per_symbol, method);
  if (!f.ok()) return f.status();
  return Receiver(spec, timing_offset_symbols, std::move(f).value());
}

}  // namespace capgap
