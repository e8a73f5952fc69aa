#!/usr/bin/python3
"""Check that an HDF5 file follows the capgap-curves layout, format_version 1.

Role: the read-back half of the file-format interface between the C++ writer
(sim/) and every reader (analysis/plot_curves.py, users' scripts). It opens
the file with h5py, checks every attribute, group and dataset of the layout
(presence, HDF5 type class and width, scalar/1-D shape, equal lengths across
the per-point datasets, string decoding) and the arithmetic that ties them
together, prints one line per item checked, and stops with a message naming
the file, the HDF5 path and the rule at the first failure (exit status 1;
2 for usage errors).

Layout (format_version 1):
  /                 attrs format="capgap-curves", format_version (int),
                    program_version, git_revision, created_utc, command_line,
                    config (non-empty INI text), kernel_target (strings),
                    threads (int, per process), ranks (int, processes of
                    the run: MPI ranks, 1 without MPI), seed (uint64)
  /<scheme>/        every top-level group is a scheme; attrs modulation,
                    code, demapper (strings), bits_per_symbol (int),
                    code_rate, info_bits_per_symbol, spectral_efficiency,
                    target_ber (float64), seed (uint64); 1-D datasets of
                    equal length P >= 1: ebno_db, esno_db, ber, ber_low,
                    ber_high, fer, fer_low, fer_high, seconds (float64);
                    bits, bit_errors, frames, frame_errors (uint64);
                    stop_reason (variable-length strings)
  /<scheme>/theory  1-D float64 datasets ebno_db, ber_uncoded, ser_uncoded;
                    fading schemes (/<scheme>/channel says so) add
                    ber_uncoded_awgn, and ber_uncoded is the fading average
  /<scheme>/channel optional: channel keys as attributes (channel, fading,
                    branches, combining, ..., channel_state)
  /<scheme>/limits  attrs shannon_ebno_db, constrained_ebno_db (float64);
                    optional 1-D constrained_curve_rho, constrained_curve_ebno_db
                    LDPC: attrs threshold_ebno_db, binary_input_ebno_db,
                    threshold_method; per-point decoder_iterations_mean,
                    decoder_iterations_max, undetected_frame_errors
  /<scheme>/signal  optional: constellation_i, constellation_q (1-D float64),
                    attr constellation_ebno_db; eye (2-D) with eye_time
  /<scheme>/limits/finite_length  optional (coded AWGN schemes): attrs n, k,
                    target_fer, normal_approximation_ebno_db,
                    normal_approximation_gaussian_ebno_db, rcu_ebno_db,
                    converse_ebno_db, method; 1-D ebno_db, fer_normal_approximation,
                    fer_rcu, fer_converse (NaN where not evaluated); then
                    /<scheme>/summary has gap_to_finite_length_db
  /<scheme>/summary attrs ebno_at_target_db, ebno_at_target_low_db,
                    ebno_at_target_high_db, uncoded_ebno_at_target_db,
                    coding_gain_db, gap_to_shannon_db, gap_to_constrained_db
                    (float64, NaN where undefined)
Optional root attribute `schemes` (comma-separated names): when present it
must name exactly the scheme groups. Other extra attributes are ignored.
Attributes must have a scalar dataspace. "float64"/"uint64" mean the HDF5
float/unsigned-integer class with 8-byte width (either byte order); "int"
means any integer class and width. Strings may be fixed-length or
variable-length, ASCII or UTF-8, except stop_reason (variable-length).

Consistency rules beyond types (each with its source):
  * ber = bit_errors / bits and fer = frame_errors / frames, relative
    1e-12 (definition).
  * 0 <= ber_low <= ber <= ber_high <= 1 (so ber_low = 0 when there are no
    errors), likewise for fer.
  * If scipy is importable, the interval equals the 95 % Clopper-Pearson
    interval [Beta(0.025; k, n-k+1), Beta(0.975; k+1, n-k)] to relative
    1e-6 (C. J. Clopper, E. S. Pearson, Biometrika 26(4), 1934; the beta
    form is common practice); without scipy only the closed forms for
    k = 0 (ber_high = 1 - 0.025^(1/n)) and k = n are checked.
  * esno_db = ebno_db + 10 log10(info_bits_per_symbol) to 1e-9 dB and
    info_bits_per_symbol = code_rate * bits_per_symbol (DEVELOPERS.md,
    Conventions: Es/N0 = rho Eb/N0, rho = R m).
  * shannon_ebno_db = 10 log10((2^eta - 1) / eta), eta = spectral_efficiency,
    to 1e-6 dB (Shannon, Proc. IRE, 1949).
  * constrained_ebno_db is +inf exactly when info_bits_per_symbol >=
    bits_per_symbol, else finite and >= shannon_ebno_db (a constrained
    input cannot beat the Gaussian input).
  * Theory: ebno_db strictly increasing and finite; 0 <= ber_uncoded <= 0.5,
    0 <= ser_uncoded <= 1, both non-increasing. For bpsk, qpsk and "<M>qam"
    the values are recomputed here by summing Gaussian tail probabilities
    over the Gray PAM decision regions of one axis (a different method from
    the closed forms of Cho & Yoon 2002 used by the writer), relative 1e-6
    (SER also absolute 1e-15).
  * Summary: differences (coding gain, gaps) agree with their operands to
    1e-9 dB; NaN propagates; gap_to_constrained_db is NaN when the
    constrained limit is +inf; low <= at <= high where finite;
    ebno_at_target_db lies between two simulated points whose BER straddles
    target_ber; it is finite whenever two adjacent points straddle the
    target with a non-zero BER on the low side; uncoded_ebno_at_target_db
    matches the theory grid's crossing within one grid step.

Usage: /usr/bin/python3 tests/python/check_h5_layout.py FILE.h5
"""

import datetime
import math
import re
import sys

import h5py
import numpy as np

try:  # Optional: exact Clopper-Pearson check.
    from scipy.stats import beta as _scipy_beta
except Exception:  # pragma: no cover - depends on the interpreter
    _scipy_beta = None

FORMAT_NAME = "capgap-curves"
FORMAT_VERSION = 1
STOP_REASONS = ("stop_bit_errors", "stop_frame_errors", "stop_bits")
ROOT_STRING_ATTRS = ("format", "program_version", "git_revision", "created_utc",
                     "command_line", "config", "kernel_target")
POINT_FLOAT = ("ebno_db", "esno_db", "ber", "ber_low", "ber_high", "fer",
               "fer_low", "fer_high", "seconds")
POINT_UINT = ("bits", "bit_errors", "frames", "frame_errors")
THEORY = ("ebno_db", "ber_uncoded", "ser_uncoded")
SUMMARY = ("ebno_at_target_db", "ebno_at_target_low_db", "ebno_at_target_high_db",
           "uncoded_ebno_at_target_db", "coding_gain_db", "gap_to_shannon_db",
           "gap_to_constrained_db")


class CheckFailure(Exception):
    pass


class Checker:
    def __init__(self, path, out=None):
        self.path = path
        self.out = out if out is not None else sys.stdout
        self.count = 0

    # -- reporting ---------------------------------------------------------
    def fail(self, where, msg):
        raise CheckFailure(f"{self.path}: {where}: {msg}")

    def ok(self, where, what):
        self.count += 1
        print(f"  ok  {where}: {what}", file=self.out)

    def note(self, where, what):
        print(f"  --  {where}: {what}", file=self.out)

    # -- attribute access --------------------------------------------------
    def _attr_id(self, obj, name):
        where = f"{obj.name} attribute '{name}'"
        if name not in obj.attrs:
            self.fail(where, "missing")
        aid = obj.attrs.get_id(name)
        if aid.shape != ():
            self.fail(where, f"dataspace has shape {aid.shape}, expected scalar")
        return where, aid.dtype

    def attr_string(self, obj, name, allow_empty=False):
        where, dt = self._attr_id(obj, name)
        info = h5py.check_string_dtype(dt)
        if info is None:
            self.fail(where, f"type is {_describe(dt)}, expected a string")
        raw = obj.attrs[name]
        value = _decode(raw, info, self, where)
        if not allow_empty and not value.strip():
            self.fail(where, "is empty")
        kind = "variable-length" if info.length is None else f"fixed-length {info.length}"
        self.ok(where, f"{kind} {info.encoding} string {_short(value)}")
        return value

    def attr_float64(self, obj, name):
        where, dt = self._attr_id(obj, name)
        if dt.kind != "f" or dt.itemsize != 8:
            self.fail(where, f"type is {_describe(dt)}, expected float64")
        value = float(obj.attrs[name])
        self.ok(where, f"float64 = {value!r}")
        return value

    def attr_uint64(self, obj, name):
        where, dt = self._attr_id(obj, name)
        if dt.kind != "u" or dt.itemsize != 8:
            self.fail(where, f"type is {_describe(dt)}, expected uint64")
        value = int(obj.attrs[name])
        self.ok(where, f"uint64 = {value}")
        return value

    def attr_int(self, obj, name):
        where, dt = self._attr_id(obj, name)
        if dt.kind not in "iu":
            self.fail(where, f"type is {_describe(dt)}, expected an integer")
        value = int(obj.attrs[name])
        self.ok(where, f"{_describe(dt)} = {value}")
        return value

    # -- datasets ----------------------------------------------------------
    def group(self, parent, name):
        where = f"{parent.name.rstrip('/')}/{name}"
        if name not in parent:
            self.fail(where, "missing group")
        obj = parent.get(name, getclass=True)
        if obj is not h5py.Group:
            self.fail(where, "is not a group")
        self.ok(where, "group present")
        return parent[name]

    def _dataset(self, parent, name):
        where = f"{parent.name.rstrip('/')}/{name}"
        if name not in parent:
            self.fail(where, "missing dataset")
        if parent.get(name, getclass=True) is not h5py.Dataset:
            self.fail(where, "is not a dataset")
        ds = parent[name]
        if ds.ndim != 1:
            self.fail(where, f"has shape {ds.shape}, expected 1-D")
        if ds.shape[0] < 1:
            self.fail(where, "is empty")
        return where, ds

    def dataset_float64(self, parent, name, finite=True):
        where, ds = self._dataset(parent, name)
        if ds.dtype.kind != "f" or ds.dtype.itemsize != 8:
            self.fail(where, f"type is {_describe(ds.dtype)}, expected float64")
        data = ds[()].astype(np.float64)
        if finite and not np.all(np.isfinite(data)):
            bad = int(np.flatnonzero(~np.isfinite(data))[0])
            self.fail(where, f"element {bad} is {data[bad]!r}, expected finite")
        self.ok(where, f"float64 shape {ds.shape}")
        return data

    def dataset_uint64(self, parent, name):
        where, ds = self._dataset(parent, name)
        if ds.dtype.kind != "u" or ds.dtype.itemsize != 8:
            self.fail(where, f"type is {_describe(ds.dtype)}, expected uint64")
        self.ok(where, f"uint64 shape {ds.shape}")
        return ds[()].astype(np.uint64)

    def dataset_vlen_strings(self, parent, name):
        where, ds = self._dataset(parent, name)
        info = h5py.check_string_dtype(ds.dtype)
        if info is None:
            self.fail(where, f"type is {_describe(ds.dtype)}, expected variable-length strings")
        if info.length is not None:
            self.fail(where, f"is a fixed-length ({info.length}) string, expected variable-length")
        try:
            values = [v.decode(info.encoding) if isinstance(v, bytes) else str(v)
                      for v in ds[()]]
        except UnicodeDecodeError as e:
            self.fail(where, f"does not decode as {info.encoding}: {e}")
        self.ok(where, f"variable-length {info.encoding} strings, shape {ds.shape}")
        return values

    # -- numeric helpers ---------------------------------------------------
    def close(self, where, got, want, rel=0.0, abs_=0.0, what="value"):
        if math.isnan(want):
            if not math.isnan(got):
                self.fail(where, f"is {got!r}, expected NaN ({what})")
            return
        if not (abs(got - want) <= max(abs_, rel * abs(want))):
            self.fail(where, f"is {got!r}, expected {want!r} ({what})")


# ---------------------------------------------------------------------------
def _describe(dt):
    dt = np.dtype(dt)
    info = h5py.check_string_dtype(dt)
    if info is not None:
        return "variable-length string" if info.length is None else f"fixed-length string({info.length})"
    if h5py.check_vlen_dtype(dt) is not None:
        return "variable-length sequence"
    names = {"f": "float", "i": "int", "u": "uint"}
    if dt.kind in names:
        return f"{names[dt.kind]}{8 * dt.itemsize}"
    return str(dt)


def _decode(raw, info, checker, where):
    if isinstance(raw, str):
        return raw
    if isinstance(raw, (bytes, np.bytes_)):
        try:
            return bytes(raw).decode(info.encoding)
        except UnicodeDecodeError as e:
            checker.fail(where, f"does not decode as {info.encoding}: {e}")
    checker.fail(where, f"read back as {type(raw).__name__}, expected a string")


def _short(s):
    one = s.replace("\n", "\\n")
    return repr(one if len(one) <= 60 else one[:57] + "...")


def qfunc(x):
    return 0.5 * math.erfc(x / math.sqrt(2.0))


def gray_pam_error_rates(side, d_over_sigma):
    """Bit and symbol error rate of Gray (binary-reflected) L-PAM.

    Levels at (2i - L + 1) d, thresholds midway; noise sigma per dimension.
    The probability of landing in region r when level i was sent is
    Q(distance to r's near edge) - Q(distance to its far edge), summed over
    the regions whose label differs in the bit considered. Returns
    (BER per axis bit, probability of a wrong axis decision).
    """
    bits = int(round(math.log2(side)))
    gray = [i ^ (i >> 1) for i in range(side)]

    def p_interval(a, b):  # P(a <= Z <= b), Z standard normal, tail-accurate
        if a >= 0:
            return qfunc(a) - qfunc(b)
        if b <= 0:
            return qfunc(-b) - qfunc(-a)
        return 1.0 - qfunc(-a) - qfunc(b)

    def p_region(i, r):
        # Region r spans [2r - L, 2r - L + 2) in units of d (outer regions are
        # unbounded); level i sits at 2i - L + 1.
        lo = -math.inf if r == 0 else (2 * r - side) - (2 * i - side + 1)
        hi = math.inf if r == side - 1 else (2 * r - side + 2) - (2 * i - side + 1)
        return p_interval(lo * d_over_sigma, hi * d_over_sigma)

    ber = 0.0
    wrong = 0.0
    for i in range(side):
        for r in range(side):
            if r != i:
                p = p_region(i, r)
                wrong += p
                ber += bin(gray[i] ^ gray[r]).count("1") * p
    return ber / (side * bits), wrong / side


def independent_uncoded(modulation, ebno_db):
    """(BER, SER) of Gray bpsk / qpsk / square M-QAM, or None if unknown."""
    eb = 10.0 ** (ebno_db / 10.0)
    if modulation == "bpsk":
        p = qfunc(math.sqrt(2.0 * eb))
        return p, p
    mqam = re.fullmatch(r"(\d+)qam", modulation)
    if modulation == "qpsk":
        order = 4
    elif mqam:
        order = int(mqam.group(1))
    else:
        return None
    side = int(round(math.sqrt(order)))
    if side * side != order or side < 2:
        return None
    m = math.log2(order)
    # Unit average symbol energy: E = 2 d^2 (L^2 - 1) / 3 = 1; sigma^2 = N0/2.
    d = math.sqrt(3.0 / (2.0 * (order - 1)))
    n0 = 1.0 / (m * eb)
    ber, wrong = gray_pam_error_rates(side, d / math.sqrt(n0 / 2.0))
    return ber, wrong * (2.0 - wrong)  # 1 - (1 - wrong)^2 without cancellation


def clopper_pearson_scipy(k, n):
    lo = 0.0 if k == 0 else float(_scipy_beta.ppf(0.025, k, n - k + 1))
    hi = 1.0 if k == n else float(_scipy_beta.ppf(0.975, k + 1, n - k))
    return lo, hi


# ---------------------------------------------------------------------------
def check_root(c, f):
    fmt = c.attr_string(f, "format")
    if fmt != FORMAT_NAME:
        c.fail("/ attribute 'format'", f"is {fmt!r}, expected {FORMAT_NAME!r}")
    version = c.attr_int(f, "format_version")
    if version != FORMAT_VERSION:
        c.fail("/ attribute 'format_version'", f"is {version}, this checker reads {FORMAT_VERSION}")
    values = {}
    for name in ROOT_STRING_ATTRS[1:]:
        values[name] = c.attr_string(f, name)
    created = values["created_utc"]
    try:
        stamp = datetime.datetime.fromisoformat(created.replace("Z", "+00:00"))
    except ValueError:
        c.fail("/ attribute 'created_utc'", f"{created!r} is not an ISO 8601 time")
    if stamp.utcoffset() != datetime.timedelta(0):
        c.fail("/ attribute 'created_utc'", f"{created!r} is not marked UTC ('Z' or '+00:00')")
    c.ok("/ attribute 'created_utc'", "ISO 8601, UTC")
    if not any("=" in line for line in values["config"].splitlines()):
        c.fail("/ attribute 'config'", "contains no 'key = value' line; expected the resolved INI text")
    c.ok("/ attribute 'config'", f"{len(values['config'].splitlines())} lines of INI text")
    threads = c.attr_int(f, "threads")
    if threads < 1:
        c.fail("/ attribute 'threads'", f"is {threads}, expected >= 1")
    ranks = c.attr_int(f, "ranks")
    if ranks < 1:
        c.fail("/ attribute 'ranks'", f"is {ranks}, expected >= 1")
    c.attr_uint64(f, "seed")


def check_points(c, g, rho, m):
    base = g.name
    data = {n: c.dataset_float64(g, n) for n in POINT_FLOAT}
    data.update({n: c.dataset_uint64(g, n) for n in POINT_UINT})
    reasons = c.dataset_vlen_strings(g, "stop_reason")
    lengths = {n: len(v) for n, v in data.items()}
    lengths["stop_reason"] = len(reasons)
    p = lengths["ebno_db"]
    for n, length in lengths.items():
        if length != p:
            c.fail(f"{base}/{n}", f"has {length} points, but {base}/ebno_db has {p}")
    c.ok(base, f"all {len(lengths)} per-point datasets have P = {p} points")

    ebno = data["ebno_db"]
    if p > 1 and not np.all(np.diff(ebno) > 0):
        c.fail(f"{base}/ebno_db", "is not strictly increasing")
    c.ok(f"{base}/ebno_db", f"strictly increasing {ebno[0]:g} .. {ebno[-1]:g} dB")
    want = ebno + 10.0 * math.log10(rho)
    for i in range(p):
        c.close(f"{base}/esno_db[{i}]", float(data["esno_db"][i]), float(want[i]),
                abs_=1e-9, what="ebno_db + 10 log10(info_bits_per_symbol)")
    c.ok(f"{base}/esno_db", "= ebno_db + 10 log10(info_bits_per_symbol)")

    for n, v in enumerate(reasons):
        if v not in STOP_REASONS:
            c.fail(f"{base}/stop_reason[{n}]", f"is {v!r}, expected one of {', '.join(STOP_REASONS)}")
    c.ok(f"{base}/stop_reason", "values in {" + ", ".join(STOP_REASONS) + "}")

    if np.any(data["seconds"] < 0):
        c.fail(f"{base}/seconds", "has a negative value")
    c.ok(f"{base}/seconds", "finite, >= 0")

    for rate, errs, trials in (("ber", "bit_errors", "bits"),
                               ("fer", "frame_errors", "frames")):
        n_arr, k_arr = data[trials], data[errs]
        for i in range(p):
            n, k = int(n_arr[i]), int(k_arr[i])
            w = f"{base}[{i}] (Eb/N0 {ebno[i]:g} dB)"
            if n == 0:
                c.fail(f"{base}/{trials}[{i}]", "is 0; every point must have simulated something")
            if k > n:
                c.fail(f"{base}/{errs}[{i}]", f"{k} > {trials} = {n}")
            r, lo, hi = (float(data[rate][i]), float(data[rate + "_low"][i]),
                         float(data[rate + "_high"][i]))
            c.close(f"{base}/{rate}[{i}]", r, float(np.float64(k) / np.float64(n)),
                    rel=1e-12, what=f"{errs} / {trials} = {k} / {n}")
            if not (0.0 <= lo <= r <= hi <= 1.0):
                c.fail(w, f"interval does not bracket {rate}: need 0 <= {rate}_low <= {rate} <= "
                          f"{rate}_high <= 1, got {lo!r} <= {r!r} <= {hi!r}")
            # (With k = 0, ber = 0 and the bracket force ber_low = 0; likewise
            # ber_high = 1 at k = n. No separate check needed.)
            if _scipy_beta is not None:
                want_lo, want_hi = clopper_pearson_scipy(k, n)
            else:
                want_lo = 0.0 if k == 0 else (0.025 ** (1.0 / n) if k == n else math.nan)
                want_hi = 1.0 - 0.025 ** (1.0 / n) if k == 0 else (1.0 if k == n else math.nan)
            what = f"95 % Clopper-Pearson for {k} errors in {n}"
            if not math.isnan(want_lo):
                c.close(f"{base}/{rate}_low[{i}]", lo, want_lo, rel=1e-6, what=what)
            if not math.isnan(want_hi):
                c.close(f"{base}/{rate}_high[{i}]", hi, want_hi, rel=1e-6, what=what)
        c.ok(base, f"{rate} = {errs}/{trials}; 0 <= {rate}_low <= {rate} <= {rate}_high <= 1 at all {p} points")
        if _scipy_beta is not None:
            c.ok(base, f"[{rate}_low, {rate}_high] = 95 % Clopper-Pearson (scipy beta quantiles, rel 1e-6)")
        else:
            c.note(base, f"scipy not importable: {rate} interval checked only at k = 0 and k = n")
    return data


def check_theory(c, g, modulation):
    th = c.group(g, "theory")
    base = th.name
    d = {n: c.dataset_float64(th, n) for n in THEORY}
    q = len(d["ebno_db"])
    for n in THEORY:
        if len(d[n]) != q:
            c.fail(f"{base}/{n}", f"has {len(d[n])} points, but {base}/ebno_db has {q}")
    if q < 2 or not np.all(np.diff(d["ebno_db"]) > 0):
        c.fail(f"{base}/ebno_db", "is not a strictly increasing grid of >= 2 points")
    c.ok(f"{base}/ebno_db", f"strictly increasing grid of {q} points, {d['ebno_db'][0]:g} .. {d['ebno_db'][-1]:g} dB")
    for n, top in (("ber_uncoded", 0.5), ("ser_uncoded", 1.0)):
        v = d[n]
        if np.any(v < 0) or np.any(v > top * (1 + 1e-12)):
            c.fail(f"{base}/{n}", f"has values outside [0, {top}]")
        if np.any(np.diff(v) > 1e-15 + 1e-12 * v[1:]):
            i = int(np.flatnonzero(np.diff(v) > 1e-15 + 1e-12 * v[1:])[0])
            c.fail(f"{base}/{n}", f"increases between elements {i} and {i + 1}")
        c.ok(f"{base}/{n}", f"in [0, {top}], non-increasing")
    fading = _fading_channel(g)
    if fading is not None:
        _check_fading_theory(c, th, d, modulation, fading)
    elif independent_uncoded(modulation, 0.0) is None:
        c.note(base, f"no independent formula here for {modulation!r}; values not recomputed")
    else:
        for i, x in enumerate(d["ebno_db"]):
            ber, ser = independent_uncoded(modulation, float(x))
            # abs 1e-15 on SER admits the rounding of a writer that forms
            # 1 - (1 - P_L)^2 directly (error ~ 2 eps); BER has no such step.
            for n, want, tiny in (("ber_uncoded", ber, 1e-280), ("ser_uncoded", ser, 1e-15)):
                got = float(d[n][i])
                c.close(f"{base}/{n}[{i}] (Eb/N0 {x:g} dB)", got, want, rel=1e-6, abs_=tiny,
                        what=f"Gray {modulation} by PAM decision-region sum")
        c.ok(base, f"ber_uncoded, ser_uncoded match Gray {modulation} decision-region sums (rel 1e-6)")
    return d


def _fading_channel(g):
    """(law, branches, combining) of a scheme whose /channel group describes
    fading or diversity, else None (AWGN, one branch, or no group)."""
    if "channel" not in g or not isinstance(g["channel"], h5py.Group):
        return None
    ch = g["channel"]
    law = _decode_plain(ch.attrs.get("channel", "awgn"))
    branches = int(ch.attrs.get("branches", 1))
    if law == "awgn" and branches == 1:
        return None
    return law, branches, _decode_plain(ch.attrs.get("combining", "mrc"))


def _decode_plain(v):
    return v.decode("utf-8") if isinstance(v, (bytes, np.bytes_)) else str(v)


def _check_fading_theory(c, th, d, modulation, fading):
    """Fading scheme: ber_uncoded_awgn is the AWGN curve (checked as the AWGN
    ber_uncoded is); for BPSK/QPSK over Rayleigh with L-branch MRC,
    ber_uncoded is the closed form ((1-mu)/2)^L sum_k C(L-1+k, k)
    ((1+mu)/2)^k, mu = sqrt(g/(1+g)) (Proakis & Salehi, Digital
    Communications, 5th ed., ch. 13), relative 1e-6."""
    base = th.name
    awgn = c.dataset_float64(th, "ber_uncoded_awgn")
    if len(awgn) != len(d["ebno_db"]):
        c.fail(f"{base}/ber_uncoded_awgn", f"has {len(awgn)} points, expected {len(d['ebno_db'])}")
    law, branches, combining = fading
    if independent_uncoded(modulation, 0.0) is not None:
        for i, x in enumerate(d["ebno_db"]):
            ber, _ = independent_uncoded(modulation, float(x))
            c.close(f"{base}/ber_uncoded_awgn[{i}] (Eb/N0 {x:g} dB)", float(awgn[i]), ber,
                    rel=1e-6, abs_=1e-280, what=f"Gray {modulation} by PAM decision-region sum")
        c.ok(base, f"ber_uncoded_awgn matches Gray {modulation} decision-region sums (rel 1e-6)")
    if law == "rayleigh" and combining == "mrc" and modulation in ("bpsk", "qpsk"):
        for i, x in enumerate(d["ebno_db"]):
            gam = 10.0 ** (float(x) / 10.0)
            mu = math.sqrt(gam / (1.0 + gam))
            want = (0.5 * (1.0 - mu)) ** branches * sum(
                math.comb(branches - 1 + k, k) * (0.5 * (1.0 + mu)) ** k for k in range(branches))
            c.close(f"{base}/ber_uncoded[{i}] (Eb/N0 {x:g} dB)", float(d["ber_uncoded"][i]), want,
                    rel=1e-6, abs_=1e-280, what="BPSK over Rayleigh, MRC closed form")
        c.ok(base, f"ber_uncoded matches the Rayleigh {branches}-branch MRC closed form (rel 1e-6)")
    else:
        c.note(base, f"fading theory ({law}, {branches} x {combining}) not recomputed here")


def crossing_from_grid(x, y, target):
    for i in range(len(x) - 1):
        if y[i] >= target > y[i + 1] and y[i + 1] > 0:
            la, lb, lt = math.log10(y[i]), math.log10(y[i + 1]), math.log10(target)
            return x[i] + (x[i + 1] - x[i]) * (la - lt) / (la - lb), x[i + 1] - x[i]
    return math.nan, math.nan


def check_optional_views(c, g, lim, m):
    """Constrained-capacity curve and signal views, checked when present."""
    if "constrained_curve_rho" in lim or "constrained_curve_ebno_db" in lim:
        rho = c.dataset_float64(lim, "constrained_curve_rho")
        ebno = c.dataset_float64(lim, "constrained_curve_ebno_db")
        if rho.shape != ebno.shape:
            c.fail(f"{lim.name}/constrained_curve_ebno_db",
                   f"shape {ebno.shape} differs from constrained_curve_rho {rho.shape}")
        if not (np.all(np.diff(rho) > 0) and np.all(rho > 0) and np.all(rho < m)):
            c.fail(f"{lim.name}/constrained_curve_rho", f"expected increasing within (0, {m})")
        # Capacity: the constellation needs more Eb/N0 for more bits, and never
        # less than the unconstrained bound (2^rho - 1)/rho (Shannon 1949).
        bound = 10.0 * np.log10((2.0 ** rho - 1.0) / rho)
        if not np.all(np.diff(ebno) > 0) or np.any(ebno < bound - 1e-6):
            c.fail(f"{lim.name}/constrained_curve_ebno_db",
                   "expected increasing and at or above the Shannon bound at eta = rho")
        c.ok(lim.name, "constrained curve increasing, above the Shannon bound")
    if "threshold_ebno_db" in lim.attrs:
        # LDPC: the BP threshold lies above the binary-input capacity limit of
        # the same rate (no decoder beats capacity; Richardson, Shokrollahi &
        # Urbanke 2001) and the iteration statistics are per point.
        th = c.attr_float64(lim, "threshold_ebno_db")
        bi = c.attr_float64(lim, "binary_input_ebno_db")
        method = c.attr_string(lim, "threshold_method")
        if method not in ("quantized", "gaussian_approximation"):
            c.fail(f"{lim.name} attribute 'threshold_method'", f"is {method!r}")
        if not (math.isfinite(th) and th > bi):
            c.fail(f"{lim.name} attribute 'threshold_ebno_db'",
                   f"is {th!r}, expected finite and above binary_input_ebno_db {bi!r}")
        c.ok(lim.name, f"threshold {th:.3f} dB ({method}) above the binary-input limit {bi:.3f} dB")
        mean = c.dataset_float64(g, "decoder_iterations_mean")
        it_max = c.dataset_uint64(g, "decoder_iterations_max")
        und = c.dataset_uint64(g, "undetected_frame_errors")
        frames = g["frames"][()]
        ferr = g["frame_errors"][()]
        if not (mean.shape == it_max.shape == und.shape == frames.shape):
            c.fail(f"{g.name}/decoder_iterations_mean", "length differs from ebno_db")
        if np.any(mean > it_max + 1e-9) or np.any(und > ferr):
            c.fail(g.name, "expected mean <= max iterations and undetected <= frame_errors")
        c.ok(g.name, "iteration statistics consistent")
        code_g = c.group(g, "code")
        girth = c.attr_int(code_g, "girth")
        if girth != 0 and (girth < 4 or girth % 2):
            c.fail(f"{code_g.name} attribute 'girth'", f"is {girth}, expected 0 or even >= 4")
    if "signal" in g:
        sg = c.group(g, "signal")
        ci = c.dataset_float64(sg, "constellation_i")
        cq = c.dataset_float64(sg, "constellation_q")
        if ci.shape != cq.shape:
            c.fail(f"{sg.name}/constellation_q", f"shape {cq.shape} differs from constellation_i")
        c.attr_float64(sg, "constellation_ebno_db")
        if "eye" in sg:
            t = c.dataset_float64(sg, "eye_time")
            eye = sg["eye"]
            if eye.ndim != 2 or eye.shape[1] != t.shape[0] or eye.shape[0] < 1:
                c.fail(f"{sg.name}/eye", f"shape {eye.shape}, expected (traces, {t.shape[0]})")
            c.ok(f"{sg.name}/eye", f"{eye.shape[0]} traces of {eye.shape[1]} samples")


def binary_input_na_fer(n, k, snr):
    """Normal approximation of the FER of k bits in n binary-input AWGN uses
    at SNR P (Polyanskiy, Poor & Verdu, IEEE Trans. Inf. Theory 56(5),
    2010): C, V of i = 1 - log2(1 + exp(-2 y P)), y ~ N(1, 1/P), by numpy's
    Gauss-Hermite rule (independent of the C++ quadrature)."""
    t, w = np.polynomial.hermite.hermgauss(150)
    y = 1.0 + np.sqrt(2.0 / snr) * t
    i = 1.0 - np.logaddexp(0.0, -2.0 * y * snr) / math.log(2.0)
    cap = float(np.sum(w * i) / math.sqrt(math.pi))
    var = float(np.sum(w * i * i) / math.sqrt(math.pi)) - cap * cap
    return qfunc((n * cap + 0.5 * math.log2(n) - k) / math.sqrt(n * var))


def check_finite_length(c, g, lim, summ):
    """/<scheme>/limits/finite_length, when present: attributes, equal-length
    FER curves within [0, 1] (NaN where not evaluated), the NA falling with
    Eb/N0, converse <= RCU (a converse bound below an achievability bound;
    Monte Carlo slack 20 %), the summary gap, and for the binary-input model
    the NA at its Eb/N0 equal to target_fer by an independent evaluation."""
    if "finite_length" not in lim:
        if "gap_to_finite_length_db" in summ.attrs:
            c.fail(f"{summ.name} attribute 'gap_to_finite_length_db'",
                   "present without limits/finite_length")
        return
    fl = c.group(lim, "finite_length")
    where = fl.name
    n, k = c.attr_int(fl, "n"), c.attr_int(fl, "k")
    target = c.attr_float64(fl, "target_fer")
    na_at = c.attr_float64(fl, "normal_approximation_ebno_db")
    for name in ("normal_approximation_gaussian_ebno_db", "rcu_ebno_db", "converse_ebno_db"):
        c.attr_float64(fl, name)
    method = c.attr_string(fl, "method")
    x = c.dataset_float64(fl, "ebno_db")
    curves = {name: c.dataset_float64(fl, name, finite=False)
              for name in ("fer_normal_approximation", "fer_rcu", "fer_converse")}
    for name, y in curves.items():
        if y.shape != x.shape:
            c.fail(f"{where}/{name}", f"shape {y.shape} differs from ebno_db {x.shape}")
        ok = np.isfinite(y)
        if np.any((y[ok] < 0) | (y[ok] > 1)):
            c.fail(f"{where}/{name}", "expected values in [0, 1] (or NaN)")
    na = curves["fer_normal_approximation"]
    if not np.all(np.isfinite(na)) or np.any(np.diff(na) > 1e-15):
        c.fail(f"{where}/fer_normal_approximation", "expected finite and non-increasing")
    both = np.isfinite(curves["fer_rcu"]) & np.isfinite(curves["fer_converse"])
    if np.any(curves["fer_converse"][both] > 1.2 * curves["fer_rcu"][both]):
        c.fail(f"{where}/fer_converse", "above the RCU achievability bound")
    c.ok(where, f"n = {n}, k = {k}: FER curves consistent, converse below RCU")
    if not (0 < target < 1) or n <= 0 or k <= 0:
        c.fail(where, f"expected 0 < target_fer < 1 and n, k > 0, got {target!r}, {n}, {k}")
    at_fer = c.attr_float64(summ, "ebno_at_target_fer_db")
    gap = c.attr_float64(summ, "gap_to_finite_length_db")
    want = at_fer - na_at if math.isfinite(at_fer) and math.isfinite(na_at) else math.nan
    c.close(f"{summ.name} attribute 'gap_to_finite_length_db'", gap, want, abs_=1e-9,
            what="ebno_at_target_fer_db - normal_approximation_ebno_db")
    if method.find("binary-input AWGN") >= 0 and math.isfinite(na_at):
        snr = 2.0 * k / n * 10.0 ** (na_at / 10.0)
        got = binary_input_na_fer(n, k, snr)
        # The Eb/N0 is found to 1e-3 dB; the FER moves ~ a few % per 0.01 dB.
        c.close(f"{where} attribute 'normal_approximation_ebno_db'", got, target, rel=0.02,
                what="target_fer, by the normal approximation recomputed with numpy")
        c.ok(where, f"NA {na_at:.3f} dB gives FER {got:.3e} (target {target:g})")


def check_scheme(c, f, name):
    g = f[name]
    base = g.name
    print(f"scheme {base}", file=c.out)
    modulation = c.attr_string(g, "modulation")
    m = c.attr_int(g, "bits_per_symbol")
    if m < 1:
        c.fail(f"{base} attribute 'bits_per_symbol'", f"is {m}, expected >= 1")
    code = c.attr_string(g, "code")
    rate = c.attr_float64(g, "code_rate")
    rho = c.attr_float64(g, "info_bits_per_symbol")
    eta = c.attr_float64(g, "spectral_efficiency")
    c.attr_uint64(g, "seed")
    target = c.attr_float64(g, "target_ber")
    c.attr_string(g, "demapper")
    if not (0.0 < rate <= 1.0):
        c.fail(f"{base} attribute 'code_rate'", f"is {rate!r}, expected 0 < R <= 1")
    if code == "none" and rate != 1.0:
        c.fail(f"{base} attribute 'code_rate'", f"is {rate!r} with code 'none', expected 1")
    c.close(f"{base} attribute 'info_bits_per_symbol'", rho, rate * m, rel=1e-12,
            what="code_rate * bits_per_symbol")
    c.ok(base, "info_bits_per_symbol = code_rate * bits_per_symbol")
    if not (0.0 < eta <= rho * (1 + 1e-12)):
        c.fail(f"{base} attribute 'spectral_efficiency'", f"is {eta!r}, expected 0 < eta <= rho = {rho!r}")
    if not (0.0 < target < 0.5):
        c.fail(f"{base} attribute 'target_ber'", f"is {target!r}, expected 0 < target < 0.5")
    c.ok(base, "0 < code_rate <= 1, 0 < spectral_efficiency <= rho, 0 < target_ber < 0.5")

    pts = check_points(c, g, rho, m)
    theory = check_theory(c, g, modulation)

    lim = c.group(g, "limits")
    shannon = c.attr_float64(lim, "shannon_ebno_db")
    constrained = c.attr_float64(lim, "constrained_ebno_db")
    c.close(f"{lim.name} attribute 'shannon_ebno_db'", shannon,
            10.0 * math.log10((2.0 ** eta - 1.0) / eta), abs_=1e-6,
            what=f"10 log10((2^eta - 1)/eta) at eta = {eta!r}")
    c.ok(lim.name, "shannon_ebno_db = 10 log10((2^eta - 1)/eta)")
    if rho >= m * (1 - 1e-12):
        if constrained != math.inf:
            c.fail(f"{lim.name} attribute 'constrained_ebno_db'",
                   f"is {constrained!r}, expected +inf (rho = {rho:g} = bits_per_symbol)")
        c.ok(lim.name, "constrained_ebno_db = +inf (rho = bits_per_symbol)")
    else:
        if not math.isfinite(constrained):
            c.fail(f"{lim.name} attribute 'constrained_ebno_db'",
                   f"is {constrained!r}, expected finite (rho = {rho:g} < bits_per_symbol = {m})")
        if constrained < shannon - 1e-6:
            c.fail(f"{lim.name} attribute 'constrained_ebno_db'",
                   f"{constrained!r} is below shannon_ebno_db {shannon!r}")
        c.ok(lim.name, "constrained_ebno_db finite and >= shannon_ebno_db")

    summ = c.group(g, "summary")
    s = {n: c.attr_float64(summ, n) for n in SUMMARY}
    sb = summ.name
    for n in SUMMARY:
        if math.isinf(s[n]):
            c.fail(f"{sb} attribute '{n}'", f"is {s[n]!r}, expected finite or NaN")
    at, lo, hi = s["ebno_at_target_db"], s["ebno_at_target_low_db"], s["ebno_at_target_high_db"]
    unc = s["uncoded_ebno_at_target_db"]

    def diff(a, b):
        return a - b if math.isfinite(a) and math.isfinite(b) else math.nan

    c.close(f"{sb} attribute 'coding_gain_db'", s["coding_gain_db"], diff(unc, at), abs_=1e-9,
            what="uncoded_ebno_at_target_db - ebno_at_target_db")
    c.close(f"{sb} attribute 'gap_to_shannon_db'", s["gap_to_shannon_db"], diff(at, shannon),
            abs_=1e-9, what="ebno_at_target_db - shannon_ebno_db")
    c.close(f"{sb} attribute 'gap_to_constrained_db'", s["gap_to_constrained_db"],
            diff(at, constrained), abs_=1e-9,
            what="ebno_at_target_db - constrained_ebno_db, NaN if either is not finite")
    c.ok(sb, "coding gain and gaps equal the differences of their operands")
    finite = [v for v in (lo, at, hi) if math.isfinite(v)]
    if finite != sorted(finite):
        c.fail(sb, f"expected ebno_at_target_low_db <= ebno_at_target_db <= ebno_at_target_high_db "
                   f"where finite, got {lo!r}, {at!r}, {hi!r}")
    c.ok(sb, "low <= at <= high where finite")

    ebno, ber = pts["ebno_db"], pts["ber"]
    straddles = [i for i in range(len(ebno) - 1)
                 if ber[i] >= target > ber[i + 1] and ber[i + 1] > 0]
    if math.isfinite(at):
        below = [i for i in range(len(ebno)) if ebno[i] <= at + 1e-9 and ber[i] >= target]
        above = [i for i in range(len(ebno)) if ebno[i] >= at - 1e-9 and ber[i] <= target]
        if not below or not above:
            c.fail(f"{sb} attribute 'ebno_at_target_db'",
                   f"{at!r} dB is not between a simulated point with ber >= target_ber and one "
                   f"with ber <= target_ber ({target:g})")
        c.ok(sb, f"ebno_at_target_db = {at:.3f} dB lies where the simulated BER crosses {target:g}")
    elif straddles:
        i = straddles[0]
        c.fail(f"{sb} attribute 'ebno_at_target_db'",
               f"is NaN, but points {i} and {i + 1} ({ebno[i]:g}, {ebno[i + 1]:g} dB) straddle "
               f"target_ber {target:g}")
    else:
        c.ok(sb, "ebno_at_target_db is NaN and no adjacent points straddle target_ber")

    check_optional_views(c, g, lim, m)
    check_finite_length(c, g, lim, summ)

    grid_at, step = crossing_from_grid(theory["ebno_db"], theory["ber_uncoded"], target)
    if math.isnan(grid_at):
        c.note(sb, "theory grid does not cross target_ber; uncoded_ebno_at_target_db not compared")
    else:
        c.close(f"{sb} attribute 'uncoded_ebno_at_target_db'", unc, grid_at, abs_=step,
                what=f"theory grid crossing of {target:g}, within one grid step {step:g} dB")
        c.ok(sb, f"uncoded_ebno_at_target_db = {unc:.3f} dB matches the theory grid crossing")


def check_file(path, out=None):
    c = Checker(path, out)
    out = c.out
    try:
        f = h5py.File(path, "r")
    except OSError as e:
        raise CheckFailure(f"{path}: cannot open as HDF5: {e}")
    with f:
        print(f"checking {path} against capgap-curves format_version {FORMAT_VERSION}", file=out)
        check_root(c, f)
        schemes = [n for n in f if f.get(n, getclass=True) is h5py.Group]
        others = [n for n in f if n not in schemes]
        if others:
            c.fail("/", f"unexpected non-group members {others}; only scheme groups belong at /")
        if not schemes:
            c.fail("/", "contains no scheme group")
        if "schemes" in f.attrs:  # optional index: comma-separated group names
            listed = [n.strip() for n in c.attr_string(f, "schemes").split(",")]
            if sorted(listed) != sorted(schemes):
                c.fail("/ attribute 'schemes'", f"lists {listed}, but the scheme groups are {schemes}")
            c.ok("/ attribute 'schemes'", "names exactly the scheme groups")
        for name in schemes:
            check_scheme(c, f, name)
    print(f"PASS {path}: {len(schemes)} scheme(s), {c.count} checks", file=out)
    return c.count


def main(argv):
    if len(argv) != 1 or argv[0].startswith("-"):
        print("usage: check_h5_layout.py FILE.h5", file=sys.stderr)
        return 2
    try:
        check_file(argv[0])
    except CheckFailure as e:
        sys.stdout.flush()
        print(f"FAIL {e}", file=sys.stderr)
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
