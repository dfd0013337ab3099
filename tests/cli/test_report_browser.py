#!/usr/bin/python3
"""The HTML report of the demo, storm and cut runs, opened as a reader would: in a browser.

Each scenario is run short (--set), postprocess/hawser_report.py makes its report, and headless
Chromium (Debian's package `chromium`; installed here with apt-get when missing and we are
root, as scripts/install-deps does) opens it:
  - every image loads (a copy of the report with one script added reports, after the page's
    load event, each <img> that is not complete or has no natural width: HTML Living Standard,
    "img.complete" and "naturalWidth");
  - a screenshot is not blank (enough pixels differ from the page's white background);
  - every /summary value is shown, and the unit shown for it matches the file: the unit of the
    table of values as stored is the file's /summary/units attribute; the unit of the summary
    at the top is that unit or its engineering multiple (kN, km, h, GPa, MPa), with the value
    shown equal to the file's value times the factor (1 kN = 1e3 N, 1 km = 1e3 m, 1 h = 3600 s,
    SI prefixes: BIPM, The International System of Units, 9th ed., 2019).
"""
import os
import shutil
import subprocess
import sys
import tempfile
from html.parser import HTMLParser
from pathlib import Path

import h5py
import numpy as np

from cli_checks import Checks, command_line

sys.dont_write_bytecode = True
ARGS = command_line()
SRC = Path(ARGS.source)
PYTHON = "/usr/bin/python3"
REPORT = SRC / "postprocess" / "hawser_report.py"
RUNS = {
    "demo": ["--set", "mesh.elements=40", "--set", "simulation.duration=30 min"],
    "storm": ["--set", "mesh.elements=40", "--set", "simulation.duration=20 min"],
    "cut": ["--set", "mesh.elements=40", "--set", "simulation.duration=6 min"],
}
# The shown unit for a file unit, and the factor from the file's unit (BIPM SI brochure).
CONVERSIONS = {("N", "kN"): 1e-3, ("m", "km"): 1e-3, ("s", "h"): 1 / 3600.0,
               ("Pa", "GPa"): 1e-9, ("Pa", "MPa"): 1e-6}
PROBE = """<script>
window.addEventListener("load", function () {
  var imgs = Array.prototype.slice.call(document.images);
  var broken = imgs.filter(function (i) { return !(i.complete && i.naturalWidth > 0); });
  var p = document.createElement("pre");
  p.id = "probe";
  p.textContent = "images=" + imgs.length + " broken=" + broken.length;
  document.body.appendChild(p);
});
</script>
"""


def chromium():
    """The Chromium program; installs Debian's package when missing and we are root."""
    found = shutil.which("chromium")
    if found or os.geteuid() != 0:
        return found
    env = dict(os.environ, DEBIAN_FRONTEND="noninteractive")
    subprocess.run(["apt-get", "update", "-qq"], env=env, capture_output=True, timeout=600)
    subprocess.run(["apt-get", "install", "-y", "-qq", "--no-install-recommends", "chromium"],
                   env=env, capture_output=True, timeout=1200)
    return shutil.which("chromium")


def browser(exe, profile, *args):
    cmd = [exe, "--headless", "--no-sandbox", "--disable-gpu", "--hide-scrollbars",
           f"--user-data-dir={profile}", "--virtual-time-budget=10000", *args]
    return subprocess.run(cmd, capture_output=True, text=True, timeout=180)


class Rows(HTMLParser):
    """The summary rows of a rendered page: (data-key, data-file-units, data-file-value,
    [cell texts])."""

    def __init__(self):
        super().__init__()
        self.rows, self.cur, self.cell, self.probe, self.in_probe = [], None, None, "", False

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "tr" and "data-key" in a:
            self.cur = (a["data-key"], a.get("data-file-units"), a.get("data-file-value"), [])
        elif tag == "td" and self.cur is not None:
            self.cell = ""
        elif tag == "pre" and a.get("id") == "probe":
            self.in_probe = True

    def handle_endtag(self, tag):
        if tag == "td" and self.cur is not None and self.cell is not None:
            self.cur[3].append(self.cell.strip())
            self.cell = None
        elif tag == "tr" and self.cur is not None:
            self.rows.append(self.cur)
            self.cur = None
        elif tag == "pre":
            self.in_probe = False

    def handle_data(self, data):
        if self.cell is not None:
            self.cell += data
        if self.in_probe:
            self.probe += data


def file_summary(path):
    with h5py.File(path, "r") as f:
        values = {k: (v.decode() if isinstance(v, bytes) else v.item() if hasattr(v, "item")
                      else v) for k, v in f["/summary"].attrs.items()}
        units = {k: v.decode() for k, v in f["/summary/units"].attrs.items()}
    return values, units


def check_units(c, tag, rows, values, units):
    shown_keys = {r[0] for r in rows}
    for k in values:
        c.check(k in shown_keys, f"{tag}: /summary {k} is shown")
    for key, funits, fvalue, cells in rows:
        if len(cells) != 3:
            c.check(False, f"{tag}: row {key} has three cells", cells)
            continue
        c.check(funits == units.get(key), f"{tag}: {key} row states the file's unit",
                (funits, units.get(key)))
        label, shown, unit = cells
        want = units.get(key)
        plain = "" if want in ("1", "text") else want
        if shown == "never":
            c.check(values[key] == -1, f"{tag}: {key} shown as 'never' only for its sentinel")
            continue
        if unit == plain:
            ok = True
            if isinstance(values[key], float):
                ok = abs(float(shown) - values[key]) <= 1e-5 * abs(values[key]) + 1e-300
            c.check(ok, f"{tag}: {key} shown as {shown} {unit} (file {values[key]} {want})")
        else:
            factor = CONVERSIONS.get((want, unit))
            if not c.check(factor is not None,
                           f"{tag}: {key} unit '{unit}' is a multiple of the file's '{want}'"):
                continue
            expect = values[key] * factor
            c.check(abs(float(shown) - expect) <= 1e-5 * abs(expect),
                    f"{tag}: {key} shown {shown} {unit} = {values[key]} {want} x {factor:g}")


def blank(png):
    """True when fewer than 2 % of the pixels differ from the page's white background."""
    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.image as mpimg
    img = mpimg.imread(png)[..., :3]
    differ = np.any(np.abs(img - 1.0) > 0.05, axis=-1)
    return float(np.mean(differ)) < 0.02, float(np.mean(differ))


def main():
    c = Checks()
    exe = chromium()
    if not c.check(exe is not None, "Chromium is installed (Debian package chromium)"):
        return c.summary()
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        for tag, extra in RUNS.items():
            h5 = tmp / f"{tag}.h5"
            p = subprocess.run([ARGS.hawser, "run", str(SRC / "scenarios" / f"{tag}.yaml"),
                                "-o", str(h5), *extra], capture_output=True, text=True,
                               timeout=300)
            if not c.check(p.returncode == 0, f"{tag}: run exit 0", p.stderr[-1000:]):
                continue
            out = tmp / f"{tag}_report"
            p = subprocess.run([PYTHON, str(REPORT), str(h5), "-o", str(out)],
                               capture_output=True, text=True, timeout=300)
            if not c.check(p.returncode == 0, f"{tag}: report exit 0", p.stderr[-1000:]):
                continue
            page = (out / "report.html").read_text(encoding="utf-8")
            probe = out / "probe.html"
            probe.write_text(page.replace("</body>", PROBE + "</body>"), encoding="utf-8")
            d = browser(exe, tmp / "profile", "--dump-dom", probe.as_uri())
            parsed = Rows()
            parsed.feed(d.stdout)
            n_img = page.count("<img ")
            c.check(parsed.probe == f"images={n_img} broken=0",
                    f"{tag}: all {n_img} images load in Chromium", parsed.probe or d.stderr[-500:])
            shot = tmp / f"{tag}.png"
            browser(exe, tmp / "profile", f"--screenshot={shot}", "--window-size=1000,1600",
                    (out / "report.html").as_uri())
            if c.check(shot.is_file(), f"{tag}: screenshot taken"):
                is_blank, frac = blank(shot)
                c.check(not is_blank, f"{tag}: screenshot not blank ({frac:.1%} drawn)")
            values, units = file_summary(h5)
            check_units(c, tag, parsed.rows, values, units)
            if tag == "demo":
                c.check("north-south (+ north)" not in page,
                        "demo (planar): no north-south panels")
                c.check("was told to go to 600 km" in page,
                        "demo: the climber's requested end (600 km) is in the caption")
            if tag == "storm":
                c.check('id="weather"' in page, "storm: the weather figure is drawn")
            if tag == "cut":
                c.check('id="weather"' not in page, "cut (no air): no weather figure")
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
