// Energy and noise bookkeeping: the only place Eb/N0 becomes a noise variance.
#include "blocks/core/energy.h"

#include <cmath>

namespace capgap {

double DbToLinear(double db) { return std::pow(10.0, db / 10.0); }
double LinearToDb(double linear) { return 10.0 * std::log10(linear); }

double EsnoDbFromEbnoDb(double ebno_db, double info_bits_per_symbol) {
  return ebno_db + LinearToDb(info_bits_per_symbol);
}
double EbnoDbFromEsnoDb(double esno_db, double info_bits_per_symbol) {
  return esno_db - LinearToDb(info_bits_per_symbol);
}

NoiseLevel ComputeNoiseLevel(const NoiseSpec& spec) {
  NoiseLevel level{};
  level.info_bits_per_symbol = spec.code_rate * spec.bits_per_symbol;
  level.esno_db = EsnoDbFromEbnoDb(spec.ebno_db, level.info_bits_per_symbol);
  // Es = 1, so N0 = 1 / (Es/N0). Per sample the complex variance stays N0 for a
  // unit-energy pulse (see header); only the per-sample SNR reflects S.
  level.n0 = 1.0 / DbToLinear(level.esno_db);
  level.sigma_per_dim = std::sqrt(level.n0 / 2.0);
  level.per_sample_snr_db =
      level.esno_db - LinearToDb(static_cast<double>(spec.samples_per_symbol));
  return level;
}

}  // namespace capgap
