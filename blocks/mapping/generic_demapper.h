// Brute-force demapper over any constellation given as its points indexed by
// label (label bit 0 = MSB, as in mapper.h): for y = h x + n, n ~ CN(0, N0),
// the metric of label l is d_l = |y - h x_l|^2 / N0 and
//   exact (log-MAP):  L_k = ln sum_{l: bit k = 0} e^{-d_l} - ln sum_{l: bit k = 1} e^{-d_l}
//   max-log:          L_k = min_{l: bit k = 1} d_l - min_{l: bit k = 0} d_l
//   hard:             +1 / -1 for the bits 0 / 1 of the label of the smallest d_l
// (L > 0 favours bit 0; common practice). Evaluated in double precision, the
// log-sum-exp shifted by each sum's smallest metric, O(M log2 M) per symbol.
// It is the reference the fast paths of Demapper are tested against, and the
// path Demapper takes for symbols with a per-symbol gain or N0.
#ifndef CAPGAP_BLOCKS_MAPPING_GENERIC_DEMAPPER_H_
#define CAPGAP_BLOCKS_MAPPING_GENERIC_DEMAPPER_H_

#include <span>

#include "blocks/core/types.h"

namespace capgap {

enum class DemapMethod;

// LLRs of one symbol. REQUIRES: points.size() == 2^llrs.size() (1..1024
// points); n0 > 0; h != 0 for a meaningful answer.
void GenericDemapSymbol(std::span<const cf32> points, DemapMethod method, cf32 y, cf32 h, float n0,
                        std::span<float> llrs);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_MAPPING_GENERIC_DEMAPPER_H_
