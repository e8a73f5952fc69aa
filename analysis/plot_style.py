"""Shared look of capgap's figures: palette, markers, rcParams, provenance line.

Role: imported by analysis/plot_curves.py, plot_plane.py and plot_signal.py so
every figure of a run uses one colour per scheme in the same order.
"""

import pathlib

# Colour-blind-safe qualitative palette (Okabe & Ito, "Color Universal
# Design", 2008; hex values common practice), yellow dropped for contrast on
# white; one marker shape per colour so the plot also survives greyscale.
# Past eight schemes: two of P. Tol's muted scheme (from memory), then repeat.
PALETTE = ("#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9",
           "#000000", "#882255", "#117733", "#999933")
MARKERS = ("o", "s", "D", "^", "P", "X", "h", "*", "v", "<")
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
