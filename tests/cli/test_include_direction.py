#!/usr/bin/python3
"""The pipeline's stages include only the stages before them, never one after.

The chain (DEVELOPERS.md, "Code map"; CMakeLists.txt links one static library per stage in
the same order):

    models/ -> solver/input/ -> solver/assembly/ -> solver/integration/ -> solver/output/
            -> solver/cli/

A file in a stage may include files of its own stage and of the stages to its left. tests/,
postprocess/ and scripts/ are outside the chain. Every .hpp/.cpp under models/ and solver/ must
sit in one of the stages (a file dropped at solver/'s top level would escape the check).

The checker is tried first on a made-up tree with one arrow pointing back, which it must report:
a check that cannot fail would prove nothing.

Source of the expectation: issue "One step of redesign" (a test fails if a file in
solver/input/ includes anything from assembly/, integration/, output/ or cli/, and likewise
down the chain).

Run by ctest as: python3 test_include_direction.py --hawser BIN --source DIR
"""
import os
import re
import sys
import tempfile

from cli_checks import Checks, command_line

STAGES = ["models", "solver/input", "solver/assembly", "solver/integration", "solver/output",
          "solver/cli"]
INCLUDE = re.compile(r'^\s*#\s*include\s*"([^"]+)"', re.M)


def stage_of(path):
    """Index of the stage a repository-relative path belongs to, or None."""
    for i, s in enumerate(STAGES):
        if path.startswith(s + "/"):
            return i
    return None


def violations(root):
    """(file, included, why) for every include that points up the chain or out of it, and every
    source file outside the stages."""
    bad = []
    for top in ("models", "solver"):
        for dirpath, _, files in os.walk(os.path.join(root, top)):
            for name in files:
                if not name.endswith((".hpp", ".cpp")):
                    continue
                rel = os.path.relpath(os.path.join(dirpath, name), root)
                own = stage_of(rel)
                if own is None:
                    bad.append((rel, "", "not in any stage"))
                    continue
                with open(os.path.join(dirpath, name), encoding="utf-8") as f:
                    text = f.read()
                for inc in INCLUDE.findall(text):
                    other = stage_of(inc)
                    if other is None:
                        if inc.startswith(("models/", "solver/")):
                            bad.append((rel, inc, "includes a file outside the stages"))
                        continue
                    if other > own:
                        bad.append((rel, inc, f"{STAGES[own]} includes {STAGES[other]}"))
    return bad


def write(root, rel, text):
    path = os.path.join(root, rel)
    os.makedirs(os.path.dirname(path), exist_ok=True)
    with open(path, "w", encoding="utf-8") as f:
        f.write(text)


def main():
    args = command_line()
    c = Checks()

    with tempfile.TemporaryDirectory() as tmp:
        write(tmp, "models/a.hpp", "#pragma once\n")
        write(tmp, "solver/input/b.hpp", '#include "models/a.hpp"\n')
        write(tmp, "solver/cli/c.cpp", '#include "solver/input/b.hpp"\n')
        c.check(violations(tmp) == [], "checker: a tree whose arrows all point down passes",
                str(violations(tmp)))
        write(tmp, "solver/input/d.cpp", '#include "solver/assembly/e.hpp"\n')
        write(tmp, "models/f.cpp", '#  include "solver/output/g.hpp"\n')
        write(tmp, "solver/loose.hpp", "#pragma once\n")
        got = sorted(v[0] for v in violations(tmp))
        c.check(got == ["models/f.cpp", "solver/input/d.cpp", "solver/loose.hpp"],
                "checker: two back arrows and a file outside the stages are all reported",
                str(got))

    bad = violations(args.source)
    for rel, inc, why in bad:
        print(f"  {rel}: {inc} ({why})")
    c.check(not bad, "no include in models/ or solver/ points back up the pipeline",
            f"{len(bad)} found")
    sys.exit(c.summary())


if __name__ == "__main__":
    main()
