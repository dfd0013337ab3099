"""The energy budget of a run closes (issue 16, item 3): the demonstration run's residual is
below 1e-3 of the energy exchanged; so are the cut's (the strain energy a cut takes) and the
storm's (the air's work) over a shortened run, whose channels are checked too.

Checked from the result file with numpy, independently of the program's own /summary:
  residual r(t) = dK + dP + dS + dC - sum of /energy/work/* + D   (changes since t = 0)
  exchanged X(t) = (|dK| + |dP| + |dS| + |dC| + sum |W| + D) / 2
and the program's /summary figures must agree with it. The climbers' energy is checked
against the closed form for a point mass at rest in the rotating frame, m Phi(r) with the
effective potential Phi(r) = -GM / r - w^2 (x^2 + y^2) / 2 (physics.md; e.g. Goldstein,
Classical Mechanics, 3rd ed., section 4.10, the centrifugal potential), with the WGS 84
constants GM = 3.986004418e14 m^3/s^2 and w = 7.292115e-5 rad/s (NIMA TR8350.2, 3rd ed.,
Table 3.1).

Run by ctest as: python3 test_energy_budget.py --hawser BIN --source DIR
"""
import os
import subprocess
import sys
import tempfile

import h5py
import numpy as np

from cli_checks import Checks, command_line, text_attr

GM_M3_S2 = 3.986004418e14
W_RAD_S = 7.292115e-5


def balance(h):
    """(largest |r| [J], largest X [J], the work channels' names) from the datasets."""
    e = h["/energy"]
    terms = [np.asarray(e[k][:], float) for k in ("kinetic", "potential", "strain")]
    if "climbers" in e:
        terms.append(np.asarray(e["climbers"][:], float))
    changes = [x - x[0] for x in terms]
    works = {k: np.asarray(v[:], float) for k, v in e["work"].items()} if "work" in e else {}
    d = np.asarray(e["dissipated"][:], float)
    r = sum(changes) - sum(works.values(), np.zeros_like(d)) + d
    x = 0.5 * (sum(np.abs(c) for c in changes) + sum((np.abs(w) for w in works.values()),
                                                      np.zeros_like(d)) + np.abs(d))
    return np.max(np.abs(r)), np.max(x), sorted(works)


def main():
    a = command_line()
    c = Checks()
    demo = os.path.join(a.source, "scenarios", "demo.yaml")
    with tempfile.TemporaryDirectory() as tmp:
        out = os.path.join(tmp, "demo.h5")
        p = subprocess.run([a.hawser, "run", demo, "-o", out], capture_output=True, text=True,
                           timeout=600)
        c.check(p.returncode == 0, "demo run exits 0", p.stderr[-500:])
        c.check("energy budget: residual" in p.stdout, "the terminal summary gives the budget",
                p.stdout[-800:])
        c.check("energy budget does not close" not in p.stderr, "no energy warning", p.stderr)
        with h5py.File(out, "r") as h:
            r_max, x_max, channels = balance(h)
            c.check(channels == ["climber_drives", "climber_events"],
                    "the demo's work channels: the climber's drive and its events", str(channels))
            jumps = h["/energy/work/climber_events"][:]
            print(f"     node-crossing jumps of the climber's energy: {jumps[-1]:.4g} J in all")
            c.check(text_attr(h["/energy/work/climber_drives"], "units") == "J",
                    "work in J (units attribute)")
            frac = r_max / x_max
            print(f"     demo: largest residual {r_max:.4g} J of {x_max:.4g} J exchanged "
                  f"({frac:.3g})")
            c.check(frac < 1e-3, "demo: residual below 1e-3 of the energy exchanged", f"{frac:.3g}")
            s = h["/summary"].attrs
            c.check(abs(abs(s["energy_residual_j"]) - r_max) <= 1e-9 * x_max,
                    "/summary energy_residual_j is the largest residual",
                    f"{s['energy_residual_j']} vs {r_max}")
            c.check(abs(s["energy_exchanged_j"] - x_max) <= 1e-9 * x_max,
                    "/summary energy_exchanged_j is the largest exchange",
                    f"{s['energy_exchanged_j']} vs {x_max}")
            c.check(text_attr(h["/summary"], "energy_balance") == "closed"
                    and s["energy_residual_limit"] > 0, "/summary: balance closed, limit stated")
            # Without the climber's drive work the budget would miss most of the exchange.
            w = h["/energy/work/climber_drives"][:]
            c.check(w[-1] > 0.5 * x_max, "the drive's work is most of the energy exchanged",
                    f"{w[-1]:.4g} J of {x_max:.4g} J")
            # The climbers' energy at the end (parked, at rest) against m Phi(r).
            pos = h["/climbers/kite/position"][-1]
            vel = h["/climbers/kite/velocity"][-1]
            m = h["/climbers/kite"].attrs["mass_kg"]
            phi = -GM_M3_S2 / np.linalg.norm(pos) - 0.5 * W_RAD_S ** 2 * (pos[0] ** 2 + pos[1] ** 2)
            expected = m * phi + 0.5 * m * float(np.dot(vel, vel))
            got = h["/energy/climbers"][-1]
            c.check(abs(got - expected) <= 1e-9 * abs(expected),
                    "/energy/climbers = m Phi(r) + m v^2 / 2 for the parked climber",
                    f"{got:.12g} vs {expected:.12g} J")
        # Other channels: a cut (its element's strain energy goes with it) and the storm's drag.
        cases = (("cut", [], "cuts", -1.0),
                 ("storm", ["--set", "simulation.duration=1 h"], "drag", 0.0))
        for name, extra, channel, sign in cases:
            out = os.path.join(tmp, f"{name}.h5")
            path = os.path.join(a.source, "scenarios", f"{name}.yaml")
            p = subprocess.run([a.hawser, "run", path, "-o", out, *extra], capture_output=True,
                               text=True, timeout=600)
            if not c.check(p.returncode == 0, f"{name} run exits 0", p.stderr[-500:]):
                continue
            with h5py.File(out, "r") as h:
                r_max, x_max, channels = balance(h)
                frac = r_max / x_max
                print(f"     {name}: channels {channels}; largest residual {r_max:.4g} J of "
                      f"{x_max:.4g} J exchanged ({frac:.3g})")
                c.check(channel in channels, f"{name}: work channel {channel} recorded",
                        str(channels))
                c.check(frac < 1e-3, f"{name}: residual below 1e-3 of the energy exchanged",
                        f"{frac:.3g}")
                if channel in channels:
                    w = h[f"/energy/work/{channel}"][-1]
                    c.check(sign == 0.0 or w * sign > 0, f"{name}: {channel} has the expected sign",
                            f"{w:.4g} J")
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
