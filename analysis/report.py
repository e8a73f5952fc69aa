#!/usr/bin/python3
"""One self-contained HTML report of a capgap run.

Role: what `capgap report FILE.h5 [-o FILE.html]` runs (sim/cli/main.cc calls
this script with Debian's python3). Reads a capgap-curves HDF5 file and writes
one HTML file a designer can mail or attach to a review:
  * provenance: program version, git revision, compiler, build type, creation
    time, command line, seed, kernel targets, threads and MPI ranks ("not
    recorded" when an older file lacks an attribute);
  * the summary tables (BER at the target; FER at the target with the
    finite-length limits; fading limits where a scheme fades);
  * every figure analysis/plot_curves.py draws for the file (the group
    figures or the single BER/FER figure, the power-bandwidth plane, the
    signal views), embedded as inline SVG;
  * per scheme: modulation and code, channel, the limits with the basis the
    file states for each, every simulated point with its counts, 95 %
    Clopper-Pearson intervals and the reason the point stopped;
  * the assumptions behind the numbers and the caution that a simulation does
    not replace measurement on hardware; the config text of the run.
The file is self-contained: styles inline, figures inline, no script, no
font, image or style sheet fetched from anywhere (the browser test
tests/python/check_report_browser.py proves it in headless chromium).
Every table cell that shows a number from the file carries
data-h5="/group/path@attribute" or data-h5="/group/dataset[i]" and
data-value (the full-precision value), so a reader or a test can trace it.

Usage: /usr/bin/python3 analysis/report.py FILE.h5 [-o FILE.html]
Exit status 1 with a message naming the file when it is not a readable
capgap-curves file, 2 for usage errors.
"""

import argparse
import html
import io
import math
import pathlib
import re
import sys

import matplotlib

matplotlib.use("Agg")

import h5py  # noqa: E402
import numpy as np  # noqa: E402

import plot_curves  # noqa: E402  (analysis/, next to this script)

PROG = "report.py"
NOT_RECORDED = "not recorded"

# Root attributes shown under "Provenance", in this order.
PROVENANCE = (("program_version", "capgap version"), ("git_revision", "git revision"),
              ("compiler", "compiler"), ("build_type", "build type"),
              ("created_utc", "written (UTC)"), ("command_line", "command line"),
              ("seed", "master seed"), ("kernel_target", "channel kernels (SIMD target)"),
              ("demap_kernel_target", "demapper kernels (SIMD target)"),
              ("threads", "worker threads"), ("ranks", "MPI ranks"))

STYLE = """
body{font-family:"DejaVu Sans",Verdana,Arial,sans-serif;margin:2em auto;max-width:1250px;
 color:#222;line-height:1.4;padding:0 1em}
h1{font-size:1.6em;margin-bottom:.2em}h2{border-bottom:1px solid #ccc;margin-top:2em}
h3{margin-top:1.6em}
table{border-collapse:collapse;margin:.6em 0;font-size:.9em}
.wide{overflow-x:auto}td:first-child{white-space:nowrap}
th,td{border:1px solid #ccc;padding:.25em .55em;text-align:left;vertical-align:top}
th{background:#f2f2f2}td.n{text-align:right;font-variant-numeric:tabular-nums}
.caution{border-left:5px solid #D55E00;background:#fff4ec;padding:.6em 1em;margin:1em 0}
.note{color:#555;font-size:.9em}
figure{margin:1.2em 0;border:1px solid #e0e0e0;padding:.5em}
figure svg{width:100%;height:auto;display:block}
figcaption{font-size:.9em;color:#444;margin-top:.3em}
pre{background:#f7f7f7;border:1px solid #e0e0e0;padding:.6em;overflow-x:auto;font-size:.85em}
.swatch{display:inline-block;width:.9em;height:.9em;border-radius:2px;margin-right:.4em;
 vertical-align:-.1em}
"""


def _str(v):
    if isinstance(v, (bytes, np.bytes_)):
        return bytes(v).decode("utf-8", errors="replace")
    return str(v)


def esc(v):
    return html.escape(_str(v), quote=True)


def fmt_number(v, digits=None):
    """Text of a number as the tables show it."""
    if isinstance(v, (int, np.integer)):
        return str(int(v))
    v = float(v)
    if math.isnan(v):
        return "\u2013"
    if math.isinf(v):
        return "\u221e" if v > 0 else "\u2212\u221e"
    if digits is not None:
        return f"{v:.{digits}f}"
    if v != 0 and (abs(v) < 1e-3 or abs(v) >= 1e6):
        return f"{v:.3e}"
    return f"{v:.4g}"


def num_cell(value, where, digits=None):
    """<td> of a number with its HDF5 source and full-precision value."""
    if isinstance(value, (int, np.integer)):
        full = str(int(value))
    else:
        full = repr(float(value))
    return (f'<td class="n" data-h5="{esc(where)}" data-value="{esc(full)}">'
            f"{esc(fmt_number(value, digits))}</td>")


def text_cell(value, where=None):
    attr = f' data-h5="{esc(where)}"' if where else ""
    return f"<td{attr}>{esc(value)}</td>"


def attr_cell(obj, name, where, digits=None):
    """A cell for attribute `name` of `obj`: number, text, or '-' if absent."""
    if name not in obj.attrs:
        return "<td>\u2013</td>"
    v = obj.attrs[name]
    path = f"{where}@{name}"
    if isinstance(v, (np.integer, int)) and not isinstance(v, bool):
        return num_cell(int(v), path)
    if isinstance(v, (np.floating, float)):
        return num_cell(float(v), path, digits)
    return text_cell(_str(v), path)


# ---------------------------------------------------------------- figures
def _unique_ids(svg, prefix):
    """Prefix every id of one SVG (and the references to it) so several
    inline SVGs in one page never share an id."""
    ids = set(re.findall(r'\sid="([^"]+)"', svg))
    if not ids:
        return svg

    def repl_id(m):
        return f' id="{prefix}{m.group(1)}"'
    svg = re.sub(r'\sid="([^"]+)"', repl_id, svg)

    def repl_ref(m):
        name = m.group(2)
        return f"{m.group(1)}#{prefix}{name}" if name in ids else m.group(0)
    return re.sub(r'(href="|url\()#([^")]+)', repl_ref, svg)


def figure_svgs(path, schemes, meta):
    """[(caption, inline svg text)] of every figure of the run."""
    out = []
    for k, (suffix, title, fig) in enumerate(plot_curves.build_figures(path, schemes, meta)):
        buf = io.StringIO()
        with matplotlib.rc_context({"svg.hashsalt": f"capgap-report-{k}"}):
            fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": "capgap report"})
        svg = buf.getvalue()
        svg = svg[svg.index("<svg"):]  # drop the XML declaration and DOCTYPE
        svg = re.sub(r"<metadata>.*?</metadata>", "", svg, flags=re.S)  # RDF block
        svg = _unique_ids(svg, f"f{k}-")
        svg = svg.replace("<svg ", f'<svg role="img" aria-label="{esc(title)}" ', 1)
        out.append((suffix, title, svg))
    return out


# ----------------------------------------------------------------- tables
def provenance_table(f):
    rows = []
    for key, label in PROVENANCE:
        if key in f.attrs:
            v = f.attrs[key]
            if isinstance(v, (np.integer, int)):
                cell = num_cell(int(v), f"/@{key}")
            else:
                cell = text_cell(_str(v), f"/@{key}")
        else:
            cell = f'<td class="note" data-h5="/@{key}" data-missing="1">{NOT_RECORDED}</td>'
        rows.append(f"<tr><th>{esc(label)}</th>{cell}</tr>")
    return "<table id=\"provenance\">" + "".join(rows) + "</table>"


def _swatch(s):
    return f'<span class="swatch" style="background:{s.colour}"></span>'


def ber_summary_table(f, schemes):
    head = ("<tr><th>scheme</th><th>modulation</th><th>code</th><th>code rate</th>"
            "<th>\u03c1 (bit/symbol)</th><th>\u03b7 (bit/s/Hz)</th><th>channel</th>"
            "<th>target BER</th><th>Eb/N0 at target (dB)</th><th>95 % low</th>"
            "<th>95 % high</th><th>Shannon limit (dB)</th><th>gap to Shannon (dB)</th>"
            "<th>constrained limit (dB)</th><th>gap to constrained (dB)</th>"
            "<th>coding gain (dB)</th></tr>")
    rows = []
    for s in schemes:
        g = f[s.name]
        w = f"/{s.name}"
        summ, lim = g["summary"], g["limits"]
        rows.append(
            "<tr>" + f"<td>{_swatch(s)}{esc(s.name)}</td>"
            + attr_cell(g, "modulation", w) + attr_cell(g, "code", w)
            + attr_cell(g, "code_rate", w) + attr_cell(g, "info_bits_per_symbol", w)
            + attr_cell(g, "spectral_efficiency", w) + text_cell(_channel_text(s))
            + attr_cell(g, "target_ber", w)
            + attr_cell(summ, "ebno_at_target_db", f"{w}/summary", 2)
            + attr_cell(summ, "ebno_at_target_low_db", f"{w}/summary", 2)
            + attr_cell(summ, "ebno_at_target_high_db", f"{w}/summary", 2)
            + attr_cell(lim, "shannon_ebno_db", f"{w}/limits", 2)
            + attr_cell(summ, "gap_to_shannon_db", f"{w}/summary", 2)
            + attr_cell(lim, "constrained_ebno_db", f"{w}/limits", 2)
            + attr_cell(summ, "gap_to_constrained_db", f"{w}/summary", 2)
            + attr_cell(summ, "coding_gain_db", f"{w}/summary", 2) + "</tr>")
    return '<div class="wide"><table id="summary-ber">' + head + "".join(rows) + "</table></div>"


def fer_summary_table(f, schemes):
    head = ("<tr><th>scheme</th><th>target FER</th><th>Eb/N0 at target FER (dB)</th>"
            "<th>95 % low</th><th>95 % high</th><th>n</th><th>k</th>"
            "<th>normal approximation (dB)</th><th>RCU achievability (dB)</th>"
            "<th>meta-converse (dB)</th><th>gap to finite-length limit (dB)</th></tr>")
    rows = []
    for s in schemes:
        g = f[s.name]
        w = f"/{s.name}"
        summ = g["summary"]
        fl = g["limits/finite_length"] if "finite_length" in g["limits"] else None
        flw = f"{w}/limits/finite_length"
        fl_cells = "".join(attr_cell(fl, n, flw, 2 if n.endswith("_db") else None)
                           for n in ("n", "k", "normal_approximation_ebno_db", "rcu_ebno_db",
                                     "converse_ebno_db")) if fl is not None \
            else '<td colspan="5" class="note">' + esc(
                _str(g["limits"].attrs.get("finite_length_absent", "no finite-length limits"))) \
            + "</td>"
        rows.append(
            "<tr>" + f"<td>{_swatch(s)}{esc(s.name)}</td>"
            + attr_cell(summ, "target_fer", f"{w}/summary")
            + attr_cell(summ, "ebno_at_target_fer_db", f"{w}/summary", 2)
            + attr_cell(summ, "ebno_at_target_fer_low_db", f"{w}/summary", 2)
            + attr_cell(summ, "ebno_at_target_fer_high_db", f"{w}/summary", 2)
            + fl_cells + attr_cell(summ, "gap_to_finite_length_db", f"{w}/summary", 2)
            + "</tr>")
    return '<div class="wide"><table id="summary-fer">' + head + "".join(rows) + "</table></div>"


def fading_table(f, schemes):
    fading = [s for s in schemes if s.fading()]
    if not fading:
        return ""
    head = ("<tr><th>scheme</th><th>channel</th><th>ergodic limit, Gaussian input (dB)</th>"
            "<th>ergodic limit, constellation (dB)</th><th>gap to ergodic (dB)</th></tr>")
    rows = []
    for s in fading:
        w = f"/{s.name}"
        lim, summ = f[s.name]["limits"], f[s.name]["summary"]
        rows.append("<tr>" + f"<td>{_swatch(s)}{esc(s.name)}</td>"
                    + text_cell(_channel_text(s))
                    + attr_cell(lim, "ergodic_shannon_ebno_db", f"{w}/limits", 2)
                    + attr_cell(lim, "ergodic_constrained_ebno_db", f"{w}/limits", 2)
                    + attr_cell(summ, "gap_to_ergodic_db", f"{w}/summary", 2) + "</tr>")
    return ("<h3>Fading channels</h3>"
            '<table id="summary-fading">' + head + "".join(rows) + "</table>")


def _channel_text(s):
    return "AWGN" if not s.fading() else s.channel_label().lstrip(", ")


def attrs_table(obj, where, table_id=None):
    """Every scalar attribute of an HDF5 object, as a two-column table."""
    rows = []
    for name in sorted(obj.attrs):
        v = obj.attrs[name]
        if isinstance(v, np.ndarray) and v.size != 1:
            cell = text_cell(", ".join(_str(x) for x in v.ravel()), f"{where}@{name}")
        else:
            cell = attr_cell(obj, name, where)
        rows.append(f"<tr><th>{esc(name)}</th>{cell}</tr>")
    if not rows:
        return ""
    tid = f' id="{esc(table_id)}"' if table_id else ""
    return f"<table{tid}>" + "".join(rows) + "</table>"


POINT_COLUMNS = (("ebno_db", "Eb/N0 (dB)", 2), ("bits", "bits", None),
                 ("bit_errors", "bit errors", None), ("ber", "BER", None),
                 ("ber_low", "BER 95 % low", None), ("ber_high", "BER 95 % high", None),
                 ("frames", "frames", None), ("frame_errors", "frame errors", None),
                 ("fer", "FER", None), ("fer_low", "FER 95 % low", None),
                 ("fer_high", "FER 95 % high", None))


def points_table(g, where):
    cols = [c for c in POINT_COLUMNS if c[0] in g]
    head = "<tr>" + "".join(f"<th>{esc(label)}</th>" for _, label, _ in cols) \
        + ("<th>stopped by</th>" if "stop_reason" in g else "") + "</tr>"
    data = {n: g[n][()] for n, _, _ in cols}
    stop = [_str(x) for x in g["stop_reason"][()]] if "stop_reason" in g else None
    rows = []
    for i in range(len(data["ebno_db"])):
        cells = []
        for n, _, digits in cols:
            v = data[n][i]
            v = int(v) if np.issubdtype(data[n].dtype, np.integer) else float(v)
            cells.append(num_cell(v, f"{where}/{n}[{i}]", digits))
        if stop is not None:
            cells.append(text_cell(stop[i], f"{where}/stop_reason[{i}]"))
        rows.append("<tr>" + "".join(cells) + "</tr>")
    return f'<div class="wide"><table class="points" id="points-{esc(g.name.lstrip("/"))}">' \
        + head + "".join(rows) + "</table></div>"


def scheme_section(f, s):
    g = f[s.name]
    w = f"/{s.name}"
    parts = [f'<h3 id="scheme-{esc(s.name)}">{_swatch(s)}{esc(s.label())}</h3>',
             "<h4>Scheme</h4>", attrs_table(g, w)]
    for sub, title in (("code", "Code"), ("channel", "Channel"), ("limits", "Limits"),
                       ("summary", "Summary at the targets")):
        if sub in g and isinstance(g[sub], h5py.Group):
            parts += [f"<h4>{title}</h4>", attrs_table(g[sub], f"{w}/{sub}")]
    if "limits" in g and "finite_length" in g["limits"]:
        parts += ["<h4>Finite-length limits at the code's (n, k)</h4>",
                  attrs_table(g["limits/finite_length"], f"{w}/limits/finite_length")]
    parts += ["<h4>Simulated points (95 % Clopper\u2013Pearson intervals)</h4>",
              points_table(g, w)]
    return "\n".join(parts)


ASSUMPTIONS = """
<ul>
<li><b>Ideal synchronisation.</b> Carrier phase and frequency, symbol timing and frame
boundaries are known to the receiver, except where a scheme sets an offset on purpose
(its <code>phase_offset_deg</code>, <code>frequency_offset</code>,
<code>timing_offset</code> attributes below). No acquisition, tracking or pilot overhead
is simulated or charged to Eb/N0.</li>
<li><b>Channel state.</b> On fading channels the receiver knows every gain h exactly
(the <code>channel_state</code> attribute of each fading scheme says "perfect"); the
demapper uses |y &minus; h x|&sup2;. No estimation loss is included. On AWGN there is no
channel state to know.</li>
<li><b>Energy bookkeeping.</b> Eb is the energy per information bit (CRC, tail and parity
bits count against the rate); constellations have unit average energy; on fading
channels Eb/N0 is the average per receive branch.</li>
<li><b>Intervals.</b> Every error rate carries a 95 % Clopper&ndash;Pearson interval of its
counts. Bit errors in one frame of a coded scheme are correlated, so the FER interval is
the honest one for coded schemes. A point stops at the first work unit after which its
counts reach the bit-error, frame-error or bit limit of the sweep ("stopped by").</li>
<li><b>What the limits mean.</b> <i>Shannon limit</i>: the least Eb/N0 at which any code with
Gaussian inputs can carry the scheme's spectral efficiency &eta; with vanishing error,
(2<sup>&eta;</sup> &minus; 1)/&eta;. <i>Constellation-constrained limit</i>: the same with the
scheme's constellation as input, equiprobable points (infinite for an uncoded scheme,
which has no redundancy). <i>BP threshold</i> (LDPC): the Eb/N0 above which belief
propagation on the code's degree distribution succeeds for unbounded length (density
evolution). <i>Finite-length limits</i> at the code's (n, k) and the target FER: normal
approximation (an estimate), RCU bound (some code of that length achieves it) and
meta-converse (no code of that length does better). <i>Ergodic limit</i>: fast fading,
receiver knows h, capacity averaged over the fades. <i>Outage</i>: block fading, one fade
per codeword. Each limit's own basis is stated in the scheme's Limits table.</li>
<li><b>Spectral efficiency.</b> Without pulse shaping &eta; = &rho; (ideal Nyquist
signalling); with shaping it is &rho; over the measured 99 % power bandwidth, as the
scheme's <code>spectral_efficiency_basis</code> says.</li>
</ul>
"""

CAUTION = ("<div class=\"caution\" id=\"caution\"><b>Caution.</b> These are results of a "
           "simulation of an idealised link. They show what a scheme can reach and how far it "
           "sits from the limits. A simulation does not replace measurement on hardware, "
           "where synchronisation, channel estimation, phase noise, quantisation, "
           "non-linear amplifiers and interference cost further dB.</div>")


def build_html(path):
    schemes, meta = plot_curves.read_file(path, None)
    order = {s.name: i for i, s in enumerate(schemes)}
    with h5py.File(path, "r") as f:
        run_order = _str(f.attrs["schemes"]).split(",") if "schemes" in f.attrs else []
        by_run = sorted(schemes, key=lambda s: (run_order.index(s.name)
                                                if s.name in run_order else len(run_order),
                                                order[s.name]))
        prov = provenance_table(f)
        tables = [ber_summary_table(f, by_run), "<h3>Frame error rate</h3>",
                  fer_summary_table(f, by_run), fading_table(f, by_run)]
        details = [scheme_section(f, s) for s in by_run]
        config = _str(f.attrs["config"]) if "config" in f.attrs else NOT_RECORDED
    figures = figure_svgs(path, schemes, meta)
    name = pathlib.Path(path).name
    figs = []
    for k, (suffix, title, svg) in enumerate(figures):
        figs.append(f'<figure id="figure-{k}" data-figure="{esc(suffix or "main")}">{svg}'
                    f"<figcaption>Figure {k + 1}: {esc(title)}.</figcaption></figure>")
    toc = "".join(f'<li><a href="#scheme-{esc(s.name)}">{esc(s.name)}</a></li>' for s in by_run)
    return f"""<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="capgap report">
<title>capgap report: {esc(name)}</title>
<style>{STYLE}</style>
</head>
<body>
<h1>capgap report: {esc(name)}</h1>
<p class="note">{len(schemes)} scheme(s). Every number below is read from the HDF5 file;
its source is in the cell's <code>data-h5</code> attribute.</p>
{CAUTION}
<h2 id="provenance-heading">Provenance</h2>
{prov}
<h2 id="summary">Summary</h2>
<h3>Bit error rate</h3>
{''.join(tables)}
<h2 id="figures">Figures</h2>
{''.join(figs)}
<h2 id="schemes">Schemes in detail</h2>
<ul>{toc}</ul>
{''.join(details)}
<h2 id="assumptions">Assumptions behind the numbers</h2>
{ASSUMPTIONS}
{CAUTION.replace('id="caution"', 'id="caution-end"')}
<h2 id="config">Configuration of the run</h2>
<pre>{esc(config)}</pre>
</body>
</html>
"""


def main(argv):
    ap = argparse.ArgumentParser(prog=PROG, description="Write the HTML report of a capgap "
                                 "curves file (self-contained: inline SVG figures and styles).")
    ap.add_argument("file", help="capgap-curves HDF5 file")
    ap.add_argument("-o", "--output", help="HTML file to write (default: FILE with .html)")
    args = ap.parse_args(argv)
    out = pathlib.Path(args.output) if args.output else pathlib.Path(args.file).with_suffix(".html")
    if out.suffix.lower() not in (".html", ".htm"):
        print(f"{PROG}: error: -o {out}: the report must end in .html", file=sys.stderr)
        return 2
    try:
        text = build_html(args.file)
    except plot_curves.FileFormatError as e:
        print(f"{PROG}: error: {args.file}: {e}", file=sys.stderr)
        return 1
    tmp = out.with_name(out.name + ".tmp")
    try:
        tmp.write_text(text, encoding="utf-8")
        tmp.replace(out)
    except OSError as e:
        print(f"{PROG}: error: -o {out}: cannot write ({e.strerror})", file=sys.stderr)
        tmp.unlink(missing_ok=True)
        return 1
    print(f"wrote {out} ({len(text.encode('utf-8')) // 1024} KiB, {text.count('<figure ')} figures)")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
