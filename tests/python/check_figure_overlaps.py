#!/usr/bin/python3
"""No two texts of a run's figures overlap.

Role: the layout test of analysis/plot_curves.py, plot_plane.py and
plot_signal.py. It renders every figure of a curves file exactly as
plot_curves.py builds them (build_figures: the group figures or the single
BER/FER figure, the power-bandwidth plane, the signal views), draws each with
matplotlib's Agg renderer, takes the window extent of every text the renderer
draws (titles, axis and tick labels, legend entries, annotations, the
provenance line) and fails when two of them share an area larger than
0.5 x 0.5 pixel. It also checks that a run of many schemes is split into
group figures and that each scheme has one colour in every figure.

The checker is itself checked first (so the test can fail): a figure with two
texts drawn on top of each other must be reported, and the same texts apart
must not.

The file is made by --capgap from --config (the demo config with short
--set limits, see tests/python.cmake) unless --h5 names an existing one.

Usage: check_figure_overlaps.py --analysis DIR (--h5 FILE |
       --capgap BIN --config INI --out FILE [--set K=V]...)
       [--fake-maker make_fake_h5.py --workdir DIR]
"""

import argparse
import pathlib
import subprocess
import sys

import matplotlib

matplotlib.use("Agg")

from matplotlib.figure import Figure  # noqa: E402

FAILURES = []


def check(ok, what):
    print(("ok: " if ok else "FAILED: ") + what)
    if not ok:
        FAILURES.append(what)
    return ok


def overlaps(fig, style):
    """[(text a, text b)] of drawn texts whose boxes overlap."""
    renderer = style.freeze_layout(fig)
    texts = style.drawn_texts(fig, renderer)
    bad = []
    for i in range(len(texts)):
        for j in range(i + 1, len(texts)):
            (ta, ba), (tb, bb) = texts[i], texts[j]
            if style.boxes_overlap(ba, bb, tolerance=0.5):
                bad.append((ta.get_text(), tb.get_text()))
    return bad, len(texts)


def self_check(style):
    """The checker must see a deliberate overlap and pass a clean figure."""
    fig = Figure(figsize=(4, 3))
    ax = fig.subplots()
    ax.text(0.3, 0.5, "first label", fontsize=10)
    ax.text(0.32, 0.51, "second label", fontsize=10)
    bad, _ = overlaps(fig, style)
    check(len(bad) == 1 and set(bad[0]) == {"first label", "second label"},
          f"checker reports two texts drawn on top of each other (found {bad})")
    fig = Figure(figsize=(4, 3))
    ax = fig.subplots()
    ax.text(0.1, 0.2, "first label", fontsize=10)
    ax.text(0.1, 0.7, "second label", fontsize=10)
    bad, n = overlaps(fig, style)
    check(not bad and n > 2, f"checker passes the same texts apart ({n} texts, found {bad})")
    # Tick labels the axis does not draw (outside the view) must not count.
    fig = Figure(figsize=(4, 3))
    ax = fig.subplots()
    ax.set_xticks([-100, 0.5, 100])
    ax.set_xlim(0, 1)
    bad, n = overlaps(fig, style)
    drawn = [t.get_text() for t, _ in style.drawn_texts(fig, fig.canvas.get_renderer())]
    check("\u2212100" not in drawn and "100" not in drawn,
          f"ticks outside the view are not counted as drawn texts ({drawn})")


def main(argv):
    ap = argparse.ArgumentParser()
    ap.add_argument("--analysis", required=True, help="the analysis/ directory")
    ap.add_argument("--h5")
    ap.add_argument("--capgap")
    ap.add_argument("--config")
    ap.add_argument("--out")
    ap.add_argument("--set", action="append", default=[])
    ap.add_argument("--fake-maker", help="make_fake_h5.py: also check its four-scheme file")
    ap.add_argument("--workdir", default=".")
    args = ap.parse_args(argv)
    sys.path.insert(0, str(pathlib.Path(args.analysis).resolve()))
    import plot_curves
    import plot_style as style

    self_check(style)

    h5 = args.h5
    if h5 is None:
        h5 = args.out
        pathlib.Path(h5).parent.mkdir(parents=True, exist_ok=True)
        cmd = [args.capgap, "run", args.config, "-o", h5, "-q"]
        for kv in args.set:
            cmd += ["--set", kv]
        print("running:", " ".join(cmd), flush=True)
        r = subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
        if not check(r.returncode == 0, f"capgap run exits 0 (status {r.returncode})"):
            print(r.stderr[-3000:])
            return 1

    files = [h5]
    if args.fake_maker:
        fake = pathlib.Path(args.workdir) / "fake.h5"
        fake.parent.mkdir(parents=True, exist_ok=True)
        r = subprocess.run([sys.executable, "-B", args.fake_maker, str(fake)],
                           stdout=subprocess.DEVNULL)
        if check(r.returncode == 0, "make_fake_h5.py writes the synthetic file"):
            files.append(str(fake))
    for path in files:
        print(f"--- {path}")
        check_file(path, plot_curves, style)
    print("PASSED" if not FAILURES else f"FAILED ({len(FAILURES)} checks)")
    return 0 if not FAILURES else 1


def check_file(h5, plot_curves, style):
    schemes, meta = plot_curves.read_file(h5, None)
    figures = plot_curves.build_figures(h5, schemes, meta)
    groups = [sfx for sfx, _, _ in figures if sfx not in ("-plane", "-signal")]
    if len(schemes) > style.GROUP_THRESHOLD:
        expected = {f"-{style.scheme_group(s)}" for s in schemes}
        check(set(groups) == expected,
              f"{len(schemes)} schemes: one figure per group {sorted(expected)} (got {groups})")
    total = 0
    for suffix, title, fig in figures:
        bad, n = overlaps(fig, style)
        total += n
        check(not bad, f"figure '{suffix or 'main'}' ({title}): {n} texts, none overlapping"
              + (f"; overlapping: {bad[:6]}" if bad else ""))
    check(total > 50, f"{total} texts checked in {len(figures)} figures")

    # One colour per scheme across every figure: the colour a scheme's
    # legend entry shows is the same in each figure that names it.
    seen = {}
    clash = []
    for suffix, _, fig in figures:
        for ax in fig.axes:
            leg = ax.get_legend()
            if leg is None:
                continue
            for handle, text in zip(leg.legend_handles if hasattr(leg, "legend_handles")
                                    else leg.legendHandles, leg.get_texts()):
                words = text.get_text().split()
                name = words[0].rstrip(":") if words else ""
                if name not in {s.name for s in schemes}:
                    continue
                colour = matplotlib.colors.to_hex(handle.get_color())
                if seen.setdefault(name, colour) != colour:
                    clash.append((name, suffix, seen[name], colour))
    check(len(seen) == len([s for s in schemes]) and not clash,
          f"each of {len(seen)}/{len(schemes)} schemes has one colour in every legend"
          + (f"; differing: {clash}" if clash else ""))
    colours = {s.colour for s in schemes}
    check(len(colours) == min(len(schemes), len(style.PALETTE)),
          f"{len(schemes)} schemes get {len(colours)} distinct colours")


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
