// Bit interleaver between encoder and mapper (and its inverse on the LLRs
// between demapper and decoder), over the coded bits of a group of
// interleaver_frames frames. What each is for:
//  * random: one permutation per scheme, drawn once from the scheme's key
//    (Fisher-Yates; R. A. Fisher and F. Yates, 1938; D. E. Knuth, TAOCP
//    vol. 2, Algorithm P). Breaks up the bursts of a slowly fading channel
//    and decorrelates the bits of one symbol (BICM: G. Caire, G. Taricco,
//    E. Biglieri, IEEE Trans. Inf. Theory 44(3), 1998).
//  * rows: row-column block interleaver, written row by row into `rows`
//    rows of N / rows columns and read column by column, so bits adjacent at
//    the encoder are N / rows positions apart on the channel (common
//    practice): a deterministic spread with a known separation.
// interleaver_frames > 1 spreads one codeword over the fading blocks of
// several frames (block fading: diversity the code alone cannot get).
// Convention: Interleave gives out[i] = in[perm[i]]; Deinterleave inverts it,
// out[perm[i]] = in[i]. Immutable after Create; shared by all threads.
#ifndef CAPGAP_BLOCKS_FEC_INTERLEAVER_H_
#define CAPGAP_BLOCKS_FEC_INTERLEAVER_H_

#include <cstdint>
#include <span>
#include <vector>

#include "blocks/channel/channel_spec.h"
#include "blocks/core/rng_stream.h"
#include "blocks/core/status.h"
#include "blocks/core/types.h"

namespace capgap {

class Interleaver {
 public:
  // length: interleaved bits (coded bits per frame times spec.frames). The
  // random permutation comes from RngStream(key, kInterleaverPointIndex, 0,
  // kCode): j = NextU64() mod (i + 1) (bias below 2^-32 for length < 2^32).
  // rows must divide length. kind none is refused (no interleaver object).
  static Result<Interleaver> Create(const InterleaverSpec& spec, std::size_t length,
                                    PhiloxKey key);

  std::size_t length() const { return perm_.size(); }
  std::span<const std::uint32_t> permutation() const { return perm_; }

  // REQUIRES: in.size() == out.size() == length(); in and out distinct.
  void Interleave(std::span<const Bit> in, std::span<Bit> out) const;
  void Deinterleave(std::span<const float> in, std::span<float> out) const;

 private:
  std::vector<std::uint32_t> perm_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_INTERLEAVER_H_
