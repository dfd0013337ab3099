"""Every example scenario is a smoke test (style.md habit 10): each file in scenarios/ passes
`hawser check`, prints its design, and runs over a shortened time to a complete result file.
"""
import argparse
import glob
import os
import subprocess
import sys
import tempfile

import h5py


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--hawser", required=True)
    ap.add_argument("--source", required=True)
    a = ap.parse_args()
    passed = failed = 0
    files = sorted(glob.glob(os.path.join(a.source, "scenarios", "*.yaml")))

    def check(ok, what):
        nonlocal passed, failed
        passed += ok
        failed += not ok
        print(("ok   " if ok else "FAIL ") + what)

    check(len(files) > 0, f"{len(files)} scenarios found")
    with tempfile.TemporaryDirectory() as tmp:
        for path in files:
            name = os.path.basename(path)
            p = subprocess.run([a.hawser, "check", path], capture_output=True, text=True, timeout=120)
            check(p.returncode == 0, f"{name}: check ({p.stderr.strip()[:300]})")
            p = subprocess.run([a.hawser, "design", path], capture_output=True, text=True, timeout=120)
            check(p.returncode in (0, 2) and ("research tool" in p.stdout or "uniform-field" in p.stderr),
                  f"{name}: design")
            out = os.path.join(tmp, name + ".h5")
            # Shortened: the first 20 simulated minutes, output every 5 minutes.
            p = subprocess.run([a.hawser, "run", path, "-o", out, "--set", "simulation.duration=20 min",
                                "--set", "simulation.output_interval=5 min"],
                               capture_output=True, text=True, timeout=300)
            ok = p.returncode == 0
            if ok:
                with h5py.File(out, "r") as f:
                    ok = f.attrs["status"] in (b"complete", "complete") and len(f["time"]) == 5
            check(ok, f"{name}: shortened run (exit {p.returncode}) {p.stderr.strip()[:300]}")
    print(f"{passed} passed, {failed} failed")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
