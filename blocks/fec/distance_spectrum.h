// Distance spectrum of a (punctured) convolutional code by exact path
// enumeration on the trellis, and the soft-decision union bound on the bit
// error rate over BPSK/QPSK-AWGN.
//
// Method. An error event leaves state 0 with input 1 at some trellis step and
// first re-merges with state 0 later. For a code of puncturing period P
// (P = 1 unpunctured) the weight of an event depends on the phase p = t mod P
// at which it starts, so the enumeration runs once per phase on the period-P
// trellis. For each phase a breadth-first dynamic programme over
// (state, accumulated output weight w <= d_free + num_terms - 1) carries the
// number of partial paths and the sum of their input weights; a path that
// reaches state 0 is absorbed into the totals of its weight. Every loop in the
// trellis away from state 0 has positive weight (ConvCode::Create rejects
// catastrophic codes), so all partial paths exceed the weight limit after at
// most S P (w_max + 1) steps and the enumeration is exact (no truncation).
// d_free is found first by Dijkstra's algorithm on the same graph.
//
// beta_d = sum over the P phases of the total information weight of the
// events of output weight d; a_d likewise counts events. With k = P
// information bits per period the soft-decision union bound is
//   Pb <= (1/k) sum_d beta_d Q(sqrt(2 d R Eb/N0))
// (Viterbi, "Convolutional codes and their performance in communication
// systems", IEEE Trans. Commun. Technol. 19(5), 1971; for punctured codes the
// per-phase sum over one period, as in Hagenauer, "Rate-compatible punctured
// convolutional codes (RCPC codes) and their applications", IEEE Trans.
// Commun. 36(4), 1988; both from memory). R is the code rate charged to Eb:
// pass ConvCode::EffectiveRate(L) to include the tail, or
// asymptotic_rate() for the tail-free bound.
#ifndef CAPGAP_BLOCKS_FEC_DISTANCE_SPECTRUM_H_
#define CAPGAP_BLOCKS_FEC_DISTANCE_SPECTRUM_H_

#include <cstdint>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/fec/conv_code.h"

namespace capgap {

struct DistanceSpectrum {
  int free_distance = 0;
  int info_bits_per_period = 1;  // k = P
  // Terms for d = free_distance + j, j = 0 .. num_terms - 1 (zeros kept, e.g.
  // the odd d of codes whose generators all have odd weight).
  std::vector<int> distances;
  std::vector<std::uint64_t> num_events;  // a_d (summed over phases)
  std::vector<std::uint64_t> info_weight;  // beta_d (summed over phases)
};

// num_terms in [1, 30]. Ignores the termination of the code (the spectrum is
// that of the infinite trellis).
Result<DistanceSpectrum> ComputeDistanceSpectrum(const ConvCode& code, int num_terms = 10);

// Union bound (1/k) sum_d beta_d Q(sqrt(2 d R Eb/N0)) over the stored terms.
// REQUIRES: code_rate in (0, 1].
double UnionBoundBer(const DistanceSpectrum& spectrum, double ebno_db, double code_rate);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_DISTANCE_SPECTRUM_H_
