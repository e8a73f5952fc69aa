#!/usr/bin/python3
"""Plot BER (and FER) versus Eb/N0 from a capgap-curves HDF5 file.

Role: the report-quality figure of a capgap run. Reads the file written by
the C++ sweep engine (layout "capgap-curves", format_version 1; the full
layout and its read-back check are in tests/python/check_h5_layout.py) and
draws, per scheme in one colour:
  * simulated points with their 95 % Clopper-Pearson interval as asymmetric
    error bars; a point without errors is drawn as an open downward triangle
    at its interval's upper end (an upper bound, not a measurement);
  * the closed-form uncoded theory curve (dashed);
  * the Shannon limit at the scheme's spectral efficiency (dotted vertical)
    and the constellation-constrained limit (dash-dot; omitted when it is
    not finite, as for uncoded schemes);
  * for LDPC schemes the belief-propagation threshold of the code's degree
    distribution (density evolution; dashed, long-short);
  * the target BER (thin horizontal line) and a double-headed arrow from the
    Shannon limit to the Eb/N0 reached at the target, labelled with the gap.
--fer adds a FER panel (same markers, intervals and limits) under the BER
panel; --fer-only draws FER alone, --ber-only BER alone. The FER panel is
the default when a scheme carries finite-length limits (coded schemes on
AWGN): there it draws, per scheme, the normal approximation, the RCU
achievability bound and the meta-converse for the code's own (n, k), the
target FER and an arrow from the normal approximation to the simulated
Eb/N0 at the target, labelled with the gap.
Next to OUT.png it writes OUT-plane.png, the power-bandwidth comparison
chart (analysis/plot_plane.py), and, when the file holds signal views,
OUT-signal.png: measured spectrum against the ideal pulse spectrum, eye and
constellation after the matched filter (analysis/plot_signal.py).
Schemes are ordered by the Eb/N0 they need at the target (left to right, as
the curves appear) unless --schemes gives an order.
Uses only Debian's python3-matplotlib (Agg backend), python3-h5py and
python3-numpy.

Usage:
  /usr/bin/python3 analysis/plot_curves.py FILE.h5 -o OUT.png [--no-svg]
      [--title TEXT] [--schemes a,b] [--fer | --fer-only | --ber-only] [--dpi N]
      [--no-plane] [--no-signal]
OUT.svg is written next to OUT.png unless --no-svg. Exit status 1 with a
message naming the file when it is not a readable capgap-curves file.
"""

import argparse
import fractions
import math
import pathlib
import sys

import matplotlib

matplotlib.use("Agg")  # before anything that could pick a GUI backend

import h5py  # noqa: E402
import numpy as np  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402
from matplotlib.lines import Line2D  # noqa: E402
from matplotlib.ticker import LogLocator, MultipleLocator, NullFormatter  # noqa: E402

import plot_plane  # noqa: E402  (analysis/, next to this script)
import plot_signal  # noqa: E402

FORMAT_NAME = "capgap-curves"
FORMAT_VERSION = 1
POINT_DATASETS = ("ebno_db", "bits", "bit_errors", "frames", "frame_errors",
                  "ber", "ber_low", "ber_high", "fer", "fer_low", "fer_high")
BER_FLOOR = 1e-9

from plot_style import (GREY, MARKERS, PALETTE, STYLE, assign_styles,  # noqa: E402,F401
                        provenance, split_groups)


class FileFormatError(Exception):
    """The input is not a readable capgap-curves file; message says why."""


def _str(value):
    if isinstance(value, (bytes, np.bytes_)):
        return bytes(value).decode("utf-8", errors="replace")
    return str(value)


def _attr(obj, name, where, kind=float):
    if name not in obj.attrs:
        raise FileFormatError(f"{where}: missing attribute '{name}'")
    value = obj.attrs[name]
    try:
        if kind is str:
            return _str(value)
        return kind(value)
    except (TypeError, ValueError):
        raise FileFormatError(f"{where}: attribute '{name}' = {value!r} is not {kind.__name__}")


class Scheme:
    """One scheme's curves, read from /<name>/ of a capgap-curves file."""

    def __init__(self, g):
        name = g.name.lstrip("/")
        self.name = name
        where = f"/{name}"
        self.modulation = _attr(g, "modulation", where, str)
        self.code = _attr(g, "code", where, str)
        self.code_rate = _attr(g, "code_rate", where)
        self.rho = _attr(g, "info_bits_per_symbol", where)
        self.eta = _attr(g, "spectral_efficiency", where)
        self.target_ber = _attr(g, "target_ber", where)
        self.demapper = _attr(g, "demapper", where, str) if "demapper" in g.attrs else ""
        p = None
        for n in POINT_DATASETS:
            if n not in g or not isinstance(g[n], h5py.Dataset):
                raise FileFormatError(f"{where}: missing dataset '{n}'")
            v = np.asarray(g[n][()], dtype=np.float64)
            if v.ndim != 1 or (p is not None and v.shape[0] != p):
                raise FileFormatError(f"{where}/{n}: shape {v.shape} differs from {where}/ebno_db ({p},)")
            p = v.shape[0]
            setattr(self, n, v)
        order = np.argsort(self.ebno_db, kind="stable")
        for n in POINT_DATASETS:
            setattr(self, n, getattr(self, n)[order])
        self.theory_ebno = self.theory_ber = None
        if "theory" in g and "ebno_db" in g["theory"] and "ber_uncoded" in g["theory"]:
            self.theory_ebno = np.asarray(g["theory/ebno_db"][()], dtype=np.float64)
            self.theory_ber = np.asarray(g["theory/ber_uncoded"][()], dtype=np.float64)
        self.bound_ber = self.bound_fer = None
        if "theory" in g and "ber_bound" in g["theory"]:
            self.bound_ber = np.asarray(g["theory/ber_bound"][()], dtype=np.float64)
        if "theory" in g and "fer_bound" in g["theory"]:
            self.bound_fer = np.asarray(g["theory/fer_bound"][()], dtype=np.float64)
        self.coded = self.code != "none"
        # Fading (optional /<scheme>/channel group; absent or "awgn" with one
        # branch: the AWGN channel).
        ch = g["channel"] if "channel" in g and isinstance(g["channel"], h5py.Group) else None
        self.channel = _str(ch.attrs["channel"]) if ch is not None and "channel" in ch.attrs \
            else "awgn"
        self.fading_time = _str(ch.attrs.get("fading", "fast")) if ch is not None else "fast"
        self.branches = int(ch.attrs.get("branches", 1)) if ch is not None else 1
        self.combining = _str(ch.attrs.get("combining", "mrc")) if ch is not None else "mrc"
        self.k_db = float(ch.attrs.get("rician_k_db", 0.0)) if ch is not None else 0.0
        self.m = float(ch.attrs.get("nakagami_m", 1.0)) if ch is not None else 1.0
        self.theory_ber_awgn = None
        if "theory" in g and "ber_uncoded_awgn" in g["theory"]:
            self.theory_ber_awgn = np.asarray(g["theory/ber_uncoded_awgn"][()], dtype=np.float64)
        lim = g["limits"] if "limits" in g else None
        if lim is None:
            raise FileFormatError(f"{where}: missing group 'limits'")
        self.shannon = _attr(lim, "shannon_ebno_db", f"{where}/limits")
        self.constrained = _attr(lim, "constrained_ebno_db", f"{where}/limits")
        summ = g["summary"] if "summary" in g else None
        if summ is None:
            raise FileFormatError(f"{where}: missing group 'summary'")
        self.at_target = _attr(summ, "ebno_at_target_db", f"{where}/summary")
        self.gap_shannon = _attr(summ, "gap_to_shannon_db", f"{where}/summary")
        # Optional parts (older or synthetic files may lack them).
        self.threshold = float(lim.attrs["threshold_ebno_db"]) \
            if "threshold_ebno_db" in lim.attrs else float("nan")
        self.shaping = _str(g.attrs["shaping"]) if "shaping" in g.attrs else "none"
        self.rolloff = float(g.attrs["rolloff"]) if "rolloff" in g.attrs else None
        self.timing_offset = float(g.attrs.get("timing_offset", 0.0))
        nan = float("nan")
        self.ergodic = float(lim.attrs.get("ergodic_shannon_ebno_db", nan))
        self.ergodic_cm = float(lim.attrs.get("ergodic_constrained_ebno_db", nan))
        self.ergodic_rho = self.ergodic_ebno = None
        if "ergodic_curve_rho" in lim and "ergodic_curve_ebno_db" in lim:
            self.ergodic_rho = np.asarray(lim["ergodic_curve_rho"][()], dtype=np.float64)
            self.ergodic_ebno = np.asarray(lim["ergodic_curve_ebno_db"][()], dtype=np.float64)
        self.outage_ebno = self.outage_gaussian = self.outage_constrained = None
        if all(n in lim for n in ("outage_ebno_db", "outage_probability_gaussian",
                                  "outage_probability_constrained")):
            self.outage_ebno = np.asarray(lim["outage_ebno_db"][()], dtype=np.float64)
            self.outage_gaussian = np.asarray(lim["outage_probability_gaussian"][()],
                                              dtype=np.float64)
            self.outage_constrained = np.asarray(lim["outage_probability_constrained"][()],
                                                 dtype=np.float64)
        self.gap_ergodic = float(summ.attrs.get("gap_to_ergodic_db", nan))
        # Frame error rates: the summary at target_fer and the finite-length
        # limits of the scheme's own (n, k) (coded AWGN schemes only).
        self.target_fer = float(summ.attrs.get("target_fer", nan))
        self.at_target_fer = float(summ.attrs.get("ebno_at_target_fer_db", nan))
        self.gap_finite_length = float(summ.attrs.get("gap_to_finite_length_db", nan))
        self.fl_ebno = self.fl_na = self.fl_rcu = self.fl_converse = None
        self.fl_na_at_target = nan
        self.fl_n = self.fl_k = 0
        if "finite_length" in lim and isinstance(lim["finite_length"], h5py.Group):
            fl = lim["finite_length"]
            for n in ("ebno_db", "fer_normal_approximation", "fer_rcu", "fer_converse"):
                if n not in fl:
                    raise FileFormatError(f"{where}/limits/finite_length: missing dataset '{n}'")
            self.fl_ebno = np.asarray(fl["ebno_db"][()], dtype=np.float64)
            self.fl_na = np.asarray(fl["fer_normal_approximation"][()], dtype=np.float64)
            self.fl_rcu = np.asarray(fl["fer_rcu"][()], dtype=np.float64)
            self.fl_converse = np.asarray(fl["fer_converse"][()], dtype=np.float64)
            self.fl_na_at_target = _attr(fl, "normal_approximation_ebno_db",
                                         f"{where}/limits/finite_length")
            self.fl_n = int(fl.attrs.get("n", 0))
            self.fl_k = int(fl.attrs.get("k", 0))
        self.curve_rho = self.curve_ebno = None
        if "constrained_curve_rho" in lim and "constrained_curve_ebno_db" in lim:
            self.curve_rho = np.asarray(lim["constrained_curve_rho"][()], dtype=np.float64)
            self.curve_ebno = np.asarray(lim["constrained_curve_ebno_db"][()], dtype=np.float64)
        self.psd_f = self.psd_db = None
        self.b99 = None
        if "spectrum" in g and "frequency" in g["spectrum"] and "psd_db" in g["spectrum"]:
            self.psd_f = np.asarray(g["spectrum/frequency"][()], dtype=np.float64)
            self.psd_db = np.asarray(g["spectrum/psd_db"][()], dtype=np.float64)
            self.b99 = float(g["spectrum"].attrs.get("occupied_bandwidth_99", float("nan")))
        self.const_i = self.const_q = self.eye = self.eye_time = None
        self.const_ebno = float("nan")
        if "signal" in g:
            sg = g["signal"]
            if "constellation_i" in sg and "constellation_q" in sg:
                self.const_i = np.asarray(sg["constellation_i"][()], dtype=np.float64)
                self.const_q = np.asarray(sg["constellation_q"][()], dtype=np.float64)
                self.const_ebno = float(sg.attrs.get("constellation_ebno_db", float("nan")))
            if "eye" in sg and "eye_time" in sg:
                self.eye = np.asarray(sg["eye"][()], dtype=np.float64)
                self.eye_time = np.asarray(sg["eye_time"][()], dtype=np.float64)

    def label(self):
        mod = self.modulation.upper().replace("QAM", "-QAM") if self.modulation[:1].isdigit() \
            else self.modulation.upper()
        if self.code == "none":
            code = "uncoded"
        else:
            frac = fractions.Fraction(self.code_rate).limit_denominator(64)
            rate = f"{frac.numerator}/{frac.denominator}" if abs(float(frac) - self.code_rate) < 1e-9 \
                else f"{self.code_rate:.3g}"
            code = f"{self.code}, R = {rate}"
        demapper = f", {self.demapper} demapper" if self.demapper else ""
        return f"{self.name}  ({mod}, {code}{demapper}, \u03b7 = {self.eta:.3g}{self.channel_label()})"

    def fading(self):
        return self.channel != "awgn" or self.branches > 1

    def channel_label(self):
        """', Rayleigh, 2-branch MRC, block' for fading schemes, '' for AWGN."""
        if not self.fading():
            return ""
        law = {"rician": f"Rician K = {self.k_db:g} dB", "nakagami": f"Nakagami m = {self.m:g}"}
        text = ", " + law.get(self.channel, self.channel.capitalize())
        if self.branches > 1:
            comb = "MRC" if self.combining == "mrc" else "SC"
            text += f", {self.branches}-branch {comb}"
        return text + f", {self.fading_time}"


def read_file(path, wanted):
    try:
        f = h5py.File(path, "r")
    except OSError as e:
        raise FileFormatError(f"cannot open as HDF5 ({e})")
    with f:
        if "format" not in f.attrs:
            raise FileFormatError("not a capgap-curves file: root attribute 'format' is missing")
        fmt = _str(f.attrs["format"])
        if fmt != FORMAT_NAME:
            raise FileFormatError(f"not a capgap-curves file: format is {fmt!r}, expected {FORMAT_NAME!r}")
        version = f.attrs.get("format_version")
        if version is None:
            raise FileFormatError("root attribute 'format_version' is missing")
        if int(version) != FORMAT_VERSION:
            raise FileFormatError(f"format_version is {int(version)}; this script reads {FORMAT_VERSION}")
        meta = {k: _str(f.attrs[k]) for k in ("program_version", "git_revision", "created_utc",
                                              "kernel_target", "threads", "seed") if k in f.attrs}
        run_order = _str(f.attrs["schemes"]).split(",") if "schemes" in f.attrs else []
        available = [n for n in f if isinstance(f[n], h5py.Group)]
        # The run's order (root attribute `schemes`) when recorded; h5py
        # lists groups by name.
        available = [n for n in run_order if n in available] + \
            [n for n in available if n not in run_order]
        if not available:
            raise FileFormatError("contains no scheme group")
        if wanted:
            missing = [n for n in wanted if n not in available]
            if missing:
                raise FileFormatError(f"no scheme {', '.join(map(repr, missing))}; "
                                      f"the file has {', '.join(available)}")
            names = wanted
        else:
            names = available
        schemes = [Scheme(f[n]) for n in names]
    # Colours and markers follow the run's order, whatever a figure draws.
    assign_styles(schemes, available)
    if not wanted:  # left-to-right order of the curves, as the eye reads them
        schemes.sort(key=lambda s: (math.isnan(s.at_target), s.at_target, s.name))
    return schemes, meta


# ---------------------------------------------------------------------------
def _decade_floor(x):
    return 10.0 ** math.floor(math.log10(x) + 1e-12)


def _y_limits(schemes, rate):
    lows, highs = [], []
    for s in schemes:
        low, high, errs = (getattr(s, f"{rate}_low"), getattr(s, f"{rate}_high"),
                           s.bit_errors if rate == "ber" else s.frame_errors)
        lows += list(low[low > 0]) + list(high[(errs == 0) & (high > 0)])
        highs += list(high[high > 0])
        if rate == "ber":
            lows.append(s.target_ber)
        elif s.fl_ebno is not None and math.isfinite(s.target_fer):
            lows.append(s.target_fer)
    smallest = min(lows) if lows else 1e-6
    y_min = max(BER_FLOOR, _decade_floor(smallest) / 10.0)
    top = max(highs) if highs else 0.5
    if top > 0.1:
        # FER reaches 1 at low Eb/N0: leave headroom so those markers and
        # their intervals are not clipped by the frame.
        y_max = 1.6 if rate == "fer" and top > 0.5 else 1.0
    else:
        y_max = 10.0 ** math.ceil(math.log10(top) + 0.05)
    return y_min, y_max


def _x_limits(schemes):
    xs = []
    for s in schemes:
        xs += list(s.ebno_db)
        xs += [v for v in (s.shannon, s.constrained, s.at_target, s.threshold, s.ergodic,
                           s.fl_na_at_target)
               if math.isfinite(v)]
    lo, hi = min(xs), max(xs)
    return math.floor(lo - 1.0), math.ceil(hi + 1.0)


def _style_axes(ax, x_lim, y_lim, ylabel):
    ax.set_yscale("log")
    ax.set_xlim(*x_lim)
    ax.set_ylim(*y_lim)
    span = x_lim[1] - x_lim[0]
    major = 1 if span <= 14 else 2 if span <= 30 else 5
    ax.xaxis.set_major_locator(MultipleLocator(major))
    ax.xaxis.set_minor_locator(MultipleLocator(major / 2 if major > 1 else 0.5))
    ax.yaxis.set_major_locator(LogLocator(base=10, numticks=30))
    ax.yaxis.set_minor_locator(LogLocator(base=10, subs=np.arange(2, 10), numticks=30))
    ax.yaxis.set_minor_formatter(NullFormatter())
    ax.grid(True, which="major", color="#d0d0d0", linewidth=0.7)
    ax.grid(True, which="minor", axis="y", color="#eeeeee", linewidth=0.5)
    ax.set_axisbelow(True)
    ax.set_xlabel(r"$E_b/N_0$ per information bit (dB)")
    ax.set_ylabel(ylabel)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)


def _draw_points(ax, s, rate, colour, marker):
    x = s.ebno_db
    y, low, high = getattr(s, rate), getattr(s, f"{rate}_low"), getattr(s, f"{rate}_high")
    errs = s.bit_errors if rate == "ber" else s.frame_errors
    hit = errs > 0
    if np.count_nonzero(hit) > 1:
        ax.plot(x[hit], y[hit], "-", color=colour, linewidth=1.4, alpha=0.85, zorder=3)
    if np.any(hit):
        ax.errorbar(x[hit], y[hit], yerr=[y[hit] - low[hit], high[hit] - y[hit]],
                    fmt=marker, color=colour, markersize=5.5, markerfacecolor=colour,
                    markeredgecolor="white", markeredgewidth=0.6, elinewidth=1.0,
                    capsize=2.5, capthick=1.0, zorder=4)
    if np.any(~hit):
        ax.plot(x[~hit], high[~hit], "v", color=colour, markersize=6.5, markerfacecolor="white",
                markeredgewidth=1.3, linestyle="none", zorder=4)


def _draw_limits(ax, s, colour):
    if math.isfinite(s.shannon):
        ax.axvline(s.shannon, color=colour, linestyle=(0, (1.2, 2.0)), linewidth=1.5,
                   alpha=0.9, zorder=2)
    if math.isfinite(s.constrained):
        ax.axvline(s.constrained, color=colour, linestyle="-.", linewidth=1.2, alpha=0.9, zorder=2)
    if math.isfinite(s.threshold):
        ax.axvline(s.threshold, color=colour, linestyle=THRESHOLD_STYLE, linewidth=1.4, alpha=0.9,
                   zorder=2)
    if math.isfinite(s.ergodic):
        ax.axvline(s.ergodic, color=colour, linestyle=ERGODIC_STYLE, linewidth=1.4, alpha=0.9,
                   zorder=2)


def _draw_outage(ax, s, colour):
    """Block fading: outage probability against Eb/N0 (FER panel): Gaussian
    input solid and thin, the constellation-constrained one dashed."""
    if s.outage_ebno is None:
        return
    for y, style in ((s.outage_gaussian, OUTAGE_STYLE), (s.outage_constrained, (0, (4, 2)))):
        ok = (y > 0) & (y < 1)
        if np.any(ok):
            ax.plot(s.outage_ebno[ok], y[ok], color=colour, linestyle=style, linewidth=1.0,
                    alpha=0.8, zorder=2)


FL_NA_STYLE = "-"
FL_RCU_STYLE = (0, (3, 1.5))
FL_CONVERSE_STYLE = (0, (1, 1.2))


def _draw_finite_length(ax, s, colour):
    """FER panel: the finite-length limits of the scheme's (n, k): normal
    approximation (thin solid), RCU achievability bound (short dashes) and
    meta-converse (dots); no code of that length and rate lies left of the
    converse."""
    if s.fl_ebno is None:
        return
    for y, style in ((s.fl_na, FL_NA_STYLE), (s.fl_rcu, FL_RCU_STYLE),
                     (s.fl_converse, FL_CONVERSE_STYLE)):
        ok = np.isfinite(y) & (y > 0) & (y < 1)
        if np.any(ok):
            ax.plot(s.fl_ebno[ok], y[ok], color=colour, linestyle=style, linewidth=1.0,
                    alpha=0.85, zorder=2)


def _draw_fer_gap(ax, s, colour, y):
    """Arrow from the finite-length normal approximation at target_fer to the
    Eb/N0 the simulated FER reaches there (its value: fer_gap_text, in the
    legend)."""
    if not (math.isfinite(s.at_target_fer) and math.isfinite(s.fl_na_at_target)):
        return
    if y < s.target_fer:
        ax.plot([s.at_target_fer, s.at_target_fer], [y, s.target_fer], color=colour,
                linewidth=0.8, linestyle=(0, (1, 1.5)), zorder=5)
    ax.plot([s.at_target_fer], [s.target_fer], marker="o", markersize=4.5, color=colour,
            markerfacecolor="white", markeredgewidth=1.2, zorder=6)
    ax.annotate("", xy=(s.at_target_fer, y), xytext=(s.fl_na_at_target, y),
                arrowprops=dict(arrowstyle="<|-|>", color=colour, linewidth=1.1,
                                shrinkA=0, shrinkB=0, mutation_scale=9),
                zorder=5)


def _short(x):
    return f"{x:.0e}".replace("e-0", "e-")


def ber_gap_text(s):
    """The BER gap of a scheme as the legend beside the plot states it."""
    if not math.isfinite(s.at_target):
        return f"BER {_short(s.target_ber)} not reached in the sweep"
    if s.fading() and math.isfinite(s.ergodic):
        gap = s.gap_ergodic if math.isfinite(s.gap_ergodic) else s.at_target - s.ergodic
        return f"{s.at_target:.2f} dB at BER {_short(s.target_ber)}, {gap:.2f} dB from ergodic limit"
    if not math.isfinite(s.shannon):
        return f"{s.at_target:.2f} dB at BER {_short(s.target_ber)}"
    gap = s.gap_shannon if math.isfinite(s.gap_shannon) else s.at_target - s.shannon
    return f"{s.at_target:.2f} dB at BER {_short(s.target_ber)}, {gap:.2f} dB from Shannon limit"


def fer_gap_text(s):
    """The FER gap to the finite-length limit, as the FER legend states it."""
    if not (math.isfinite(s.at_target_fer) and math.isfinite(s.fl_na_at_target)):
        return f"{s.name}: FER {_short(s.target_fer)} not reached"
    gap = s.gap_finite_length if math.isfinite(s.gap_finite_length) \
        else s.at_target_fer - s.fl_na_at_target
    return (f"{s.name}: {s.at_target_fer:.2f} dB at FER {_short(s.target_fer)}, "
            f"{gap:.2f} dB from n = {s.fl_n} limit")


def _draw_target_line(ax, t, rate_word):
    """The horizontal target line with its label at the left end: at low
    Eb/N0 every curve is still above the target, so that corner is free."""
    ax.axhline(t, color="#222222", linewidth=0.9, zorder=2.5)
    ax.annotate(f"target {rate_word} {t:.0e}".replace("e-0", "e-"), xy=(0.0, t),
                xycoords=("axes fraction", "data"), xytext=(4, 2.5),
                textcoords="offset points", ha="left", va="bottom",
                fontsize=8.5, color="#222222",
                bbox=dict(boxstyle="square,pad=0.1", facecolor="white",
                          edgecolor="none", alpha=0.8))


def _draw_gap(ax, s, colour, y):
    """Arrow (no text) from the Shannon limit (fading schemes: the ergodic
    limit) to the Eb/N0 reached at target_ber.

    Drawn at height y (the target itself for the first scheme, staggered
    below it for the others); a thin drop line joins the arrow's right end to
    the curve's crossing of the target line so the reading stays exact.
    """
    if not (math.isfinite(s.at_target) and math.isfinite(s.shannon)):
        return
    limit = s.shannon
    if s.fading() and math.isfinite(s.ergodic):
        # A fading scheme is measured against its channel's ergodic limit.
        limit = s.ergodic
    if y < s.target_ber:
        ax.plot([s.at_target, s.at_target], [y, s.target_ber], color=colour, linewidth=0.8,
                linestyle=(0, (1, 1.5)), zorder=5)
    ax.plot([s.at_target], [s.target_ber], marker="o", markersize=4.5, color=colour,
            markerfacecolor="white", markeredgewidth=1.2, zorder=6)
    ax.annotate("", xy=(s.at_target, y), xytext=(limit, y),
                arrowprops=dict(arrowstyle="<|-|>", color=colour, linewidth=1.1,
                                shrinkA=0, shrinkB=0, mutation_scale=9),
                zorder=5)
    # The arrow carries no text: its value stands in the legend beside the
    # plot (ber_gap_text), where labels cannot collide with curves or other
    # labels however many schemes share the target.


THRESHOLD_STYLE = (0, (10, 2, 2, 2, 2, 2))  # long dash, two dots
ERGODIC_STYLE = (0, (6, 2, 1, 2))             # dash, dot
OUTAGE_STYLE = "-"
AWGN_REFERENCE_STYLE = (0, (1, 1.5))


def _key_handles(rate, any_zero, any_constrained, with_theory, any_bound=False,
                 any_threshold=False, any_ergodic=False, any_outage=False, any_awgn_ref=False,
                 any_finite_length=False):
    h = [Line2D([], [], color=GREY, marker="o", markersize=5, linewidth=1.4,
                label="simulated, 95 % Clopper\u2013Pearson interval")]
    if any_zero:
        h.append(Line2D([], [], color=GREY, marker="v", markersize=6.5, markerfacecolor="white",
                        linestyle="none", label="no errors: 95 % upper bound"))
    if with_theory:
        h.append(Line2D([], [], color=GREY, linestyle=(0, (5, 2.5)), linewidth=1.3,
                        label="uncoded theory"))
    h.append(Line2D([], [], color=GREY, linestyle=(0, (1.2, 2.0)), linewidth=1.5,
                    label="Shannon limit at \u03b7"))
    if any_constrained:
        h.append(Line2D([], [], color=GREY, linestyle="-.", linewidth=1.2,
                        label="constellation-constrained limit"))
    if any_threshold:
        h.append(Line2D([], [], color=GREY, linestyle=THRESHOLD_STYLE, linewidth=1.4,
                        label="LDPC BP threshold (density evolution)"))
    if with_theory and any_awgn_ref:
        h.append(Line2D([], [], color=GREY, linestyle=AWGN_REFERENCE_STYLE, linewidth=1.0,
                        alpha=0.6, label="uncoded theory on AWGN (fading schemes)"))
    if any_ergodic:
        h.append(Line2D([], [], color=GREY, linestyle=ERGODIC_STYLE, linewidth=1.4,
                        label="ergodic capacity limit at \u03c1 (fading, receiver knows h)"))
    if any_outage:
        h.append(Line2D([], [], color=GREY, linestyle=OUTAGE_STYLE, linewidth=1.0,
                        label="outage probability, Gaussian input (block fading)"))
        h.append(Line2D([], [], color=GREY, linestyle=(0, (4, 2)), linewidth=1.0,
                        label="outage probability, constellation (block fading)"))
    if any_finite_length:
        h.append(Line2D([], [], color=GREY, linestyle=FL_NA_STYLE, linewidth=1.0,
                        label="FER limit at the code's (n, k): normal approximation"))
        h.append(Line2D([], [], color=GREY, linestyle=FL_RCU_STYLE, linewidth=1.0,
                        label="  RCU achievability bound"))
        h.append(Line2D([], [], color=GREY, linestyle=FL_CONVERSE_STYLE, linewidth=1.0,
                        label="  meta-converse (no code lies left of it)"))
    if rate == "ber" and any_bound:
        h.append(Line2D([], [], color=GREY, linestyle=(0, (6, 1.5, 1, 1.5, 1, 1.5)),
                        linewidth=1.2, label="union bound (coded, soft decisions)"))
    if rate == "ber":
        h.append(Line2D([], [], color="#222222", linewidth=0.9,
                        label="target BER / FER" if any_finite_length else "target BER"))
    return h


def _any_zero(s, rate):
    return bool(np.any((s.bit_errors if rate == "ber" else s.frame_errors) == 0))


def draw_panel(ax, schemes, rate, x_lim, scheme_legend, key_handles):
    """One log-y panel of `rate` ("ber" or "fer") versus Eb/N0."""
    ylabel = "Bit error rate" if rate == "ber" else "Frame error rate"
    y_lim = _y_limits(schemes, rate)
    _style_axes(ax, x_lim, y_lim, ylabel)
    scheme_handles = []
    for s in schemes:
        colour, marker = s.colour, s.marker
        if rate == "ber" and s.theory_ebno is not None and not s.coded:
            ok = s.theory_ber > 0
            ax.plot(s.theory_ebno[ok], s.theory_ber[ok], color=colour, linestyle=(0, (5, 2.5)),
                    linewidth=1.3, alpha=0.9, zorder=2)
            if s.theory_ber_awgn is not None:
                ok = (s.theory_ber_awgn > 0) & (s.theory_ber_awgn >= y_lim[0])
                ax.plot(s.theory_ebno[ok], s.theory_ber_awgn[ok], color=colour,
                        linestyle=AWGN_REFERENCE_STYLE, linewidth=1.0, alpha=0.6, zorder=2)
        if rate == "fer":
            _draw_outage(ax, s, colour)
            _draw_finite_length(ax, s, colour)
        bound = s.bound_ber if rate == "ber" else s.bound_fer
        if s.theory_ebno is not None and bound is not None:
            # Union bound of a coded scheme (its uncoded curve is not drawn:
            # it would duplicate the uncoded scheme of the same modulation).
            ok = (bound > 0) & (bound < (0.5 if rate == "ber" else 1.0))
            ax.plot(s.theory_ebno[ok], bound[ok], color=colour,
                    linestyle=(0, (6, 1.5, 1, 1.5, 1, 1.5)), linewidth=1.2, alpha=0.9, zorder=2)
        _draw_points(ax, s, rate, colour, marker)
        _draw_limits(ax, s, colour)
        scheme_handles.append(Line2D([], [], color=colour, marker=marker, markersize=5.5,
                                     markeredgecolor="white", markeredgewidth=0.6,
                                     linewidth=1.4,
                                     label=s.label() + ("\n" + ber_gap_text(s) if rate == "ber"
                                                        else "")))
    if rate == "ber":
        for t in sorted({s.target_ber for s in schemes}):
            _draw_target_line(ax, t, "BER")
        # Stagger the gap arrows so several schemes stay legible: the first
        # sits on its target line, the others step down by 4.5 % of the axes
        # height each (the region left of the curves is empty there).
        step = 0.045 * math.log10(y_lim[1] / y_lim[0])
        per_target = {}
        for s in schemes:
            k = per_target.get(s.target_ber, 0)
            per_target[s.target_ber] = k + 1
            y = s.target_ber * 10.0 ** (-step * k)
            if y < y_lim[0]:
                continue
            _draw_gap(ax, s, s.colour, y)
    if rate == "fer":
        targets = sorted({s.target_fer for s in schemes if math.isfinite(s.target_fer)
                          and s.fl_ebno is not None})
        for t in targets:
            _draw_target_line(ax, t, "FER")
        step = 0.045 * math.log10(y_lim[1] / y_lim[0])
        per_target = {}
        for s in schemes:
            if s.fl_ebno is None or not math.isfinite(s.target_fer):
                continue
            k = per_target.get(s.target_fer, 0)
            per_target[s.target_fer] = k + 1
            y = s.target_fer * 10.0 ** (-step * k)
            if y >= y_lim[0]:
                _draw_fer_gap(ax, s, s.colour, y)
            # The FER panel's legend opens with the gaps, one line a scheme.
            scheme_handles.append(Line2D([], [], color=s.colour, marker=s.marker,
                                         markersize=5.5, markeredgecolor="white",
                                         linewidth=1.4, label=fer_gap_text(s)))
    # One legend outside the axes on the right (constrained layout reserves
    # room for an axes legend): schemes first, then the line-style key. Inside
    # the axes it would cover the gap annotations or the curves.
    handles = list(scheme_handles) if scheme_legend or rate == "fer" else []
    if key_handles:
        if handles:
            handles.append(Line2D([], [], linestyle="none", label=" "))
        handles.extend(key_handles)
    if handles:
        ax.legend(handles=handles, loc="upper left", bbox_to_anchor=(1.01, 1.0),
                  title="Scheme" if scheme_legend else
                  "At the target FER" if rate == "fer" and scheme_handles else None,
                  alignment="left",
                  borderaxespad=0.0, fontsize=8.5, handlelength=2.6)


def make_figure(path, schemes, meta, title, fer_mode, dpi):
    matplotlib.rcParams.update(STYLE)
    rates = {"none": ["ber"], "also": ["ber", "fer"], "only": ["fer"]}[fer_mode]
    height = 6.0 if len(rates) == 1 else 10.5
    fig = Figure(figsize=(12.0, height), dpi=dpi, layout="constrained")
    axes = fig.subplots(len(rates), 1, sharex=True, squeeze=False)[:, 0]
    x_lim = _x_limits(schemes)
    key = _key_handles(
        "ber" if "ber" in rates else "fer",
        any_zero=any(_any_zero(s, r) for s in schemes for r in rates),
        any_constrained=any(math.isfinite(s.constrained) for s in schemes),
        with_theory="ber" in rates and any(s.theory_ebno is not None and not s.coded
                                           for s in schemes),
        any_bound=any((r == "ber" and s.bound_ber is not None)
                      or (r == "fer" and s.bound_fer is not None)
                      for s in schemes for r in rates),
        any_threshold=any(math.isfinite(s.threshold) for s in schemes),
        any_ergodic=any(math.isfinite(s.ergodic) for s in schemes),
        any_outage="fer" in rates and any(s.outage_ebno is not None for s in schemes),
        any_awgn_ref=any(s.theory_ber_awgn is not None and not s.coded for s in schemes),
        any_finite_length="fer" in rates and any(s.fl_ebno is not None for s in schemes))
    for k, (ax, rate) in enumerate(zip(axes, rates)):
        last = k == len(rates) - 1
        draw_panel(ax, schemes, rate, x_lim, scheme_legend=(k == 0),
                   key_handles=key if last else None)
        if not last:
            ax.set_xlabel("")
    default = {"none": "Bit error rate versus $E_b/N_0$",
               "also": "Bit and frame error rates versus $E_b/N_0$",
               "only": "Frame error rate versus $E_b/N_0$"}[fer_mode]
    fig.suptitle(title if title is not None else default, fontsize=13.5, fontweight="semibold")
    # supxlabel: the constrained layout reserves room under the x label
    # (a free fig.text there overprinted it).
    fig.supxlabel(provenance(path, meta), x=0.01, ha="left", fontsize=7, color="#808080")
    fig.get_layout_engine().set(h_pad=0.12, w_pad=0.08)
    return fig


def parse_args(argv):
    ap = argparse.ArgumentParser(
        prog="plot_curves.py",
        description="Plot BER/FER versus Eb/N0 from a capgap-curves HDF5 file.")
    ap.add_argument("file", help="capgap-curves HDF5 file")
    ap.add_argument("-o", "--output", help="PNG to write (default: FILE with .png)")
    ap.add_argument("--no-svg", action="store_true", help="do not write the SVG next to the PNG")
    ap.add_argument("--title", help="figure title (default describes the plot)")
    ap.add_argument("--schemes", help="comma-separated scheme names to plot, in this order")
    fer = ap.add_mutually_exclusive_group()
    fer.add_argument("--fer", action="store_true",
                     help="add a FER panel under the BER panel (figure 9 x 10.5 in); the "
                          "default when a plotted scheme carries finite-length limits")
    fer.add_argument("--ber-only", action="store_true", help="plot BER alone")
    fer.add_argument("--fer-only", action="store_true", help="plot FER instead of BER")
    ap.add_argument("--dpi", type=int, default=150, help="PNG resolution (default 150)")
    ap.add_argument("--no-plane", action="store_true",
                    help="do not write OUT-plane.png (the power-bandwidth comparison chart)")
    ap.add_argument("--no-signal", action="store_true",
                    help="do not write OUT-signal.png (spectrum, eye and constellation)")
    return ap.parse_args(argv)


def fer_mode_for(schemes, args_mode):
    """'also' / 'only' / 'none' for a figure of `schemes`: the user's choice,
    else the FER panel when a scheme carries finite-length limits (coded
    schemes are judged by their FER)."""
    if args_mode is not None:
        return args_mode
    return "also" if any(s.fl_ebno is not None for s in schemes) else "none"


def build_figures(path, schemes, meta, title=None, fer_mode=None, dpi=150, plane=True,
                  signal=True, grouped=True):
    """Every figure of a run as [(suffix, title, Figure)]; suffix "" is the
    single BER/FER figure, "-<group>" a group's figure (more than
    GROUP_THRESHOLD schemes in several groups: uncoded, coded, shaped,
    fading), "-plane" the power-bandwidth chart, "-signal" the signal views.
    Used by main() and by analysis/report.py."""
    out = []
    groups = split_groups(schemes) if grouped else [(None, list(schemes))]
    for group, members in groups:
        mode = fer_mode_for(members, fer_mode)
        t = title
        if t is None and group is not None:
            t = {"none": "Bit error rate", "also": "Bit and frame error rates",
                 "only": "Frame error rate"}[mode] + f" versus $E_b/N_0$: {group} schemes"
        fig = make_figure(path, members, meta, t, mode, dpi)
        what = "BER/FER" if mode == "also" else "FER" if mode == "only" else "BER"
        out.append(("" if group is None else f"-{group}",
                    f"{what} versus Eb/N0" + ("" if group is None else f", {group} schemes"), fig))
    if plane:
        out.append(("-plane", "Power-bandwidth plane",
                    plot_plane.make_figure(path, schemes, meta, dpi)))
    if signal and any(s.const_i is not None for s in schemes):
        out.append(("-signal", "Signal views", plot_signal.make_figure(path, schemes, meta, dpi)))
    return out


def main(argv):
    args = parse_args(argv)
    prog = "plot_curves.py"
    png = pathlib.Path(args.output) if args.output else pathlib.Path(args.file).with_suffix(".png")
    if png.suffix.lower() != ".png":
        print(f"{prog}: error: -o {png}: the output must end in .png "
              "(the SVG is written beside it)", file=sys.stderr)
        return 2
    wanted = [w.strip() for w in args.schemes.split(",") if w.strip()] if args.schemes else None
    try:
        schemes, meta = read_file(args.file, wanted)
    except FileFormatError as e:
        print(f"{prog}: error: {args.file}: {e}", file=sys.stderr)
        return 1
    fer_mode = "only" if args.fer_only else "also" if args.fer else "none" if args.ber_only \
        else None
    # A run of many schemes in several groups gets one figure per group
    # (OUT-uncoded.png, OUT-coded.png, ...) instead of OUT.png; --schemes
    # (an explicit choice) always gives the single figure.
    figures = build_figures(args.file, schemes, meta, args.title, fer_mode, args.dpi,
                            plane=not args.no_plane, signal=not args.no_signal,
                            grouped=wanted is None)
    png.parent.mkdir(parents=True, exist_ok=True)
    written = []
    for suffix, _, figure in figures:
        out = png.with_name(f"{png.stem}{suffix}.png")
        figure.savefig(out, dpi=args.dpi, metadata={"Software": "capgap analysis/plot_curves.py"})
        written.append(str(out))
        if not args.no_svg:
            svg = out.with_suffix(".svg")
            figure.savefig(svg, metadata={"Date": None, "Creator": "capgap analysis/plot_curves.py"})
            written.append(str(svg))
    print(f"wrote {', '.join(written)}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
