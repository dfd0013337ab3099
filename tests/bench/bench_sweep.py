#!/usr/bin/python3
"""Sweep speed: 16 variants of the traffic scenario (4 cruise speeds x 4 fibre damping times,
the first HOURS simulated hours) run one after another with `hawser run`, and as
`hawser sweep -j 2`, alternately, REPEAT times each. Prints each pass and the best of each (the
quietest moment of a shared machine), their ratio (the target: at most 0.6 on 2 cores) and the
processor time each took. Not a test: the figure depends on the machine and on what else runs
on it (a machine busy with other work gives the sweep no second core).

Usage: /usr/bin/python3 tests/bench/bench_sweep.py --hawser BIN --source DIR [--hours H] [-j N]
       [--repeat R]
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


def one_after_another(a, scenario, tmp):
    for speed, damping in itertools.product(SPEEDS, DAMPING):
        subprocess.run([a.hawser, "run", scenario, "--set", f"simulation.duration={a.hours} h",
                        "--set", f"schedules[0].cruise_speed={speed}",
                        "--set", f"material.damping_time={damping}",
                        "-o", os.path.join(tmp, "alone.h5")], check=True, capture_output=True)


def as_sweep(a, study, tmp):
    out = os.path.join(tmp, "out")
    shutil.rmtree(out, ignore_errors=True)
    subprocess.run([a.hawser, "sweep", study, "-j", str(a.j), "-o", out], check=True,
                   capture_output=True)


def timed(fn, *args):
    c0, t0 = cpu(), time.perf_counter()
    fn(*args)
    return time.perf_counter() - t0, cpu() - c0


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--hawser", required=True)
    ap.add_argument("--source", required=True)
    ap.add_argument("--hours", type=float, default=24)
    ap.add_argument("-j", type=int, default=2)
    ap.add_argument("--repeat", type=int, default=3)
    a = ap.parse_args()
    scenario = os.path.join(a.source, "scenarios", "traffic.yaml")
    tmp = tempfile.mkdtemp(prefix="hawser-bench-sweep-")
    try:
        study = os.path.join(tmp, "study.yaml")
        with open(study, "w") as f:
            f.write(f"scenario: {scenario}\nset:\n  simulation.duration: {a.hours} h\nproduct:\n"
                    f"  schedules[0].cruise_speed: [{', '.join(SPEEDS)}]\n"
                    f"  material.damping_time: [{', '.join(DAMPING)}]\n")
        serial, sweep = [], []
        for i in range(a.repeat):
            load = os.getloadavg()[0]
            s = timed(one_after_another, a, scenario, tmp)
            w = timed(as_sweep, a, study, tmp)
            serial.append(s)
            sweep.append(w)
            print(f"pass {i + 1} (load average {load:.1f}): one after another {s[0]:.2f} s wall, "
                  f"{s[1]:.2f} s processor; sweep -j {a.j} {w[0]:.2f} s wall, "
                  f"{w[1]:.2f} s processor")
        bs, bw = min(x[0] for x in serial), min(x[0] for x in sweep)
        print(f"16 variants, {a.hours:g} h each, best of {a.repeat}: "
              f"one after another {bs:.2f} s; "
              f"hawser sweep -j {a.j} {bw:.2f} s; ratio {bw / bs:.3f}")
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
