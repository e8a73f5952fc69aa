// Fused kernels of the soft BPSK and QPSK chains on an additive channel:
// coded bits -> symbols -> AWGN -> channel LLRs in one pass, in registers,
// with no symbol array; and of the uncoded 16-, 64-, 256-QAM and 8-, 16-PSK
// chains with hard or max-log decisions, bits -> symbols -> AWGN ->
// decisions -> error count. Plain interface (pointers and counts, no vector
// types); channel_llr_kernels.cc is compiled for several instruction sets
// (Google Highway dynamic dispatch, the target chosen once per process by
// dispatch.h, the same as the noise kernels') and channel_llr_reference.h
// holds the scalar oracle, which ForceScalarKernels(true) and
// CAPGAP_FORCE_SCALAR builds run instead.
//
// Exactness (what makes them drop-in replacements in sim/chain/chain.cc):
// each LLR is computed with the same float operations, on the same normals,
// as the composed path
//  * BPSK (real axis): x_i = 1 - 2 b_i, AddRealNoise(x, sigma) of
//    awgn_kernels.h, L_i = scale x_i (the chain passes scale = 4 / N0);
//  * QPSK: Mapper::Map (points by label b0 b1, b0 the MSB), AddComplexNoise
//    (re of symbol s takes normal 2s, im normal 2s + 1), and the demapper's
//    LLRs L(b0) = gain Im y, L(b1) = gain Re y (demap_kernels.h: gain =
//    2 sqrt2 / N0, computed by the caller exactly as the demapper does);
// so the LLRs are bit-identical to the composed path's on every target, and
// the noise stream advances exactly as there: by ceil(n / 2) blocks for n
// real samples (BPSK: n bits; QPSK: 2 per symbol, i.e. n bits as well).
#ifndef CAPGAP_BLOCKS_KERNELS_CHANNEL_LLR_KERNELS_H_
#define CAPGAP_BLOCKS_KERNELS_CHANNEL_LLR_KERNELS_H_

#include <cstddef>

#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"

namespace capgap {

// n bits (one per byte, 0 or 1) to n LLRs: BPSK on the real axis,
// llrs[i] = scale (x_i + sigma z_i), x_i = 1 - 2 bits[i].
void BpskChannelLlrs(const Bit* bits, std::size_t n, float sigma, float scale, RngStream& noise,
                     float* llrs);

// 2 n bits (one per byte, only the lowest bit of each read) to 2 n LLRs for
// n QPSK symbols; points_re/im[l] is the point of label l = 2 b0 + b1
// (Mapper::points()): llrs[2s] = gain Im y_s, llrs[2s + 1] = gain Re y_s.
void QpskChannelLlrs(const Bit* bits, std::size_t n_symbols, const float* points_re,
                     const float* points_im, float sigma, float gain, RngStream& noise,
                     float* llrs);

// Uncoded Gray 16-QAM on an additive channel, fused to the error count:
// bits -> symbols -> AWGN -> decisions -> errors, nothing stored. Per axis
// sample t (Re of symbol s at t = 2s, Im at 2s + 1; the layout of
// AddComplexNoise) the two bits bits[2t], bits[2t + 1] are the axis label,
// x = levels[label] (Mapper::pam_levels()), y = x + sigma z_t as
// AddComplexNoise forms it, and the decisions are exactly those the chain
// would take:
//  * hard: the demapper's slicer, u = (1 / s) y, level index j = #{u < c}
//    over the thresholds c = 2, 0, -2, label Gray(j);
//  * max-log: the demapper's closed-form 4-PAM LLRs (demap_reference.h),
//    L0 = ka y - kb (|y + 2s| - |y - 2s|), L1 = kc |y| - kd, each bit
//    decided as L < 0 (the identity code's LlrToBits);
// with s the level scale and the constants formed exactly as the demapper
// forms them (MakeQam16Decider). Advances the noise stream by 2 n_symbols /
// 2 = n_symbols blocks, like AddComplexNoise.
struct Qam16Decider {
  float levels[4];  // by axis label
  bool maxlog;
  float inv_s;                     // hard
  float ka, kb, kc, kd, two_s;     // max-log
};
Qam16Decider MakeQam16Decider(const float* levels, float level_scale, float n0, bool maxlog);
// 4 n_symbols bits, one per byte (0 or 1).
std::uint64_t CountQam16Errors(const Bit* bits, std::size_t n_symbols, const Qam16Decider& d,
                               float sigma, RngStream& noise);

// Uncoded Gray 64- and 256-QAM (p = 3 or 4 bits per axis) on an additive
// channel, fused to the error count like CountQam16Errors: per axis sample t
// (Re of symbol s at t = 2s, Im at 2s + 1) the p bits bits[p t .. p t + p - 1]
// (MSB first) are the axis label, x = levels[label] (Mapper::pam_levels()),
// y = x + sigma z_t as AddComplexNoise forms it, and the decisions are
// exactly those of the demapper's oracle (demap_reference.h, kPam):
//  * hard: u = (1 / s) y, j = #{u < L - 2 - 2i, i = 0..L-2}, label Gray(j);
//  * max-log: u2 = (2 (1 / s)) y, metrics e[Gray(j)] = c c - c u2 with
//    c = L - 1 - 2j, bit k decided as (min_{bit k = 1} e - min_{bit k = 0} e)
//    scale < 0 with scale = s s (1 / N0) (the LLR's sign, LlrToBits);
// constants formed as the demapper forms them (MakeQamAxisDecider). Ties
// between equal metrics can change the sign of a zero LLR only, never a
// decision. Advances the noise stream by n_symbols blocks, like
// AddComplexNoise.
struct QamAxisDecider {
  int axis_bits = 3;  // p: 3 (64-QAM) or 4 (256-QAM)
  float levels[16];   // by axis label, 2^p used
  bool maxlog = false;
  float inv_s = 1.0f;      // 1 / s
  float two_inv_s = 2.0f;  // 2 (1 / s)
  float scale = 1.0f;      // s s (1 / N0)
};
QamAxisDecider MakeQamAxisDecider(int axis_bits, const float* levels, float level_scale, float n0,
                                  bool maxlog);
// 2 p n_symbols bits, one per byte (0 or 1). REQUIRES: axis_bits 3 or 4.
std::uint64_t CountQamAxisErrors(const Bit* bits, std::size_t n_symbols, const QamAxisDecider& d,
                                 float sigma, RngStream& noise);

// Uncoded Gray 8- and 16-PSK (b = 3 or 4 bits per symbol) on an additive
// channel, fused to the error count: per symbol s the b bits
// bits[b s .. b s + b - 1] (MSB first) are the label, x = points[label]
// (Mapper::points()), Re/Im y = x + sigma z_{2s}, z_{2s+1} as AddComplexNoise
// forms them, and the decisions are exactly those of the demapper's oracle
// (demap_reference.h, kPsk):
//  * hard: c = #{i < M/2: Im y cos_i - Re y sin_i >= 0} over the boundary
//    lines, label Gray(c - 1) when Im y >= 0, else Gray(M - 1 - c);
//  * max-log: metrics e_l = (-2 Re y) mre_l + (-2 Im y) mim_l over the
//    demapper's points, bit k decided as (min_{bit k = 1} e -
//    min_{bit k = 0} e) (1 / N0) < 0 (the LLR's sign, LlrToBits).
// Advances the noise stream by n_symbols blocks, like AddComplexNoise.
struct PskDecider {
  int bits = 3;  // b: 3 (8-PSK) or 4 (16-PSK)
  float point_re[16], point_im[16];    // transmitted points by label
  float metric_re[16], metric_im[16];  // the demapper's points by label
  float boundary_cos[8], boundary_sin[8];
  bool maxlog = false;
  float inv_n0 = 1.0f;
};
// points: the mapper's points by label (2^bits of them); metric_re/im and
// boundary_cos/sin: the demapper's (DemapKernelArgs of the kPsk path).
PskDecider MakePskDecider(int bits, const cf32* points, const float* metric_re,
                          const float* metric_im, const float* boundary_cos,
                          const float* boundary_sin, float n0, bool maxlog);
// b n_symbols bits, one per byte (0 or 1). REQUIRES: bits 3 or 4.
std::uint64_t CountPskErrors(const Bit* bits, std::size_t n_symbols, const PskDecider& d,
                             float sigma, RngStream& noise);

// Name of the instruction set these kernels run (NoiseKernelTarget() unless
// the scalar kernels are forced).
const char* ChannelLlrKernelTarget();

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_CHANNEL_LLR_KERNELS_H_
