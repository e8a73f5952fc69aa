// Energy and noise bookkeeping, defined once for the whole project.
//
// Conventions (see DEVELOPERS.md): complex baseband, Es = 1 per symbol;
// m = bits per symbol, R = code rate, rho = R m information bits per symbol;
// Es/N0 = rho Eb/N0; circular complex AWGN n ~ CN(0, N0), variance N0/2 per
// real dimension. With a unit-energy transmit pulse at S samples per symbol
// and its matched filter, the channel adds complex noise of variance N0 per
// *sample*; the matched-filter output at the symbol instant then carries
// signal x with noise variance N0, so Es/N0 is unchanged by oversampling. The
// per-sample SNR is Es/N0 - 10 log10(S) dB.
#ifndef CAPGAP_BLOCKS_CORE_ENERGY_H_
#define CAPGAP_BLOCKS_CORE_ENERGY_H_

namespace capgap {

double DbToLinear(double db);
double LinearToDb(double linear);

// Es/N0 in dB for an Eb/N0 in dB and rho information bits per symbol.
double EsnoDbFromEbnoDb(double ebno_db, double info_bits_per_symbol);
double EbnoDbFromEsnoDb(double esno_db, double info_bits_per_symbol);

struct NoiseSpec {
  double ebno_db = 0.0;
  double code_rate = 1.0;       // effective rate: tail and puncturing included
  int bits_per_symbol = 1;      // coded bits per constellation symbol, m
  int samples_per_symbol = 1;   // S; 1 for an unshaped chain
};

struct NoiseLevel {
  double info_bits_per_symbol;  // rho = R m
  double esno_db;               // Es/N0 = rho Eb/N0
  double n0;                    // complex noise variance per sample (Es = 1)
  double sigma_per_dim;         // sqrt(N0 / 2): standard deviation of I and of Q
  double per_sample_snr_db;     // Es/N0 - 10 log10(S)
};

// The one function that turns (Eb/N0, R, m, S) into the noise to add. Inputs
// must be valid (R in (0, 1], m >= 1, S >= 1); callers validate config first.
NoiseLevel ComputeNoiseLevel(const NoiseSpec& spec);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CORE_ENERGY_H_
