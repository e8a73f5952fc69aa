// Closed-form (and numerically integrated) error rates of uncoded, coherent,
// Gray-labelled modulations on the AWGN channel. All functions take Eb/N0 in
// dB per *information* bit of the uncoded scheme (rho = m).
//
// Methods and sources (also cited beside the tests):
//  * Q(x) = 0.5 erfc(x / sqrt 2).
//  * BPSK / QPSK: Pb = Q(sqrt(2 Eb/N0)) (Proakis & Salehi, Digital
//    Communications, 5th ed., ch. 4).
//  * Square M-QAM: Ps = 1 - (1 - P_L)^2, P_L = 2 (1 - 1/L) Q(sqrt(3 Es/((M-1) N0)));
//    exact Gray BER by K. Cho and D. Yoon, IEEE Trans. Commun. 50(7), 2002.
//  * M-PSK: Ps by Craig's integral (J. W. Craig, MILCOM 1991); exact Gray BER
//    by integrating the 2-D Gaussian over every decision sector in polar form
//    (Craig-type single integrals per sector boundary).
#ifndef CAPGAP_ANALYSIS_UNCODED_THEORY_H_
#define CAPGAP_ANALYSIS_UNCODED_THEORY_H_

#include "blocks/mapping/modulation.h"

namespace capgap::analysis {

double QFunction(double x);
// Inverse of Q on (0, 0.5]: x with Q(x) = p.
double InverseQ(double p);

// Exact for PSK and square QAM. For a generic constellation (points and
// labels as data) they are the union bounds of constellation_bounds.h over
// its points: upper bounds, tight at high SNR (UncodedTheoryIsExact false).
// The Eb/N0 at a BER below then inverts the bound (an optimistic figure).
double UncodedBer(const Modulation& modulation, double ebno_db);
double UncodedSer(const Modulation& modulation, double ebno_db);
// True when UncodedBer/UncodedSer are exact (PSK, QAM), false when they are
// the union bound (generic constellations).
bool UncodedTheoryIsExact(const Modulation& modulation);

// Eb/N0 (dB) at which UncodedBer equals `ber` (0 < ber < 0.5 and reachable),
// found by bracketing and bisection to 1e-6 dB; NaN if not reachable.
double UncodedEbnoDbAtBer(const Modulation& modulation, double ber);

}  // namespace capgap::analysis

#endif  // CAPGAP_ANALYSIS_UNCODED_THEORY_H_
