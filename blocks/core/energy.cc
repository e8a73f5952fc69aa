// Energy and noise bookkeeping: the only place Eb/N0 becomes a noise variance.
#include "blocks/core/energy.h"

#include <cmath>

namespace capgap {

double DbToLinear(double db) { return std::pow(10.0, db / 10.0); }
double LinearToDb(double linear) { return 10.0 * std::log10(linear); }

double EsN0DbFromEbN0Db(double ebn0_db, double info_bits_per_symbol) {
  return ebn0_db + LinearToDb(info_bits_per_symbol);
}
double EbN0DbFromEsN0Db(double esn0_db, double info_bits_per_symbol) {
  return esn0_db - LinearToDb(info_bits_per_symbol);
}

NoiseLevel ComputeNoiseLevel(const NoiseSpec& spec) {
  NoiseLevel level{};
  level.info_bits_per_symbol = spec.code_rate * spec.bits_per_symbol;
  level.esn0_db = EsN0DbFromEbN0Db(spec.ebn0_db, level.info_bits_per_symbol);
  // Es = 1, so N0 = 1 / (Es/N0). Per sample the complex variance stays N0 for a
  // unit-energy pulse (see header); only the per-sample SNR reflects S.
  level.n0 = 1.0 / DbToLinear(level.esn0_db);
  level.sigma_per_dim = std::sqrt(level.n0 / 2.0);
  level.per_sample_snr_db =
      level.esn0_db - LinearToDb(static_cast<double>(spec.samples_per_symbol));
  return level;
}

}  // namespace capgap
