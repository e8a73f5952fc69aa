#!/usr/bin/python3
"""Reference speed of the two uncoded chains in careful, vectorised numpy.

The yardstick for the C++ engine's throughput (tests/bench/chain_bench.cc):
same chains, same frame sizes, one thread. Prints a JSON object with the
median information bits per second of each chain over --repeats runs.

  bpsk_hard:     bits -> +-1 -> + N(0, N0/2) -> sign -> count errors
  qam16_maxlog:  bits -> Gray 16-QAM -> + CN(0, N0) -> max-log LLRs per bit
                 (min over the constellation subsets, per axis) -> sign -> count
  qam16_maxlog_careful: the same chain as a careful numpy user writes it:
                 float32 throughout, random bytes unpacked to bits, and the
                 per-axis closed-form max-log LLRs of Gray 4-PAM (levels +-a,
                 +-3a; up to a positive scale the sign bit's LLR is y and the
                 inner bit's |y| - 2a with this project's labels, where the
                 outer levels carry inner bit 0)

numpy's PCG64 generator with standard_normal(float32) is used for the noise.
"""
import argparse
import json
import os
import statistics
import time

# One BLAS/numpy thread: the comparison is per core.
os.environ.setdefault("OMP_NUM_THREADS", "1")
import numpy as np  # noqa: E402


def bpsk_hard(rng, n, sigma):
    bits = rng.integers(0, 2, n, dtype=np.uint8)
    y = (1.0 - 2.0 * bits).astype(np.float32)
    y += sigma * rng.standard_normal(n, dtype=np.float32)
    return int(np.count_nonzero((y < 0) != bits.astype(bool)))


def qam16_tables():
    # Gray 4-PAM per axis: label bits (b0 b1) -> level; MSB 0 on the positive side.
    levels = np.array([3, 1, -3, -1], dtype=np.float32) / np.sqrt(10.0)  # labels 00,01,10,11
    return levels


def qam16_maxlog(rng, n, sigma, n0, levels):
    bits = rng.integers(0, 2, n, dtype=np.uint8).reshape(-1, 4)
    i_label = 2 * bits[:, 0] + bits[:, 1]
    q_label = 2 * bits[:, 2] + bits[:, 3]
    m = bits.shape[0]
    yi = levels[i_label] + sigma * rng.standard_normal(m, dtype=np.float32)
    yq = levels[q_label] + sigma * rng.standard_normal(m, dtype=np.float32)
    errors = 0
    for y, b_hi, b_lo in ((yi, bits[:, 0], bits[:, 1]), (yq, bits[:, 2], bits[:, 3])):
        d = (y[:, None] - levels[None, :]) ** 2  # m x 4 squared distances
        # bit 0 (MSB): labels {0,1} vs {2,3}; bit 1: labels {0,2} vs {1,3}
        l_hi = (np.minimum(d[:, 2], d[:, 3]) - np.minimum(d[:, 0], d[:, 1])) / n0
        l_lo = (np.minimum(d[:, 1], d[:, 3]) - np.minimum(d[:, 0], d[:, 2])) / n0
        errors += int(np.count_nonzero((l_hi < 0) != b_hi.astype(bool)))
        errors += int(np.count_nonzero((l_lo < 0) != b_lo.astype(bool)))
    return errors


def qam16_maxlog_careful(rng, n, sigma, levels, two_a):
    bits = np.unpackbits(rng.integers(0, 256, n // 8, dtype=np.uint8)).reshape(-1, 2)
    y = levels[2 * bits[:, 0] + bits[:, 1]]  # axis samples, Re and Im interleaved
    y += sigma * rng.standard_normal(y.shape[0], dtype=np.float32)
    errors = np.count_nonzero((y < 0) != bits[:, 0].astype(bool))
    errors += np.count_nonzero((np.abs(y) - two_a < 0) != bits[:, 1].astype(bool))
    return int(errors)


def timed(fn, bits_per_call, calls, repeats):
    rates = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        for _ in range(calls):
            fn()
        rates.append(bits_per_call * calls / (time.perf_counter() - t0))
    return statistics.median(rates)


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--bits", type=int, default=1 << 20, help="bits per call")
    ap.add_argument("--calls", type=int, default=8)
    ap.add_argument("--repeats", type=int, default=5)
    args = ap.parse_args()
    rng = np.random.default_rng(1)
    n = args.bits - args.bits % 4
    ebno = 10 ** (6.0 / 10)
    sigma_bpsk = np.float32(np.sqrt(1 / (2 * ebno)))
    n0_16 = np.float32(1 / (4 * ebno))
    sigma_16 = np.float32(np.sqrt(n0_16 / 2))
    levels = qam16_tables()
    out = {
        "bpsk_hard_bits_per_second": timed(lambda: bpsk_hard(rng, n, sigma_bpsk), n, args.calls, args.repeats),
        "qam16_maxlog_bits_per_second": timed(
            lambda: qam16_maxlog(rng, n, sigma_16, n0_16, levels), n, args.calls, args.repeats),
        "qam16_maxlog_careful_bits_per_second": timed(
            lambda: qam16_maxlog_careful(rng, n - n % 8, sigma_16, levels, np.float32(2 / np.sqrt(10.0))),
            n - n % 8, args.calls, args.repeats),
        "numpy_version": np.__version__,
    }
    print(json.dumps(out))


if __name__ == "__main__":
    main()
