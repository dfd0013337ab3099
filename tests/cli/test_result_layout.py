#!/usr/bin/python3
"""The result files and config/result_layout.yaml agree (the contract cannot drift).

Runs short versions (--set) of the demo with a strike added (climbers, events), the storm
(weather) and the cut scenario, and checks each file against the layout both ways:
  - every dataset is listed (path patterns: `*` = one name) and its `units` attribute is the
    layout's; every required dataset is there;
  - every attribute of every group is listed under `values` with a unit in the group's child
    `units` that is the layout's (texts: "text"), or is a `meaning`/`content` text; every
    required value is there; the root attributes likewise, with the caution among them;
  - the resolved planet and material equal published or independent values: WGS 84's
    equatorial radius (NIMA TR8350.2, 3rd ed., Table 3.1), the synchronous radius
    (GM / Omega^2)^(1/3) from WGS 84's GM and Omega, and the material values that
    `hawser design --json` reports;
  - the summary's altitudes are those of the elements and nodes it names, recomputed with
    numpy from /equilibrium/position and /planet.
The Python reader (postprocess/hawser_result.py) reads the same layout file.
"""
import json
import subprocess
import sys
import tempfile
from pathlib import Path

import h5py
import numpy as np

from cli_checks import Checks, command_line

sys.dont_write_bytecode = True
ARGS = command_line()
SRC = Path(ARGS.source)
sys.path.insert(0, str(SRC / "postprocess"))
import hawser_result as hr  # noqa: E402

SHORT = ["--set", "mesh.elements=40", "--set", "simulation.duration=10 min",
         "--set", "simulation.output_interval=1 min"]
STRIKE = ("\nevents:\n  strikes:\n    - altitude: 20000 km\n      time: 5 min\n"
          "      delta_v: [0, 1, 0]\n")
WGS84_A_M = 6378137.0              # NIMA TR8350.2, 3rd ed. (2000), Table 3.1
WGS84_GM = 3.986004418e14          # m^3/s^2, same table
WGS84_OMEGA = 7.292115e-5          # rad/s, same table
TEXT_ANYWHERE = {"meaning", "content"}  # explanatory texts any object may carry


def text(v):
    return v.decode("utf-8") if isinstance(v, bytes) else str(v)


def is_text(v):
    return isinstance(v, (bytes, str)) or (isinstance(v, np.ndarray) and v.dtype.kind in "SUO")


def check_file(c, path, tag):
    layout = hr.LAYOUT
    with h5py.File(path, "r") as f:
        # root attributes
        for name, value in f.attrs.items():
            entry = layout["root"].get(name)
            c.check(entry is not None, f"{tag}: root attribute {name} is in the layout")
        for name, entry in layout["root"].items():
            if entry.get("required"):
                c.check(name in f.attrs, f"{tag}: required root attribute {name} is written")
        c.check(f.attrs.get("format_version") == layout["format_version"],
                f"{tag}: format_version is the layout's", repr(f.attrs.get("format_version")))
        c.check("certification" in text(f.attrs.get("caution", b"")),
                f"{tag}: the root caution says it is not a certification method")

        datasets, groups = [], []
        f.visititems(lambda n, o: (datasets if isinstance(o, h5py.Dataset) else groups).append(
            ("/" + n, o)))
        for p, d in datasets:
            entry = hr.layout_dataset(p)
            if not c.check(entry is not None, f"{tag}: dataset {p} is in the layout"):
                continue
            units = d.attrs.get("units")
            c.check(units is not None and text(units) == entry["units"],
                    f"{tag}: {p} units {text(units) if units is not None else None!r} = "
                    f"layout {entry['units']!r}")
        for pattern, entry in layout["datasets"].items():
            if entry.get("required") and "*" not in pattern:
                c.check(pattern in f, f"{tag}: required dataset {pattern} is written")

        # group values and their units
        for g, obj in groups:
            if g.endswith("/units"):
                owner = g[: -len("/units")]
                for name in obj.attrs:
                    c.check(name in f[owner].attrs,
                            f"{tag}: {g} attribute {name} names a value of {owner}")
                continue
            stored = f[g]["units"].attrs if "units" in f[g] else {}
            for name, value in obj.attrs.items():
                if name in TEXT_ANYWHERE and is_text(value):
                    continue
                entry = hr.layout_value(g, name)
                if not c.check(entry is not None, f"{tag}: value {g} {name} is in the layout"):
                    continue
                got = text(stored[name]) if name in stored else None
                c.check(got == entry["units"], f"{tag}: {g} {name} unit {got!r} = layout "
                        f"{entry['units']!r}")
                c.check(is_text(value) == (entry["units"] == "text"),
                        f"{tag}: {g} {name} is a text exactly when the layout says so")
        for group in ("/summary", "/material", "/mesh", "/equilibrium"):
            for name, entry in layout["values"][group].items():
                if entry.get("required"):
                    c.check(group in f and name in f[group].attrs,
                            f"{tag}: required value {group} {name} is written")
        return {"summary": dict(f["/summary"].attrs), "planet": dict(f["/planet"].attrs),
                "material": dict(f["/material"].attrs), "eq": f["/equilibrium/position"][()]}


def check_values(c, got, design, tag):
    p, m, s, eq = got["planet"], got["material"], got["summary"], got["eq"]
    c.check(p["equatorial_radius_m"] == WGS84_A_M, f"{tag}: /planet radius is WGS 84's",
            p["equatorial_radius_m"])
    r_sync = (WGS84_GM / WGS84_OMEGA ** 2) ** (1.0 / 3.0)
    c.check(abs(p["synchronous_radius_m"] - r_sync) < 1e-6 * r_sync,
            f"{tag}: /planet synchronous radius = (GM/Omega^2)^(1/3) = {r_sync:.1f} m",
            p["synchronous_radius_m"])
    dm = design["material"]
    for key in ("ultimate_strength_pa", "youngs_modulus_pa"):
        c.check(m[key] == dm[key], f"{tag}: /material {key} = design --json's", (m[key], dm[key]))
    r_m = np.linalg.norm(eq, axis=1)
    h_el = 0.5 * (r_m[:-1] + r_m[1:]) - WGS84_A_M
    for key in ("peak_tension", "min_tension", "min_safety_factor"):
        e = int(s[f"{key}_element"])
        c.check(abs(s[f"{key}_altitude_m"] - h_el[e]) < 1e-6 * max(1.0, h_el[e]),
                f"{tag}: {key}_altitude_m is element {e}'s midpoint altitude",
                (s[f"{key}_altitude_m"], h_el[e]))
    k = int(s["peak_east_west_node"])
    c.check(abs(s["peak_east_west_altitude_m"] - (r_m[k] - WGS84_A_M)) < 1.0,
            f"{tag}: peak_east_west_altitude_m is node {k}'s altitude")
    c.check(s["design_safety_factor"] == m["design_safety_factor"],
            f"{tag}: the design safety factor beside the smallest seen",
            (s["design_safety_factor"], s["min_safety_factor"]))


def main():
    c = Checks()
    hawser = ARGS.hawser
    layout = hr.LAYOUT
    c.check(all("units" in e for e in layout["datasets"].values()),
            "every dataset of the layout has units")
    c.check(all("units" in e for g in layout["values"].values() for e in g.values()),
            "every value of the layout has units")
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        demo = tmp / "demo_strike.yaml"
        demo.write_text((SRC / "scenarios" / "demo.yaml").read_text() + STRIKE)
        cases = [("demo", demo), ("storm", SRC / "scenarios" / "storm.yaml"),
                 ("cut", SRC / "scenarios" / "cut.yaml")]
        for tag, scenario in cases:
            out = tmp / f"{tag}.h5"
            p = subprocess.run([hawser, "run", str(scenario), "-o", str(out), *SHORT],
                               capture_output=True, text=True, timeout=300)
            if not c.check(p.returncode == 0 and out.is_file(), f"{tag}: hawser run exit 0",
                           p.stderr[-2000:]):
                continue
            c.check("not a certification method" in p.stdout.splitlines()[-2]
                    if len(p.stdout.splitlines()) >= 2 else False,
                    f"{tag}: run's terminal summary ends with the caution", p.stdout[-300:])
            d = subprocess.run([hawser, "design", str(scenario), "--json", *SHORT],
                               capture_output=True, text=True, timeout=120)
            got = check_file(c, out, tag)
            if c.check(d.returncode == 0, f"{tag}: design --json exit 0", d.stderr[-500:]):
                check_values(c, got, json.loads(d.stdout), tag)
            if tag == "demo":
                with h5py.File(out, "r") as f:
                    st = f["/events/strike_time"][()]
                    c.check(list(st) == [300.0], "demo: /events/strike_time holds the strike",
                            st)
            if tag == "cut":
                with h5py.File(out, "r") as f:
                    ct = f["/events/cut_time"][()]
                    h = f["/events/cut_altitude"][()]
                    c.check(list(ct) == [120.0] and h[0] == 3.0e7,
                            "cut: /events holds the cut (2 min, 30,000 km)", (ct, h))
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
