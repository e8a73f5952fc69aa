#!/usr/bin/python3
"""`capgap report` end to end: the HTML holds the HDF5 values, and a real
browser (Debian's chromium, headless) loads it cleanly.

Role: the test of sim/run/report_command.cc and analysis/report.py.
  1. capgap report FILE.h5 -o OUT.html must exit 0 and write OUT.html.
  2. Static checks (python's html.parser): no <script>, no <link>, no src or
     href that points outside the file (only "#..." and data: allowed); one
     <figure> per figure plot_curves.build_figures makes, each with an inline
     <svg>; every cell that names an HDF5 source (data-h5) holds that value:
     data-value equals the h5py read exactly, and the shown text rounds to it;
     every provenance attribute the file lacks says "not recorded"; each
     scheme appears in the summary tables and has a points table with one
     row per simulated point.
  3. Browser (--browser): chromium --headless --remote-debugging-pipe, driven
     over the DevTools protocol with the standard library only. Loading the
     page must log no console error, no exception and no log entry of level
     error, and request nothing but the file itself; every figure's SVG has
     a non-zero size and its screenshot is not blank (pixel standard
     deviation and share of non-white pixels, read with matplotlib.image);
     the table cells the browser shows (its DOM) equal the HDF5 values.
     The browser check is first run on a spoiled copy of the page (an image
     from the network and a console error) and must report both, so the
     test can fail.
Without chromium the browser part exits 77 (ctest: skipped) with a message,
unless CAPGAP_REQUIRE_BROWSER=1 (CI), where a missing chromium fails.

Usage: check_report_browser.py --capgap BIN --h5 FILE --analysis DIR
       --workdir DIR [--browser]
"""

import argparse
import base64
import html.parser
import io
import json
import math
import os
import pathlib
import shutil
import subprocess
import sys
import tempfile
import time

FAILURES = []
SKIP = 77


def check(ok, what):
    print(("ok: " if ok else "FAILED: ") + what, flush=True)
    if not ok:
        FAILURES.append(what)
    return ok


# ------------------------------------------------------------------ HDF5
def h5_value(f, ref):
    """The value a data-h5 reference names: '/@attr', '/a/b@attr' or
    '/a/dataset[i]'."""
    import numpy as np
    if "@" in ref:
        path, attr = ref.rsplit("@", 1)
        obj = f[path or "/"]
        v = obj.attrs[attr]
    else:
        path, idx = ref[:-1].rsplit("[", 1)
        v = f[path][int(idx)]
    if isinstance(v, (bytes, np.bytes_)):
        return bytes(v).decode("utf-8")
    if isinstance(v, np.integer):
        return int(v)
    if isinstance(v, np.floating):
        return float(v)
    if isinstance(v, np.ndarray) and v.size > 1:
        return ", ".join(x.decode() if isinstance(x, bytes) else str(x) for x in v.ravel())
    if isinstance(v, np.ndarray):
        return h5_value_scalar(v.item())
    return v


def h5_value_scalar(v):
    return v.decode() if isinstance(v, bytes) else v


def shown_number(text):
    t = text.strip().replace("\u2212", "-")
    if t == "\u2013":
        return float("nan")
    if t in ("\u221e", "-\u221e"):
        return float("inf") if t[0] != "-" else float("-inf")
    return float(t)


def cell_agrees(ref, value_attr, text, truth):
    """'' when the cell agrees with the HDF5 value, else the reason."""
    if isinstance(truth, str):
        return "" if text.strip() == truth.strip() else f"text {text!r} != {truth!r}"
    if value_attr is None:
        return "no data-value"
    if isinstance(truth, int):
        if value_attr != str(truth) or shown_number(text) != truth:
            return f"value {value_attr} / text {text!r} != {truth}"
        return ""
    full = float(value_attr)
    if not (full == truth or (math.isnan(full) and math.isnan(truth))):
        return f"data-value {value_attr} != {truth!r}"
    shown = shown_number(text)
    if math.isnan(truth) or math.isinf(truth):
        return "" if (math.isnan(shown) and math.isnan(truth)) or shown == truth \
            else f"text {text!r} for {truth}"
    # Shown with 2 decimals (dB) or 4 significant digits: half a unit of
    # the last shown digit.
    t = text.strip()
    if "e" in t:
        tol = 0.5e-3 * abs(truth) * 1.01
    elif "." in t:
        decimals = len(t.split(".")[1])
        tol = max(0.5 * 10 ** -decimals * 1.01, 0.5e-3 * abs(truth))
    else:
        tol = max(0.5 * 1.01, 0.5e-3 * abs(truth))
    return "" if abs(shown - truth) <= tol else f"text {text!r} differs from {truth!r} by > {tol}"


# ---------------------------------------------------------------- static
class Page(html.parser.HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags = {}
        self.urls = []
        self.cells = []  # [ref, value, text, missing]
        self.figures = 0
        self.svgs_in_figures = 0
        self._in_figure = 0
        self._cell = None
        self.tables = set()
        self.table_rows = {}
        self._table = None

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        self.tags[tag] = self.tags.get(tag, 0) + 1
        for k in ("src", "href", "xlink:href", "data", "action", "poster"):
            if k in a and a[k] is not None:
                self.urls.append((tag, k, a[k]))
        if tag == "figure":
            self.figures += 1
            self._in_figure += 1
        if tag == "svg" and self._in_figure:
            self.svgs_in_figures += 1
        if tag == "table":
            self._table = a.get("id")
            if self._table:
                self.tables.add(self._table)
                self.table_rows[self._table] = 0
        if tag == "tr" and self._table:
            self.table_rows[self._table] += 1
        if tag == "td" and "data-h5" in a:
            self._cell = [a["data-h5"], a.get("data-value"), "", "data-missing" in a]

    def handle_endtag(self, tag):
        if tag == "figure":
            self._in_figure -= 1
        if tag == "td" and self._cell is not None:
            self.cells.append(self._cell)
            self._cell = None
        if tag == "table":
            self._table = None

    def handle_data(self, data):
        if self._cell is not None:
            self._cell[2] += data


def check_cells(f, cells, where):
    bad = []
    for ref, value, text, missing in cells:
        if missing:
            path, attr = ref.rsplit("@", 1)
            if attr in f[path or "/"].attrs or text.strip() != "not recorded":
                bad.append((ref, "marked not recorded but present, or wrong text"))
            continue
        try:
            truth = h5_value(f, ref)
        except (KeyError, ValueError, IndexError) as e:
            bad.append((ref, f"no such HDF5 object ({e})"))
            continue
        why = cell_agrees(ref, value, text, truth)
        if why:
            bad.append((ref, why))
    check(not bad and len(cells) > 100,
          f"{where}: {len(cells)} cells with an HDF5 source all hold the file's values"
          + (f"; differing: {bad[:5]}" if bad else ""))


def static_checks(html_text, h5, analysis):
    import h5py
    sys.path.insert(0, str(pathlib.Path(analysis).resolve()))
    import plot_curves
    p = Page()
    p.feed(html_text)
    check(p.tags.get("script", 0) == 0, f"no <script> ({p.tags.get('script', 0)} found)")
    check(p.tags.get("link", 0) == 0 and p.tags.get("iframe", 0) == 0
          and p.tags.get("img", 0) == 0, "no <link>, <iframe> or <img> (styles and figures inline)")
    outside = [u for u in p.urls if not (u[2].startswith("#") or u[2].startswith("data:"))]
    check(not outside, f"no src/href leaving the file ({len(p.urls)} references; outside: "
          f"{outside[:5]})")
    check("@import" not in html_text and "url(http" not in html_text,
          "no @import or url(http...) in the styles")
    schemes, meta = plot_curves.read_file(h5, None)
    n_fig = len(plot_curves.build_figures(h5, schemes, meta))
    check(p.figures == n_fig and p.svgs_in_figures >= n_fig,
          f"{p.figures} <figure> with {p.svgs_in_figures} inline <svg> for the {n_fig} figures "
          "plot_curves.py draws")
    with h5py.File(h5, "r") as f:
        check_cells(f, p.cells, "static HTML")
        refs = {c[0] for c in p.cells}
        for key in ("program_version", "git_revision", "command_line", "seed", "kernel_target",
                    "threads", "ranks"):
            check(f"/@{key}" in refs, f"provenance shows {key}"
                  + ("" if key in f.attrs else " (as 'not recorded': absent from the file)"))
        for s in schemes:
            n = len(f[s.name]["ebno_db"])
            rows = p.table_rows.get(f"points-{s.name}", 0)
            ok = (f"/{s.name}/summary@ebno_at_target_db" in refs
                  and f"/{s.name}/summary@target_fer" in refs and rows == n + 1
                  and all(f"/{s.name}/stop_reason[{i}]" in refs for i in range(n)))
            check(ok, f"{s.name}: in both summary tables; points table of {n} rows "
                  f"(+ header: {rows}) with stop reasons")
    for phrase in ("does not replace measurement on hardware", "Ideal synchronisation",
                   "Channel state", "What the limits mean"):
        check(phrase in html_text, f"report states '{phrase}'")


# ---------------------------------------------------------------- browser
class DevTools:
    """The DevTools protocol over --remote-debugging-pipe (fd 3: commands to
    the browser, fd 4: replies and events; NUL-terminated JSON)."""

    def __init__(self, chromium, profile):
        to_child_r, self.to_child = os.pipe()
        self.from_child, from_child_w = os.pipe()
        # Keep the child's ends away from 3 and 4 before dup2.
        a = os.dup(to_child_r) if to_child_r < 5 else to_child_r
        b = os.dup(from_child_w) if from_child_w < 5 else from_child_w
        while a < 5:
            a = os.dup(a)
        while b < 5 or b == a:
            b = os.dup(b)

        def fds():
            os.dup2(a, 3)
            os.dup2(b, 4)
        args = [chromium, "--headless", "--remote-debugging-pipe", "--disable-gpu",
                "--no-first-run", "--no-default-browser-check", "--hide-scrollbars",
                f"--user-data-dir={profile}", "--window-size=1300,1000",
                "--disable-background-networking", "--disable-component-update",
                "--disable-sync", "--disable-extensions", "about:blank"]
        if os.geteuid() == 0:
            args.insert(1, "--no-sandbox")
        self.proc = subprocess.Popen(args, preexec_fn=fds, close_fds=False,
                                     stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        for fd in {to_child_r, from_child_w, a, b}:
            os.close(fd)
        self.buf = b""
        self.next_id = 0
        self.events = []

    def _read_message(self, deadline):
        while b"\0" not in self.buf:
            if time.time() > deadline:
                raise TimeoutError("no reply from chromium")
            chunk = os.read(self.from_child, 1 << 20)
            if not chunk:
                raise EOFError("chromium closed the pipe")
            self.buf += chunk
        msg, self.buf = self.buf.split(b"\0", 1)
        return json.loads(msg)

    def send(self, method, params=None, session=None, timeout=60):
        self.next_id += 1
        msg = {"id": self.next_id, "method": method, "params": params or {}}
        if session:
            msg["sessionId"] = session
        os.write(self.to_child, json.dumps(msg).encode() + b"\0")
        deadline = time.time() + timeout
        while True:
            m = self._read_message(deadline)
            if m.get("id") == self.next_id:
                if "error" in m:
                    raise RuntimeError(f"{method}: {m['error']}")
                return m.get("result", {})
            self.events.append(m)

    def wait_event(self, method, timeout=60):
        deadline = time.time() + timeout
        for m in self.events:
            if m.get("method") == method:
                return m
        while True:
            m = self._read_message(deadline)
            self.events.append(m)
            if m.get("method") == method:
                return m

    def close(self):
        try:
            self.send("Browser.close", timeout=10)
        except Exception:
            pass
        try:
            self.proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            self.proc.kill()
            self.proc.wait()
        os.close(self.to_child)
        os.close(self.from_child)


def load_in_browser(chromium, page, shots=True):
    """Load `page`; return (problems, requests outside, figure results, DOM cells)."""
    profile = tempfile.mkdtemp(prefix="capgap-chromium-")
    dt = DevTools(chromium, profile)
    try:
        target = dt.send("Target.createTarget", {"url": "about:blank"})["targetId"]
        session = dt.send("Target.attachToTarget", {"targetId": target, "flatten": True})[
            "sessionId"]
        for domain in ("Page", "Runtime", "Log", "Network"):
            dt.send(f"{domain}.enable", session=session)
        url = pathlib.Path(page).resolve().as_uri()
        dt.events.clear()
        dt.send("Page.navigate", {"url": url}, session=session)
        dt.wait_event("Page.loadEventFired", timeout=120)
        time.sleep(0.5)  # late console messages or requests
        dt.send("Runtime.evaluate", {"expression": "1"}, session=session)  # drain events
        problems, requests = [], []
        for m in dt.events:
            meth, p = m.get("method"), m.get("params", {})
            if meth == "Runtime.consoleAPICalled" and p.get("type") in ("error", "assert"):
                problems.append(("console." + p["type"], str(p.get("args"))[:200]))
            elif meth == "Runtime.exceptionThrown":
                problems.append(("exception", str(p.get("exceptionDetails"))[:200]))
            elif meth == "Log.entryAdded" and p.get("entry", {}).get("level") == "error":
                problems.append(("log", p["entry"].get("text", "")[:200]))
            elif meth == "Network.requestWillBeSent":
                u = p.get("request", {}).get("url", "")
                if u != url and not u.startswith("data:"):
                    requests.append(u)
            elif meth == "Network.loadingFailed":
                problems.append(("loading failed", str(p.get("errorText"))))
        # The test's own expression (the page itself has no script).
        boxes = dt.send("Runtime.evaluate", {"returnByValue": True, "expression": """
            JSON.stringify(Array.from(document.querySelectorAll('figure svg')).map(e => {
              const r = e.getBoundingClientRect();
              return [r.left + window.scrollX, r.top + window.scrollY, r.width, r.height]; }))"""},
            session=session)
        boxes = json.loads(boxes["result"]["value"])
        cells = dt.send("Runtime.evaluate", {"returnByValue": True, "expression": """
            JSON.stringify(Array.from(document.querySelectorAll('td[data-h5]')).map(e =>
              [e.dataset.h5, e.dataset.value === undefined ? null : e.dataset.value,
               e.textContent, e.hasAttribute('data-missing')]))"""}, session=session)
        cells = json.loads(cells["result"]["value"])
        figures = []
        if shots:
            import matplotlib.image
            import numpy as np
            for (x, y, w, h) in boxes:
                if w < 1 or h < 1:
                    figures.append((w, h, 0.0, 0.0))
                    continue
                shot = dt.send("Page.captureScreenshot", {
                    "format": "png", "captureBeyondViewport": True,
                    "clip": {"x": x, "y": y, "width": w, "height": h, "scale": 1}},
                    session=session, timeout=120)
                img = matplotlib.image.imread(io.BytesIO(base64.b64decode(shot["data"])),
                                              format="png")
                rgb = np.asarray(img[..., :3], dtype=np.float64)
                nonwhite = float(np.mean(np.any(rgb < 0.9, axis=-1)))
                figures.append((w, h, float(rgb.std()), nonwhite))
        return problems, requests, figures, cells
    finally:
        dt.close()
        shutil.rmtree(profile, ignore_errors=True)


def browser_checks(chromium, page, h5, workdir):
    import h5py
    # The checker must catch a spoiled page: a network image, a console error
    # and a blank figure.
    text = pathlib.Path(page).read_text(encoding="utf-8")
    spoiled = pathlib.Path(workdir) / "spoiled.html"
    spoiled.write_text(text.replace(
        "</body>", '<img src="http://192.0.2.1/x.png" alt="">'
        '<figure><svg width="600" height="300"></svg></figure>'
        '<script>console.error("deliberate error")</script></body>'), encoding="utf-8")
    problems, requests, figures, _ = load_in_browser(chromium, spoiled)
    w, h, std, nonwhite = figures[-1]
    check(any("192.0.2.1" in r for r in requests)
          and any(k == "console.error" for k, _ in problems)
          and w > 200 and h > 100 and std < 0.05 and nonwhite < 0.01,
          f"browser check catches a spoiled page (requests {requests}, problems "
          f"{[k for k, _ in problems]}, blank figure std {std:.3f})")

    problems, requests, figures, cells = load_in_browser(chromium, page)
    check(not problems, f"chromium loads the report with no console error, exception or error "
          f"log entry (found {problems[:5]})")
    check(not requests, f"no request leaves the file (found {requests[:5]})")
    check(len(figures) > 0, f"{len(figures)} figures in the browser's DOM")
    for k, (w, h, std, nonwhite) in enumerate(figures):
        check(w > 200 and h > 100 and std > 0.05 and nonwhite > 0.01,
              f"figure {k + 1} renders: {w:.0f} x {h:.0f} px, pixel std {std:.3f} (> 0.05), "
              f"{100 * nonwhite:.1f} % non-white (> 1 %)")
    with h5py.File(h5, "r") as f:
        check_cells(f, cells, "browser DOM")


def main(argv):
    ap = argparse.ArgumentParser()
    ap.add_argument("--capgap", required=True)
    ap.add_argument("--h5", required=True)
    ap.add_argument("--analysis", required=True)
    ap.add_argument("--workdir", required=True)
    ap.add_argument("--browser", action="store_true")
    args = ap.parse_args(argv)
    work = pathlib.Path(args.workdir)
    work.mkdir(parents=True, exist_ok=True)

    chromium = None
    if args.browser:
        chromium = shutil.which("chromium") or shutil.which("chromium-browser")
        if chromium is None:
            if os.environ.get("CAPGAP_REQUIRE_BROWSER") == "1":
                check(False, "chromium is installed (CAPGAP_REQUIRE_BROWSER=1; Debian package "
                      "chromium, installed by sim/scripts/setup_debian.sh --browser)")
                return 1
            print("SKIPPED: chromium not found; install Debian's chromium "
                  "(bash sim/scripts/setup_debian.sh --browser) to run the browser test")
            return SKIP

    page = work / "report.html"
    page.unlink(missing_ok=True)
    r = subprocess.run([args.capgap, "report", args.h5, "-o", str(page)],
                       capture_output=True, text=True)
    if not check(r.returncode == 0 and page.exists(),
                 f"capgap report exits 0 and writes {page.name} (status {r.returncode}; "
                 f"{r.stderr.strip()[-300:]})"):
        return 1
    if chromium is None:
        static_checks(page.read_text(encoding="utf-8"), args.h5, args.analysis)
    else:
        browser_checks(chromium, page, args.h5, work)
    print("PASSED" if not FAILURES else f"FAILED ({len(FAILURES)} checks)")
    return 0 if not FAILURES else 1


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
