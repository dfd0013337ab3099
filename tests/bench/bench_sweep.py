#!/usr/bin/python3
"""Sweep speed: 16 variants of the traffic scenario (4 cruise speeds x 4 fibre damping times,
the first HOURS simulated hours) run one after another with `hawser run`, then as
`hawser sweep -j 2`. Prints both wall times, their ratio (the target: at most 0.6 on a
2-core machine) and the processor time each took. Not a test: the figure depends on the machine
and on what else runs on it (a busy machine gives the sweep no second core).

Usage: /usr/bin/python3 tests/bench/bench_sweep.py --hawser BIN --source DIR [--hours H] [-j N]
"""
import argparse
import itertools
import os
import resource
import shutil
import subprocess
import sys
import tempfile
import time

SPEEDS = ["100 km/h", "150 km/h", "200 km/h", "250 km/h"]
DAMPING = ["0.5 s", "1 s", "2 s", "4 s"]


def cpu():
    """Processor time [s] of the finished child processes (the runs and the sweep's)."""
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--hawser", required=True)
    ap.add_argument("--source", required=True)
    ap.add_argument("--hours", type=float, default=24)
    ap.add_argument("-j", type=int, default=2)
    a = ap.parse_args()
    scenario = os.path.join(a.source, "scenarios", "traffic.yaml")
    tmp = tempfile.mkdtemp(prefix="hawser-bench-sweep-")
    try:
        study = os.path.join(tmp, "study.yaml")
        with open(study, "w") as f:
            f.write(f"scenario: {scenario}\nset:\n  simulation.duration: {a.hours} h\nproduct:\n"
                    f"  schedules[0].cruise_speed: [{', '.join(SPEEDS)}]\n"
                    f"  material.damping_time: [{', '.join(DAMPING)}]\n")
        c0, t0 = cpu(), time.perf_counter()
        for speed, damping in itertools.product(SPEEDS, DAMPING):
            subprocess.run([a.hawser, "run", scenario, "--set", f"simulation.duration={a.hours} h",
                            "--set", f"schedules[0].cruise_speed={speed}",
                            "--set", f"material.damping_time={damping}",
                            "-o", os.path.join(tmp, "alone.h5")], check=True, capture_output=True)
        serial, serial_cpu = time.perf_counter() - t0, cpu() - c0
        c0, t0 = cpu(), time.perf_counter()
        subprocess.run([a.hawser, "sweep", study, "-j", str(a.j), "-o", os.path.join(tmp, "out")],
                       check=True, capture_output=True)
        sweep, sweep_cpu = time.perf_counter() - t0, cpu() - c0
        print(f"16 variants, {a.hours:g} h each: one after another {serial:.2f} s wall "
              f"({serial_cpu:.2f} s processor); hawser sweep -j {a.j} {sweep:.2f} s wall "
              f"({sweep_cpu:.2f} s processor); wall ratio {sweep / serial:.3f}; "
              f"load average at the end {os.getloadavg()[0]:.1f}")
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
