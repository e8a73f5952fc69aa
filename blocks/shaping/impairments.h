// Receiver impairments of a pulse-shaped chain, each off by default:
//   timing offset    tau in symbols, |tau| <= 1/2: the receiver samples its
//                    matched filter tau T late (tau > 0) or early. Applied by
//                    the Receiver of fir_filter.h, which evaluates the matched
//                    filter at the shifted phase (taps = pulse at t_m + tau):
//                    an exact fractional delay for a pulse band-limited below
//                    S / 2 (up to the span truncation), no interpolator.
//   carrier phase    phi0 in degrees, and
//   carrier frequency f in cycles per symbol (|f| <= 1/2): the received
//                    samples are rotated, r[n] <- r[n] exp(j (phi0 + 2 pi f n / S)),
//                    n the stream sample index (n = 0 at the first sample
//                    after CarrierOffset::State was reset). Apply it to the
//                    channel output, before the matched filter.
// ImpairmentSpec gathers the three for config validation; the chain passes
// timing_offset_symbols to Receiver::Create and the other two to
// CarrierOffset::Create.
#ifndef CAPGAP_BLOCKS_SHAPING_IMPAIRMENTS_H_
#define CAPGAP_BLOCKS_SHAPING_IMPAIRMENTS_H_

#include <cstdint>
#include <span>

#include "blocks/core/status.h"
#include "blocks/core/types.h"

namespace capgap {

struct ImpairmentSpec {
  double timing_offset_symbols = 0.0;               // [-0.5, 0.5]
  double phase_offset_deg = 0.0;                    // finite, any value
  double frequency_offset_cycles_per_symbol = 0.0;  // [-0.5, 0.5]
};

// Messages:
//   "impairments: timing_offset_symbols = V: must be in [-0.5, 0.5]"
//   "impairments: phase_offset_deg = V: must be finite"
//   "impairments: frequency_offset_cycles_per_symbol = V: must be in [-0.5, 0.5]"
Status ValidateImpairmentSpec(const ImpairmentSpec& spec);

// Carrier phase and frequency offset. Immutable; state in State.
class CarrierOffset {
 public:
  // Mutable phase of a stream: the frequency term's phase in cycles, wrapped
  // to [0, 1). Zero-initialised = stream start.
  struct State {
    double cycles = 0.0;
    void Reset() { cycles = 0.0; }
  };

  static Result<CarrierOffset> Create(double phase_offset_deg,
                                      double frequency_offset_cycles_per_symbol,
                                      int samples_per_symbol);
  bool is_identity() const { return phase_rad_ == 0.0 && step_cycles_ == 0.0; }
  // samples[i] *= exp(j (phi0 + 2 pi (state.cycles + i f / S))); advances
  // state by samples.size() samples. The rotation runs as a double-precision
  // recurrence restarted exactly at every call (error ~1e-16 per sample).
  void Apply(std::span<cf32> samples, State& state) const;

 private:
  CarrierOffset(double phase_rad, double step_cycles)
      : phase_rad_(phase_rad), step_cycles_(step_cycles) {}
  double phase_rad_;
  double step_cycles_;  // f / S cycles per sample
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_SHAPING_IMPAIRMENTS_H_
