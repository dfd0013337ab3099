"""Loaded static states through the command line.

A 10 t climber parked at about 20,000 km on the demonstration tether (scenarios/demo.yaml, J2
on, a coarser mesh). hawser's static state, read from the result file, is checked against an
independent top-down shooting solution written here: with the as-built L0, areas and node
masses from the file, guess the top radius r_N; working down, each element's tension is the
sum of the net outward forces on the nodes above it and its stretched length is
L0 (1 + T / (E A)); SciPy's brentq finds the r_N for which node 0 lands on the anchor. Net
outward force per unit mass on the equator, rotating frame, with J2:
    f(r) = -GM / r^2 (1 + 1.5 J2 (a / r)^2) + Omega^2 r
(the equatorial gravity of the J2 potential, e.g. Vallado, Fundamentals of Astrodynamics and
Applications, section 8.6, recalled from memory; the centrifugal term of the rotating frame).
WGS 84 constants as config/planets.yaml (NIMA TR8350.2, Table 3.1; J2 recalled from memory).
Required agreement: 1e-6 relative in tensions, 1 m in positions.

Also: the result file records the static state's load case and the as-built mesh; the L0 are
those of the tether without the climber; a climber whose weight the base cannot hold makes
hawser refuse the scenario (exit 2) naming the load and the load factor reached; the load-case
table of `hawser design` gives the same static state for the same climber, warns on a case
with no equilibrium or a small margin, and its keys are validated with file:line:column.

Run by ctest as: python3 test_statics_cli.py --hawser BIN --source DIR
"""
import json
import os
import subprocess
import sys
import tempfile

import h5py
import numpy as np
from scipy.optimize import brentq

from cli_checks import Checks, command_line, text_attr

GM = 3.986004418e14       # m^3/s^2, WGS 84 (NIMA TR8350.2 Table 3.1)
OMEGA = 7.292115e-5       # rad/s, WGS 84 (NIMA TR8350.2 Table 3.1)
A_EQ = 6378137.0          # m, WGS 84 semi-major axis (NIMA TR8350.2 Table 3.1)
J2 = 1.08262982e-3        # WGS 84 (NIMA TR8350.2 Table 3.3, recalled from memory)
CLIMBER_KG = 10000.0


def run(*args):
    return subprocess.run(list(args), capture_output=True, text=True, timeout=600)


def outward(r):
    """Net outward force per unit mass on the equator [N/kg]."""
    return -GM / r**2 * (1.0 + 1.5 * J2 * (A_EQ / r) ** 2) + OMEGA**2 * r


def shoot(r_top, l0, ea, mass):
    """Radii and tensions working down from a top radius; returns (r, T)."""
    n = len(l0)
    r = np.empty(n + 1)
    t = np.empty(n)
    r[n] = r_top
    pull = mass[n] * outward(r_top)
    for e in range(n - 1, -1, -1):
        t[e] = pull
        r[e] = r[e + 1] - l0[e] * (1.0 + t[e] / ea[e])
        pull += mass[e] * outward(r[e])
    return r, t


PARKED = ("climbers=[{{name: c10, mass: {mass} kg, from: {h} m, to: {to} m, direction: up, "
          "cruise_speed: 200 km/h, acceleration: 0.1 m/s^2, deceleration: 0.1 m/s^2, "
          "start_time: 100 d}}]")
COMMON = ["--set", "mesh.elements=300", "--set", "model.j2=true",
          "--set", "simulation.duration=10 s", "--set", "simulation.output_interval=10 s",
          "--set", "initial.displacements=[]",
          # the point load: the shooting solution hangs the climber on its node(s) exactly
          "--set", "mesh.climber_load=point"]


def read_state(path):
    with h5py.File(path, "r") as f:
        return {"x": f["/equilibrium/position"][:], "t": f["/equilibrium/tension"][:],
                "built": f["/mesh/as_built_position"][:], "l0": f["/mesh/element_L0"][:],
                "area": f["/mesh/element_area"][:], "mass": f["/mesh/node_mass"][:].copy(),
                "load_case": text_attr(f["/equilibrium"], "load_case"),
                "units": text_attr(f["/mesh/as_built_position"], "units"),
                "x0": f["/nodes/position"][0]}


def check_parked(c, a, demo, tmp):
    """The parked climber's static state against the shooting solution; returns figures."""
    p = run(a.hawser, "design", demo, "--json")
    c.check(p.returncode == 0, "design --json runs", p.stderr[-300:])
    e_pa = json.loads(p.stdout)["material"]["youngs_modulus_pa"]
    bare_h5 = os.path.join(tmp, "bare.h5")
    p = run(a.hawser, "run", demo, "-o", bare_h5, "--set", "climbers=[]", *COMMON)
    c.check(p.returncode == 0, "the tether without climbers runs", p.stderr[-300:])
    bare = read_state(bare_h5)
    c.check(np.array_equal(bare["built"], bare["x"]),
            "with nothing hung on it, the static state is the as-built geometry")
    h = np.linalg.norm(bare["built"], axis=1) - A_EQ
    k = int(np.argmin(np.abs(h - 20000e3)))
    climber = PARKED.format(mass=repr(float(CLIMBER_KG)), h=repr(float(h[k])),
                            to=repr(float(h[k]) + 1e6))
    out = os.path.join(tmp, "parked.h5")
    p = run(a.hawser, "run", demo, "-o", out, "--set", climber, *COMMON)
    c.check(p.returncode == 0, "the tether with a parked climber runs", p.stderr[-300:])
    s = read_state(out)
    x, t = s["x"], s["t"]
    c.check("c10" in (s["load_case"] or ""), "/equilibrium names its load case",
            f"{s['load_case']!r}")
    c.check(s["units"] == "m", "/mesh/as_built_position carries units m", f"{s['units']!r}")
    c.check(np.array_equal(s["l0"], bare["l0"]),
            "the L0 are the as-built tether's, not changed by the climber")
    c.check(np.max(np.abs(s["x0"] - x)) == 0.0, "the run starts from the static state")
    # Independent solution: the climber's mass on its node (it sits on a node, xi 0 or 1).
    mass = s["mass"]
    mass[k] += CLIMBER_KG
    ea = e_pa * s["area"]
    top = len(s["l0"])
    r_solver = np.linalg.norm(x[top])
    r_top = brentq(lambda rt: shoot(rt, s["l0"], ea, mass)[0][0] - A_EQ,
                   r_solver - 2e5, r_solver + 2e5, xtol=1e-6, rtol=1e-15)
    r_ref, t_ref = shoot(r_top, s["l0"], ea, mass)
    pos_err = np.max(np.abs(np.linalg.norm(x, axis=1) - r_ref))
    t_err = np.max(np.abs(t - t_ref) / t_ref)
    c.check(pos_err <= 1.0, "node radii agree with the top-down shooting solution to 1 m",
            f"{pos_err} m")
    c.check(np.max(np.abs(x[:, 1:])) <= 1e-6, "the state stays on the equatorial line")
    c.check(t_err <= 1e-6, "tensions agree with the shooting solution to 1e-6", f"{t_err}")
    drop = np.linalg.norm(bare["built"][top]) - r_solver
    c.check(drop > 1e3, "the top drops by kilometres under the parked climber",
            f"{drop / 1e3} km")
    net_weight = -CLIMBER_KG * outward(np.linalg.norm(x[k]))
    base_bare = bare["t"][0]
    print(f"     top drop {drop / 1e3:.3f} km; base tension change "
          f"{(t[0] - base_bare) / 1e3:.4f} kN against the climber's net weight "
          f"{net_weight / 1e3:.4f} kN")
    # A climber heavier than the base tension can hold, low down: no equilibrium.
    heavy = PARKED.format(mass="40000.0", h="100000.0", to="200000.0")
    slack_h5 = os.path.join(tmp, "slack.h5")
    p = run(a.hawser, "run", demo, "-o", slack_h5, "--set", heavy, *COMMON)
    c.check(p.returncode == 2 and "no equilibrium" in p.stderr and "c10" in p.stderr
            and "%" in p.stderr,
            "a load the base cannot hold is refused (exit 2), naming the load and the step reached",
            f"exit {p.returncode}: {p.stderr.strip()[-400:]!r}")
    c.check(not os.path.exists(slack_h5), "nothing written for it")
    return {"h": float(h[k]), "k": k, "x": x, "t": t, "built": bare["built"], "drop": drop,
            "base_bare": base_bare}


def check_table(c, a, text, tmp, run_state):
    """The load-case table of `hawser design`: the same climber as a load case gives the same
    static state as the run (base tension, top and climber displacement); a heavier
    counterweight lifts the top; a case the base cannot hold warns."""
    r = run_state
    cases = text + (
        "load_cases:\n"
        f"  - name: c10 at 20000 km\n"
        f"    climbers: [{{mass: {CLIMBER_KG!r} kg, altitude: {r['h']!r} m}}]\n"
        "  - name: counterweight +5 %\n    counterweight_change: 0.05\n"
        "  - name: too heavy low down\n    climbers: [{mass: 40 t, altitude: 100 km}]\n"
        "load_case_checks: {min_base_margin: 0.5}\n")
    path = os.path.join(tmp, "cases.yaml")
    with open(path, "w") as fh:
        fh.write(cases)
    p = run(a.hawser, "design", path, "--json", "--set", "mesh.elements=300",
            "--set", "model.j2=true", "--set", "mesh.climber_load=point")
    c.check(p.returncode == 0, "design with load cases runs", p.stderr[-300:])
    if p.returncode == 0:
        lc = json.loads(p.stdout)["load_cases"]
        one, heavy_cw, slack = lc["cases"]
        t0 = r["t"][0]
        c.check(one["equilibrium"] and abs(one["base_tension_n"] / t0 - 1) < 1e-9,
                "load case: the base tension of the run's static state",
                f"{one['base_tension_n']} vs {t0}")
        c.check(abs(one["top_radial_displacement_m"] + r["drop"]) < 1e-3,
                "load case: the top drop of the run's static state",
                f"{one['top_radial_displacement_m']} vs {-r['drop']}")
        k = r["k"]
        dr = np.linalg.norm(r["x"][k]) - np.linalg.norm(r["built"][k])
        c.check(abs(one["climber_radial_displacement_m"][0] - dr) < 1e-3,
                "load case: the climber's radial displacement",
                f"{one['climber_radial_displacement_m']} vs {dr}")
        c.check(abs(one["base_tension_margin"] - t0 / r["base_bare"]) < 1e-9,
                "load case: margin = base tension / as-built base tension")
        c.check(heavy_cw["equilibrium"] and heavy_cw["top_radial_displacement_m"] > 0
                and heavy_cw["base_tension_n"] > r["base_bare"],
                "load case: a heavier counterweight lifts the top and pulls harder on the base")
        c.check(not slack["equilibrium"] and slack["warning"]
                and "no equilibrium" in slack["failure"],
                "load case: a load the base cannot hold is no equilibrium, with a warning")
        c.check("warning: load case too heavy low down" in p.stderr,
                "the warning also goes to stderr")
        low = [x for x in lc["cases"] if x["equilibrium"] and x["base_tension_margin"] < 0.5]
        c.check(all(x["warning"] for x in low),
                "load case: a margin below min_base_margin warns")
    p = run(a.hawser, "design", path, "--set", "mesh.elements=300")
    c.check(p.returncode == 0 and "Static load cases" in p.stdout
            and "no equilibrium" in p.stdout, "design prints the load-case table")


BAD = [("  - name: x\n    climbers: [{mass: -2 t, altitude: 10 km}]\n", "mass: -2 t",
        "load_cases[0].climbers[0].mass"),
       ("  - name: x\n    climbers: [{mass: 2 t, altitude: 200000 km}]\n",
        "altitude: 200000 km", "load_cases[0].climbers[0].altitude"),
       ("  - name: x\n    mean_wind: true\n", "mean_wind: true", "load_cases[0].mean_wind"),
       ("  - name: x\n    counterweight_change: -1.5\n", "counterweight_change",
        "load_cases[0].counterweight_change"),
       ("  - name: x\n    colour: red\n", "colour: red", "load_cases[0].colour"),
       ("  - name: x\n    tides: true\n", "tides: true", "load_cases[0].tides"),
       ("  - name: x\nenvironment:\n  tides: {static: true}\n", "static: true",
        "environment.tides.static")]


def check_bad(c, a, text, tmp):
    """Bad load cases: exit 2, file:line:column and the key path, nothing on stdout."""
    for extra, needle, key in BAD:
        t_bad = text + "load_cases:\n" + extra
        path = os.path.join(tmp, "bad.yaml")
        with open(path, "w") as fh:
            fh.write(t_bad)
        line = 1 + t_bad[:t_bad.index(needle)].count("\n")
        p = run(a.hawser, "check", path)
        hit = any(f"{path}:{line}:" in ln and key in ln for ln in p.stderr.splitlines())
        c.check(p.returncode == 2 and hit and not p.stdout.strip(), f"refused: {key}",
                f"exit {p.returncode}: {p.stderr.strip()!r}")
    # tether.built_under must name a load case.
    path = os.path.join(tmp, "built.yaml")
    with open(path, "w") as fh:
        fh.write(text + "load_cases:\n  - name: x\n")
    p = run(a.hawser, "check", path, "--set", "tether.built_under=nope")
    c.check(p.returncode == 2 and "tether.built_under" in p.stderr
            and "no load case named 'nope'" in p.stderr, "refused: tether.built_under",
            f"exit {p.returncode}: {p.stderr.strip()!r}")
    p = run(a.hawser, "check", path, "--set", "tether.built_under=x")
    c.check(p.returncode == 0, "accepted: tether.built_under naming a case", p.stderr.strip())


def main():
    a = command_line()
    c = Checks()
    demo = os.path.join(a.source, "scenarios", "demo.yaml")
    with open(demo) as fh:
        text = fh.read()
    text = text[:text.index("load_cases:")]  # the demo's own cases and checks left out
    with tempfile.TemporaryDirectory() as tmp:
        state = check_parked(c, a, demo, tmp)
        check_table(c, a, text, tmp, state)
        check_bad(c, a, text, tmp)
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
