#!/usr/bin/python3
"""ctest wrapper: plot a synthetic capgap-curves file and check the outputs.

Role: end-to-end test of analysis/plot_curves.py that needs no simulator.
Steps, each reported as PASS/FAIL:
  1. write a synthetic file with tests/python/make_fake_h5.py;
  2. plot it (BER) to WORKDIR/fake_curves.png; the PNG must exist, carry
     the PNG signature and be 12 x 6 in at 150 dpi (1800 x 900 pixels, read
     from the IHDR chunk), and fake_curves.svg must exist, be non-empty and
     parse as XML with an <svg> root;
  3. plot it again with --fer --schemes --title --no-svg: PNG written,
     12 x 10.5 in (1800 x 1575), and no SVG;
  4. the plot script must refuse a non-HDF5 file and an HDF5 file without
     the capgap-curves "format" attribute: exit status 1, a message naming
     the file and the reason, and no PNG left behind.
Prints "N passed, M failed"; exits non-zero if anything failed.

Usage: plot_fake_and_check.py --workdir DIR [--plotter PATH] [--maker PATH]
"""

import argparse
import pathlib
import struct
import subprocess
import sys
import xml.etree.ElementTree as ET

HERE = pathlib.Path(__file__).resolve().parent
REPO = HERE.parent.parent


def png_size(path):
    data = path.read_bytes()[:33]
    if len(data) < 24 or data[:8] != b"\x89PNG\r\n\x1a\n" or data[12:16] != b"IHDR":
        return None
    return struct.unpack(">II", data[16:24])


def main(argv):
    ap = argparse.ArgumentParser()
    ap.add_argument("--workdir", required=True)
    ap.add_argument("--plotter", default=str(REPO / "analysis" / "plot_curves.py"))
    ap.add_argument("--maker", default=str(HERE / "make_fake_h5.py"))
    args = ap.parse_args(argv)
    work = pathlib.Path(args.workdir)
    work.mkdir(parents=True, exist_ok=True)
    py = [sys.executable, "-B"]
    passed = failed = 0

    def report(ok, what, detail=""):
        nonlocal passed, failed
        passed, failed = passed + bool(ok), failed + (not ok)
        print(f"{'PASS' if ok else 'FAIL'}  {what}" + (f"\n      {detail}" if detail and not ok else ""))
        return ok

    def run(cmd):
        r = subprocess.run(cmd, capture_output=True, text=True)
        return r, f"exit {r.returncode}; stdout: {r.stdout.strip()[-500:]}; stderr: {r.stderr.strip()[-800:]}"

    fake = work / "fake_curves.h5"
    png, svg = work / "fake_curves.png", work / "fake_curves.svg"
    for p in (fake, png, svg):
        p.unlink(missing_ok=True)
    r, log = run(py + [args.maker, str(fake)])
    if not report(r.returncode == 0 and fake.exists() and fake.stat().st_size > 0,
                  "make_fake_h5.py writes the synthetic file", log):
        print(f"{passed} passed, {failed} failed")
        return 1

    r, log = run(py + [args.plotter, str(fake), "-o", str(png)])
    report(r.returncode == 0, "plot_curves.py FILE -o PNG exits 0", log)
    size = png_size(png) if png.exists() else None
    report(png.exists() and png.stat().st_size > 0, f"{png.name} exists and is non-empty")
    report(size == (1800, 900), f"{png.name} is a PNG of 1800 x 900 pixels (12 x 6 in at 150 dpi)",
           f"IHDR says {size}")
    svg_ok, detail = False, "missing"
    if svg.exists() and svg.stat().st_size > 0:
        try:
            root = ET.parse(svg).getroot()
            svg_ok, detail = root.tag.endswith("svg"), f"root tag {root.tag}"
        except ET.ParseError as e:
            detail = f"not XML: {e}"
    report(svg_ok, f"{svg.name} exists, is non-empty and parses as SVG", detail)

    png2, svg2 = work / "fake_fer.png", work / "fake_fer.svg"
    for p in (png2, svg2):
        p.unlink(missing_ok=True)
    r, log = run(py + [args.plotter, str(fake), "-o", str(png2), "--fer", "--no-svg",
                       "--schemes", "qpsk_uncoded,qpsk_synthetic_r1-2",
                       "--title", "Synthetic test data"])
    report(r.returncode == 0 and png2.exists() and png2.stat().st_size > 0,
           "--fer --schemes --title --no-svg writes the PNG", log)
    report(png2.exists() and png_size(png2) == (1800, 1575),
           "two-panel PNG is 1800 x 1575 pixels (12 x 10.5 in)",
           f"IHDR says {png_size(png2) if png2.exists() else None}")
    report(not svg2.exists(), "--no-svg writes no SVG")
    png3 = work / "fake_fer_only.png"
    png3.unlink(missing_ok=True)
    r, log = run(py + [args.plotter, str(fake), "-o", str(png3), "--fer-only", "--no-svg"])
    report(r.returncode == 0 and png3.exists() and png_size(png3) == (1800, 900),
           "--fer-only writes a one-panel 1800 x 900 PNG", log)

    r, log = run(py + [args.plotter, str(fake), "-o", str(work / "x.png"), "--schemes", "nosuch"])
    report(r.returncode == 1 and "nosuch" in r.stderr and "qpsk_uncoded" in r.stderr,
           "an unknown --schemes name is refused, listing the file's schemes", log)

    not_h5 = work / "not_hdf5.h5"
    not_h5.write_text("this is not HDF5\n")
    import h5py  # only here: the steps above must not depend on it in this process
    other = work / "other_format.h5"
    with h5py.File(other, "w") as f:
        f.attrs["title"] = "some other HDF5 file"
    for bad, reason in ((not_h5, "cannot open as HDF5"),
                        (other, "not a capgap-curves file")):
        out = work / f"{bad.stem}.png"
        out.unlink(missing_ok=True)
        r, log = run(py + [args.plotter, str(bad), "-o", str(out)])
        ok = (r.returncode == 1 and str(bad) in r.stderr and reason in r.stderr
              and "Traceback" not in r.stderr and not out.exists())
        report(ok, f"refuses {bad.name}: exit 1, message names the file and says '{reason}'", log)

    print(f"{passed} passed, {failed} failed")
    return 0 if failed == 0 else 1


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
