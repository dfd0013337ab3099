"""`hawser modes` through the command line: the table, the JSON form, the HDF5 shape file and
bad input (issue: modal analysis, item 3).

The bench case is a taut steel string, 10 m long, 1 mm^2, 100 N between fixed ends, 40
elements. Its lateral frequencies: the continuous string omega_n = n pi / L sqrt(T / mu)
(physics.md section 8; e.g. Kinsler et al., Fundamentals of Acoustics, ch. 2, recalled from
memory), and the lumped-mass (beaded) string omega_n = 2 sqrt(T / (m h)) sin(n pi / (2 N))
(Lagrange's beaded string, e.g. French, Vibrations and Waves, ch. 5, recalled from memory),
which the discrete model reproduces to round-off. Steel: density 7850 kg/m^3 from
config/materials.yaml (steel_4340, ASM Handbook Vol. 1).

Run by ctest as: python3 test_modes_cli.py --hawser BIN --source DIR
"""
import json
import math
import os
import subprocess
import sys
import tempfile

import h5py
import numpy as np

from cli_checks import Checks, command_line

STRING = """\
name: modes test string
material: steel_4340
field: {kind: uniform, gravity: 0, cable_length: 10 m, cable_area: 1 mm^2, far_end: fixed, pretension: 100 N}
mesh: {elements: 40}
"""
L_M, T_N, MU_KG_M, N_EL = 10.0, 100.0, 7850.0 * 1e-6, 40



def main():
    a = command_line()
    c = Checks()

    def run(*args):
        return subprocess.run([a.hawser, "modes", *args], capture_output=True, text=True, timeout=120)

    with tempfile.TemporaryDirectory() as tmp:
        scenario = os.path.join(tmp, "string.yaml")
        with open(scenario, "w") as f:
            f.write(STRING)
        h5 = os.path.join(tmp, "string_modes.h5")

        # Text form: it ends with the caution (README, "Caution").
        p = run(scenario, "-k", "2")
        tail = p.stdout.strip().splitlines()[-2:]
        c.check(p.returncode == 0 and "not a certification method" in " ".join(tail),
                "modes' text output ends with the caution", "\n".join(tail))

        # JSON form, with the shape file.
        p = run(scenario, "-k", "6", "--json", "-o", h5)
        c.check(p.returncode == 0, "modes --json exits 0", p.stderr)
        try:
            j = json.loads(p.stdout)
        except ValueError:
            c.check(False, "modes --json prints JSON", p.stdout[:300])
            j = None
        if j is not None:
            c.check(j["format"] == "hawser-modes" and j["format_version"] == 1, "JSON format and version")
            c.check(len(j["modes"]) == 6, "six modes in the JSON")
            c.check(j["degrees_of_freedom"] == 3 * (N_EL - 1), "degrees of freedom: 3 per free node",
                    str(j["degrees_of_freedom"]))
            c.check(j["stiffness_negative_directions"] == 0, "taut string: positive definite stiffness")
            h = L_M / N_EL
            for n in (1, 2, 3):
                pair = [m for m in j["modes"] if m["kind"] in ("east-west", "north-south")][2 * (n - 1): 2 * n]
                kinds = sorted(m["kind"] for m in pair)
                c.check(kinds == ["east-west", "north-south"], f"string mode {n}: one in each lateral plane", str(kinds))
                beaded = 2 * math.sqrt(T_N / (MU_KG_M * h * h)) * math.sin(n * math.pi / (2 * N_EL))
                continuous = n * math.pi / L_M * math.sqrt(T_N / MU_KG_M)
                for m in pair:
                    omega = 2 * math.pi / m["period_s"]
                    c.check(abs(omega / beaded - 1) < 1e-9, f"mode {n} ({m['kind']}) on the beaded-string formula",
                            f"{omega} vs {beaded}")
                    c.check(abs(omega / continuous - 1) < 0.005, f"mode {n} within 0.5% of the continuous string",
                            f"{omega} vs {continuous}")
                    c.check(abs(m["frequency_hz"] * m["period_s"] - 1) < 1e-12, f"mode {n}: frequency = 1 / period")
                    c.check(abs(sum(m["kinetic_fraction"].values()) - 1) < 1e-12, f"mode {n}: kinetic fractions sum to 1")
                    # The largest motion of string mode n is at an antinode, (2i - 1) L / (2n).
                    antinodes = [(2 * i - 1) * L_M / (2 * n) for i in range(1, n + 1)]
                    d = min(abs(m["largest_motion_altitude_m"] - x) for x in antinodes)
                    c.check(d <= h / 2 + 1e-9, f"mode {n}: largest motion at an antinode",
                            str(m["largest_motion_altitude_m"]))
            c.check(j["shapes_file"] == h5, "JSON names the shape file")

        # The HDF5 shape file: layout, units, normalisation, agreement with the JSON.
        try:
            with h5py.File(h5, "r") as f:
                attr = lambda o, k: o.attrs[k].decode() if isinstance(o.attrs[k], bytes) else o.attrs[k]
                c.check(attr(f, "format") == "hawser-modes" and int(f.attrs["format_version"]) == 1,
                        "HDF5 root attributes format, format_version")
                c.check("modes test string" in f["/input/scenario"][()].decode(), "HDF5 keeps the scenario as run")
                c.check("not a certification method" in attr(f, "caution"),
                        "HDF5 root caution attribute")
                units = {"period": "s", "frequency": "Hz", "damping_ratio": "1", "eigenvalue_real": "1/s",
                         "eigenvalue_imag": "1/s", "kind": "1", "kinetic_fraction": "1",
                         "largest_motion_altitude": "m", "shape_real": "m", "shape_imag": "m"}
                for name, u in units.items():
                    c.check(attr(f["/modes/" + name], "units") == u, f"/modes/{name} has units {u}")
                sr, si = f["/modes/shape_real"][()], f["/modes/shape_imag"][()]
                c.check(sr.shape == (6, N_EL + 1, 3) and si.shape == sr.shape, "shapes are (k, N+1, 3)", str(sr.shape))
                amp = np.sqrt(np.sum(sr ** 2 + si ** 2, axis=2))
                c.check(np.allclose(amp.max(axis=1), 1.0, rtol=1e-12), "each shape has largest node amplitude 1 m")
                c.check(np.all(amp[:, 0] == 0) and np.all(amp[:, -1] == 0), "prescribed end nodes do not move")
                c.check(np.all(sr[:, :, 0] == 0), "no along motion in a string's lateral modes")
                if j is not None:
                    per = f["/modes/period"][()]
                    c.check(np.allclose(per, [m["period_s"] for m in j["modes"]], rtol=1e-14), "HDF5 periods = JSON periods")
                    codes = {0: "along", 1: "east-west", 2: "north-south"}
                    c.check([codes[int(k)] for k in f["/modes/kind"][()]] == [m["kind"] for m in j["modes"]],
                            "HDF5 kind codes = JSON kinds")
                c.check(f["/equilibrium/position"].shape == (N_EL + 1, 3), "equilibrium positions for plotting")
        except (OSError, KeyError) as e:
            c.check(False, "HDF5 shape file readable with the documented layout", repr(e))

        # The readable table.
        p = run(scenario, "-k", "3", "-o", os.path.join(tmp, "t.h5"))
        lines = p.stdout.splitlines()
        rows = [l for l in lines if l.split()[:1] and l.split()[0].isdigit() and len(l.split()) == 9]
        c.check(p.returncode == 0 and lines and lines[0].startswith("hawser modes: modes test string"),
                "table: exit 0 and title", p.stderr)
        c.check(len(rows) == 3, "table: one row per mode", str(rows))
        c.check(any("shapes:" in l for l in lines), "table names the shape file")

        # --set reaches the model.
        p = run(scenario, "-k", "2", "--json", "--set", "mesh.elements=20")
        ok = p.returncode == 0 and json.loads(p.stdout)["degrees_of_freedom"] == 3 * 19
        c.check(ok, "--set mesh.elements=20 takes effect", p.stderr)

        # The demo tether: rotation, damping; internal consistency of each mode.
        demo = os.path.join(a.source, "scenarios", "demo.yaml")
        p = run(demo, "-k", "4", "--json", "--set", "mesh.elements=60")
        c.check(p.returncode == 0, "demo modes exit 0", p.stderr)
        if p.returncode == 0:
            d = json.loads(p.stdout)
            c.check(d["stiffness_negative_directions"] == 0, "demo: positive definite tangent stiffness")
            for m in d["modes"]:
                lam = complex(m["eigenvalue_real_per_s"], m["eigenvalue_imag_per_s"])
                c.check(abs(m["period_s"] * lam.imag / (2 * math.pi) - 1) < 1e-12, f"demo mode {m['index']}: period")
                c.check(abs(m["damping_ratio"] + lam.real / abs(lam)) < 1e-15, f"demo mode {m['index']}: damping ratio")
                c.check(0 <= m["largest_motion_altitude_m"] <= 1.0e8 + 1, f"demo mode {m['index']}: altitude on the tether")

        # Bad input: exit 2, a message, nothing on standard output.
        for args, words in (((scenario, "-k", "0"), "-k"),
                            ((scenario, "-k", "500"), "degrees of freedom"),
                            ((os.path.join(tmp, "missing.yaml"),), "cannot open"),
                            ((scenario, "-k", "many"), "-k")):
            p = run(*args)
            c.check(p.returncode == 2 and words in p.stderr and not p.stdout.strip(),
                    f"bad input {args[1:] or args}: exit 2 naming {words!r}",
                    f"exit {p.returncode}, stderr {p.stderr.strip()[:200]!r}, stdout {p.stdout[:100]!r}")

    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
