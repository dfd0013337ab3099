"""The environment through the command line: the storm and cut scenarios
run shortened and leave their environment datasets in the result file; bad environment and
event keys are refused with exit code 2, the file:line: of the fault and the key's path.

Checks against outside values: sea-level air density 1.2250 kg/m^3 (U.S. Standard Atmosphere
1976, recalled from memory); the tidal acceleration at the anchor is of the order of
GM_moon R / D^3 ~ 1.1e-6 m/s^2 (GM_moon 4.9028e12 m^3/s^2, D 384,400 km, R 6378 km; recalled
from memory): between 0.2 and 3 times it (the Moon's place sets the factor, 2 straight
overhead, -1 at right angles).

Run by ctest as: python3 test_environment_cli.py --hawser BIN --source DIR
"""
import os
import subprocess
import sys
import tempfile

import h5py
import numpy as np

from cli_checks import Checks, command_line



def run(hawser, *args):
    return subprocess.run([hawser, *args], capture_output=True, text=True, timeout=300)


def line_of(text, needle):
    for i, line in enumerate(text.splitlines(), 1):
        if needle in line:
            return i
    raise AssertionError(f"{needle!r} not in scenario")


BENCH = """\
name: environment keys on the bench
material: {density: 1000, youngs_modulus: 1e9, ultimate_strength: 1e12, kind: invented}
field: {kind: uniform, gravity: 9.81, cable_length: 10 m, cable_area: 1 mm^2, far_end: free}
mesh: {elements: 10}
"""

BAD = [
    # (name, text appended to BENCH, line needle, key, words)
    ("wind without air", "environment:\n  winds:\n    - kind: table\n      table: [{altitude: 0, speed: 3, from_direction: 0}]\n",
     "winds:", "environment.winds", ["needs air"]),
    ("standard atmosphere on the bench", "environment:\n  atmosphere: us1976\n", "atmosphere:", "environment.atmosphere",
     ["needs a planet"]),
    ("unknown environment key", "environment:\n  atmosphere: uniform\n  air_density: 1.2\n  humidity: 3\n", "humidity",
     "environment.humidity", ["unknown key"]),
    ("bad atmosphere choice", "environment:\n  atmosphere: mars1976\n", "atmosphere:", "environment.atmosphere",
     ["not one of"]),
    ("cut beyond the mesh", "events:\n  cuts:\n    - element: 12\n      time: 1\n", "element: 12", "events.cuts[0].element",
     ["does not exist"]),
    ("strike node and altitude", "events:\n  strikes:\n    - node: 3\n      altitude: 2 m\n      time: 1\n"
     "      delta_v: [1, 0, 0]\n", "altitude: 2 m", "events.strikes[0].altitude", ["not both"]),
    ("negative cut time", "events:\n  cuts:\n    - element: 2\n      time: -1\n", "time: -1", "events.cuts[0].time",
     ["at least 0"]),
    ("gust band upside down", "environment:\n  atmosphere: uniform\n  air_density: 1.2\n  gusts:\n    - amplitude: 3\n"
     "      gradient_time: 2\n      direction: [1, 0, 0]\n      altitude_low: 5\n      altitude_high: 2\n      onset: 1\n",
     "altitude_high: 2", "environment.gusts[0].altitude_high", ["above altitude_low"]),
    ("tides on the bench", "environment:\n  tides:\n    moon: true\n", "moon: true", "environment.tides.moon",
     ["planet tether only"]),
]


def main():
    a = command_line()
    c = Checks()
    storm = os.path.join(a.source, "scenarios", "storm.yaml")
    cut = os.path.join(a.source, "scenarios", "cut.yaml")
    with tempfile.TemporaryDirectory() as tmp:
        # The storm, shortened to 5 minutes, with the Moon's tide added.
        out = os.path.join(tmp, "storm.h5")
        p = run(a.hawser, "run", storm, "-o", out, "--set", "simulation.duration=5 min",
                "--set", "environment.tides.moon=true", "--set", "output.node_stride=10")
        c.check(p.returncode == 0, "storm runs (shortened)", p.stderr[-500:])
        if p.returncode == 0:
            with h5py.File(out, "r") as f:
                nt = f["time"].shape[0]
                k = f["nodes/position"].shape[1]
                n = f["elements/tension"].shape[1]
                w, rho = f["environment/wind"], f["environment/air_density"]
                drag, load = f["environment/drag_force"], f["environment/drag_load"]
                tide = f["environment/tidal_acceleration"]
                c.check(w.shape == (nt, k, 3) and w.attrs["units"] in (b"m/s", "m/s"), "wind (nt, K, 3) m/s",
                        f"{w.shape} {w.attrs['units']}")
                c.check(rho.shape == (nt, k) and rho.attrs["units"] in (b"kg/m^3", "kg/m^3"), "air density (nt, K) kg/m^3")
                c.check(drag.shape == (nt, n, 3) and drag.attrs["units"] in (b"N", "N"), "drag force (nt, N, 3) N")
                c.check(load.shape == (nt, n) and load.attrs["units"] in (b"N/m", "N/m"), "drag load (nt, N) N/m")
                c.check(tide.shape == (nt, k, 3), "tidal acceleration (nt, K, 3)")
                c.check(abs(rho[0, 0] - 1.2250) < 1e-3, "air density at the anchor is the sea-level standard",
                        f"{rho[0, 0]}")
                c.check(rho[0, -1] == 0.0, "no air at the top")
                peak = f["summary"].attrs.get("peak_aerodynamic_load_n_per_m", -1.0)
                c.check(abs(peak - np.max(load[:])) <= 1e-9 * peak and peak > 1.0,
                        "summary peak_aerodynamic_load_n_per_m is the largest recorded load", f"{peak}")
                a_anchor = np.linalg.norm(tide[0, 0])
                scale = 4.9028e12 * 6378137.0 / 3.844e8 ** 3
                c.check(0.2 * scale < a_anchor < 3.0 * scale, "tidal acceleration at the anchor ~ GM R / D^3",
                        f"{a_anchor} vs {scale}")
                c.check(np.max(np.abs(w[:, 0, 1])) > 5.0, "the anchor node feels an eastward wind")
        # The cut, shortened: still cut 2 minutes in.
        out = os.path.join(tmp, "cut.h5")
        p = run(a.hawser, "run", cut, "-o", out, "--set", "simulation.duration=6 min")
        c.check(p.returncode == 0, "cut runs (shortened)", p.stderr[-500:])
        if p.returncode == 0:
            with h5py.File(out, "r") as f:
                t = f["time"][:]
                x = f["nodes/position"][:]
                r = np.linalg.norm(x, axis=2) - 6378137.0
                e = int(np.searchsorted(r[0], 30000e3)) - 1
                c.check(r[-1, e + 1] > r[0, e + 1] + 10e3 and r[-1, e] < r[0, e] - 10e3,
                        "after the cut the node above rises and the node below falls",
                        f"{(r[-1, e + 1] - r[0, e + 1]) / 1e3} km, {(r[-1, e] - r[0, e]) / 1e3} km")
                c.check(f["elements/tension"][-1, e] == 0.0, "the cut element carries nothing")
                c.check(t[-1] == 360.0, "ran to the end")
        # Bad input: exit 2, located messages, nothing on stdout.
        for name, extra, needle, key, words in BAD:
            text = BENCH + extra
            path = os.path.join(tmp, name.replace(" ", "_") + ".yaml")
            with open(path, "w") as fh:
                fh.write(text)
            p = run(a.hawser, "check", path)
            loc = f"{path}:{line_of(text, needle)}:"
            hits = [l for l in p.stderr.splitlines() if loc in l and key in l and all(wd in l for wd in words)]
            c.check(p.returncode == 2 and not p.stdout.strip() and hits, f"refused: {name}",
                    f"exit {p.returncode}; stderr {p.stderr.strip()!r}")
        # The key reference lists the new keys.
        p = run(a.hawser, "keys")
        c.check(p.returncode == 0 and "environment.turbulence.stations[].sigma" in p.stdout
                and "events.strikes[].impulse" in p.stdout, "hawser keys lists the environment and event keys")
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
