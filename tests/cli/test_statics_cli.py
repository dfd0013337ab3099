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
those of the tether without the climber; and a climber whose weight the base cannot hold
makes hawser refuse the scenario (exit 2) naming the load and the load factor reached.

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
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
