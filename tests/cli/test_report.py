#!/usr/bin/python3
"""Checks of postprocess/hawser_report.py on synthetic result files (no hawser run needed).

Usage: /usr/bin/python3 test_report.py [--hawser PATH] [--source DIR]
--hawser is accepted for the common test interface and not used: the result files are built
here with h5py, following config/result_layout.yaml (names, units, format version).

The synthetic tether: NODES nodes on a straight radial line from the anchor (R, 0, 0) to
TOP_M above it, moving with a known motion about that equilibrium,
    east  = A_EW sin(pi s / L) sin(2 pi t / P_EW)
    north = A_NS sin(2 pi s / L) sin(2 pi t / P_NS)
    up    = A_UP sin(pi s / L) cos(2 pi t / P_EW)      (stretching, must not leak into the others)
(the "known synthetic motion" each deflection check compares against).
"""

import argparse
import base64
import os
import re
import struct
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import h5py
import numpy as np

ap = argparse.ArgumentParser()
ap.add_argument("--hawser", default=None, help="path of the hawser program (not used here)")
ap.add_argument("--source", default=str(Path(__file__).resolve().parents[2]))
ARGS = ap.parse_args()
POST = Path(ARGS.source) / "postprocess"
REPORT = POST / "hawser_report.py"
sys.dont_write_bytecode = True  # no __pycache__ in the source tree
sys.path.insert(0, str(POST))
import hawser_plots  # noqa: E402
import hawser_result  # noqa: E402

PYTHON = "/usr/bin/python3"

# --- the synthetic case (all values invented for this test) -----------------------------------
R_M = 5.0e6  # planet equatorial radius of the invented planet, m (given in the scenario as km)
NODES = 20
TOP_M = 1.0e8  # 100,000 km above the anchor
L_M = TOP_M
A_EW, P_EW = 2000.0, 3600.0  # m, s
A_NS, P_NS = 700.0, 5400.0  # m, s
A_UP = 50.0  # m
NT = 61
T_END = 7200.0  # s
SUMMARY = {"peak_tension_n": 123456.0, "peak_tension_element": 7, "peak_tension_time_s": 1234.5,
           "min_safety_factor": 2.375, "peak_east_west_m": 1993.18, "peak_north_south_m": 698.5,
           "steps": 4321, "rhs_evals": 9876, "jac_evals": 55, "error_test_failures": 3,
           "nonlinear_failures": 1}
SCENARIO = """# Synthetic scenario for the report test; loads < 1 kN & "quotes" must be escaped
name: synthetic ribbon
planet:
  name: Testworld
  equatorial_radius: 5000 km
  gm: 3.986004418e14
  spin_rate: 7.292115e-5
tether:
  nodes: 20
"""
FIGURES = ["safety_margins", "tension", "deflection_profiles", "deflection_history",
           "deflection_map", "energy", "anchor_force", "climbers"]
CAUTION_PHRASES = ["not a certification method", "real structure is safe",
                   "licensed engineering practice", "applicable standards"]

RESULTS = []


def check(name, ok, detail=""):
    RESULTS.append(bool(ok))
    print(("PASS " if ok else "FAIL ") + name + ("" if ok else f": {detail}"))


def s_nodes():
    return np.linspace(0.0, L_M, NODES)


def equilibrium():
    eq = np.zeros((NODES, 3))
    eq[:, 0] = R_M + s_nodes()
    return eq


def times():
    return np.linspace(0.0, T_END, NT)


def known_motion():
    """(east, north, up) deflections (NT, NODES) of the synthetic motion, m."""
    s, t = s_nodes()[None, :], times()[:, None]
    east = A_EW * np.sin(np.pi * s / L_M) * np.sin(2 * np.pi * t / P_EW)
    north = A_NS * np.sin(2 * np.pi * s / L_M) * np.sin(2 * np.pi * t / P_NS)
    up = A_UP * np.sin(np.pi * s / L_M) * np.cos(2 * np.pi * t / P_EW)
    return east, north, up


def positions():
    east, north, up = known_motion()
    pos = np.repeat(equilibrium()[None], NT, axis=0)
    pos[..., 0] += up  # at (r, 0, 0): up = +x, east = +y, north = +z (physics.md section 1)
    pos[..., 1] += east
    pos[..., 2] += north
    return pos


def ds(f, path, data, units):
    d = f.create_dataset(path, data=np.asarray(data, dtype=float))
    d.attrs["units"] = units


def write_result(path, status="complete", parts=("all",), keep=None, extra_rows=0,
                 failure=None):
    """A synthetic result file. parts: "all" or a subset of names below; keep: node indices
    recorded (thinned output); extra_rows: zero rows appended to every time-axis dataset, as a
    writer that extended them before filling them would leave."""
    want = (lambda p: "all" in parts or p in parts)
    pos = positions()
    vel = np.gradient(pos, times(), axis=0)
    t = times()
    pad = lambda a: np.concatenate([a, np.zeros((extra_rows,) + a.shape[1:])])  # noqa: E731
    with h5py.File(path, "w") as f:
        f.attrs["format"] = "hawser-timehistory"
        f.attrs["format_version"] = hawser_result.FORMAT_VERSION
        f.attrs["program_version"] = "0.1.0-test"
        f.attrs["status"] = status
        f.attrs["scenario_name"] = "synthetic ribbon"
        f.create_dataset("/input/scenario", data=SCENARIO)
        if want("summary"):
            g = f.create_group("summary")
            u = g.create_group("units")
            for k, v in SUMMARY.items():
                g.attrs[k] = v
                u.attrs[k] = hawser_result.layout_value("/summary", k)["units"]
            if failure:
                g.attrs["failure_message"] = failure
                u.attrs["failure_message"] = "text"
        # The planet and material as the program writes them resolved (SI): R_M as given, and
        # GM, Omega of WGS 84 (recalled from memory) giving the synchronous radius.
        gm, om = 3.986004418e14, 7.292115e-5
        planet = {"equatorial_radius_m": (R_M, "m"), "gm_m3_per_s2": (gm, "m^3/s^2"),
                  "spin_rate_rad_per_s": (om, "rad/s"),
                  "synchronous_altitude_m": ((gm / om ** 2) ** (1 / 3) - R_M, "m")}
        material = {"ultimate_strength_pa": (50.0e9, "Pa"), "design_safety_factor": (2.0, "1")}
        if want("planet"):
            for group, values in (("planet", planet), ("material", material)):
                g = f.create_group(group)
                u = g.create_group("units")
                for k, (v, unit) in values.items():
                    g.attrs[k] = v
                    u.attrs[k] = unit
        h = equilibrium()[:, 0] - R_M
        hm = 0.5 * (h[:-1] + h[1:])
        eq_tension = 1.0e5 * np.exp(-((hm - 3.6e7) / 3.0e7) ** 2)
        if want("mesh"):
            ds(f, "/mesh/s0", s_nodes(), "m")
            ds(f, "/mesh/node_mass", np.full(NODES, 1.0e4), "kg")
            ds(f, "/mesh/element_area", np.full(NODES - 1, 1.0e-6), "m^2")
            ds(f, "/mesh/element_L0", np.diff(s_nodes()), "m")
        if want("equilibrium"):
            ds(f, "/equilibrium/position", equilibrium(), "m")
            ds(f, "/equilibrium/tension", eq_tension, "N")
        ds(f, "/time", pad(t), "s")
        idx = np.arange(NODES) if keep is None else np.asarray(keep)
        if keep is not None:
            f.create_dataset("/nodes/index", data=idx.astype(np.int64))
        ds(f, "/nodes/position", pad(pos[:, idx]), "m")
        if want("velocity"):
            ds(f, "/nodes/velocity", pad(vel[:, idx]), "m/s")
        if want("tension"):
            wobble = 1.0 + 0.05 * np.sin(2 * np.pi * t / P_EW)[:, None]
            ds(f, "/elements/tension", pad(eq_tension[None, :] * wobble), "N")
        if want("energy"):
            ke = 1.0e9 * np.sin(2 * np.pi * t / P_EW) ** 2
            ds(f, "/energy/kinetic", pad(ke), "J")
            ds(f, "/energy/potential", pad(-5.0e12 - 0.5 * ke), "J")
            ds(f, "/energy/strain", pad(2.0e10 - 0.5 * ke), "J")
            ds(f, "/energy/dissipated", pad(np.zeros(NT)), "J")
        if want("anchor"):
            fa = np.zeros((NT, 3))
            fa[:, 0] = 9.0e4
            fa[:, 1] = 300.0 * np.sin(2 * np.pi * t / P_EW)
            fa[:, 2] = 100.0 * np.sin(2 * np.pi * t / P_NS)
            ds(f, "/anchor/force", pad(fa), "N")
        if want("climbers"):
            s_c = 50.0 * t  # 50 m/s climb
            cpos = np.zeros((NT, 3))
            cpos[:, 0] = R_M + s_c
            ds(f, "/climbers/lift1/s", pad(s_c), "m")
            ds(f, "/climbers/lift1/position", pad(cpos), "m")
            ds(f, "/climbers/lift1/velocity", pad(np.tile([50.0, 0, 0], (NT, 1))), "m/s")
            ds(f, "/climbers/lift1/drive_force", pad(np.full(NT, 2.0e4)), "N")
            cor = np.zeros((NT, 3))
            cor[:, 1] = -2 * 2000.0 * 7.292115e-5 * 50.0  # -2 m Omega v, westward going up
            ds(f, "/climbers/lift1/coriolis_force", pad(cor), "N")


def run_report(h5, outdir):
    p = subprocess.run([PYTHON, str(REPORT), str(h5), "-o", str(outdir)], capture_output=True,
                       text=True, timeout=60)
    return p.returncode, p.stdout + p.stderr


def png_ok(path):
    """PNG signature and a nonzero IHDR size (PNG specification, ISO/IEC 15948, 5.2 and 11.2.2)."""
    if not path.is_file() or path.stat().st_size == 0:
        return False, "missing or empty"
    data = path.read_bytes()
    if data[:8] != b"\x89PNG\r\n\x1a\n" or data[12:16] != b"IHDR":
        return False, "no PNG signature/IHDR"
    w, h = struct.unpack(">II", data[16:24])
    if w == 0 or h == 0 or not data.rstrip(b"\x00").endswith(b"IEND\xaeB`\x82"):
        return False, f"size {w}x{h} or no IEND"
    return True, f"{w}x{h}"


# --- the checks -------------------------------------------------------------------------------


def test_deflection_function():
    east, north, up = known_motion()
    d = hawser_plots.deflection_from_equilibrium(positions(), equilibrium())
    for name, got, want in (("east", d.east_m, east), ("north", d.north_m, north),
                            ("up", d.up_m, up)):
        err = float(np.max(np.abs(got - want)))
        # tolerance: round-off of positions ~1e8 m in double precision (1e8 * 2.2e-16 ~ 2e-8 m)
        check(f"deflection {name} equals the known synthetic motion", err < 1e-6,
              f"max error {err} m")
    # The same tether turned 30 degrees about the spin axis has the same local deflections:
    # east/north/up follow each node's own radius (rotation invariance, common practice).
    c, s = np.cos(np.radians(30)), np.sin(np.radians(30))
    rot = np.array([[c, -s, 0], [s, c, 0], [0, 0, 1]])
    d2 = hawser_plots.deflection_from_equilibrium(positions() @ rot.T, equilibrium() @ rot.T)
    err = max(float(np.max(np.abs(d2.east_m - east))), float(np.max(np.abs(d2.north_m - north))))
    check("deflection unchanged by a rotation about the spin axis", err < 1e-6, f"{err} m")


def test_planar_panels():
    """A planar run (north-south exactly zero) gets no north-south panels; a 3-D run gets them."""
    east, north, up = known_motion()
    d3 = hawser_plots.Deflection(east, north, up)
    d2 = hawser_plots.Deflection(east, np.zeros_like(north), up)
    check("3-D motion: east-west and north-south panels",
          len(hawser_plots.moving_components(d3)) == 2)
    check("planar motion: the east-west panel only", len(hawser_plots.moving_components(d2)) == 1)
    alt = (equilibrium()[:, 0] - R_M) / 1e3
    fig = hawser_plots.deflection_history_figure(times(), d2, alt, [("top", NODES - 1)])
    check("planar motion: the history figure has one axis", len(fig.axes) == 1, len(fig.axes))


def test_full_report(tmp):
    h5 = tmp / "full.h5"
    write_result(h5)
    out = tmp / "full_out"
    t0 = time.time()
    rc, log = run_report(h5, out)
    check("full file: exit code 0", rc == 0, log)
    html_path = out / "report.html"
    check("full file: report.html written", html_path.is_file(), log)
    if not html_path.is_file():
        return
    text = html_path.read_text(encoding="utf-8")
    print(f"     (report in {time.time() - t0:.1f} s, {len(text) / 1e3:.0f} kB)")
    for phrase in CAUTION_PHRASES:
        check(f"caution contains '{phrase}'", phrase in text)
    check("caution comes before the figures", 0 <= text.find("certification") < text.find("<img"))
    for k, v in SUMMARY.items():
        # the table of every value as stored: reals with 6 significant digits, integers as
        # they are (fmt()), the unit the file gives ("1" shown as nothing)
        shown = str(v) if isinstance(v, int) else f"{v:.6g}"
        unit = hawser_result.layout_value("/summary", k)["units"]
        unit = "" if unit == "1" else unit
        check(f"summary value {k} = {shown} {unit} shown as stored",
              f'<td>{k}</td><td class="num">{shown}</td><td class="unit">{unit}</td>' in text)
    # the curated table: 123456 N shown as 123.456 kN (1 kN = 1000 N)
    check("peak tension in kN at the top", 'data-key="peak_tension_n" data-file-units="N" '
          'data-file-value="123456.0"><td>Peak tension</td><td class="num">123.456</td>'
          '<td class="unit">kN</td>' in text)
    check("its time, under an hour, in s", 'data-key="peak_tension_time_s" data-file-units="s" '
          'data-file-value="1234.5"><td class="sub">when</td><td class="num">1234.5</td>'
          '<td class="unit">s</td>' in text)
    check("status 'complete' shown", "Run status: complete" in text)
    check("scenario name in the title", "<h1>hawser report: synthetic ribbon</h1>" in text)
    check("planet radius read from /planet", "5e+06 m, from /planet in the result file" in text)
    # peaks recomputed from the recorded histories equal the synthetic motion's
    east, north, _ = known_motion()
    for name, values in (("east-west", east), ("north-south", north)):
        want = f"{float(np.max(np.abs(values))):.6g}"
        check(f"recorded peak {name} deflection {want} m shown", f">{want}<" in text)
    for stem in FIGURES:
        ok, why = png_ok(out / f"{stem}.png")
        check(f"{stem}.png is a valid PNG ({why})", ok, why)
    imgs = re.findall(r'src="data:image/png;base64,([A-Za-z0-9+/=]+)"', text)
    check("every figure embedded in the HTML", len(imgs) == len(FIGURES), len(imgs))
    if imgs:
        check("embedded image equals the PNG file",
              base64.b64decode(imgs[0]) == (out / "safety_margins.png").read_bytes())
    check("self-contained (no external src/href)", not re.search(r'(src|href)="(?!data:)', text))
    check("scenario text present and escaped",
          "loads &lt; 1 kN &amp; &quot;quotes&quot;" in text and "loads < 1 kN" not in text)


def test_thinned_output(tmp):
    keep = [0, 3, 6, 8, 11, 14, 17, 19]  # skips the mid nodes 9, 10 where the east peak is
    h5 = tmp / "thin.h5"
    write_result(h5, keep=keep)
    out = tmp / "thin_out"
    rc, log = run_report(h5, out)
    check("thinned output: exit code 0", rc == 0, log)
    text = (out / "report.html").read_text(encoding="utf-8") if rc == 0 else ""
    east, _, _ = known_motion()
    want = f"{float(np.max(np.abs(east[:, keep]))):.6g}"
    check(f"thinned output: peak east-west over the kept nodes {want} m", f">{want}<" in text)
    check("thinned output: says the output was thinned", "output thinned" in text)
    ok, why = png_ok(out / "deflection_map.png")
    check("thinned output: deflection_map.png valid", ok, why)


def test_missing_groups(tmp):
    h5 = tmp / "partial.h5"
    write_result(h5, status="running", parts=("velocity",), extra_rows=4)
    out = tmp / "partial_out"
    rc, log = run_report(h5, out)
    check("partial file: exit code 0", rc == 0, log)
    text = (out / "report.html").read_text(encoding="utf-8") if rc == 0 else ""
    for path in ("/summary", "/equilibrium/position", "/energy/kinetic", "/anchor/force",
                 "/elements/tension", "/mesh/s0"):
        check(f"partial file: names missing {path}", f"<code>{path}</code>" in text)
    check("partial file: says the run is still running", "still in progress" in text)
    check("partial file: trailing unwritten rows dropped",
          f"first {NT} of {NT + 4} output rows" in text)
    check("partial file: caution still present", CAUTION_PHRASES[0] in text)
    check("partial file: no energy figure", not (out / "energy.png").exists())
    ok, why = png_ok(out / "deflection_history.png")
    check("partial file: deflection figures still drawn", ok, why)


def test_failed_run(tmp):
    h5 = tmp / "failed.h5"
    write_result(h5, status="failed", failure="CVode returned CV_CONV_FAILURE at t = 812 s")
    out = tmp / "failed_out"
    rc, log = run_report(h5, out)
    check("failed run: exit code 0", rc == 0, log)
    text = (out / "report.html").read_text(encoding="utf-8") if rc == 0 else ""
    check("failed run: status and message shown",
          "Run status: failed" in text and "CV_CONV_FAILURE at t = 812 s" in text)


def test_refused_files(tmp):
    other = tmp / "other.h5"
    with h5py.File(other, "w") as f:
        f.attrs["format"] = "some-other-format"
        f.create_dataset("x", data=[1.0, 2.0])
    rc, log = run_report(other, tmp / "o1")
    check("non-hawser HDF5: exit code 2", rc == 2, f"rc {rc}: {log}")
    check("non-hawser HDF5: clear message", "not a hawser result" in log, log)
    text_file = tmp / "notes.h5"
    text_file.write_text("not HDF5 at all\n")
    rc, log = run_report(text_file, tmp / "o2")
    check("non-HDF5 file: exit code 2", rc == 2, f"rc {rc}: {log}")
    rc, log = run_report(tmp / "does_not_exist.h5", tmp / "o3")
    check("missing file: exit code 2", rc == 2, f"rc {rc}: {log}")
    check("missing file: clear message", "no such file" in log, log)
    check("refused files: nothing written", not (tmp / "o1").exists() and not (tmp / "o3").exists())


def main():
    t0 = time.time()
    test_deflection_function()
    test_planar_panels()
    with tempfile.TemporaryDirectory(prefix="hawser_report_test_") as d:
        tmp = Path(d)
        test_full_report(tmp)
        test_thinned_output(tmp)
        test_missing_groups(tmp)
        test_failed_run(tmp)
        test_refused_files(tmp)
        if os.environ.get("HAWSER_KEEP_REPORT"):  # for looking at the figures by eye
            import shutil
            shutil.copytree(tmp / "full_out", os.environ["HAWSER_KEEP_REPORT"], dirs_exist_ok=True)
    passed, failed = sum(RESULTS), len(RESULTS) - sum(RESULTS)
    print(f"(took {time.time() - t0:.1f} s)")
    print(f"{passed} passed, {failed} failed")
    return 0 if failed == 0 and passed > 0 else 1


if __name__ == "__main__":
    sys.exit(main())
