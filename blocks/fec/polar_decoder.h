// Successive-cancellation (SC) and SC list (SCL) decoders of a PolarCode
// (polar_construction.h: x = u G_N, no bit reversal) over the N LLRs of the
// mother code (rate matching already undone: punctured bits LLR 0, shortened
// bits a large positive LLR).
//
// LLR convention: L = ln P(b=0|y) / P(b=1|y), L > 0 favours 0. Node updates
// in float, min-sum form (common practice): f(a, b) = sign(a) sign(b)
// min(|a|, |b|) (formed as min(|a|, |b|) with the sign bit of a XOR b; a -0
// input can only flip the sign of a zero result, which no decision reads),
// g(a, b, u) = b + (1 - 2u) a, where a, b are the first and
// second halves of a node's LLRs (x_left = v_left + v_right, x_right =
// v_right). A leaf decides 0 when frozen, else 1 iff L < 0.
//
// SCL: I. Tal and A. Vardy, "List decoding of polar codes", IEEE Trans. Inf.
// Theory 61(5), 2015 (lazy copying: per path and per tree level a reference
// to a shared array, copied only when a path writes a shared one), with the
// LLR-based path metric of A. Balatsoukas-Stimming, M. Bastani Parizi and A.
// Burg, "LLR-based successive cancellation list decoding of polar codes",
// IEEE Trans. Signal Process. 63(19), 2015, in its approximate form: a
// path's metric grows by |L| when its decision at a leaf disagrees with the
// sign of L (hard decision 1 iff L < 0), frozen leaves included. At an
// information leaf the 2n extensions of n paths are ranked by (metric,
// parent's rank in the list, bit) and the best L kept, so L = 1 makes the
// decisions of SC exactly. After the last leaf the candidates are ranked by
// metric (ties: list order); CRC selection is the caller's
// (polar_channel_code.h).
//
// SCL simplified nodes (fast_nodes = true): in a rate-0 subtree, and in the
// frozen leaves of a repetition subtree, every earlier decision inside the
// subtree is 0, so each path's leaf LLRs follow from one local pass of f and
// g(., ., 0) over the subtree's input; the metric takes their penalties in
// leaf order (the same float operations as leaf by leaf) and a repetition
// node then splits paths once, on its last leaf's LLR. Rate-1 and SPC nodes
// are not simplified in SCL: the usual limited-candidate enumeration
// (Hashemi et al. 2017) ranks candidates by approximations whose decisions
// can differ from leaf-by-leaf SCL, so only the exactly equivalent nodes
// are kept (tested: metrics and codewords of every path identical).
//
// Both decoders allocate nothing per frame; the workspace holds all state.
#ifndef CAPGAP_BLOCKS_FEC_POLAR_DECODER_H_
#define CAPGAP_BLOCKS_FEC_POLAR_DECODER_H_

#include <cstdint>
#include <span>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/fec/polar_construction.h"
#include "blocks/kernels/polar_sc_kernels.h"

namespace capgap {

// SC with simplified nodes (fast_nodes = true): a subtree whose leaves are
// all frozen (rate-0) returns zeros; one whose leaves are all information
// bits (rate-1) returns the hard decisions of its input LLRs when none of
// them is exactly 0 (A. Alamdar-Yazdi and F. R. Kschischang, IEEE Commun.
// Lett. 15(12), 2011); with a zero present it falls back to the recursion,
// because min-sum f(0, b) = 0 decides 0 where the sign rule would not. A
// repetition node (only its last leaf free; G. Sarkis et al., "Fast polar
// decoders: algorithm and implementation", IEEE J. Sel. Areas Commun. 32(5),
// 2014) decides the sign of the sum of its LLRs, summed in the tree order of
// the recursion (pairwise by halves), so the float result is the last
// leaf's LLR bit for bit. A single-parity-check node (only its first leaf
// frozen, size >= 4; Sarkis et al. 2014) takes Wagner's rule: the hard
// decisions, and with odd parity the least reliable one flipped (the ML
// decision, which min-sum SC reaches on such a subtree); it falls back to
// the recursion when an LLR is 0 or, with odd parity, the smallest |LLR| is
// not unique (ties that SC breaks by its own order). Decisions are
// therefore identical to plain SC (tested on random LLRs with +-0, on
// whole-number LLRs full of ties, and on punctured and shortened codes).
class PolarScDecoder {
 public:
  explicit PolarScDecoder(const PolarCode& code, bool fast_nodes = true);

  struct Workspace {
    std::vector<float> llr;  // tree levels 0..m-1, level s at [2^s, 2^{s+1})
    std::vector<Bit> beta;   // partial sums of levels 0..m-1, same layout
  };
  Workspace MakeWorkspace() const;

  // REQUIRES: llr.size() == u_hat.size() == x_hat.size() == N. u_hat: the
  // leaf decisions; x_hat = u_hat G_N.
  void Decode(std::span<const float> llr, std::span<Bit> u_hat, std::span<Bit> x_hat,
              Workspace& ws) const;

  // Number of SPC nodes the decoder takes (outermost ones; for tests).
  int spc_nodes() const;

  // The node kinds and frozen flags, for the frames-across-lanes kernel
  // (polar_sc_kernels.h), whose scalar oracle this decoder is.
  PolarScTree tree() const { return {m_, kind_.data(), frozen_.data()}; }

 private:
  enum NodeKind : std::uint8_t {  // the values of PolarNodeKind
    kPlain = kPolarNodePlain,
    kRate0 = kPolarNodeRate0,
    kRate1 = kPolarNodeRate1,
    kRepetition = kPolarNodeRepetition,
    kSpc = kPolarNodeSpc,
  };
  void Node(int s, int leaf, const float* in, Bit* out, Bit* u_hat, Workspace& ws) const;
  int m_;
  std::vector<std::uint8_t> frozen_;
  // Kind of the node of level s starting at leaf `leaf`, at index
  // (1 << (m - s)) + (leaf >> s) (heap order); all kPlain without fast nodes.
  std::vector<std::uint8_t> kind_;
};

class PolarSclDecoder {
 public:
  static constexpr int kMaxListSize = 32;
  // fast_nodes: rate-0 and repetition subtrees in one step per path (see
  // below); decisions and metrics identical to the leaf-by-leaf recursion.
  static Result<PolarSclDecoder> Create(const PolarCode& code, int list_size,  // 1..32
                                        bool fast_nodes = true);

  int list_size() const { return list_; }

  class Workspace {
   public:
    // After Decode: the number of surviving paths and the codeword estimate
    // x (N bits) of the path of rank r (0 = smallest metric).
    int paths() const { return active_count_; }
    std::span<const Bit> Codeword(int rank) const;
    float Metric(int rank) const;

    // Decoder state (polar_decoder.cc), not for callers.
    int m_ = 0, list_ = 0;
    std::vector<float> llr_pool_;       // level s: list_ arrays of 2^s at list_ (2^s - 1)
    std::vector<Bit> beta_pool_;        // levels 0..m, same layout
    std::vector<int> llr_idx_, beta_idx_;  // [path * (m + 1) + s]
    std::vector<int> llr_ref_, beta_ref_;  // [s * list_ + array]
    std::vector<int> llr_free_, beta_free_;  // stacks [s * list_ + j]
    std::vector<int> llr_free_n_, beta_free_n_;
    std::vector<int> slot_free_;
    int slot_free_n_ = 0;
    std::vector<int> active_;  // slots, list order
    int active_count_ = 0;
    std::vector<float> metric_;  // by slot
    std::vector<int> order_;     // scratch: ranking of 2 list_ candidates
    std::vector<float> cand_metric_;
    std::vector<std::uint8_t> keep_;
    std::vector<int> next_active_;
    std::vector<int> rank_;  // after Decode: slots by rank
    std::vector<float> zero_scratch_;  // fast nodes: 2^{m+1} floats
  };
  Workspace MakeWorkspace() const;

  // REQUIRES: llr.size() == N.
  void Decode(std::span<const float> llr, Workspace& ws) const;

 private:
  PolarSclDecoder(const PolarCode& code, int list_size, bool fast_nodes);
  void Node(int s, int leaf, const float* channel, Workspace& ws) const;
  void Leaf(int leaf, Workspace& ws) const;
  int m_;
  int list_;
  std::vector<std::uint8_t> frozen_;
  // Per node (heap order as in PolarScDecoder): 0 plain, 1 rate-0,
  // 2 repetition.
  std::vector<std::uint8_t> kind_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_POLAR_DECODER_H_
