// Union bounds on the symbol and bit error rates of any constellation on the
// coherent AWGN channel with maximum-likelihood (minimum-distance) decisions,
// from its pairwise distances: the theory beside the curve of a generic
// constellation (points and labels as data, blocks/mapping/modulation.h).
//
// With equiprobable points x_0..x_{M-1}, average energy Es and complex noise
// CN(0, N0), the pairwise error probability of x_j against x_i is
// Q(|x_i - x_j| / sqrt(2 N0)), and the union bound gives
//   SER <= (1/M) sum_i sum_{j != i} Q(|x_i - x_j| / sqrt(2 N0)),
//   BER <= (1/(M m)) sum_i sum_{j != i} H(i, j) Q(|x_i - x_j| / sqrt(2 N0)),
// H(i, j) the Hamming distance between the labels (Proakis & Salehi, Digital
// Communications, 5th ed., ch. 4, union bound on the error probability;
// section from memory). The BER form bounds the bit errors of ML *symbol*
// decisions; bit-wise MAP (the LLR signs) differs from it by a vanishing
// amount at high SNR. The bounds are exact for M = 2 (one pair) and
// asymptotically tight at high SNR, where the nearest-neighbour terms
// dominate; at low SNR they exceed 1 and are clipped to 1 (SER) and 1/2 (BER)
// only by the caller's choice (these functions do not clip).
#ifndef CAPGAP_ANALYSIS_CONSTELLATION_BOUNDS_H_
#define CAPGAP_ANALYSIS_CONSTELLATION_BOUNDS_H_

#include <span>

#include "blocks/core/types.h"

namespace capgap::analysis {

// points[l] carries label l (2..1024 points, a power of two for the BER
// form); esno is the linear Es/N0 with Es the points' average energy (so the
// points need not be normalised). NaN for invalid input.
double UnionBoundSer(std::span<const cf32> points, double esno);
double UnionBoundBer(std::span<const cf32> points, double esno);

// Minimum distance of the points divided by sqrt(Es) (Es their average
// energy); 0 if two points coincide.
double NormalisedMinimumDistance(std::span<const cf32> points);

}  // namespace capgap::analysis

#endif  // CAPGAP_ANALYSIS_CONSTELLATION_BOUNDS_H_
