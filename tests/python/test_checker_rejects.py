#!/usr/bin/python3
"""Negative test of check_h5_layout.py: broken capgap-curves files are rejected.

Role: proves the layout checker can fail, and fails for the right reason.
It writes one good synthetic file with make_fake_h5.py, checks that it passes
(positive control: otherwise every rejection below would be meaningless),
then builds broken copies -- each with exactly one defect: a wrong dataset
or attribute type, a missing attribute, group or dataset, a wrong value or an
inconsistent number -- and asserts for each that the checker exits with
status 1, prints a "FAIL <file>: ..." line (not a Python traceback), and that
the message names the defect (expected substrings listed beside each case).

Prints one line per case and "N passed, M failed" at the end; exits non-zero
if any case failed. Usage:
  /usr/bin/python3 tests/python/test_checker_rejects.py [--workdir DIR]
"""

import argparse
import contextlib
import io
import math
import pathlib
import shutil
import subprocess
import sys
import tempfile

import h5py
import numpy as np

HERE = pathlib.Path(__file__).resolve().parent
sys.dont_write_bytecode = True  # keep the source tree free of __pycache__
sys.path.insert(0, str(HERE))
import check_h5_layout  # noqa: E402

CHECKER = HERE / "check_h5_layout.py"
MAKER = HERE / "make_fake_h5.py"
S = "qpsk_uncoded"          # an uncoded scheme of the fake file
C = "qpsk_synthetic_r1-2"   # the fake file's rate-1/2 scheme (finite constrained limit)

# The Clopper-Pearson value case needs the checker's optional scipy.
HAVE_SCIPY = check_h5_layout._scipy_beta is not None


def replace_dataset(g, name, data, dtype=None):
    del g[name]
    g.create_dataset(name, data=data, dtype=dtype)


def retype_dataset(path, dtype):
    def edit(f):
        g, name = f[path].parent, path.rsplit("/", 1)[1]
        data = g[name][()]
        replace_dataset(g, name, data.astype(dtype))
    return edit


def del_attr(path, name):
    def edit(f):
        del f[path].attrs[name]
    return edit


def set_attr(path, name, value):
    def edit(f):
        f[path].attrs[name] = value
    return edit


def del_item(path):
    def edit(f):
        del f[path]
    return edit


def scale_element(path, index, factor):
    def edit(f):
        ds = f[path]
        v = ds[()]
        v[index] *= factor
        ds[...] = v
    return edit


def first_index(f, scheme, pred):
    errs = f[f"{scheme}/bit_errors"][()]
    for i, e in enumerate(errs):
        if pred(int(e)):
            return i
    raise RuntimeError("fake file lacks the needed point")


def zero_error_low(f):
    i = first_index(f, S, lambda e: e == 0)
    v = f[f"{S}/ber_low"][()]
    v[i] = 1e-9
    f[f"{S}/ber_low"][...] = v


def low_above_ber(f):
    i = first_index(f, S, lambda e: e > 0)
    ber = f[f"{S}/ber"][()]
    v = f[f"{S}/ber_low"][()]
    v[i] = ber[i] * 1.5
    f[f"{S}/ber_low"][...] = v


def shrink_interval(f):  # e.g. a normal-approximation interval: 5 % narrower
    i = first_index(f, S, lambda e: e > 0)
    ber = f[f"{S}/ber"][()]
    hi = f[f"{S}/ber_high"][()]
    hi[i] = ber[i] + 0.95 * (hi[i] - ber[i])
    f[f"{S}/ber_high"][...] = hi


def shorter_seconds(f):
    replace_dataset(f[S], "seconds", f[f"{S}/seconds"][()][:-1])


def two_d_dataset(f):
    v = f[f"{S}/fer"][()]
    replace_dataset(f[S], "fer", v.reshape(1, -1))


def swap_theory_grid(f):
    v = f[f"{S}/theory/ebno_db"][()]
    v[10], v[11] = v[11], v[10]
    f[f"{S}/theory/ebno_db"][...] = v


def bad_stop_reason(f):
    v = [s.decode() for s in f[f"{S}/stop_reason"][()]]
    v[0] = "ran_out_of_time"
    replace_dataset(f[S], "stop_reason", v, dtype=h5py.string_dtype("utf-8"))


def fixed_stop_reason(f):
    v = [s.decode() for s in f[f"{S}/stop_reason"][()]]
    replace_dataset(f[S], "stop_reason", np.array(v, dtype="S13"))


def esno_with_m(f):  # coded scheme: Es/N0 computed with m instead of rho = R m
    e = f[f"{C}/ebno_db"][()]
    f[f"{C}/esno_db"][...] = e + 10.0 * math.log10(2.0)


def nan_at_target(f):
    f[f"{S}/summary"].attrs["ebno_at_target_db"] = np.float64(math.nan)
    for n in ("coding_gain_db", "gap_to_shannon_db", "gap_to_constrained_db"):
        f[f"{S}/summary"].attrs[n] = np.float64(math.nan)


def extra_root_dataset(f):
    f.create_dataset("stray", data=np.zeros(3))


# (name, edit, expected substrings in the FAIL message)
CASES = [
    ("ber stored as float32", retype_dataset(f"{S}/ber", np.float32),
     [f"/{S}/ber", "float32", "expected float64"]),
    ("bits stored as int64", retype_dataset(f"{S}/bits", np.int64),
     [f"/{S}/bits", "int64", "expected uint64"]),
    ("theory ebno_db stored as float32", retype_dataset(f"{S}/theory/ebno_db", np.float32),
     ["theory/ebno_db", "expected float64"]),
    ("root attribute config missing", del_attr("/", "config"), ["'config'", "missing"]),
    ("root attribute seed missing", del_attr("/", "seed"), ["'seed'", "missing"]),
    ("scheme attribute target_ber missing", del_attr(S, "target_ber"),
     [f"/{S} attribute 'target_ber'", "missing"]),
    ("limits attribute constrained_ebno_db missing",
     del_attr(f"{S}/limits", "constrained_ebno_db"), ["constrained_ebno_db", "missing"]),
    ("summary attribute gap_to_shannon_db missing",
     del_attr(f"{S}/summary", "gap_to_shannon_db"), ["gap_to_shannon_db", "missing"]),
    ("format is another word", set_attr("/", "format", "some-curves"),
     ["'format'", "expected 'capgap-curves'"]),
    ("format_version 2", set_attr("/", "format_version", np.int32(2)), ["format_version", "is 2"]),
    ("format_version as float", set_attr("/", "format_version", np.float64(1.0)),
     ["format_version", "expected an integer"]),
    ("config empty", set_attr("/", "config", ""), ["'config'", "is empty"]),
    ("root seed as int64", set_attr("/", "seed", np.int64(5)), ["'seed'", "expected uint64"]),
    ("scheme seed as float64", set_attr(S, "seed", np.float64(5)), ["'seed'", "expected uint64"]),
    ("code_rate as float32", set_attr(S, "code_rate", np.float32(1.0)),
     ["'code_rate'", "float32", "expected float64"]),
    ("modulation as an integer", set_attr(S, "modulation", np.int32(4)),
     ["'modulation'", "expected a string"]),
    ("target_ber as a 1-element array", set_attr(S, "target_ber", np.array([1e-5])),
     ["'target_ber'", "expected scalar"]),
    ("created_utc not UTC", set_attr("/", "created_utc", "2024-05-01T12:00:00+02:00"),
     ["created_utc", "UTC"]),
    ("ber != bit_errors / bits", scale_element(f"{S}/ber", 3, 1.0 + 1e-9),
     [f"/{S}/ber[3]", "bit_errors / bits"]),
    ("fer != frame_errors / frames", scale_element(f"{S}/fer", 2, 0.5),
     [f"/{S}/fer[2]", "frame_errors / frames"]),
    ("ber_low above ber", low_above_ber, ["does not bracket ber"]),
    ("ber_low non-zero at a point without errors", zero_error_low,
     ["ber_low <= ber", "got 1e-09 <= 0.0"]),
    ("seconds one point short", shorter_seconds, [f"/{S}/seconds", "points"]),
    ("fer stored 2-D", two_d_dataset, [f"/{S}/fer", "expected 1-D"]),
    ("dataset fer_high missing", del_item(f"{S}/fer_high"), ["fer_high", "missing dataset"]),
    ("limits group missing", del_item(f"{S}/limits"), [f"/{S}/limits", "missing group"]),
    ("theory grid not monotone", swap_theory_grid, ["theory/ebno_db", "strictly increasing"]),
    ("theory ber 1 % off", scale_element(f"{S}/theory/ber_uncoded", 40, 1.01),
     ["ber_uncoded[40]", "decision-region"]),
    ("stop_reason with an unknown word", bad_stop_reason, ["stop_reason[0]", "expected one of"]),
    ("stop_reason fixed-length", fixed_stop_reason, ["stop_reason", "expected variable-length"]),
    ("esno_db uses m instead of rho", esno_with_m, [f"/{C}/esno_db[0]", "info_bits_per_symbol"]),
    ("constrained limit NaN on the rate-1/2 scheme",
     set_attr(f"{C}/limits", "constrained_ebno_db", np.float64(math.nan)),
     ["constrained_ebno_db", "expected finite"]),
    ("constrained limit finite on an uncoded scheme",
     set_attr(f"{S}/limits", "constrained_ebno_db", np.float64(3.0)),
     ["constrained_ebno_db", "expected +inf"]),
    ("shannon limit 0.1 dB off", set_attr(f"{S}/limits", "shannon_ebno_db", np.float64(1.86)),
     ["shannon_ebno_db", "10 log10"]),
    ("gap_to_shannon inconsistent", set_attr(f"{S}/summary", "gap_to_shannon_db", np.float64(1.0)),
     ["gap_to_shannon_db", "ebno_at_target_db - shannon_ebno_db"]),
    ("ebno_at_target NaN although the curve crosses", nan_at_target, ["is NaN", "straddle"]),
    ("stray dataset at /", extra_root_dataset, ["unexpected non-group", "stray"]),
    ("schemes index names a group that is not there",
     set_attr("/", "schemes", "qpsk_uncoded,16qam_uncoded,64qam_uncoded,qpsk_synthetic_r1-2,bpsk"),
     ["'schemes'", "bpsk"]),
]
if HAVE_SCIPY:
    CASES.append(("interval 5 % narrower than Clopper-Pearson", shrink_interval,
                  ["ber_high", "Clopper-Pearson"]))


class Outcome:
    def __init__(self, returncode, stdout, stderr):
        self.returncode, self.stdout, self.stderr = returncode, stdout, stderr


def run_checker(path, in_process):
    """Run the checker as a program, or call its main() (same code path, no
    interpreter start-up: keeps the suite at a few seconds)."""
    if not in_process:
        r = subprocess.run([sys.executable, "-B", str(CHECKER), str(path)],
                           capture_output=True, text=True)
        return Outcome(r.returncode, r.stdout, r.stderr)
    out, err = io.StringIO(), io.StringIO()
    try:
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            rc = check_h5_layout.main([str(path)])
    except Exception:  # a crash is a failure of the checker, not a rejection
        import traceback
        err.write("Traceback (in-process):\n" + traceback.format_exc())
        rc = -1
    return Outcome(rc, out.getvalue(), err.getvalue())


def main(argv):
    ap = argparse.ArgumentParser(description="checker negative test")
    ap.add_argument("--workdir", help="directory for the test files (default: a temporary one)")
    args = ap.parse_args(argv)
    tmp = None
    if args.workdir:
        work = pathlib.Path(args.workdir)
        work.mkdir(parents=True, exist_ok=True)
    else:
        tmp = tempfile.TemporaryDirectory(prefix="capgap_checker_")
        work = pathlib.Path(tmp.name)

    passed = failed = 0

    def report(ok, name, detail=""):
        nonlocal passed, failed
        if ok:
            passed += 1
        else:
            failed += 1
        print(f"{'PASS' if ok else 'FAIL'}  {name}" + (f"\n      {detail}" if detail else ""))

    good = work / "good.h5"
    made = subprocess.run([sys.executable, "-B", str(MAKER), str(good)],
                          capture_output=True, text=True)
    if made.returncode != 0:
        print(f"cannot make the fake file: {made.stderr}")
        print("0 passed, 1 failed")
        return 1
    for in_process in (False, True):
        r = run_checker(good, in_process)
        report(r.returncode == 0 and "PASS" in r.stdout,
               f"unmodified synthetic file is accepted ({'main()' if in_process else 'program'})",
               "" if r.returncode == 0 else r.stderr.strip())

    not_h5 = work / "not_hdf5.h5"
    not_h5.write_text("capgap-curves, honestly\n")
    cases = [("file that is not HDF5", None, ["not_hdf5.h5", "cannot open as HDF5"])] + CASES
    for i, (name, edit, expect) in enumerate(cases):
        if edit is None:
            path = not_h5
        else:
            path = work / f"broken_{i:02d}.h5"
            shutil.copyfile(good, path)
            with h5py.File(path, "r+") as f:
                edit(f)
        # The first cases run as a separate program (real exit status and
        # streams); the rest call main() in-process.
        r = run_checker(path, in_process=i >= 3)
        msg = r.stderr.strip()
        problems = []
        if r.returncode != 1:
            problems.append(f"exit status {r.returncode}, expected 1")
        if "Traceback" in r.stderr or not msg.startswith(f"FAIL {path}:"):
            problems.append("no clean 'FAIL <file>:' message")
        missing = [s for s in expect if s not in msg]
        if missing:
            problems.append(f"message lacks {missing}")
        report(not problems, f"rejects: {name}",
               "; ".join(problems) + f"\n      checker said: {msg[-400:]}" if problems else msg)
    if not HAVE_SCIPY:
        print("note: scipy not importable; the Clopper-Pearson value case is not run")

    print(f"{passed} passed, {failed} failed")
    if tmp:
        tmp.cleanup()
    return 0 if failed == 0 else 1


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
