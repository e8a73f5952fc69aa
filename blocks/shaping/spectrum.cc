// Welch PSD with FFTW and the occupied / half-power bandwidths (spectrum.h).
#include "blocks/shaping/spectrum.h"

#include <algorithm>
#include <bit>
#include <cmath>
#include <numbers>
#include <string>

namespace capgap {

Result<WelchPsd> WelchPsd::Create(int segment_length, int samples_per_symbol) {
  if (segment_length < 16 || segment_length > (1 << 20) ||
      !std::has_single_bit(static_cast<unsigned>(segment_length))) {
    return Status::Error("spectrum: segment_length = " + std::to_string(segment_length) +
                         ": must be a power of 2 in 16..1048576");
  }
  if (samples_per_symbol < 1) {
    return Status::Error("spectrum: samples_per_symbol = " + std::to_string(samples_per_symbol) +
                         ": must be >= 1");
  }
  return WelchPsd(segment_length, samples_per_symbol);
}

WelchPsd::WelchPsd(int n, int s)
    : n_(n), samples_per_symbol_(s), plans_(std::make_shared<const FftwPlanPair>(n)) {
  window_.resize(static_cast<std::size_t>(n));
  for (int i = 0; i < n; ++i) {
    const double w = 0.5 - 0.5 * std::cos(2.0 * std::numbers::pi * i / n);
    window_[static_cast<std::size_t>(i)] = static_cast<float>(w);
    window_energy_ += static_cast<double>(window_[static_cast<std::size_t>(i)]) *
                      window_[static_cast<std::size_t>(i)];
  }
}

void WelchPsd::Workspace::Reset() {
  fill_ = 0;
  segments_ = 0;
  std::fill(sum_.begin(), sum_.end(), 0.0);
}

WelchPsd::Workspace WelchPsd::MakeWorkspace() const {
  Workspace ws;
  const std::size_t n = static_cast<std::size_t>(n_);
  ws.pending_.assign(n, cf32());
  ws.sum_.assign(n, 0.0);
  ws.time_ = MakeFftwBuffer(n);
  ws.freq_ = MakeFftwBuffer(n);
  return ws;
}

void WelchPsd::ProcessSegment(Workspace& ws) const {
  const std::size_t n = static_cast<std::size_t>(n_);
  for (std::size_t i = 0; i < n; ++i) {
    ws.time_[i][0] = window_[i] * ws.pending_[i].real();
    ws.time_[i][1] = window_[i] * ws.pending_[i].imag();
  }
  plans_->Forward(ws.time_.get(), ws.freq_.get());
  for (std::size_t k = 0; k < n; ++k) {
    const double re = ws.freq_[k][0], im = ws.freq_[k][1];
    ws.sum_[k] += re * re + im * im;
  }
  ++ws.segments_;
  // 50 % overlap: the second half becomes the first half of the next segment.
  std::copy(ws.pending_.begin() + static_cast<std::ptrdiff_t>(n / 2), ws.pending_.end(),
            ws.pending_.begin());
  ws.fill_ = n / 2;
}

void WelchPsd::Accumulate(std::span<const cf32> samples, Workspace& ws) const {
  const std::size_t n = static_cast<std::size_t>(n_);
  std::size_t pos = 0;
  while (pos < samples.size()) {
    const std::size_t take = std::min(n - ws.fill_, samples.size() - pos);
    std::copy(samples.begin() + static_cast<std::ptrdiff_t>(pos),
              samples.begin() + static_cast<std::ptrdiff_t>(pos + take),
              ws.pending_.begin() + static_cast<std::ptrdiff_t>(ws.fill_));
    ws.fill_ += take;
    pos += take;
    if (ws.fill_ == n) ProcessSegment(ws);
  }
}

Status WelchPsd::Finish(const Workspace& ws, std::span<double> psd) const {
  CAPGAP_DCHECK(psd.size() == static_cast<std::size_t>(n_));
  if (ws.segments_ == 0) {
    return Status::Error("spectrum: no complete segment (need " + std::to_string(n_) +
                         " samples)");
  }
  const std::size_t n = static_cast<std::size_t>(n_);
  const double scale = 1.0 / (static_cast<double>(ws.segments_) * window_energy_);
  for (std::size_t k = 0; k < n; ++k) {
    // Output bin k holds frequency (k - N/2) S / N: FFT bin (k + N/2) mod N.
    psd[k] = ws.sum_[(k + n / 2) % n] * scale;
  }
  return Status::Ok();
}

double OccupiedBandwidth(std::span<const double> psd, double bin_width, double fraction) {
  const std::size_t n = psd.size();
  double total = 0.0;
  for (double p : psd) total += p;
  if (!(total > 0.0)) return 0.0;
  const double tail = 0.5 * (1.0 - fraction) * total;
  // Frequency where the cumulative power reaches `target`, bins of constant
  // density spanning [f_k - w/2, f_k + w/2).
  auto edge = [&](double target) {
    double cum = 0.0;
    for (std::size_t k = 0; k < n; ++k) {
      if (cum + psd[k] >= target) {
        const double frac = psd[k] > 0.0 ? (target - cum) / psd[k] : 0.0;
        const double lo = (static_cast<double>(k) - static_cast<double>(n / 2) - 0.5) * bin_width;
        return lo + frac * bin_width;
      }
      cum += psd[k];
    }
    return (static_cast<double>(n) - static_cast<double>(n / 2) - 0.5) * bin_width;
  };
  return edge(total - tail) - edge(tail);
}

double HalfPowerBandwidth(std::span<const double> psd, double bin_width) {
  const std::size_t n = psd.size();
  if (n == 0) return 0.0;
  const std::size_t peak =
      static_cast<std::size_t>(std::max_element(psd.begin(), psd.end()) - psd.begin());
  const double half = 0.5 * psd[peak];
  auto freq = [&](double k) { return (k - static_cast<double>(n / 2)) * bin_width; };
  double right = freq(static_cast<double>(n - 1));
  for (std::size_t k = peak; k + 1 < n; ++k) {
    if (psd[k + 1] < half) {
      const double t = (psd[k] - half) / (psd[k] - psd[k + 1]);
      right = freq(static_cast<double>(k) + t);
      break;
    }
  }
  double left = freq(0.0);
  for (std::size_t k = peak; k > 0; --k) {
    if (psd[k - 1] < half) {
      const double t = (psd[k] - half) / (psd[k] - psd[k - 1]);
      left = freq(static_cast<double>(k) - t);
      break;
    }
  }
  return right - left;
}

}  // namespace capgap
