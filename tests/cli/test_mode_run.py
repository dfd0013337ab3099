"""A run started in a computed mode oscillates at that mode's period (issue: modal analysis,
item 4, the check run users can repeat with `initial.mode`).

The lowest (east-west) mode of a coarse demo tether from `hawser modes --json` against the
period of the top node's east-west motion in `hawser run` started from that mode shape,
measured from upward zero crossings; agreement within 1% (the issue's acceptance figure).
"""
import argparse
import json
import os
import subprocess
import sys
import tempfile

import h5py
import numpy as np


def crossing_period(t, q):
    up = [i for i in range(len(q) - 1) if q[i] < 0.0 <= q[i + 1]]
    times = [t[i] + (t[i + 1] - t[i]) * (-q[i]) / (q[i + 1] - q[i]) for i in up]
    return float(np.mean(np.diff(times))), len(times)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--hawser", required=True)
    ap.add_argument("--source", required=True)
    a = ap.parse_args()
    demo = os.path.join(a.source, "scenarios", "demo.yaml")
    common = ["--set", "mesh.elements=40", "--set", "mesh.grading=uniform", "--set", "climbers=[]"]
    passed = failed = 0
    p = subprocess.run([a.hawser, "modes", demo, "-k", "1", "--json", *common], capture_output=True, text=True)
    if p.returncode != 0:
        print("FAIL hawser modes:", p.stderr)
        print("0 passed, 1 failed")
        return 1
    mode = json.loads(p.stdout)["modes"][0]
    period = mode["period_s"]
    # erk and esdirk (the implicit Runge-Kutta method, checked end to end from the command line).
    for method in ("erk", "esdirk"):
        with tempfile.TemporaryDirectory() as tmp:
            out = os.path.join(tmp, "mode.h5")
            p = subprocess.run([a.hawser, "run", demo, "-o", out, *common, "--set", "initial.displacements=[]",
                                "--set", "initial.mode.index=1", "--set", "initial.mode.amplitude=1 km",
                                "--set", f"simulation.duration={2.2 * period}",
                                "--set", "simulation.output_interval=20 min",
                                "--set", f"simulation.method={method}"], capture_output=True, text=True)
            ok = p.returncode == 0
            print(("ok  " if ok else "FAIL") + f" {method}: run from mode 1 exits {p.returncode}")
            passed += ok
            failed += not ok
            if not ok:
                print(p.stderr)
                continue
            with h5py.File(out, "r") as f:
                t = f["time"][:]
                y = f["nodes/position"][:, -1, 1] - f["equilibrium/position"][-1, 1]
            measured, n = crossing_period(t, y)
            rel = abs(measured - period) / period
            ok = n >= 2 and rel < 0.01
            print(("ok  " if ok else "FAIL") + f" {method}: {mode['kind']} mode: modes {period / 3600:.4f} h, "
                  f"run {measured / 3600:.4f} h ({n} crossings), difference {rel:.2e} (limit 1e-2)")
            passed += ok
            failed += not ok
    print(f"{passed} passed, {failed} failed")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
