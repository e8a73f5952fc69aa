// Capacity limits: Shannon-Hartley, the minimum Eb/N0 for a spectral
// efficiency, constellation-constrained (coded-modulation) capacity and BICM
// capacity on the complex AWGN channel.
//
// Sources: C. E. Shannon, "Communication in the Presence of Noise", Proc. IRE,
// 1949 (C = B log2(1 + S/N); Eb/N0 >= (2^eta - 1) / eta, -> ln 2 as eta -> 0).
// Constrained capacity C = m - E[log2 sum_x' exp(-(|x + n - x'|^2 - |n|^2) / N0)]
// over equiprobable x and n ~ CN(0, N0), evaluated by Gauss-Hermite product
// quadrature (1-D for real constellations). BICM: G. Caire, G. Taricco,
// E. Biglieri, IEEE Trans. Inf. Theory 44(3), 1998.
#ifndef CAPGAP_ANALYSIS_CAPACITY_H_
#define CAPGAP_ANALYSIS_CAPACITY_H_

#include <span>

#include "blocks/core/types.h"

namespace capgap::analysis {

// Shannon-Hartley capacity in bit/s for a bandwidth in Hz and SNR in dB.
double ShannonHartleyCapacity(double bandwidth_hz, double snr_db);

// Minimum Eb/N0 in dB for reliable transmission at spectral efficiency eta
// (bit/s/Hz, unconstrained Gaussian input): 10 log10((2^eta - 1) / eta).
// eta -> 0 returns the limit 10 log10(ln 2) = -1.59 dB (computed stably for
// tiny eta). REQUIRES eta >= 0.
double ShannonMinEbnoDb(double eta);

// Constrained capacity in bit/symbol of the given constellation (points with
// unit average energy, equiprobable) at Es/N0 in dB. If every point is real,
// the channel is treated as real (noise variance N0/2 on the real axis only).
double ConstrainedCapacity(std::span<const cf32> points, double esno_db);

// BICM capacity (sum of the bit channels' capacities) for the labelling
// points[label] (label bits MSB first, as in Mapper).
double BicmCapacity(std::span<const cf32> points, double esno_db);

// Eb/N0 (dB) at which ConstrainedCapacity(points, Es/N0 = rho Eb/N0) = rho.
// Returns +infinity when rho >= log2(points.size()) (the constellation carries
// that many bits only at infinite SNR). REQUIRES 0 < rho.
double ConstrainedMinEbnoDb(std::span<const cf32> points, double rho);
// Same for BICM capacity.
double BicmMinEbnoDb(std::span<const cf32> points, double rho);

// Binary-input (BPSK) AWGN limit for code rate R: ConstrainedMinEbnoDb of
// {+1, -1} at rho = R. Rate 1/2 gives about 0.19 dB.
double BinaryInputMinEbnoDb(double rate);

}  // namespace capgap::analysis

#endif  // CAPGAP_ANALYSIS_CAPACITY_H_
