// Demapper kernels: the inner loops of blocks/mapping/demapper.h (hard
// decisions, max-log and log-MAP LLRs for BPSK, QPSK, square Gray QAM and
// Gray M-PSK, M = 8..64). Plain interface (pointers and counts, no vector
// types); demap_kernels.cc is compiled for several instruction sets (Google
// Highway dynamic dispatch, target chosen once per process by dispatch.h) and
// demap_reference.h holds the scalar oracle, which ForceScalarKernels(true) and
// CAPGAP_FORCE_SCALAR builds run instead.
//
// Every target computes each output with the same IEEE float operations in
// the same order as the oracle (separate multiply and add, never fused:
// demap_kernels.cc and its test are compiled with -ffp-contract=off), so the
// LLRs and decisions are bit-identical whichever target runs. The methods,
// conventions (L > 0 favours bit 0; label bit 0 is the MSB) and the exp/log
// approximations of log-MAP are documented in demap_reference.h.
#ifndef CAPGAP_BLOCKS_KERNELS_DEMAP_KERNELS_H_
#define CAPGAP_BLOCKS_KERNELS_DEMAP_KERNELS_H_

#include <cstddef>

#include "blocks/core/types.h"

namespace capgap {

// Which closed form / metric family a constellation uses.
enum class DemapKernelPath { kBpsk, kQpsk, kPam, kPsk };

// What a kernel call needs to know about the constellation (built by
// Demapper::Create; the arrays are owned by the Demapper).
struct DemapKernelArgs {
  DemapKernelPath path = DemapKernelPath::kBpsk;
  int bits_per_symbol = 1;        // m
  int axis_bits = 0;              // kPam: p = m / 2, 1..5
  float level_scale = 1.0f;       // kPam: the levels are s (L - 1 - 2j), L = 2^p
  const float* point_re = nullptr;      // kPsk: Re of the M points by label
  const float* point_im = nullptr;      // kPsk: Im of the M points by label
  const float* boundary_cos = nullptr;  // kPsk: cos(2 pi i / M), i < M/2
  const float* boundary_sin = nullptr;  // kPsk: sin(2 pi i / M), i < M/2
};

// LLRs of n symbols y (interleaved re, im; 2 n floats) with complex noise
// variance n0: max-log, or log-MAP when `exact`. llrs[m s + k] is bit k of
// symbol s. REQUIRES: n0 > 0 and 1 / n0 finite; m n floats at llrs.
void DemapSoft(const DemapKernelArgs& args, bool exact, const float* y, std::size_t n, float n0,
               float* llrs);

// Nearest-point decisions of n symbols: the label bits of that point, as
// +1 (bit 0) / -1 (bit 1) into `signs` when it is not null, else as 0/1 into
// `bits`. m n outputs.
void DemapHard(const DemapKernelArgs& args, const float* y, std::size_t n, float* signs, Bit* bits);

// Name of the instruction set the demap kernels run ("AVX2", ..., "SCALAR"
// when the scalar kernels are forced), written into every output file.
const char* DemapKernelTarget();

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_DEMAP_KERNELS_H_
