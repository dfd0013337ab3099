"""Scenario validation through the command line (issue: foundation, item 5).

Each case writes a scenario with one known fault, runs `hawser check` and `hawser design`,
and asserts exit code 2, the file:line:column of the fault and the key path in the message,
and nothing on standard output. Run by ctest as: python3 test_validation.py --hawser BIN --source DIR
"""
import argparse
import json
import os
import subprocess
import sys
import tempfile
import time

import h5py
import yaml

GOOD = """\
name: validation base case
planet: earth
material:
  density: 1300 kg/m^3
  youngs_modulus: 630 GPa
  ultimate_strength: 63 GPa
tether:
  profile: constant_stress
  safety_factor: 2
  base_area: 6 mm^2
  top_altitude: 100000 km
  section:
    shape: ribbon
    width_to_thickness: 1000
counterweight:
  mass: computed
anchor:
  latitude: 0 deg
  longitude: 10 deg
mesh:
  elements: 100
"""


def line_of(text, needle):
    for i, line in enumerate(text.splitlines(), 1):
        if needle in line:
            return i
    raise AssertionError(f"{needle!r} not in scenario")


class Runner:
    def __init__(self, hawser, tmp):
        self.hawser, self.tmp = hawser, tmp
        self.passed, self.failed = 0, 0

    def run(self, *args):
        return subprocess.run([self.hawser, *args], capture_output=True, text=True, timeout=60)

    def case(self, name, text, expect, extra=(), commands=("check", "design")):
        """`expect`: list of (line, key, words) that must all appear in one line of stderr;
        line is a line number (file:line: must appear), "file" (the file's path must) or None."""
        path = os.path.join(self.tmp, name.replace(" ", "_") + ".yaml")
        with open(path, "w") as f:
            f.write(text)
        for cmd in commands:
            p = self.run(cmd, path, *extra)
            problems = []
            if p.returncode != 2:
                problems.append(f"exit code {p.returncode}, expected 2")
            if p.stdout.strip():
                problems.append(f"wrote to stdout: {p.stdout[:200]!r}")
            for line, key, words in expect:
                loc = f"{path}:{line}:" if isinstance(line, int) else (path if line == "file" else "")
                hits = [l for l in p.stderr.splitlines() if loc in l and key in l and all(w in l for w in words)]
                if not hits:
                    problems.append(f"no message with {loc!r}, key {key!r} and {words!r}")
            if problems:
                self.failed += 1
                print(f"FAIL {name} ({cmd}): " + "; ".join(problems) + f"\n  stderr: {p.stderr.strip()}")
            else:
                self.passed += 1
                print(f"ok   {name} ({cmd})")


def mutate(text, old, new):
    assert old in text, old
    return text.replace(old, new, 1)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--hawser", required=True)
    ap.add_argument("--source", required=True)
    a = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        r = Runner(a.hawser, tmp)

        # The base case is valid (otherwise every other case proves nothing).
        base = os.path.join(tmp, "good.yaml")
        open(base, "w").write(GOOD)
        p = r.run("check", base)
        if p.returncode == 0:
            r.passed += 1
        else:
            r.failed += 1
            print("FAIL base case does not validate:", p.stderr)

        t = mutate(GOOD, "  safety_factor: 2\n", "  safety_factor: 2\n  colour: blue\n")
        r.case("unknown key", t, [(line_of(t, "colour"), "tether.colour", ["unknown key"])])

        # A dotted key in the file once named the nested key and silently overrode it.
        t = GOOD + "mesh.elements: 7\n"
        r.case("dotted key in the file", t, [(line_of(t, "mesh.elements"), "mesh.elements", ["one word", "nested"])])

        # A second YAML document was once ignored.
        t = GOOD + "---\nname: second document\n"
        r.case("two documents", t, [(line_of(t, "second document"), "(syntax)", ["one YAML document", "holds 2"])])

        # A key with no value was reported as "got a list".
        t = mutate(GOOD, "  safety_factor: 2\n", "  safety_factor:\n")
        r.case("null value", t, [(line_of(t, "safety_factor"), "tether.safety_factor", ["got nothing (null)"])])

        # Text that is not UTF-8 was once accepted, and broke h5py's decoding of the attribute
        # (RFC 3629: 0xFF never occurs in UTF-8). Written as Latin-1 so the byte stays raw.
        t = mutate(GOOD, "name: validation base case", "name: caf\u00e9 \u00ff")
        path = os.path.join(tmp, "latin1_name.yaml")
        with open(path, "w", encoding="latin-1") as f:
            f.write(t)
        p = r.run("check", path)
        ok = p.returncode == 2 and f"{path}:1:" in p.stderr and "not valid UTF-8" in p.stderr
        r.passed += ok
        r.failed += not ok
        print(("ok   " if ok else "FAIL ") + f"name not in UTF-8: exit {p.returncode}, {p.stderr.strip()}")
        path = os.path.join(tmp, "utf8_name.yaml")
        with open(path, "w", encoding="utf-8") as f:
            f.write(t)
        p = r.run("check", path)
        r.passed += p.returncode == 0
        r.failed += p.returncode != 0
        print(("ok   " if p.returncode == 0 else "FAIL ") + f"the same name in UTF-8 passes: {p.stderr.strip()}")

        t = mutate(GOOD, "  youngs_modulus: 630 GPa\n", "")
        r.case("missing physical property", t, [(line_of(t, "material:"), "material.youngs_modulus", ["missing"])])

        t = mutate(GOOD, "  elements: 100", "  elements: many")
        r.case("wrong type integer", t, [(line_of(t, "elements:"), "mesh.elements", ["whole number"])])

        t = mutate(GOOD, "  top_altitude: 100000 km", "  top_altitude: 100000 furlongs")
        r.case("unknown unit", t, [(line_of(t, "top_altitude"), "tether.top_altitude", ["unknown unit"])])

        t = mutate(GOOD, "  section:\n    shape: ribbon\n    width_to_thickness: 1000\n", "  section: ribbon\n")
        r.case("wrong type map", t, [(line_of(t, "section:"), "tether.section", ["mapping"])])

        t = mutate(GOOD, "  density: 1300 kg/m^3", "  density: -1300 kg/m^3")
        r.case("non-positive density", t, [(line_of(t, "density:"), "material.density", ["greater than 0"])])

        t = mutate(GOOD, "  ultimate_strength: 63 GPa", "  ultimate_strength: 0 GPa")
        r.case("non-positive strength", t, [(line_of(t, "ultimate_strength"), "material.ultimate_strength", ["greater than 0"])])

        t = mutate(GOOD, "  safety_factor: 2", "  safety_factor: 1")
        r.case("design stress at ultimate", t, [(line_of(t, "safety_factor"), "tether.safety_factor", ["greater than 1"])])

        t = mutate(GOOD, "  top_altitude: 100000 km", "  top_altitude: 30000 km")
        r.case("top below geostationary", t, [(line_of(t, "top_altitude"), "tether.top_altitude", ["synchronous", "fall"])])

        t = mutate(GOOD, "  mass: computed", "  mass: 1000 kg")
        r.case("counterweight too light", t, [(line_of(t, "mass: 1000"), "counterweight.mass", ["cannot hold the tether up"])])

        t = mutate(GOOD, "  profile: constant_stress", "  profile: uniform")
        r.case("uniform cable infeasible", t, [(line_of(t, "profile:"), "tether.profile", ["uniform cable"])])

        t = mutate(GOOD, "  latitude: 0 deg", "  latitude: [0, 1]")
        r.case("list where a value belongs", t, [(line_of(t, "latitude"), "anchor.latitude", ["single value"])])

        t = mutate(GOOD, "mesh:\n  elements: 100", "mesh:\n  elements: 100\n   bad: [")
        r.case("malformed YAML", t, [(line_of(t, "bad: ["), "(syntax)", ["malformed YAML"])])

        t = mutate(GOOD, "planet: earth", "planet: vulcan")
        r.case("unknown planet", t, [(line_of(t, "planet:"), "planet", ["no entry 'vulcan'", "earth"])])

        # Every problem at once: three faults, three messages.
        t = mutate(GOOD, "  density: 1300 kg/m^3", "  density: -1")
        t = mutate(t, "  elements: 100", "  elements: 0")
        t = mutate(t, "  longitude: 10 deg", "  longitude: 10 deg\n  height: 3 m")
        r.case("all problems at once", t, [
            (line_of(t, "density"), "material.density", ["greater than 0"]),
            (line_of(t, "elements"), "mesh.elements", ["at least 1"]),
            (line_of(t, "height"), "anchor.height", ["unknown key"]),
        ])

        # --set is validated like the file.
        r.case("--set bad value", GOOD, [(None, "tether.safety_factor", ["--set tether.safety_factor=0.5", "greater than 1"])],
               extra=("--set", "tether.safety_factor=0.5"))
        r.case("--set unknown key", GOOD, [(None, "tether.colour", ["--set tether.colour=red", "unknown key"])],
               extra=("--set", "tether.colour=red"))
        r.case("--set malformed", GOOD, [(None, "(command line)", ["key.path=value"])], extra=("--set", "nonsense"))

        # List items by index: a missing item and a malformed index are errors with the reason.
        demo = os.path.join(a.source, "scenarios", "demo.yaml")
        for setting, words in (("climbers[3].mass=30 t", "there is no [3]"),
                               ("climbers[x].mass=30 t", "list index is written"),
                               # a trailing dot was once taken for the key before it
                               ("tether.safety_factor.=3", "empty key in the path"),
                               # an index past 64 bits once gave "error: stoul" and exit 1
                               ("climbers[99999999999999999999].mass=1 t", "too large"),
                               # a key the --set creates is located on the command line, not at
                               # the scenario's line 1
                               ("colour.shade=red", "unknown key"),
                               ("mesh[0]=3", "mesh is not a list"),
                               # a climber's drag needs air (the demo has no atmosphere)
                               ("climbers[0].drag={area: 4 m^2, cd: 1.1}", "needs air")):
            p = r.run("check", demo, "--set", setting)
            ok = p.returncode == 2 and words in p.stderr and "--set " + setting in p.stderr
            r.passed += ok
            r.failed += not ok
            print(("ok  " if ok else "FAIL") + f" --set {setting}: exit {p.returncode}, {p.stderr.strip()}")
        # A path of 60,000 parts once overflowed the stack (and took minutes): refused at once,
        # with a message of bounded length (key paths have at most 32 parts, --set at most
        # 4096 characters: solver/input/scenario_reader.cpp).
        for setting in ("a." * 60000 + "b=1", "a." * 1000 + "b=1"):
            t0 = time.monotonic()
            p = r.run("check", demo, "--set", setting)
            took = time.monotonic() - t0
            ok = p.returncode == 2 and len(p.stderr) < 10000 and took < 10 and \
                ("at most 32 parts" in p.stderr or "longer than 4096" in p.stderr)
            r.passed += ok
            r.failed += not ok
            print(("ok  " if ok else "FAIL") + f" --set of {len(setting)} characters: exit "
                  f"{p.returncode} in {took:.2f} s, {p.stderr.strip()[:160]}")
        # ... and a valid one takes effect: the scenario as run (/input/scenario) carries it.
        out = os.path.join(tmp, "set_item.h5")
        p = r.run("run", demo, "-o", out, "--set", "climbers[0].mass=30 t", "--set", "simulation.duration=1 min")
        try:
            with h5py.File(out, "r") as f:
                raw = f["input/scenario"][()]
            as_run = yaml.safe_load(raw.decode() if isinstance(raw, bytes) else raw)
            ok = p.returncode == 0 and str(as_run["climbers"][0]["mass"]) == "30 t"
        except (OSError, KeyError, IndexError, yaml.YAMLError):
            ok = False
        r.passed += ok
        r.failed += not ok
        print(("ok  " if ok else "FAIL") + " --set climbers[0].mass takes effect in the scenario as run")

        # A valid --set takes effect: the design reflects it.
        p = r.run("design", base, "--json", "--set", "tether.safety_factor=3")
        try:
            d = json.loads(p.stdout)
            ok = p.returncode == 0 and abs(d["design"]["design_stress_pa"] - 21e9) < 1.0
        except (ValueError, KeyError):
            ok = False
        r.passed += ok
        r.failed += not ok
        print(("ok  " if ok else "FAIL") + " --set takes effect in design --json")

        # Usage errors are exit code 2 too; a missing file names itself.
        for args, words in ((("design",), "SCENARIO"), (("check", os.path.join(tmp, "nope.yaml")), "cannot open")):
            p = r.run(*args)
            ok = p.returncode == 2 and words in (p.stderr + p.stdout)
            r.passed += ok
            r.failed += not ok
            print(("ok  " if ok else "FAIL") + f" usage {args}: exit {p.returncode}")

    print(f"{r.passed} passed, {r.failed} failed")
    return 1 if r.failed else 0


if __name__ == "__main__":
    sys.exit(main())
