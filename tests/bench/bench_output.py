#!/usr/bin/python3
"""Benchmark: what writing the result file costs a run.

Case: the climber transit of bench_climber.cpp (the demo tether, 20 t at 200 km/h from the
anchor toward the geostationary altitude) with 400 elements for 7 days (168 h), rtol 1e-6,
atol 1 mm and 1e-4 m/s, bdf; the full state of every node written every 5 minutes (2,017
outputs, 47 MB) against the same run with an output every 6 hours (29 outputs): the difference
is the cost of output. Each case runs `hawser run` as a user would (default flush policy:
every 10 s of wall time), best of --repeat wall times.

    bench_output.py --hawser build/hawser [--repeat 3] [--compression none deflate]

A measurement, not a test: run it on an idle machine.
"""
import argparse
import os
import subprocess
import tempfile
import time

SCENARIO = """name: climber transit output benchmark
planet: earth
material: kestrel_k100
tether: {profile: constant_stress, safety_factor: 2, base_design_load: 196.1 kN, top_altitude: 100000 km,
         section: {shape: ribbon, width_to_thickness: 1000}}
counterweight: {mass: computed}
anchor: {latitude: 0 deg, longitude: -125 deg}
mesh: {elements: 400}
simulation: {duration: 168 h, output_interval: 5 min, method: bdf, rtol: 1.0e-6,
             atol_position: 1.0e-3, atol_velocity: 1.0e-4}
climbers:
  - {name: transit, mass: 20 t, from: 0 km, to: 35786 km, direction: up, cruise_speed: 200 km/h,
     acceleration: 0.5 m/s^2, deceleration: 0.5 m/s^2}
"""


def best_wall(exe, scenario, out, extra, repeat):
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        subprocess.run([exe, "run", scenario, "-o", out, *extra], check=True,
                       stdout=subprocess.DEVNULL)
        best = min(best, time.perf_counter() - t0)
    return best, os.path.getsize(out)


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--hawser", required=True)
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--compression", nargs="+", default=["none", "deflate"])
    a = ap.parse_args()
    exe = os.path.abspath(a.hawser)
    with tempfile.TemporaryDirectory() as tmp:
        scenario = os.path.join(tmp, "transit.yaml")
        with open(scenario, "w") as f:
            f.write(SCENARIO)
        out = os.path.join(tmp, "out.h5")
        base, base_size = best_wall(exe, scenario, out, ["--set", "simulation.output_interval=6 h"],
                                    a.repeat)
        print(f"29 outputs:                 {base:6.2f} s wall, {base_size / 1e6:6.1f} MB")
        for comp in a.compression:
            wall, size = best_wall(exe, scenario, out, ["--set", f"output.compression={comp}"], a.repeat)
            print(f"2017 outputs, {comp:8s}:    {wall:6.2f} s wall, {size / 1e6:6.1f} MB; output costs "
                  f"{wall - base:5.2f} s = {100 * (wall - base) / wall:4.1f} % of the run")


if __name__ == "__main__":
    main()
