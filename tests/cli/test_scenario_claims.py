#!/usr/bin/python3
"""The example scenarios check what they tell their reader to look for.

Each scenario in scenarios/ says in its comments what a run shows ("the top node about 77 km
east after 6 h"). Each claim below quotes that text, which must still stand in the file
(comment markers and line breaks ignored), and measures the figure from the program's own
output of the full scenario: `hawser design --json`, `hawser modes --json` and the result
file of `hawser run`. So an example can drift from its text in neither direction: edit the
text and the quote fails; change the physics and the figure fails.

The source of every expected value is the scenario's own text; the tolerance says how "about"
the text is (its figures are given to two or three digits).

Run by ctest as: python3 test_scenario_claims.py --hawser BIN --source DIR
"""
import json
import os
import re
import subprocess
import sys
import tempfile

import h5py
import numpy as np

from cli_checks import Checks, command_line

H = 3600.0


def comment_text(path):
    """The file's comments as one line of words."""
    words = []
    with open(path, encoding="utf-8") as f:
        for line in f:
            if "#" in line:
                words.append(line.split("#", 1)[1])
    return re.sub(r"\s+", " ", " ".join(words)).strip()


class Outputs:
    """The program's outputs for one scenario, produced on first use."""

    def __init__(self, hawser, scenario, tmp):
        self.hawser, self.scenario, self.tmp = hawser, scenario, tmp
        self._design = self._modes = self._run = None

    def _json(self, *args):
        p = subprocess.run([self.hawser, *args, self.scenario, "--json"], capture_output=True,
                           text=True, timeout=600)
        if p.returncode != 0:
            raise RuntimeError(f"{' '.join(args)} exited {p.returncode}: {p.stderr[-500:]}")
        return json.loads(p.stdout)

    def design(self):
        if self._design is None:
            self._design = self._json("design")
        return self._design

    def modes(self):
        if self._modes is None:
            self._modes = self._json("modes", "-k", "4")
        return self._modes

    def run(self):
        if self._run is None:
            out = os.path.join(self.tmp, os.path.basename(self.scenario) + ".h5")
            p = subprocess.run([self.hawser, "run", self.scenario, "-o", out],
                               capture_output=True, text=True, timeout=600)
            if p.returncode not in (0, 3):
                raise RuntimeError(f"run exited {p.returncode}: {p.stderr[-500:]}")
            self._run = h5py.File(out, "r")
        return self._run


# ---- measurements on a result file ------------------------------------------------------------

def node_offset(f, node, t_s):
    """Displacement [m] (x up, y east, z north) of recorded node `node` from the starting
    static state at the output nearest t_s."""
    t = f["time"][:]
    i = int(np.argmin(np.abs(t - t_s)))
    idx = list(f["nodes/index"][:])
    k = idx.index(node)
    return f["nodes/position"][i, k, :] - f["equilibrium/position"][node, :]


def top(f):
    return int(f["nodes/index"][-1])


def top_east_extreme(f, sign, t_from_s, t_to_s):
    """(time [h], offset [m]) of the top's largest east (sign +1) or west (-1) offset."""
    t = f["time"][:]
    k = list(f["nodes/index"][:]).index(top(f))
    y = f["nodes/position"][:, k, 1] - f["equilibrium/position"][top(f), 1]
    sel = (t >= t_from_s) & (t <= t_to_s)
    i = np.flatnonzero(sel)[int(np.argmax(sign * y[sel]))]
    return t[i] / H, abs(y[i])


def lowest_period_h(modes, kind):
    """Period [h] of the lowest (longest-period) mode of a kind."""
    return max(m["period_s"] for m in modes["modes"] if m["kind"] == kind) / H


def separation_speed(f, below_km, above_km):
    """Radial speeds [m/s] of the recorded nodes nearest the given altitudes (at rest) at the
    last output."""
    eq = f["equilibrium/position"][:]
    idx = list(f["nodes/index"][:])
    r0 = np.linalg.norm(eq[0])
    alt = np.linalg.norm(eq[idx], axis=1) - r0
    out = []
    for h in (below_km, above_km):
        k = int(np.argmin(np.abs(alt - h * 1e3)))
        v = f["nodes/velocity"][-1, k, :]
        out.append(v[0])
    return out


def claims():
    """(scenario, quoted text, what, measure(outputs) -> value, expected, relative tolerance);
    an expected value ("<", b) or (">", b) is a bound the text states."""
    c = []
    add = lambda *a: c.append(a)
    # demo.yaml ------------------------------------------------------------------------------
    d = "demo.yaml"
    add(d, "the widest section at the geostationary altitude (35,786 km)", "altitude of the widest section [km]",
        lambda o: o.design()["design"]["max_area_altitude_m"] / 1e3, 35786.0, 1e-4)
    add(d, "a taper ratio near 3.7", "taper ratio",
        lambda o: o.design()["design"]["taper_ratio"], 3.7, 0.01)
    add(d, "a tether of about 1,600 t", "tether mass [t]",
        lambda o: o.design()["design"]["tether_mass_kg"] / 1e3, 1600.0, 0.03)
    add(d, "a counterweight of about 800 t", "counterweight [t]",
        lambda o: o.design()["design"]["counterweight_mass_kg"] / 1e3, 800.0, 0.03)
    case = lambda o, name: next(x for x in o.design()["load_cases"]["cases"] if x["name"] == name)
    add(d, "the 20 t design climber parked at 1,000 km pulls the top down some 43 km",
        "top's fall under the design climber at 1,000 km [km]",
        lambda o: -case(o, "design climber at 1,000 km")["top_radial_displacement_m"] / 1e3, 43.0, 0.05)
    add(d, "leaves less than a quarter of the base tension (a warning)",
        "base-tension margin under it",
        lambda o: case(o, "design climber at 1,000 km")["base_tension_margin"], ("<", 0.25), None)
    add(d, "5 % more counterweight lifts the top some 220 km", "top's rise with 5 % more counterweight [km]",
        lambda o: max(x["top_radial_displacement_m"] for x in o.design()["load_cases"]["cases"]) / 1e3,
        220.0, 0.05)
    add(d, "falls from 196 kN to under 10 kN", "anchor tension at the start [kN]",
        lambda o: o.run()["elements/tension"][0, 0] / 1e3, 196.0, 0.01)
    add(d, "falls from 196 kN to under 10 kN", "smallest anchor tension [kN]",
        lambda o: o.run()["elements/tension"][:, 0].min() / 1e3, ("<", 10.0), None)
    add(d, "the top by some 40 km after 4 h", "top's fall at 4 h [km]",
        lambda o: -node_offset(o.run(), top(o.run()), 4 * H)[0] / 1e3, 40.0, 0.05)
    add(d, "the top node about 77 km east after 6 h", "top's east offset at 6 h [km]",
        lambda o: node_offset(o.run(), top(o.run()), 6 * H)[1] / 1e3, 77.0, 0.05)
    add(d, "/climbers/kite/coriolis_force is about 160 N westward (-y) while it climbs",
        "the climber's mean westward Coriolis force while climbing [N]",
        lambda o: -np.mean([fy for fy, s in zip(o.run()["climbers/kite/coriolis_force"][:, 1],
                                                   o.run()["climbers/kite/velocity"][:, 0]) if s > 10.0]),
        160.0, 0.1)
    # ringdown.yaml --------------------------------------------------------------------------
    r = "ringdown.yaml"
    add(r, "swinging east to about 6 km at about 22 h", "time of the top's eastmost point [h]",
        lambda o: top_east_extreme(o.run(), +1, 0, 80 * H)[0], 22.0, 0.1)
    add(r, "swinging east to about 6 km at about 22 h", "the top's eastmost offset [km]",
        lambda o: top_east_extreme(o.run(), +1, 0, 80 * H)[1] / 1e3, 6.0, 0.1)
    add(r, "west to about 6 km at about 106 h", "time of the top's westmost point after 80 h [h]",
        lambda o: top_east_extreme(o.run(), -1, 80 * H, 150 * H)[0], 106.0, 0.1)
    add(r, "west to about 6 km at about 106 h", "the top's westmost offset after 80 h [km]",
        lambda o: top_east_extreme(o.run(), -1, 80 * H, 150 * H)[1] / 1e3, 6.0, 0.1)
    add(r, "the lowest east-west mode (151 h;", "period of the lowest east-west mode [h]",
        lambda o: lowest_period_h(o.modes(), "east-west"), 151.0, 0.01)
    # storm.yaml -----------------------------------------------------------------------------
    s = "storm.yaml"
    add(s, "about 37 N/m, in the jet near 12 km", "peak aerodynamic load [N/m]",
        lambda o: float(o.run()["summary"].attrs["peak_aerodynamic_load_n_per_m"]), 37.0, 0.1)
    # traffic.yaml ---------------------------------------------------------------------------
    t = "traffic.yaml"
    add(t, "it stays above 60 kN", "smallest anchor tension [kN]",
        lambda o: o.run()["elements/tension"][:, 0].min() / 1e3, (">", 60.0), None)
    add(t, "the top moves down by up to about 47 km", "top's largest fall [km]",
        lambda o: -min(node_offset(o.run(), top(o.run()), tt)[0] for tt in o.run()["time"][:]) / 1e3,
        47.0, 0.08)
    add(t, "gains about 290 km east in 30 h", "top's east offset at 30 h [km]",
        lambda o: node_offset(o.run(), top(o.run()), 30 * H)[1] / 1e3, 290.0, 0.08)
    add(t, "a period of about 152 h", "period of the lowest east-west mode [h]",
        lambda o: lowest_period_h(o.modes(), "east-west"), 152.0, 0.01)
    # cut.yaml -------------------------------------------------------------------------------
    k = "cut.yaml"
    add(k, "parting company at about 1.5 km/s each, up (+x) and down",
        "radial speed of the node above the cut [km/s]",
        lambda o: separation_speed(o.run(), 29500, 30200)[1] / 1e3, 1.5, 0.15)
    add(k, "parting company at about 1.5 km/s each, up (+x) and down",
        "radial speed of the node below the cut, downward [km/s]",
        lambda o: -separation_speed(o.run(), 29500, 30200)[0] / 1e3, 1.5, 0.15)
    return c


def main():
    a = command_line()
    c = Checks()
    with tempfile.TemporaryDirectory() as tmp:
        outputs = {}
        for scenario, quote, what, measure, expected, rel in claims():
            path = os.path.join(a.source, "scenarios", scenario)
            text = comment_text(path)
            c.check(re.sub(r"\s+", " ", quote) in text, f"{scenario}: says '{quote}'")
            o = outputs.setdefault(scenario, Outputs(a.hawser, path, tmp))
            try:
                got = float(measure(o))
            except Exception as e:  # a missing output is a failed claim, not a crash
                c.check(False, f"{scenario}: {what}", f"could not measure: {e}")
                continue
            if isinstance(expected, tuple):
                op, bound = expected
                c.check(got < bound if op == "<" else got > bound,
                        f"{scenario}: {what}: {got:.4g} (text: {op} {bound:g})")
                continue
            c.check(abs(got - expected) <= rel * abs(expected),
                    f"{scenario}: {what}: {got:.4g} (text: {expected:g}, within {rel:.0%})",
                    f"off by {got / expected - 1:+.1%}")
    sys.exit(c.summary())


if __name__ == "__main__":
    main()
