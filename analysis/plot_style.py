"""Shared look of capgap's figures: palette, markers, rcParams, provenance
line, scheme colours and groups, and the label placer.

Role: imported by analysis/plot_curves.py, plot_plane.py, plot_signal.py and
report.py so every figure of a run gives a scheme the same colour and marker
(assigned once, in the run's scheme order, by assign_styles), and so labels
placed inside a plot never cover one another (place_labels).
"""

import pathlib

from matplotlib.text import Text
from matplotlib.transforms import Bbox

# Colour-blind-safe qualitative palette (Okabe & Ito, "Color Universal
# Design", 2008; hex values common practice), yellow dropped for contrast on
# white; one marker shape per colour so the plot also survives greyscale.
# Past seven schemes: colours of P. Tol's muted scheme (from memory), then
# repeat (twelve distinct colours, so the demo's eleven schemes all differ).
PALETTE = ("#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9",
           "#000000", "#882255", "#117733", "#999933", "#44AA99", "#AA4499")
MARKERS = ("o", "s", "D", "^", "P", "X", "h", "*", "v", "<", ">", "p")
GREY = "#4d4d4d"

STYLE = {
    "font.family": "DejaVu Sans",
    "font.size": 10.5,
    "axes.titlesize": 13,
    "axes.titleweight": "semibold",
    "axes.labelsize": 11.5,
    "axes.edgecolor": "#333333",
    "axes.linewidth": 0.8,
    "xtick.labelsize": 10,
    "ytick.labelsize": 10,
    "xtick.direction": "out",
    "ytick.direction": "out",
    "legend.fontsize": 9,
    "legend.title_fontsize": 9.5,
    "legend.framealpha": 0.92,
    "legend.edgecolor": "#bbbbbb",
    "svg.hashsalt": "capgap",  # reproducible SVG ids
    "svg.fonttype": "path",    # SVG renders the same without DejaVu installed
}


def provenance(path, meta):
    parts = [pathlib.Path(path).name]
    if "program_version" in meta:
        rev = f" ({meta['git_revision']})" if "git_revision" in meta else ""
        parts.append(f"capgap {meta['program_version']}{rev}")
    if "kernel_target" in meta:
        parts.append(f"kernels {meta['kernel_target']}")
    if "threads" in meta:
        parts.append(f"{meta['threads']} thread(s)")
    if "seed" in meta:
        parts.append(f"seed {meta['seed']}")
    if "created_utc" in meta:
        parts.append(meta["created_utc"])
    return "  \u00b7  ".join(parts)


def assign_styles(schemes, run_order=None):
    """Give every scheme its colour and marker once for the whole run.

    The index is the scheme's position in the run (root attribute `schemes`
    of the file when given, else the order of `schemes`), so a scheme keeps
    its colour in every figure and every group figure, whatever subset or
    order a figure draws. Sets s.colour and s.marker.
    """
    order = [n for n in (run_order or []) if n]
    for s in schemes:
        if s.name not in order:
            order.append(s.name)
    for s in schemes:
        i = order.index(s.name)
        s.colour, s.marker = PALETTE[i % len(PALETTE)], MARKERS[i % len(MARKERS)]


# Figure groups, in the order their figures are written. A run with more
# than GROUP_THRESHOLD schemes gets one BER/FER figure per non-empty group.
GROUPS = ("uncoded", "coded", "shaped", "fading")
GROUP_THRESHOLD = 6


def scheme_group(s):
    """fading (any fading channel or diversity) > shaped (pulse shaping) >
    coded (a channel code) > uncoded."""
    if s.fading():
        return "fading"
    if getattr(s, "shaping", "none") not in ("none", ""):
        return "shaped"
    return "coded" if s.coded else "uncoded"


def split_groups(schemes, threshold=GROUP_THRESHOLD):
    """[(group name or None, schemes)]: one entry with every scheme when the
    run has at most `threshold` schemes or only one group, else one entry per
    non-empty group in GROUPS order (schemes keep their order)."""
    by_group = {g: [s for s in schemes if scheme_group(s) == g] for g in GROUPS}
    used = [g for g in GROUPS if by_group[g]]
    if len(schemes) <= threshold or len(used) <= 1:
        return [(None, list(schemes))]
    return [(g, by_group[g]) for g in used]


def drawn_texts(fig, renderer):
    """Every text the renderer draws in `fig`, with its window extent:
    visible, non-empty, and for tick labels only those of ticks inside the
    view (matplotlib keeps Text objects for ticks it does not draw)."""
    tick_texts = set()
    out = []
    for ax in fig.axes:
        for axis in (ax.xaxis, ax.yaxis):
            for t in axis.get_ticklabels(which="both"):
                tick_texts.add(id(t))
            for tick in axis.get_major_ticks() + axis.get_minor_ticks():
                tick_texts.add(id(tick.label1))
                tick_texts.add(id(tick.label2))
            # Only the ticks the axis draws (inside the view interval).
            for tick in axis._update_ticks():
                for t in (tick.label1, tick.label2):
                    if t.get_visible() and t.get_text().strip():
                        out.append(t)
    for t in fig.findobj(Text):
        if id(t) in tick_texts or not t.get_visible() or not t.get_text().strip():
            continue
        if t.axes is not None and not t.axes.get_visible():
            continue
        out.append(t)
    result = []
    for t in out:
        bb = t.get_window_extent(renderer)
        if bb.width > 0 and bb.height > 0:
            result.append((t, bb))
    return result


def boxes_overlap(a, b, tolerance=0.5):
    """True when the two display-space boxes share an area wider and taller
    than `tolerance` pixels."""
    return (min(a.x1, b.x1) - max(a.x0, b.x0) > tolerance
            and min(a.y1, b.y1) - max(a.y0, b.y0) > tolerance)


def freeze_layout(fig):
    """Draw once with the layout engine, then fix the layout so positions
    measured afterwards stay true when the figure is saved. Returns the
    renderer."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    if not isinstance(fig.canvas, FigureCanvasAgg):
        FigureCanvasAgg(fig)
    fig.canvas.draw()
    fig.set_layout_engine("none")
    return fig.canvas.get_renderer()


# Candidate offsets (points) around an anchor: right, left, above, below,
# then the diagonals, then the same farther out.
_CANDIDATES = []
for _r in (1.0, 2.2, 3.6):
    for _dx, _dy, _ha, _va in ((7, 0, "left", "center"), (-7, 0, "right", "center"),
                               (0, 7, "center", "bottom"), (0, -7, "center", "top"),
                               (7, 7, "left", "bottom"), (7, -7, "left", "top"),
                               (-7, 7, "right", "bottom"), (-7, -7, "right", "top")):
        _CANDIDATES.append((_dx * _r, _dy * _r, _ha, _va))


def place_labels(fig, ax, labels, obstacles=()):
    """Place text labels next to data anchors without covering each other,
    any text already drawn, or the obstacle points.

    labels: dicts with text, xy (data coordinates) and optional colour,
    fontsize, fontweight. Each label takes the first candidate offset
    (_CANDIDATES) whose box stays inside the axes and clear of every box
    taken so far; a label with no free place is left out and returned, so the
    caller can say it elsewhere (the legend names every scheme anyway).
    obstacles: data points (x, y) to keep clear (markers), 12 px square.
    The figure's layout is frozen first (freeze_layout).
    """
    renderer = freeze_layout(fig)
    taken = [bb for _, bb in drawn_texts(fig, renderer)]
    for leg in [a.get_legend() for a in fig.axes] + list(fig.legends):
        if leg is not None:
            taken.append(leg.get_window_extent(renderer))
    for x, y in obstacles:
        px, py = ax.transData.transform((x, y))
        taken.append(Bbox.from_extents(px - 6, py - 6, px + 6, py + 6))
    frame = ax.get_window_extent(renderer)
    left_out = []
    for lab in labels:
        placed = False
        for dx, dy, ha, va in _CANDIDATES:
            ann = ax.annotate(lab["text"], xy=lab["xy"], xytext=(dx, dy),
                              textcoords="offset points", ha=ha, va=va,
                              fontsize=lab.get("fontsize", 8.5),
                              color=lab.get("colour", "#222222"),
                              fontweight=lab.get("fontweight", "normal"), zorder=6)
            bb = ann.get_window_extent(renderer)
            inside = (bb.x0 >= frame.x0 and bb.x1 <= frame.x1 and bb.y0 >= frame.y0
                      and bb.y1 <= frame.y1)
            if inside and not any(boxes_overlap(bb, t, tolerance=-1.0) for t in taken):
                taken.append(bb)
                placed = True
                break
            ann.remove()
        if not placed:
            left_out.append(lab)
    return left_out
