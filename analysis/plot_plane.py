"""The power-bandwidth comparison chart of a capgap run.

Role: every scheme of a run as a point at (Eb/N0 it needs for its target
BER, spectral efficiency eta) on one plane, against
  * the unconstrained Shannon bound Eb/N0 = (2^eta - 1) / eta (Shannon,
    "Communication in the Presence of Noise", Proc. IRE, 1949), with the
    unreachable region to its left shaded;
  * the constellation-constrained capacity curve of every constellation in
    the run, as the C++ side computed it (/<scheme>/limits/
    constrained_curve_rho and constrained_curve_ebno_db, ideal Nyquist
    signalling: eta = rho);
  * a horizontal arrow from the bound to each point; the distance in dB
    (the scheme's gap_to_shannon_db) stands in the legend beside the plot,
    and the scheme names beside the points are placed clear of every other
    text (plot_style.place_labels).
Called by analysis/plot_curves.py, which writes OUT-plane.png beside OUT.png;
reads the Scheme objects plot_curves.py built.
"""

import math

import numpy as np
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.ticker import MultipleLocator

from plot_style import STYLE, place_labels, provenance

import matplotlib


def shannon_ebno_db(eta):
    """10 log10((2^eta - 1) / eta), eta > 0 (numpy array)."""
    eta = np.asarray(eta, dtype=np.float64)
    return 10.0 * np.log10(np.expm1(eta * math.log(2.0)) / eta)


def _modulation_label(mod):
    return mod.upper().replace("QAM", "-QAM") if mod[:1].isdigit() else mod.upper()


def make_figure(path, schemes, meta, dpi):
    matplotlib.rcParams.update(STYLE)
    fig = Figure(figsize=(12.0, 6.5), dpi=dpi, layout="constrained")
    ax = fig.subplots()
    reached = [s for s in schemes if math.isfinite(s.at_target)]
    etas = [s.eta for s in schemes] + [1.0]
    y_max = max(2.0, math.ceil(max(etas) * 1.15 + 0.5))
    xs = [s.at_target for s in reached] + [-1.6] + \
        [s.ergodic for s in reached if math.isfinite(getattr(s, "ergodic", float("nan")))]
    x_lo = math.floor(min(xs) - 1.0)
    x_hi = math.ceil(max(xs + [shannon_ebno_db(y_max)]) + 3.0)  # room for the names

    # Shannon bound and the unreachable region left of it.
    eta = np.linspace(0.01, y_max, 400)
    bound = shannon_ebno_db(eta)
    ax.fill_betweenx(eta, x_lo, bound, color="#f2f2f2", zorder=0)
    ax.plot(bound, eta, color="#222222", linewidth=1.8, zorder=3)
    ax.axvline(10.0 * math.log10(math.log(2.0)), color="#222222", linestyle=(0, (1, 2)),
               linewidth=0.9, zorder=2)
    ax.text(-1.3, y_max * 0.93, "unreachable at any\nerror rate (Shannon)", fontsize=8.5,
            color="#666666", ha="left", va="top")
    curve_labels = []  # placed last, clear of every other text

    # Constrained-capacity curves, one per constellation in the run.
    seen = set()
    for s in schemes:
        if s.curve_rho is None or s.modulation in seen:
            continue
        seen.add(s.modulation)
        ok = np.isfinite(s.curve_ebno)
        if not np.any(ok):
            continue
        x, y = s.curve_ebno[ok], s.curve_rho[ok]
        ax.plot(x, y, color="#8c8c8c", linewidth=1.1, linestyle="-.", zorder=2)
        curve_labels.append(dict(text=_modulation_label(s.modulation), xy=(x[-1], y[-1]),
                                 fontsize=8, colour="#6f6f6f"))

    # Ergodic Gaussian-input bound of every fading channel in the run (the
    # C++ side's /<scheme>/limits/ergodic_curve_*; eta = rho, receiver knows h).
    seen_channels = set()
    for s in schemes:
        if s.ergodic_rho is None or s.channel_label() in seen_channels:
            continue
        seen_channels.add(s.channel_label())
        ok = np.isfinite(s.ergodic_ebno) & (s.ergodic_rho <= y_max)
        if not np.any(ok):
            continue
        x, y = s.ergodic_ebno[ok], s.ergodic_rho[ok]
        ax.plot(x, y, color="#444444", linewidth=1.3, linestyle=(0, (6, 2, 1, 2)), zorder=3)
        curve_labels.append(dict(text="ergodic" + s.channel_label(), xy=(x[-1], y[-1]),
                                 fontsize=8, colour="#444444"))

    # Schemes: point, and a horizontal arrow to the bound (for a fading
    # scheme: to its channel's ergodic bound at its rho). The distance is
    # written in the legend; the name is placed beside the point.
    name_labels, points, gaps = [], [], {}
    for s in schemes:
        if not math.isfinite(s.at_target):
            continue
        limit = float(shannon_ebno_db(s.eta)) if s.eta > 0 else s.shannon
        if s.fading() and math.isfinite(s.ergodic):
            limit = s.ergodic
        ax.annotate("", xy=(s.at_target, s.eta), xytext=(limit, s.eta),
                    arrowprops=dict(arrowstyle="<|-|>", color=s.colour, linewidth=1.1,
                                    shrinkA=0, shrinkB=4, mutation_scale=9), zorder=4)
        ax.plot([s.at_target], [s.eta], marker=s.marker, color=s.colour, markersize=8,
                markeredgecolor="white", markeredgewidth=0.8, linestyle="none", zorder=5)
        gaps[s.name] = s.at_target - limit
        points.append((s.at_target, s.eta))
        name_labels.append(dict(text=s.name, xy=(s.at_target, s.eta), colour=s.colour,
                                fontsize=8.5))

    ax.set_xlim(x_lo, x_hi)
    ax.set_ylim(0, y_max)
    ax.xaxis.set_major_locator(MultipleLocator(2 if x_hi - x_lo <= 30 else 5))
    ax.xaxis.set_minor_locator(MultipleLocator(1))
    ax.yaxis.set_major_locator(MultipleLocator(1))
    ax.yaxis.set_minor_locator(MultipleLocator(0.5))
    ax.grid(True, which="major", color="#d9d9d9", linewidth=0.7)
    ax.set_axisbelow(True)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    ax.set_xlabel(r"$E_b/N_0$ needed at the target BER (dB)")
    ax.set_ylabel(r"spectral efficiency $\eta$ (bit/s/Hz)")

    targets = sorted({s.target_ber for s in schemes})
    target_text = ", ".join(f"{t:.0e}".replace("e-0", "e-") for t in targets)
    handles = [Line2D([], [], color="#222222", linewidth=1.8,
                      label=r"Shannon bound $(2^\eta-1)/\eta$"),
               Line2D([], [], color="#8c8c8c", linewidth=1.1, linestyle="-.",
                      label="constellation-constrained capacity (Nyquist, \u03b7 = \u03c1)"),
               Line2D([], [], color="#222222", linestyle=(0, (1, 2)), linewidth=0.9,
                      label="\u22121.59 dB (\u03b7 \u2192 0)")]
    if seen_channels:
        handles.append(Line2D([], [], color="#444444", linewidth=1.3,
                              linestyle=(0, (6, 2, 1, 2)),
                              label="ergodic capacity, Gaussian input, receiver knows h "
                                    "(\u03b7 = \u03c1, Eb/N0 per branch)"))
    for s in schemes:
        if math.isfinite(s.at_target):
            handles.append(Line2D([], [], color=s.colour, marker=s.marker, linestyle="none",
                                  markersize=7, markeredgecolor="white",
                                  label=f"{s.label()}\n{s.at_target:.2f} dB, "
                                        f"{gaps[s.name]:.2f} dB from the bound"))
    missing = [s.name for s in schemes if not math.isfinite(s.at_target)]
    if missing:
        handles.append(Line2D([], [], linestyle="none",
                              label="not reached in the sweep: " + ", ".join(missing)))
    ax.legend(handles=handles, loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=8.5,
              borderaxespad=0.0, alignment="left",
              title="arrow: distance to the Shannon bound at the scheme's \u03b7"
                    + ("\n(fading schemes: to their ergodic bound)" if seen_channels else ""))
    fig.suptitle(f"Power\u2013bandwidth plane at target BER {target_text}", fontsize=13.5,
                 fontweight="semibold")
    # supxlabel: the constrained layout reserves room, so nothing overlaps it.
    fig.supxlabel(provenance(path, meta), x=0.01, ha="left", fontsize=7, color="#808080")
    # Names beside their points, then the curve labels, each clear of every
    # text drawn so far (this freezes the layout).
    place_labels(fig, ax, name_labels + curve_labels, obstacles=points)
    return fig
