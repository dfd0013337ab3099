"""Climbers through the command line: bad input and the result file.

Bad input: each case writes the base scenario with one fault in its `climbers` or `schedules`
list and runs `hawser run`; it must exit 2 (architecture.md, exit codes), write nothing on
standard output and no result file, and name the file:line and the key path of the fault.
`hawser check` must exit 2 on the same files (architecture.md: check reports every problem).
Good input: a short run writes /climbers/<name>/* with a `units` attribute on every dataset
and the climbers' peaks in /summary; the values are checked against physics:
- the Coriolis force is -2 m Omega x v for the climber's own velocity (rotating-frame
  equations of motion, Goldstein, Classical Mechanics), westward going up, eastward going down;
- parked at rest at t = 0, the drive holds the climber's weight less its centrifugal force,
  m (GM / r^2 - Omega^2 r) (Newton's gravitation in the rotating frame, physics.md section 1);
- the /summary peaks are the largest |value| of their datasets.
Earth constants: WGS 84, GM = 3.986004418e14 m^3/s^2, Omega = 7.292115e-5 rad/s (NIMA
TR8350.2 Table 3.1), as config/planets.yaml.

Run by ctest as: python3 test_climbers_cli.py --hawser BIN --source DIR
"""
import math
import os
import re
import subprocess
import sys
import tempfile

import h5py
import numpy as np

from cli_checks import Checks, command_line

GM = 3.986004418e14   # m^3/s^2, WGS 84 (NIMA TR8350.2 Table 3.1)
OMEGA = 7.292115e-5   # rad/s, WGS 84 (NIMA TR8350.2 Table 3.1)

# Invented setting: the demo's tether (scenarios/demo.yaml) on a coarse mesh, two climbers.
BASE = """\
name: climber command-line case
planet: earth
material: kestrel_k100
tether:
  profile: constant_stress
  safety_factor: 2
  base_design_load: 196.1 kN
  top_altitude: 100000 km
  section: {shape: ribbon, width_to_thickness: 1000}
counterweight: {mass: computed}
anchor: {latitude: 0 deg, longitude: -125 deg}
mesh: {elements: 30, grading: geometric, first_element_length: 50 km}
simulation: {duration: 1 h, output_interval: 10 min, method: bdf, rtol: 1.0e-6, atol_velocity: 1.0e-4}
climbers:
  - name: wren
    mass: 2 t
    from: 100 km
    to: 600 km
    direction: up
    cruise_speed: 200 km/h
    acceleration: 0.5 m/s^2
    deceleration: 0.5 m/s^2
  - name: petrel
    mass: 3 t
    from: 900 km
    to: 700 km
    direction: down
    cruise_speed: 150 km/h
    acceleration: 0.2 m/s^2
    deceleration: 0.2 m/s^2
"""
MASSES = {"wren": 2000.0, "petrel": 3000.0}
# The validation stage flies every profile on the tether at rest, where altitudes are measured
# (solver/input/climber_reader.hpp), before anything is built: the leg from 100 to 600 km is
# 500 km there. Ramps a = 0.01, d = 0.5 m/s^2 reach at most sqrt(2 L a d / (a + d))
# (kinematics): 99.02 m/s = 356.5 km/h. (0.5 % allowed.)
REACHABLE_KM_H = math.sqrt(2 * 500e3 * 0.01 * 0.5 / 0.51) * 3.6
DIRECTION = {"wren": +1, "petrel": -1}

SCHEDULE = """\
schedules:
  - name: shuttle
    first_departure: 0 s
    every: 20 min
    count: 3
    masses: [1 t, 1.5 t]
    from: 0 km
    to: 150 km
    direction: up
    cruise_speed: 200 km/h
    acceleration: 0.5 m/s^2
    deceleration: 0.5 m/s^2
"""

UNITS = {"s": "m", "altitude": "m", "on_tether": "1", "position": "m", "velocity": "m/s",
         "drive_force": "N", "coriolis_force": "N", "lateral_offset": "m",
         "tension_below": "N", "tension_above": "N"}
SHAPES = {"position": (3,), "velocity": (3,), "coriolis_force": (3,), "lateral_offset": (2,)}



def line_of(text, needle, after=None):
    """1-based line of the first line containing `needle` (after the line containing `after`)."""
    start = 0
    lines = text.splitlines()
    if after is not None:
        start = next(i for i, l in enumerate(lines) if after in l) + 1
    for i in range(start, len(lines)):
        if needle in lines[i]:
            return i + 1
    raise AssertionError(f"{needle!r} not in scenario")


def mutate(text, old, new, count=1):
    assert old in text, old
    return text.replace(old, new, count)


def text_attr(v):
    return v.decode() if isinstance(v, bytes) else str(v)


def main():
    a = command_line()
    c = Checks()

    def hawser(*args):
        return subprocess.run([a.hawser, *args], capture_output=True, text=True, timeout=300)

    with tempfile.TemporaryDirectory() as tmp:
        def write(name, text):
            path = os.path.join(tmp, name + ".yaml")
            with open(path, "w") as f:
                f.write(text)
            return path

        # ---- bad input: exit 2, file:line and key, nothing written -------------------------
        cases = [
            ("climber beyond the top of the tether", mutate(BASE, "to: 600 km", "to: 120000 km"),
             line_of(BASE, "to: 600 km"), "climbers[0].to", ["beyond the top", "100000 km"]),
            ("climber below the anchor", mutate(BASE, "from: 100 km", "from: -5 km"),
             line_of(BASE, "from: 100 km"), "climbers[0].from", []),
            ("zero mass", mutate(BASE, "mass: 2 t", "mass: 0 t"),
             line_of(BASE, "mass: 2 t"), "climbers[0].mass", ["greater than 0"]),
            ("negative mass", mutate(BASE, "mass: 3 t", "mass: -3 t"),
             line_of(BASE, "mass: 3 t"), "climbers[1].mass", ["greater than 0"]),
            # The fastest reachable speed is checked below (REACHABLE_KM_H).
            ("cruise speed never reached",
             mutate(mutate(BASE, "cruise_speed: 200 km/h", "cruise_speed: 2000 km/h"),
                    "acceleration: 0.5 m/s^2", "acceleration: 0.01 m/s^2"),
             line_of(BASE, "name: wren"), "climbers[0]",
             ["never reached", "fastest reachable speed"]),
            # wren rises to 800 km while petrel comes down from 900 km to 700 km: they meet.
            ("overlapping climbers", mutate(BASE, "to: 600 km", "to: 800 km"),
             line_of(BASE, "name: petrel"), "climbers[1]", ["wren", "petrel", "same stretch"]),
            ("direction against from and to", mutate(BASE, "direction: up", "direction: down"),
             line_of(BASE, "direction: up"), "climbers[0].direction", ["disagrees"]),
            ("schedule direction against from and to",
             BASE + mutate(SCHEDULE, "direction: up", "direction: down"),
             line_of(BASE + SCHEDULE, "direction: up", after="schedules:"), "schedules[0].direction", ["disagrees"]),
            ("schedule with a zero mass", BASE + mutate(SCHEDULE, "[1 t, 1.5 t]", "[1 t, 0 t]"),
             line_of(BASE + SCHEDULE, "masses:"), "schedules[0].masses", []),
        ]
        for name, text, line, key, words in cases:
            path = write(name.replace(" ", "_"), text)
            out = os.path.join(tmp, "bad.h5")
            p = hawser("run", path, "-o", out)
            loc = f"{path}:{line}:"
            hits = [l for l in p.stderr.splitlines() if loc in l and key in l and all(w in l for w in words)]
            c.check(p.returncode == 2, f"{name}: exit 2", f"got {p.returncode}; {p.stderr.strip()}")
            c.check(bool(hits), f"{name}: message names {loc} and {key}", p.stderr.strip())
            c.check(not p.stdout.strip(), f"{name}: nothing on stdout", p.stdout[:200])
            c.check(not os.path.exists(out), f"{name}: no result file")
            if name == "cruise speed never reached":
                m = re.search(r"fastest reachable speed there is ([0-9.]+) km/h", p.stderr)
                got = float(m.group(1)) if m else float("nan")
                c.check(abs(got / REACHABLE_KM_H - 1) < 5e-3,
                        f"{name}: the fastest reachable speed",
                        f"{got} km/h against {REACHABLE_KM_H:.1f} km/h")
            # `hawser check` validates only; architecture.md: it reports every problem too.
            q = hawser("check", path)
            c.check(q.returncode == 2, f"{name}: `hawser check` exits 2", f"got {q.returncode}: {q.stdout.strip()}")

        # ---- good runs: the two climbers alone (physics), then with a schedule (datasets) ----
        runs = {}
        for name, text in (("pair", BASE), ("traffic", BASE + SCHEDULE)):
            path = write(name, text)
            out = os.path.join(tmp, name + ".h5")
            p = hawser("run", path, "-o", out)
            if c.check(p.returncode == 0, f"good run ({name}) exits 0", p.stderr):
                runs[name] = out
        if "pair" in runs:
            with h5py.File(runs["pair"], "r") as f:
                t = f["time"][:]
                nt = t.shape[0]
                for n in ("wren", "petrel"):
                    g = f["climbers"][n]
                    m = MASSES[n]
                    r = g["position"][:]
                    v = g["velocity"][:]
                    fc = g["coriolis_force"][:]
                    rad = np.linalg.norm(r, axis=1)
                    weight = m * (GM / rad ** 2 - OMEGA ** 2 * rad)
                    # Coriolis: -2 m Omega z x v = 2 m Omega (v_y, -v_x, 0).
                    expected = 2 * m * OMEGA * np.stack([v[:, 1], -v[:, 0], np.zeros(nt)], axis=1)
                    err = np.max(np.abs(fc - expected)) / np.max(np.abs(expected))
                    c.check(err < 1e-9, f"{n}: Coriolis force is -2 m Omega x v", f"relative error {err:.3g}")
                    cruise = (t >= 600) & (t <= 3600)  # past the ramps, before arrival
                    west = fc[cruise, 1] * DIRECTION[n]
                    c.check(np.all(west < 0), f"{n}: Coriolis force {'west' if DIRECTION[n] > 0 else 'east'}ward "
                                              f"at cruise", str(fc[cruise, 1]))
                    c.check(abs(g["drive_force"][0] / weight[0] - 1) < 1e-6,
                            f"{n}: parked at t = 0 the drive holds m (GM/r^2 - Omega^2 r)",
                            f"{g['drive_force'][0]} N vs {weight[0]} N")
                    # At cruise the tether under the climber still rings (measured within 3 %).
                    ratio = g["drive_force"][cruise] / weight[cruise]
                    c.check(np.all(np.abs(ratio - 1) < 0.05), f"{n}: at cruise the drive holds the weight within 5 %",
                            str(ratio))
                    c.check(np.all(g["on_tether"][:] == 1), f"{n}: on the tether throughout")
        if "traffic" in runs:
            with h5py.File(runs["traffic"], "r") as f:
                nt = f["time"].shape[0]
                names = ["wren", "petrel", "shuttle_1", "shuttle_2", "shuttle_3"]
                c.check(sorted(f["climbers"].keys()) == sorted(names), "one group per climber, schedules expanded",
                        str(list(f["climbers"].keys())))
                for n in names:
                    g = f["climbers"][n]
                    for k, unit in UNITS.items():
                        ok = k in g and text_attr(g[k].attrs.get("units", b"")) == unit and \
                            g[k].shape == (nt,) + SHAPES.get(k, ())
                        c.check(ok, f"/climbers/{n}/{k}: shape (nt{''.join(', %d' % s for s in SHAPES.get(k, ()))}) "
                                    f"and units {unit}", str(g[k].shape) if k in g else "missing")
                summary = f["summary"].attrs
                for n in names:
                    g = f["climbers"][n]
                    for field, attr in (("drive_force", f"climber_{n}_peak_drive_force_n"),
                                        ("lateral_offset", f"climber_{n}_peak_lateral_offset_m")):
                        data = np.abs(g[field][:])
                        data = data[np.isfinite(data)]
                        ok = attr in summary and data.size > 0 and \
                            math.isclose(float(summary[attr]), float(data.max()), rel_tol=1e-12)
                        c.check(ok, f"/summary {attr} is the largest |{field}|",
                                f"{summary.get(attr)} vs {data.max() if data.size else None}")
                # The scheduled shuttles leave (at_end: leave, the default) once arrived: 150 km at
                # 200 km/h takes 2700 s + 111 s of ramps, so shuttle_1 is gone by 1 h; shuttle_3,
                # a sudden load, is off the tether before its departure at 40 min and on it after.
                s1, s3 = f["climbers"]["shuttle_1"], f["climbers"]["shuttle_3"]
                c.check(s1["on_tether"][-1] == 0 and np.isnan(s1["position"][-1]).all(),
                        "shuttle_1 has left the tether by the end")
                c.check(s3["on_tether"][0] == 0 and s3["on_tether"][-1] == 1 and s3["s"][-1] > 0.0,
                        "shuttle_3 joins at its departure and is on its way at the end")

    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
