#!/usr/bin/python3
"""Layout check and plots of a curves file holding a fading scheme.

Role: the Python half of tests/sim/io/fading_curves_test.cc. Runs that test
binary with CAPGAP_FADING_CURVES_OUT set so that it keeps the file it wrote
(one block-Rayleigh QPSK scheme with 2-branch MRC and one AWGN scheme), then
runs check_h5_layout.py on it (which recomputes the AWGN curves and the
Rayleigh MRC closed form) and plot_curves.py --fer (BER panel with the
fading theory and the ergodic limit, FER panel with the outage curves, and
the power-bandwidth chart with the ergodic bound). Exit status 0 when all
three succeed and the PNGs exist and are non-empty.

Usage: check_fading_file.py --test-binary BIN --out FILE.h5 --checker PY --plotter PY
"""

import argparse
import os
import pathlib
import subprocess
import sys


def main(argv):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--test-binary", required=True)
    ap.add_argument("--out", required=True)
    ap.add_argument("--checker", required=True)
    ap.add_argument("--plotter", required=True)
    args = ap.parse_args(argv)
    out = pathlib.Path(args.out)
    out.parent.mkdir(parents=True, exist_ok=True)
    if out.exists():
        out.unlink()
    env = dict(os.environ, CAPGAP_FADING_CURVES_OUT=str(out))
    steps = [
        ([args.test_binary, "--gtest_filter=FadingCurves.NewNames*"], env),
        ([sys.executable, "-B", args.checker, str(out)], None),
        ([sys.executable, "-B", args.plotter, str(out), "--fer", "--no-svg"], None),
    ]
    for cmd, e in steps:
        r = subprocess.run(cmd, env=e, capture_output=True, text=True)
        if r.returncode != 0:
            print(f"FAILED ({r.returncode}): {' '.join(cmd)}\n{r.stdout[-4000:]}\n{r.stderr[-4000:]}")
            return 1
        print(f"ok: {' '.join(cmd)}")
    for png in (out.with_suffix(".png"), out.with_name(out.stem + "-plane.png")):
        if not png.exists() or png.stat().st_size == 0:
            print(f"FAILED: {png} missing or empty")
            return 1
        print(f"ok: {png} ({png.stat().st_size} bytes)")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
