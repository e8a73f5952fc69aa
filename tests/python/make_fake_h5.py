#!/usr/bin/python3
"""Write a small SYNTHETIC capgap-curves HDF5 file for testing the Python tools.

Role: test fixture generator. The file follows the capgap-curves layout
(format_version 1) that the C++ writer produces, so that
analysis/plot_curves.py and tests/python/check_h5_layout.py can be exercised
before (and independently of) the simulator. Nothing in it comes from a
simulation: every "simulated" point is a binomial draw (numpy, fixed seed) at
the closed-form error rate, and the file says so in its root attributes
(`program_version`, `git_revision`, `kernel_target`, `note`) and in the first
line of its `config` text.

Schemes written (four, to stress the plot layout):
  qpsk_uncoded, 16qam_uncoded, 64qam_uncoded: uncoded Gray square QAM;
  qpsk_synthetic_r1-2: a made-up "code" of rate 1/2 on QPSK whose BER is the
      uncoded QPSK curve moved 4.5 dB to the left (a finite constrained limit
      and a coding gain exist, so every plot element is drawn).

Methods (all numpy/h5py only, no scipy, so the result is an independent
oracle for check_h5_layout.py, which recomputes with other methods):
  * Gray square M-QAM BER: K. Cho and D. Yoon, "On the general BER expression
    of one- and two-dimensional amplitude modulations", IEEE Trans. Commun.
    50(7), 2002, eq. for P_b(k) (closed form with erfc; from memory).
  * SER: Ps = 1 - (1 - P_L)^2 (evaluated as P_L (2 - P_L)), P_L = 2 (1 - 1/L) Q(sqrt(3 Es / ((M-1) N0)))
    (Proakis & Salehi, Digital Communications, 5th ed., ch. 4; from memory).
  * 95 % Clopper-Pearson interval by bisection on the binomial tail sums
    (log-space terms), not by beta quantiles.
  * Shannon limit 10 log10((2^eta - 1) / eta) (Shannon, Proc. IRE, 1949).
  * Binary-input AWGN limit for the rate-1/2 scheme (QPSK = two BPSK) by
    Gauss-Hermite quadrature of the BPSK mutual information and bisection;
    about 0.19 dB (Richardson & Urbanke, Modern Coding Theory, 2008; value
    from memory).

Usage: /usr/bin/python3 tests/python/make_fake_h5.py OUT.h5 [--seed N]
"""

import argparse
import datetime
import math
import sys

import h5py
import numpy as np

ALPHA = 0.05  # 95 % two-sided interval.
BITS_PER_FRAME = 1000
TARGET_ERRORS = 200
MAX_FRAMES = 20000  # stop_bits = 2e7
TARGET_BER = 1e-5


def qfunc(x):
    return 0.5 * math.erfc(x / math.sqrt(2.0))


def cho_yoon_ber(order, ebno_db):
    """Gray square M-QAM BER on AWGN (Cho & Yoon 2002), rho = log2(M)."""
    m = int(round(math.log2(order)))
    side = int(round(math.sqrt(order)))
    gamma_b = 10.0 ** (ebno_db / 10.0)
    arg = math.sqrt(3.0 * m * gamma_b / (2.0 * (order - 1)))
    levels_bits = int(round(math.log2(side)))
    total = 0.0
    for k in range(1, levels_bits + 1):
        pk = 0.0
        upper = int(round((1.0 - 2.0 ** (-k)) * side))
        for i in range(upper):
            w = (i * 2 ** (k - 1)) // side
            sign = -1.0 if (w % 2) else 1.0
            weight = 2 ** (k - 1) - math.floor(i * 2 ** (k - 1) / side + 0.5)
            pk += sign * weight * math.erfc((2 * i + 1) * arg)
        total += pk / side
    return total / levels_bits


def square_qam_ser(order, ebno_db):
    m = math.log2(order)
    side = math.sqrt(order)
    esno = m * 10.0 ** (ebno_db / 10.0)
    pl = 2.0 * (1.0 - 1.0 / side) * qfunc(math.sqrt(3.0 * esno / (order - 1)))
    return pl * (2.0 - pl)  # = 1 - (1 - P_L)^2 without cancellation


def ebno_at_ber(ber_fn, target, lo=-10.0, hi=60.0):
    """Bisection to 1e-9 dB on a decreasing BER curve; NaN if not bracketed."""
    if not (ber_fn(lo) > target > ber_fn(hi)):
        return math.nan
    while hi - lo > 1e-9:
        mid = 0.5 * (lo + hi)
        if ber_fn(mid) > target:
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi)


def _log_binom_terms(n, kmax, p):
    i = np.arange(kmax + 1, dtype=np.float64)
    lgam = np.vectorize(math.lgamma)
    return (math.lgamma(n + 1.0) - lgam(i + 1.0) - lgam(n - i + 1.0)
            + i * math.log(p) + (n - i) * math.log1p(-p))


def _binom_cdf(k, n, p):
    """P(X <= k) for X ~ Binomial(n, p), summed in log space."""
    t = _log_binom_terms(n, k, p)
    top = t.max()
    return min(1.0, math.exp(top) * float(np.sum(np.exp(t - top))))


def _bisect_p(fn, want, increasing):
    """p in (0, 1) with fn(p) = want, bisecting on log p."""
    lo, hi = -40.0, 0.0  # log10 p
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        val = fn(10.0 ** mid)
        if (val < want) == increasing:
            lo = mid
        else:
            hi = mid
    return 10.0 ** (0.5 * (lo + hi))


def clopper_pearson(k, n, alpha=ALPHA):
    """Two-sided exact binomial interval by tail-sum bisection."""
    if k == 0:
        low = 0.0
        high = 1.0 - (alpha / 2.0) ** (1.0 / n)
        return low, high
    if k == n:
        return (alpha / 2.0) ** (1.0 / n), 1.0
    # Lower: P(X >= k; p) = alpha/2, increasing in p.
    low = _bisect_p(lambda p: 1.0 - _binom_cdf(k - 1, n, p), alpha / 2.0, True)
    # Upper: P(X <= k; p) = alpha/2, decreasing in p.
    high = _bisect_p(lambda p: _binom_cdf(k, n, p), alpha / 2.0, False)
    return low, high


def bpsk_mutual_information(esno_db, nodes=80):
    """I(X;Y) in bit for equiprobable +-1 on a real AWGN channel of variance N0/2.

    Gauss-Hermite quadrature over the noise; used for the rate-1/2 limit.
    """
    x, w = np.polynomial.hermite.hermgauss(nodes)
    n0 = 1.0 / 10.0 ** (esno_db / 10.0)
    sigma = math.sqrt(n0 / 2.0)
    noise = math.sqrt(2.0) * sigma * x
    # Given x = +1 sent: log2(1 + exp(-2 * 2 (1 + n) / N0)) averaged.
    llr = 4.0 * (1.0 + noise) / n0
    loss = np.logaddexp(0.0, -llr) / math.log(2.0)
    return 1.0 - float(np.sum(w * loss) / math.sqrt(math.pi))


def binary_input_limit_db(rate):
    # BPSK per real dimension carries `rate` bits at Es/N0 = rate Eb/N0.
    lo, hi = -10.0, 20.0
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if bpsk_mutual_information(mid + 10.0 * math.log10(rate)) < rate:
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi)


def shannon_limit_db(eta):
    return 10.0 * math.log10((2.0 ** eta - 1.0) / eta)


def crossing_db(ebno, ber, target):
    """Log-linear interpolation of the first downward crossing of target."""
    for i in range(len(ebno) - 1):
        a, b = ber[i], ber[i + 1]
        if a >= target > b and b > 0.0:
            la, lb, lt = math.log10(a), math.log10(b), math.log10(target)
            return float(ebno[i] + (ebno[i + 1] - ebno[i]) * (la - lt) / (la - lb))
    return math.nan


def simulate_points(rng, ebno_grid, ber_fn):
    """Binomial draws frame by frame with the usual stopping rule."""
    out = {k: [] for k in ("bits", "bit_errors", "frames", "frame_errors",
                           "stop_reason", "seconds")}
    for ebno in ebno_grid:
        p = ber_fn(ebno)
        per_frame = rng.binomial(BITS_PER_FRAME, p, size=MAX_FRAMES)
        cum = np.cumsum(per_frame)
        hit = np.nonzero(cum >= TARGET_ERRORS)[0]
        if hit.size:
            frames = int(hit[0]) + 1
            reason = "stop_bit_errors"
        else:
            frames = MAX_FRAMES
            reason = "stop_bits"
        used = per_frame[:frames]
        out["bits"].append(frames * BITS_PER_FRAME)
        out["bit_errors"].append(int(used.sum()))
        out["frames"].append(frames)
        out["frame_errors"].append(int(np.count_nonzero(used)))
        out["stop_reason"].append(reason)
        out["seconds"].append(frames * BITS_PER_FRAME * 2.5e-9)  # synthetic
    return out


def write_scheme(f, rng, name, modulation, order, code, rate, grid, ber_fn,
                 seed, constrained_db):
    m = int(round(math.log2(order)))
    rho = rate * m
    g = f.create_group(name)
    # Scheme string attributes as fixed-length ASCII (as a C++ writer using
    # H5T_C_S1 of exact size would store them); root ones are variable-length
    # UTF-8. The checker must accept both.
    g.attrs["modulation"] = np.bytes_(modulation)
    g.attrs["bits_per_symbol"] = np.int32(m)
    g.attrs["code"] = np.bytes_(code)
    g.attrs["code_rate"] = np.float64(rate)
    g.attrs["info_bits_per_symbol"] = np.float64(rho)
    g.attrs["spectral_efficiency"] = np.float64(rho)  # Nyquist, roll-off 0
    g.attrs["seed"] = np.uint64(seed)
    g.attrs["target_ber"] = np.float64(TARGET_BER)
    g.attrs["demapper"] = np.bytes_("exact")

    sim = simulate_points(rng, grid, ber_fn)
    bits = np.array(sim["bits"], dtype=np.uint64)
    errs = np.array(sim["bit_errors"], dtype=np.uint64)
    frames = np.array(sim["frames"], dtype=np.uint64)
    ferrs = np.array(sim["frame_errors"], dtype=np.uint64)
    ber = errs.astype(np.float64) / bits.astype(np.float64)
    fer = ferrs.astype(np.float64) / frames.astype(np.float64)
    ber_ci = np.array([clopper_pearson(int(k), int(n)) for k, n in zip(errs, bits)])
    fer_ci = np.array([clopper_pearson(int(k), int(n)) for k, n in zip(ferrs, frames)])

    g.create_dataset("ebno_db", data=np.asarray(grid, dtype=np.float64))
    g.create_dataset("esno_db", data=np.asarray(grid, dtype=np.float64)
                     + 10.0 * math.log10(rho))
    g.create_dataset("bits", data=bits)
    g.create_dataset("bit_errors", data=errs)
    g.create_dataset("frames", data=frames)
    g.create_dataset("frame_errors", data=ferrs)
    g.create_dataset("ber", data=ber)
    g.create_dataset("ber_low", data=ber_ci[:, 0])
    g.create_dataset("ber_high", data=ber_ci[:, 1])
    g.create_dataset("fer", data=fer)
    g.create_dataset("fer_low", data=fer_ci[:, 0])
    g.create_dataset("fer_high", data=fer_ci[:, 1])
    g.create_dataset("seconds", data=np.array(sim["seconds"], dtype=np.float64))
    g.create_dataset("stop_reason", data=sim["stop_reason"],
                     dtype=h5py.string_dtype("utf-8"))

    th = g.create_group("theory")
    fine = np.round(np.arange(-4.0, 30.0 + 1e-9, 0.05), 10)
    th.create_dataset("ebno_db", data=fine)
    th.create_dataset("ber_uncoded", data=[cho_yoon_ber(order, x) for x in fine])
    th.create_dataset("ser_uncoded", data=[square_qam_ser(order, x) for x in fine])

    shannon = shannon_limit_db(rho)
    lim = g.create_group("limits")
    lim.attrs["shannon_ebno_db"] = np.float64(shannon)
    lim.attrs["constrained_ebno_db"] = np.float64(constrained_db)

    at = crossing_db(grid, ber, TARGET_BER)
    at_low = crossing_db(grid, ber_ci[:, 0], TARGET_BER)
    at_high = crossing_db(grid, ber_ci[:, 1], TARGET_BER)
    uncoded = ebno_at_ber(lambda x: cho_yoon_ber(order, x), TARGET_BER)
    summ = g.create_group("summary")
    summ.attrs["ebno_at_target_db"] = np.float64(at)
    summ.attrs["ebno_at_target_low_db"] = np.float64(at_low)
    summ.attrs["ebno_at_target_high_db"] = np.float64(at_high)
    summ.attrs["uncoded_ebno_at_target_db"] = np.float64(uncoded)
    summ.attrs["coding_gain_db"] = np.float64(uncoded - at)
    summ.attrs["gap_to_shannon_db"] = np.float64(at - shannon)
    summ.attrs["gap_to_constrained_db"] = np.float64(
        at - constrained_db if math.isfinite(constrained_db) else math.nan)


CONFIG_TEXT = """\
# SYNTHETIC TEST DATA written by tests/python/make_fake_h5.py -- not a simulation.
[run]
seed = {seed}
threads = 1

[scheme.qpsk_uncoded]
modulation = qpsk
code = none

[scheme.16qam_uncoded]
modulation = 16qam
code = none

[scheme.64qam_uncoded]
modulation = 64qam
code = none

[scheme.qpsk_synthetic_r1-2]
modulation = qpsk
code = synthetic
"""


def main(argv):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("out", help="output .h5 path")
    ap.add_argument("--seed", type=int, default=20240611)
    args = ap.parse_args(argv)

    rng = np.random.default_rng(args.seed)
    with h5py.File(args.out, "w") as f:
        f.attrs["format"] = "capgap-curves"
        f.attrs["format_version"] = np.int32(1)
        f.attrs["program_version"] = "0.0.0-synthetic"
        f.attrs["git_revision"] = "synthetic"
        f.attrs["created_utc"] = datetime.datetime.now(
            datetime.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ")
        f.attrs["command_line"] = " ".join(["make_fake_h5.py"] + list(argv))
        f.attrs["config"] = CONFIG_TEXT.format(seed=args.seed)
        f.attrs["threads"] = np.int32(1)
        f.attrs["ranks"] = np.int32(1)
        f.attrs["kernel_target"] = "synthetic"
        f.attrs["seed"] = np.uint64(args.seed)
        f.attrs["note"] = "SYNTHETIC TEST DATA: binomial draws at closed-form rates"

        inf = math.inf
        write_scheme(f, rng, "qpsk_uncoded", "qpsk", 4, "none", 1.0,
                     np.arange(-2.0, 12.0 + 1e-9, 1.0),
                     lambda x: cho_yoon_ber(4, x), args.seed + 1, inf)
        write_scheme(f, rng, "16qam_uncoded", "16qam", 16, "none", 1.0,
                     np.arange(0.0, 16.0 + 1e-9, 1.0),
                     lambda x: cho_yoon_ber(16, x), args.seed + 2, inf)
        write_scheme(f, rng, "64qam_uncoded", "64qam", 64, "none", 1.0,
                     np.arange(4.0, 20.0 + 1e-9, 1.0),
                     lambda x: cho_yoon_ber(64, x), args.seed + 3, inf)
        write_scheme(f, rng, "qpsk_synthetic_r1-2", "qpsk", 4, "synthetic", 0.5,
                     np.arange(-1.0, 6.0 + 1e-9, 0.5),
                     lambda x: cho_yoon_ber(4, x + 4.5), args.seed + 4,
                     binary_input_limit_db(0.5))
        # Optional index of the scheme groups, as the C++ writer adds it.
        f.attrs["schemes"] = "qpsk_uncoded,16qam_uncoded,64qam_uncoded,qpsk_synthetic_r1-2"
    print(f"wrote synthetic capgap-curves test file {args.out}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
