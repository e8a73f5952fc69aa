#!/usr/bin/python3
"""ctest wrapper: run capgap on a config, check the HDF5 layout, plot it.

Role: the end-to-end read-back test of the file-format interface on a real
run (not synthetic data). Three steps, stopping at the first failure:
  1. CAPGAP run CONFIG -o OUT.h5 --quiet   (any stale OUT.h5 is deleted
     first, so a file from an earlier build cannot pass for this one);
     must exit 0 and leave a non-empty OUT.h5;
  2. check_h5_layout.py OUT.h5             must exit 0;
  3. plot_curves.py OUT.h5 -o OUT.png      must exit 0 and leave non-empty
     OUT.png and OUT.svg, OUT-plane.png and OUT-signal.png.
Each step's command and outcome are printed; exit status 1 on failure.

Usage: run_and_check.py --capgap BIN --config INI --out OUT.h5
                        [--checker PATH] [--plotter PATH] [--timeout S]
                        [--set KEY=VALUE ...]
"""

import argparse
import pathlib
import subprocess
import sys

HERE = pathlib.Path(__file__).resolve().parent
REPO = HERE.parent.parent


def step(n, what, cmd, timeout):
    print(f"[{n}/3] {what}\n      $ {' '.join(map(str, cmd))}", flush=True)
    try:
        r = subprocess.run([str(c) for c in cmd], capture_output=True, text=True,
                           timeout=timeout)
    except FileNotFoundError as e:
        print(f"      FAIL: cannot start: {e}")
        return False
    except subprocess.TimeoutExpired:
        print(f"      FAIL: still running after {timeout} s")
        return False
    tail = (r.stdout.strip().splitlines() or [""])[-1]
    if r.returncode != 0:
        print(f"      FAIL: exit status {r.returncode}")
        for stream, text in (("stdout", r.stdout), ("stderr", r.stderr)):
            if text.strip():
                print(f"      {stream}:\n" + "\n".join("        " + l for l in text.strip().splitlines()[-25:]))
        return False
    print(f"      ok ({tail})" if tail else "      ok")
    return True


def non_empty(path):
    ok = path.exists() and path.stat().st_size > 0
    print(f"      {'ok' if ok else 'FAIL'}: {path} {'exists, ' + str(path.stat().st_size) + ' bytes' if ok else 'missing or empty'}")
    return ok


def main(argv):
    ap = argparse.ArgumentParser()
    ap.add_argument("--capgap", required=True)
    ap.add_argument("--config", required=True)
    ap.add_argument("--out", required=True)
    ap.add_argument("--checker", default=str(HERE / "check_h5_layout.py"))
    ap.add_argument("--plotter", default=str(REPO / "analysis" / "plot_curves.py"))
    ap.add_argument("--timeout", type=float, default=240.0, help="per step, seconds")
    ap.add_argument("--set", action="append", default=[], metavar="KEY=VALUE",
                    help="config override passed to capgap run (repeatable)")
    args = ap.parse_args(argv)
    out = pathlib.Path(args.out)
    png, svg = out.with_suffix(".png"), out.with_suffix(".svg")
    out.parent.mkdir(parents=True, exist_ok=True)
    for p in (out, png, svg, png.with_name(png.stem + "-plane.png"),
              png.with_name(png.stem + "-signal.png"),
              out.with_name(out.name + ".ckpt")):  # a killed earlier run's checkpoint
        p.unlink(missing_ok=True)
    py = [sys.executable, "-B"]

    if not pathlib.Path(args.capgap).exists():
        print(f"[1/3] FAIL: the CLI {args.capgap} does not exist (not built yet?)")
        return 1
    if not pathlib.Path(args.config).exists():
        print(f"[1/3] FAIL: the config {args.config} does not exist")
        return 1
    overrides = [a for kv in args.set for a in ("--set", kv)]
    ok = (step(1, "simulate", [args.capgap, "run", args.config, "-o", out, "--quiet"] + overrides,
               args.timeout)
          and non_empty(out)
          and step(2, "check the HDF5 layout", py + [args.checker, out], args.timeout)
          and step(3, "plot", py + [args.plotter, out, "-o", png], args.timeout)
          and non_empty(png) and non_empty(svg)
          # The companion figures: the power-bandwidth chart always, the
          # signal views because the config has a shaped scheme.
          and non_empty(png.with_name(png.stem + "-plane.png"))
          and non_empty(png.with_name(png.stem + "-signal.png")))
    print("run_and_check: " + ("PASS" if ok else "FAIL"))
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
