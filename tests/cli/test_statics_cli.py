"""Loaded static states through the command line (issue 13).

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


def main():
    a = command_line()
    c = Checks()
    demo = os.path.join(a.source, "scenarios", "demo.yaml")
    common = ["--set", "mesh.elements=300", "--set", "model.j2=true", "--set", "simulation.duration=10 s",
              "--set", "simulation.output_interval=10 s", "--set", "initial.displacements=[]"]
    with tempfile.TemporaryDirectory() as tmp:
        p = run(a.hawser, "design", demo, "--json")
        c.check(p.returncode == 0, "design --json runs", p.stderr[-300:])
        e_pa = json.loads(p.stdout)["material"]["youngs_modulus_pa"]
        bare_h5 = os.path.join(tmp, "bare.h5")
        p = run(a.hawser, "run", demo, "-o", bare_h5, "--set", "climbers=[]", *common)
        c.check(p.returncode == 0, "the tether without climbers runs", p.stderr[-300:])
        with h5py.File(bare_h5, "r") as f:
            built = f["/mesh/as_built_position"][:]
            l0_bare = f["/mesh/element_L0"][:]
            c.check(np.array_equal(built, f["/equilibrium/position"][:]),
                    "with nothing hung on it, the static state is the as-built geometry")
        h = np.linalg.norm(built, axis=1) - A_EQ
        k = int(np.argmin(np.abs(h - 20000e3)))
        climber = (f"climbers=[{{name: c10, mass: {CLIMBER_KG!r} kg, from: {h[k]!r} m, to: {h[k] + 1e6!r} m, "
                   "direction: up, cruise_speed: 200 km/h, acceleration: 0.1 m/s^2, deceleration: 0.1 m/s^2, "
                   "start_time: 100 d}]")
        out = os.path.join(tmp, "parked.h5")
        p = run(a.hawser, "run", demo, "-o", out, "--set", climber, *common)
        c.check(p.returncode == 0, "the tether with a parked climber runs", p.stderr[-300:])
        with h5py.File(out, "r") as f:
            x = f["/equilibrium/position"][:]
            t = f["/equilibrium/tension"][:]
            l0 = f["/mesh/element_L0"][:]
            ea = e_pa * f["/mesh/element_area"][:]
            mass = f["/mesh/node_mass"][:].copy()
            load_case = text_attr(f["/equilibrium"], "load_case")
            units = text_attr(f["/mesh/as_built_position"], "units")
            x0 = f["/nodes/position"][0]
        c.check("c10" in (load_case or ""), "/equilibrium names its load case", f"{load_case!r}")
        c.check(units == "m", "/mesh/as_built_position carries units m", f"{units!r}")
        c.check(np.array_equal(l0, l0_bare), "the L0 are the as-built tether's, not changed by the climber")
        c.check(np.max(np.abs(x0 - x)) == 0.0, "the run starts from the static state")
        # Independent solution: the climber's mass on its node (it sits on a node, xi 0 or 1).
        mass[k] += CLIMBER_KG
        top = len(l0)
        r_solver = np.linalg.norm(x[top])
        r_top = brentq(lambda rt: shoot(rt, l0, ea, mass)[0][0] - A_EQ, r_solver - 2e5, r_solver + 2e5,
                       xtol=1e-6, rtol=1e-15)
        r_ref, t_ref = shoot(r_top, l0, ea, mass)
        pos_err = np.max(np.abs(np.linalg.norm(x, axis=1) - r_ref))
        lateral = np.max(np.abs(x[:, 1:]))
        t_err = np.max(np.abs(t - t_ref) / t_ref)
        c.check(pos_err <= 1.0, "node radii agree with the top-down shooting solution to 1 m", f"{pos_err} m")
        c.check(lateral <= 1e-6, "the state stays on the equatorial line", f"{lateral} m")
        c.check(t_err <= 1e-6, "tensions agree with the shooting solution to 1e-6", f"{t_err}")
        drop = np.linalg.norm(built[top]) - r_solver
        c.check(drop > 1e3, "the top drops by kilometres under the parked climber", f"{drop / 1e3} km")
        net_weight = -CLIMBER_KG * outward(np.linalg.norm(x[k]))
        with h5py.File(bare_h5, "r") as f:
            base_bare = f["/equilibrium/tension"][0]
        print(f"     top drop {drop / 1e3:.3f} km; base tension change {(t[0] - base_bare) / 1e3:.4f} kN against "
              f"the climber's net weight {net_weight / 1e3:.4f} kN")
        # A climber heavier than the base tension can hold, low down: no equilibrium.
        heavy = climber.replace(f"from: {h[k]!r} m", "from: 100 km").replace(f"to: {h[k] + 1e6!r} m", "to: 200 km")
        heavy = heavy.replace(f"mass: {CLIMBER_KG!r} kg", "mass: 40 t")
        p = run(a.hawser, "run", demo, "-o", os.path.join(tmp, "slack.h5"), "--set", heavy, *common)
        c.check(p.returncode == 2 and "no equilibrium" in p.stderr and "c10" in p.stderr and "%" in p.stderr,
                "a load the base cannot hold is refused (exit 2), naming the load and the step reached",
                f"exit {p.returncode}: {p.stderr.strip()[-400:]!r}")
        c.check(not os.path.exists(os.path.join(tmp, "slack.h5")), "nothing written for it")

        # The load-case table of `hawser design`: the same climber as a load case gives the
        # same static state as the run above (base tension, top and climber displacement);
        # a heavier counterweight lifts the top; a case the base cannot hold warns.
        with open(demo) as fh:
            text = fh.read()
        text = text[:text.index("load_cases:")]  # the demo's own cases and checks left out
        cases = text + (
            "load_cases:\n"
            f"  - name: c10 at 20000 km\n    climbers: [{{mass: {CLIMBER_KG!r} kg, altitude: {h[k]!r} m}}]\n"
            "  - name: counterweight +5 %\n    counterweight_change: 0.05\n"
            "  - name: too heavy low down\n    climbers: [{mass: 40 t, altitude: 100 km}]\n"
            "load_case_checks: {min_base_margin: 0.5}\n")
        path = os.path.join(tmp, "cases.yaml")
        with open(path, "w") as fh:
            fh.write(cases)
        p = run(a.hawser, "design", path, "--json", "--set", "mesh.elements=300", "--set", "model.j2=true")
        c.check(p.returncode == 0, "design with load cases runs", p.stderr[-300:])
        if p.returncode == 0:
            lc = json.loads(p.stdout)["load_cases"]
            one, heavy_cw, slack = lc["cases"]
            c.check(one["equilibrium"] and abs(one["base_tension_n"] / t[0] - 1) < 1e-9,
                    "load case: the base tension of the run's static state", f"{one['base_tension_n']} vs {t[0]}")
            c.check(abs(one["top_radial_displacement_m"] + drop) < 1e-3,
                    "load case: the top drop of the run's static state", f"{one['top_radial_displacement_m']} vs {-drop}")
            dr = np.linalg.norm(x[k]) - np.linalg.norm(built[k])
            c.check(abs(one["climber_radial_displacement_m"][0] - dr) < 1e-3,
                    "load case: the climber's radial displacement", f"{one['climber_radial_displacement_m']} vs {dr}")
            c.check(abs(one["base_tension_margin"] - t[0] / base_bare) < 1e-9,
                    "load case: margin = base tension / as-built base tension")
            c.check(heavy_cw["equilibrium"] and heavy_cw["top_radial_displacement_m"] > 0
                    and heavy_cw["base_tension_n"] > base_bare,
                    "load case: a heavier counterweight lifts the top and pulls harder on the base")
            c.check(not slack["equilibrium"] and slack["warning"] and "no equilibrium" in slack["failure"],
                    "load case: a load the base cannot hold is reported as no equilibrium, with a warning")
            c.check("warning: load case too heavy low down" in p.stderr, "the warning also goes to stderr")
            low = [r for r in lc["cases"] if r["equilibrium"] and r["base_tension_margin"] < 0.5]
            c.check(all(r["warning"] for r in low), "load case: a margin below min_base_margin warns")
        p = run(a.hawser, "design", path, "--set", "mesh.elements=300")
        c.check(p.returncode == 0 and "Static load cases" in p.stdout and "no equilibrium" in p.stdout,
                "design prints the load-case table")
        # Bad load cases: exit 2, file:line:column and the key path, nothing on stdout.
        bad = [("  - name: x\n    climbers: [{mass: -2 t, altitude: 10 km}]\n", "mass: -2 t",
                "load_cases[0].climbers[0].mass"),
               ("  - name: x\n    climbers: [{mass: 2 t, altitude: 200000 km}]\n", "altitude: 200000 km",
                "load_cases[0].climbers[0].altitude"),
               ("  - name: x\n    mean_wind: true\n", "mean_wind: true", "load_cases[0].mean_wind"),
               ("  - name: x\n    counterweight_change: -1.5\n", "counterweight_change", "load_cases[0].counterweight_change"),
               ("  - name: x\n    colour: red\n", "colour: red", "load_cases[0].colour"),
               ("  - name: x\n    tides: true\n", "tides: true", "load_cases[0].tides"),
               ("  - name: x\nenvironment:\n  tides: {static: true}\n", "static: true", "environment.tides.static")]
        for extra, needle, key in bad:
            t_bad = text + "load_cases:\n" + extra
            path = os.path.join(tmp, "bad.yaml")
            with open(path, "w") as fh:
                fh.write(t_bad)
            line = 1 + t_bad[:t_bad.index(needle)].count("\n")
            p = run(a.hawser, "check", path)
            hit = any(f"{path}:{line}:" in l and key in l for l in p.stderr.splitlines())
            c.check(p.returncode == 2 and hit and not p.stdout.strip(), f"refused: {key}",
                    f"exit {p.returncode}: {p.stderr.strip()!r}")
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
