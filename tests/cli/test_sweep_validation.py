#!/usr/bin/python3
"""A study file is validated like a scenario: every problem at once, each with the study's
file:line:column and the key path, exit code 2, and nothing written (no sweep folder).

Each case is a study with one fault; the expected location is computed from the text (the line
and column where the faulty key or value starts, counted from 1, as `hawser check` reports).
Faults in the overrides are found by the scenario loader itself (they are validated as --set
would be) and reported at the value in the study. Source of the expectations: the issue's brief
and architecture.md ("every problem with file:line and the key's path"; exit code 2).

Run by ctest as: python3 test_sweep_validation.py --hawser BIN --source DIR
"""
import os
import shutil
import sys
import tempfile

from cli_checks import Checks, command_line
from sweep_cases import sweep


def locate(text, needle, nth=0):
    """(line, column), from 1, of the nth occurrence of `needle` in `text`."""
    at = -1
    for _ in range(nth + 1):
        at = text.index(needle, at + 1)
    line = text.count("\n", 0, at) + 1
    col = at - (text.rfind("\n", 0, at) + 1) + 1
    return line, col


def main():
    args = command_line()
    c = Checks()
    tmp = tempfile.mkdtemp(prefix="hawser-study-")
    head = f"scenario: {os.path.join(args.source, 'scenarios', 'traffic.yaml')}\n"
    # (what, study body, [(needle to locate, key path, words of the message)])
    cases = [
        ("an unknown study key", "prodcut:\n  material.damping_time: [1 s]\n",
         [("prodcut", "prodcut", "unknown key")]),
        ("a bad value in one product item",
         "product:\n  schedules[0].cruise_speed: [100 km/h, 100 kg]\n",
         [("100 kg", "schedules[0].cruise_speed", "")]),
        ("an unknown scenario key in a strategy",
         "strategies:\n  - name: fast\n    set:\n      schedules[0].cruise_sped: 300 km/h\n",
         [("300 km/h", "schedules[0].cruise_sped", "unknown key")]),
        ("a product entry that is not a list", "product:\n  material.damping_time: 2 s\n",
         [("2 s", "product.material.damping_time", "list of values")]),
        ("zipped lists of different lengths",
         "zip:\n  - material.damping_time: [1 s, 2 s]\n    schedules[0].cruise_speed: [100 km/h]\n",
         [("[100 km/h]", "zip[0].schedules[0].cruise_speed", "must be as long")]),
        ("a key varied on two axes",
         "product:\n  material.damping_time: [1 s, 2 s]\nzip:\n  - material.damping_time: [3 s]\n",
         [("material.damping_time", "material.damping_time", "varied by")]),
        ("a limit with a unit of the wrong kind",
         "limits:\n  - metric: peak_east_west_m\n    at_most: 5 kg\n",
         [("5 kg", "limits[0].at_most", "")]),
        ("a rank order that is no choice",
         "rank_by:\n  - metric: min_safety_factor\n    order: up\n",
         [("up", "rank_by[0].order", "not one of")]),
        ("a climber sent past the tether's top (found by the model, as hawser check does)",
         "variants:\n  - name: far\n    set:\n      schedules[0].to: 150000 km\n",
         [("150000 km", "schedules[0].to", "beyond the top")]),
        ("two faults at once",
         "set: {tether.safety_factor: -2}\nproduct:\n  material.density: [1 kg]\n",
         [("-2", "tether.safety_factor", ""), ("1 kg", "material.density", "")]),
    ]
    try:
        for what, body, expected in cases:
            text = head + body
            path = os.path.join(tmp, "study.yaml")
            with open(path, "w") as f:
                f.write(text)
            out = os.path.join(tmp, "out")
            r = sweep(args.hawser, path, "-o", out)
            c.check(r.returncode == 2, f"{what}: exit code 2", (r.returncode, r.stderr))
            c.check(not os.path.exists(out), f"{what}: no sweep folder written")
            for needle, key, words in expected:
                nth = 1 if needle == "material.damping_time" and "zip" in body else 0
                line, col = locate(text, needle, nth)
                want = f"{path}:{line}:{col}: {key}:"
                ok = any(want in l and words in l for l in r.stderr.splitlines())
                c.check(ok, f"{what}: reported at {os.path.basename(path)}:{line}:{col} with {key}",
                        r.stderr)
        # A variant index past the study's end (a Slurm array of another study).
        path = os.path.join(tmp, "study.yaml")
        with open(path, "w") as f:
            f.write(head)
        r = sweep(args.hawser, path, "--variant", "1", "-o", os.path.join(tmp, "v"))
        c.check(r.returncode == 2 and "the study has 1 variants" in r.stderr
                and not os.path.exists(os.path.join(tmp, "v")),
                "--variant past the last: exit 2, nothing written", r.stderr)
        # A missing study file and a missing base scenario.
        r = sweep(args.hawser, os.path.join(tmp, "nope.yaml"))
        c.check(r.returncode == 2 and "nope.yaml" in r.stderr, "a missing study: exit 2, named",
                r.stderr)
        path = os.path.join(tmp, "study.yaml")
        with open(path, "w") as f:
            f.write("scenario: missing.yaml\n")
        r = sweep(args.hawser, path, "-o", os.path.join(tmp, "o"))
        c.check(r.returncode == 2 and f"{path}:1:11: scenario:" in r.stderr,
                "a missing base scenario: exit 2 at the scenario key", r.stderr)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
