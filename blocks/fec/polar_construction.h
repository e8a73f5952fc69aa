// Polar code construction: reliability of the N = 2^m synthetic channels
// (m = 3..15) and the choice of the information set, with rate matching to a
// transmitted length E, N/2 < E <= N.
//
// Bit order (stated once for every polar block): x = u G_N with G_N =
// F^{(x)m}, F = [[1, 0], [1, 1]] (Arikan, IEEE Trans. Inf. Theory 55(7),
// 2009), without the bit-reversal permutation: G_N[i][j] = 1 iff the binary
// digits of j are a subset of those of i, so x_j = XOR of u_i over i
// covering j. Index i of u is the synthetic channel i.
//
// Reliability orders:
// - ga: Gaussian approximation of density evolution (S.-Y. Chung, T.
//   Richardson, R. Urbanke, IEEE Trans. Inf. Theory 47(2), 2001) applied to
//   polar codes as in P. Trifonov, "Efficient design and decoding of polar
//   codes", IEEE Trans. Commun. 60(11), 2012, with the three-piece
//   approximation of phi given there (from memory):
//     phi(x) = exp(0.0564 x^2 - 0.48560 x)              0 <= x < 0.867861
//            = exp(-0.4527 x^0.86 + 0.0218)              0.867861 <= x < 10
//            = sqrt(pi / x) exp(-x / 4) (1 - 10 / (7 x)) x >= 10.
//   phi^-1 inverts these pieces (closed form on the first two, Newton on the
//   third). The recursion runs on ln phi so that means of 10^6 (m = 15 at
//   high SNR) do not overflow phi; the means of the worst channels shrink
//   doubly exponentially and reach 0 in double (ties then go by index, all
//   of them frozen at any practical rate). Channel LLR mean 4 Ec/N0 (LLR 2y/sigma^2,
//   sigma^2 = N0/2, common practice).
// - bhattacharyya: Z of the BI-AWGN channel exp(-Ec/N0), with Z- = Za + Zb
//   - Za Zb (exact on the erasure channel, an upper bound otherwise) and Z+ =
//   Za Zb (Arikan 2009), in the log domain.
// - beta: polarization weight PW(i) = sum_j i_j beta^j, beta = 2^(1/4), i_j
//   the binary digits of i (G. He et al., "beta-expansion: a theoretical
//   framework for fast and recursive construction of polar codes", IEEE
//   Globecom 2017); independent of the SNR.
//
// Rate matching (the pattern of 3GPP TS 38.212 §5.4.1 with the identity in
// place of its sub-block interleaver): puncturing drops the first P = N - E
// coded bits x_0..x_{P-1}, whose u_0..u_{P-1} then reach only punctured bits
// (i covers j implies j <= i) and are frozen; shortening drops the last S = N
// - E coded bits, which are zero once u_{N-S}..u_{N-1} are frozen, and the
// decoder knows them. ga and bhattacharyya also see the punctured bits as
// erasures (LLR mean 0, Z = 1) and the shortened bits as perfect. auto picks
// puncturing when (info bits + CRC bits) / E <= 7/16, else shortening (the
// rule of 3GPP TS 38.212 §5.4.1.1, from memory).
#ifndef CAPGAP_BLOCKS_FEC_POLAR_CONSTRUCTION_H_
#define CAPGAP_BLOCKS_FEC_POLAR_CONSTRUCTION_H_

#include <cstdint>
#include <span>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"

namespace capgap {

enum class PolarConstruction { kGa, kBhattacharyya, kBeta };
Result<PolarConstruction> ParsePolarConstruction(std::string_view word);  // ga, bhattacharyya, beta
std::string_view ToString(PolarConstruction c);

enum class PolarRateMatching { kAuto, kNone, kPuncture, kShorten };
Result<PolarRateMatching> ParsePolarRateMatching(std::string_view word);  // auto, puncture, shorten
std::string_view ToString(PolarRateMatching r);  // auto, none, puncture, shorten

inline constexpr int kPolarMinLog2 = 3;
inline constexpr int kPolarMaxLog2 = 15;

// The Gaussian-approximation phi (header comment) and its inverse on ln phi,
// exposed for tests. LnPhi(0) = 0, LnPhi(inf) = -inf; InvLnPhi(LnPhi(x)) ~ x.
double PolarLnPhi(double x);
double PolarInvLnPhi(double ln_phi);

// Reliability of every synthetic channel u_i, larger = more reliable: the
// mean LLR (ga), -ln Z (bhattacharyya) or PW(i) (beta). coded_state[j] is
// 0 for a transmitted coded bit, 1 punctured, 2 shortened (size N = 2^m);
// ecn0_linear is the design Ec/N0 per coded bit (ignored by beta).
std::vector<double> PolarReliabilities(PolarConstruction c, int m, double ecn0_linear,
                                       std::span<const std::uint8_t> coded_state);

// Indices 0..N-1 from least to most reliable (ties: lower index first).
std::vector<int> PolarReliabilityOrder(std::span<const double> reliabilities);

struct PolarCodeSpec {
  int length = 0;            // E, transmitted bits, 5 <= E <= 2^15
  int message_bits = 0;      // K = information + CRC bits, 1 <= K <= E
  PolarConstruction construction = PolarConstruction::kGa;
  double design_ecn0_db = 0;  // design Ec/N0 per coded bit (ga, bhattacharyya)
  PolarRateMatching rate_matching = PolarRateMatching::kAuto;
};

struct PolarCode {
  int m = 0;                  // N = 2^m, the smallest power of two >= E
  int mother_length = 0;      // N
  int length = 0;             // E
  int message_bits = 0;       // K
  PolarRateMatching rate_matching = PolarRateMatching::kNone;  // resolved
  std::vector<std::uint8_t> frozen;   // N entries, 1 = frozen (value 0)
  std::vector<int> info_positions;    // K positions, ascending
  std::vector<double> reliability;    // N entries, as PolarReliabilities
  // Rate matching: first transmitted mother position and count (puncture:
  // [N-E, N); shorten or none: [0, E)).
  int first_transmitted() const {
    return rate_matching == PolarRateMatching::kPuncture ? mother_length - length : 0;
  }
};

// Chooses the K most reliable channels among those rate matching leaves
// free; messages name the rule broken.
Result<PolarCode> ConstructPolarCode(const PolarCodeSpec& spec);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_POLAR_CONSTRUCTION_H_
