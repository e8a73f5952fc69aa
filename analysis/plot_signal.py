"""Signal views of a capgap run: spectrum, eye and constellation.

Role: the picture a designer checks before trusting a shaped chain. One row
per pulse-shaped scheme:
  * the measured power spectral density of the transmitted signal
    (/<scheme>/spectrum, Welch's method) against the ideal spectrum of the
    pulse, |P(f)|^2 with P the raised-cosine spectrum for an RRC transmitter
    and P^2 for an RC one (Proakis & Salehi, Digital Communications, 5th ed.,
    ch. 9), the ideal curve scaled to the measured total power; the 99 %
    occupied bandwidth is marked;
  * the noise-free eye of the matched-filter output (/<scheme>/signal/eye),
    with the ideal sampling instant and the configured timing offset;
  * the demapper's input at the operating point (/<scheme>/signal/
    constellation_*): matched-filter output at the symbol instants,
    impairments and noise included.
Unshaped schemes get one constellation panel each in a last row (at most
four). Called by analysis/plot_curves.py, which writes OUT-signal.png.
"""

import math

import matplotlib
import numpy as np
from matplotlib.figure import Figure

from plot_style import STYLE, provenance


def raised_cosine_spectrum(f, rolloff):
    """Raised-cosine spectrum P(f), peak 1, f in symbol rates (|f| <= (1+a)/2)."""
    f = np.abs(np.asarray(f, dtype=np.float64))
    a = rolloff
    lo, hi = (1.0 - a) / 2.0, (1.0 + a) / 2.0
    out = np.zeros_like(f)
    out[f <= lo] = 1.0
    mid = (f > lo) & (f <= hi)
    out[mid] = 0.5 * (1.0 + np.cos(math.pi / a * (f[mid] - lo)))
    return out


def _ideal_psd_db(s):
    p = raised_cosine_spectrum(s.psd_f, s.rolloff)
    shape = p if s.shaping == "rrc" else p * p
    measured = 10.0 ** (s.psd_db / 10.0)
    scale = np.sum(measured) / max(np.sum(shape), 1e-300)
    with np.errstate(divide="ignore"):
        return 10.0 * np.log10(shape * scale)


def _spectrum_panel(ax, s, colour):
    f = s.psd_f
    ax.plot(f, s.psd_db, color=colour, linewidth=1.2, label="measured (Welch)")
    ideal = _ideal_psd_db(s)
    ok = np.isfinite(ideal)
    ax.plot(f[ok], ideal[ok], color="#222222", linestyle=(0, (4, 2)), linewidth=1.1,
            label=f"ideal {s.shaping.upper()}, a = {s.rolloff:g}")
    peak = float(np.max(s.psd_db))
    if s.b99 is not None and math.isfinite(s.b99):
        for x in (-s.b99 / 2.0, s.b99 / 2.0):
            ax.axvline(x, color="#777777", linewidth=0.8, linestyle=":")
        ax.annotate(f"B99 = {s.b99:.3f} $R_s$", xy=(0.0, peak - 12.0), ha="center",
                    fontsize=8, color="#555555")
    ax.set_xlim(-1.0, 1.0)
    ax.set_ylim(peak - 70.0, peak + 5.0)
    ax.set_xlabel("frequency / symbol rate")
    ax.set_ylabel("PSD (dB)")
    ax.grid(True, color="#e0e0e0", linewidth=0.6)
    ax.legend(fontsize=7.5, loc="lower center")


def _eye_panel(ax, s, colour):
    t = s.eye_time
    for row in s.eye[:200]:
        # Rasterized in the SVG (an embedded image): 200 traces as vectors
        # made the report's signal figure most of its size.
        ax.plot(t, row, color=colour, linewidth=0.5, alpha=0.25, rasterized=True)
    ax.axvline(0.0, color="#222222", linewidth=0.8, linestyle="--", label="ideal instant")
    if s.timing_offset:
        ax.axvline(s.timing_offset, color="#D55E00", linewidth=1.0,
                   label=f"sampled at {s.timing_offset:+g} T")
    ax.set_xlim(t[0], t[-1])
    ax.set_xlabel("time / symbol period")
    ax.set_ylabel("in-phase, noise-free")
    ax.grid(True, color="#e0e0e0", linewidth=0.6)
    ax.legend(fontsize=7.5, loc="lower right")


def _constellation_panel(ax, s, colour):
    ax.plot(s.const_i, s.const_q, ".", color=colour, markersize=1.6, alpha=0.5, rasterized=True)
    lim = 1.25 * max(1.0, float(np.percentile(np.abs(np.concatenate([s.const_i, s.const_q])),
                                              99.5)))
    ax.set_xlim(-lim, lim)
    ax.set_ylim(-lim, lim)
    ax.set_aspect("equal")
    ax.axhline(0, color="#cccccc", linewidth=0.6)
    ax.axvline(0, color="#cccccc", linewidth=0.6)
    ax.set_xlabel("I")
    ax.set_ylabel("Q")
    ax.set_title(f"{s.name} at {s.const_ebno:.2f} dB", fontsize=9.5)


def make_figure(path, schemes, meta, dpi):
    matplotlib.rcParams.update(STYLE)
    colour = {s.name: s.colour for s in schemes}  # the run's colour (assign_styles)
    shaped = [s for s in schemes if s.psd_f is not None and s.rolloff is not None
              and s.eye is not None and s.const_i is not None]
    plain = [s for s in schemes if s not in shaped and s.const_i is not None][:4]
    rows = len(shaped) + (1 if plain else 0)
    cols = 3 if shaped else max(1, len(plain))
    if plain and not shaped:
        cols = len(plain)
    fig = Figure(figsize=(4.2 * max(cols, 3), 3.6 * rows + 0.6), dpi=dpi, layout="constrained")
    grid = fig.add_gridspec(rows, max(cols, len(plain), 1))
    for r, s in enumerate(shaped):
        c = colour[s.name]
        ax = fig.add_subplot(grid[r, 0])
        _spectrum_panel(ax, s, c)
        ax.set_title(f"{s.name}: transmitted spectrum", fontsize=9.5)
        ax = fig.add_subplot(grid[r, 1])
        _eye_panel(ax, s, c)
        ax.set_title(f"{s.name}: eye after the matched filter", fontsize=9.5)
        _constellation_panel(fig.add_subplot(grid[r, 2]), s, c)
    if plain:
        for k, s in enumerate(plain):
            _constellation_panel(fig.add_subplot(grid[rows - 1, k]), s, colour[s.name])
    fig.suptitle("Signal views: spectrum, eye, and the demapper input at the Eb/N0 each scheme "
                 "needs for its target BER", fontsize=13, fontweight="semibold")
    # supxlabel: the constrained layout reserves room, so nothing overlaps it.
    fig.supxlabel(provenance(path, meta), x=0.01, ha="left", fontsize=7, color="#808080")
    return fig
