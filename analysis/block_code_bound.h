// Union bounds on the maximum-likelihood (soft-decision) error rates of a
// binary linear (n, k) block code on the AWGN channel with antipodal
// (BPSK-like) signalling of each coded bit, from its weight enumerators
// (blocks/fec/block_code.h):
//   FER <= sum_{w>=1} A_w Q(sqrt(2 w R Eb/N0)),
//   BER <= sum_{w>=1} (B_w / k) Q(sqrt(2 w R Eb/N0)),
// R = k / n, Eb per information bit, A_w the number of codewords of weight
// w and B_w their total information weight. Each term is the pairwise error
// probability Q(d_E / sqrt(2 N0)) of two codewords at Hamming distance w
// (squared Euclidean distance 4 w R Eb); by linearity the all-zero codeword
// may be assumed sent (J. G. Proakis and M. Salehi, Digital Communications,
// 5th ed., 2008, ch. 7, soft-decision decoding of linear block codes;
// S. Lin and D. J. Costello, Error Control Coding, 2nd ed., 2004, ch. 10
// (soft-decision decoding performance); both from memory). The bounds are
// returned as computed, not clipped to 1: at low Eb/N0 they exceed 1 and say
// nothing; at high Eb/N0 they approach the d_min term.
// QPSK with Gray labelling gives the same per-bit picture (two independent
// BPSK rails), so the bounds hold for it too.
#ifndef CAPGAP_ANALYSIS_BLOCK_CODE_BOUND_H_
#define CAPGAP_ANALYSIS_BLOCK_CODE_BOUND_H_

#include <span>
#include <vector>

#include "blocks/fec/block_code.h"

namespace capgap::analysis {

// One value per entry of ebno_db (dB). REQUIRES: an enumerator from
// BlockCode (n, k >= 1, n + 1 entries each).
std::vector<double> BlockCodeFerUnionBound(const BlockWeightEnumerator& enumerator,
                                           std::span<const double> ebno_db);
std::vector<double> BlockCodeBerUnionBound(const BlockWeightEnumerator& enumerator,
                                           std::span<const double> ebno_db);

}  // namespace capgap::analysis

#endif  // CAPGAP_ANALYSIS_BLOCK_CODE_BOUND_H_
