// What a scheme asks of its channel, as typed options: the amplitude law of
// flat fading, how the gain varies in time, receive diversity, and the
// interleaver that spreads a coded frame over the fades. Parsed from the
// scheme's channel keys (sim/families/), read by the channel blocks
// (blocks/channel/) and by the theory and limits (analysis/), so that the
// simulated chain and its theory describe the same channel.
//
// Conventions (every law): E|h|^2 = 1 per branch, so Eb/N0 is the average
// per branch; the receiver knows every h exactly (perfect channel state).
#ifndef CAPGAP_BLOCKS_CHANNEL_CHANNEL_SPEC_H_
#define CAPGAP_BLOCKS_CHANNEL_CHANNEL_SPEC_H_

#include <cstdint>

namespace capgap {

// Amplitude law of the complex gain h. kAwgn: h = 1, no fading.
enum class FadingLaw { kAwgn, kRayleigh, kRician, kNakagami };
// Time variation: independent per symbol; constant over coherence_symbols
// symbols, independent between blocks; or a correlated (Doppler) process.
enum class FadingTime { kFast, kBlock, kDoppler };
enum class Combining { kMrc, kSelection };

struct ChannelSpec {
  FadingLaw law = FadingLaw::kAwgn;
  double rician_k_db = 0;      // Rician K factor, dB (law = kRician)
  double nakagami_m = 1;       // Nakagami m >= 0.5 (law = kNakagami)
  FadingTime time = FadingTime::kFast;
  std::uint32_t coherence_symbols = 1;  // time = kBlock
  double doppler = 0.01;       // f_D * T_s (time = kDoppler)
  int branches = 1;            // receive branches L
  Combining combining = Combining::kMrc;
  bool fading() const { return law != FadingLaw::kAwgn; }
};

enum class InterleaverKind { kNone, kRandom, kRows };

struct InterleaverSpec {
  InterleaverKind kind = InterleaverKind::kNone;
  std::uint32_t rows = 0;    // kRows: rows of the row-column interleaver
  std::uint32_t frames = 1;  // frames whose coded bits are interleaved together
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CHANNEL_CHANNEL_SPEC_H_
