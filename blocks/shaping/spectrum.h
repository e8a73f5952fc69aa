// Power spectral density of the transmitted signal by Welch's method, and its
// 99 % occupied and -3 dB bandwidths; frequency in units of the symbol rate.
//
// Method (P. D. Welch, IEEE Trans. Audio Electroacoust. AU-15(2), 1967; from
// memory): segments of N samples with 50 % overlap (hop N / 2), each weighted
// by the periodic Hann window w[n] = 0.5 - 0.5 cos(2 pi n / N), transformed
// with FFTW; the periodograms |X_k|^2 are averaged. Segments run across frame
// boundaries (the workspace keeps the unfinished segment), so a stream fed
// frame by frame gives the same estimate as one call.
//
// Normalisation: P_k = mean |X_k|^2 / sum w^2, bins ordered by frequency
// f_k = (k - N/2) S / N cycles per symbol, k = 0..N-1 (bin width S / N). Then
// sum_k P_k (S / N) = S E|x|^2, the energy per symbol period: for unit-energy
// symbols through a unit-energy pulse P(f) estimates |H(f)|^2, e.g. the RC
// spectrum (peak 1, T = 1) for an RRC pulse.
// Resolution: the Hann main lobe is +-2 bins, so choose N with 2 S / N well
// below the roll-off band a; N = 64 S gives 1/32 symbol rate per bin.
#ifndef CAPGAP_BLOCKS_SHAPING_SPECTRUM_H_
#define CAPGAP_BLOCKS_SHAPING_SPECTRUM_H_

#include <cstddef>
#include <memory>
#include <span>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/shaping/fftw_plan.h"

namespace capgap {

class WelchPsd {
 public:
  // Accumulated periodograms and the unfinished segment of one stream.
  class Workspace {
   public:
    void Reset();
    std::size_t segments() const { return segments_; }

   private:
    friend class WelchPsd;
    std::vector<cf32> pending_;     // N samples, the first `fill_` valid
    std::size_t fill_ = 0;
    std::vector<double> sum_;       // sum of |X_k|^2, FFT order
    std::size_t segments_ = 0;
    FftwBuffer time_, freq_;
  };

  // segment_length N: a power of two in 16..2^20; samples_per_symbol S >= 1.
  // Messages: "spectrum: segment_length = V: must be a power of 2 in 16..1048576",
  //           "spectrum: samples_per_symbol = V: must be >= 1".
  static Result<WelchPsd> Create(int segment_length, int samples_per_symbol);
  Workspace MakeWorkspace() const;

  void Accumulate(std::span<const cf32> samples, Workspace& ws) const;
  // REQUIRES psd.size() == segment_length(). Error "spectrum: no complete
  // segment (need N samples)" when fewer than N samples were accumulated.
  Status Finish(const Workspace& ws, std::span<double> psd) const;

  int segment_length() const { return n_; }
  double bin_width() const { return static_cast<double>(samples_per_symbol_) / n_; }
  double frequency(int bin) const { return (bin - n_ / 2) * bin_width(); }

 private:
  WelchPsd(int n, int s);
  void ProcessSegment(Workspace& ws) const;
  int n_;
  int samples_per_symbol_;
  std::vector<float> window_;
  double window_energy_ = 0.0;
  std::shared_ptr<const FftwPlanPair> plans_;
};

// Bandwidths of a PSD ordered as WelchPsd::Finish writes it (bin k at
// (k - N/2) * bin_width), in units of the symbol rate. The PSD is taken as
// constant over each bin.
// Occupied bandwidth: f_hi - f_lo where the power below f_lo and above f_hi are
// each (1 - fraction) / 2 of the total (linear interpolation inside a bin).
double OccupiedBandwidth(std::span<const double> psd, double bin_width, double fraction = 0.99);
// -3 dB (half-power) bandwidth: from the peak bin, outwards on each side to
// the first crossing of half the peak value (linear interpolation between bin
// centres); the distance between the two crossings.
double HalfPowerBandwidth(std::span<const double> psd, double bin_width);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_SHAPING_SPECTRUM_H_
