"""What the sweep tests share: small studies on scenarios/traffic.yaml, and readers of a sweep
folder's summary.csv and sweep.log. Not a test itself (ctest runs tests/cli/test_*.py only)."""
import csv
import os

import h5py

# The first hours of the traffic day: two departures, a run of a fraction of a second to a few
# seconds. Four variants: cruise speed x fibre damping.
PRODUCT = """\
product:
  schedules[0].cruise_speed: [100 km/h, 200 km/h]
  material.damping_time: [0.5 s, 2 s]
"""


def write_study(folder, source, hours=2, extra="", product=PRODUCT, name="study.yaml"):
    """Writes a study on the source tree's traffic scenario; returns its path."""
    path = os.path.join(folder, name)
    with open(path, "w") as f:
        f.write(f"scenario: {os.path.join(source, 'scenarios', 'traffic.yaml')}\n"
                f"set:\n  simulation.duration: {hours} h\n" + product + extra +
                "rank_by:\n  - {metric: min_safety_factor, order: descending}\n"
                "limits:\n  - {metric: peak_east_west_m, at_most: 1.2 km}\n")
    return path


def read_rows(sweep_dir):
    """summary.csv as a list of dicts, in variant order."""
    with open(os.path.join(sweep_dir, "summary.csv"), newline="") as f:
        return list(csv.DictReader(f))


def log_events(sweep_dir):
    """sweep.log as (event, variant id, rest) tuples: event is start or end."""
    out = []
    path = os.path.join(sweep_dir, "sweep.log")
    if not os.path.exists(path):
        return out
    with open(path) as f:
        for line in f:
            parts = line.split()
            if len(parts) >= 5 and parts[3] in ("start", "end"):
                out.append((parts[3], parts[4], " ".join(parts[5:])))
    return out


def summary_attrs(path):
    """The /summary attributes of a result file, without the run's wall time."""
    with h5py.File(path, "r") as f:
        return {k: v for k, v in f["/summary"].attrs.items() if k != "wall_time_s"}


def same_bits(a, b):
    """True if two attribute values are equal bit for bit (NaN included)."""
    import numpy as np
    a, b = np.asarray(a), np.asarray(b)
    return a.dtype == b.dtype and a.shape == b.shape and a.tobytes() == b.tobytes()


def sweep(hawser, *args, **kw):
    """`hawser sweep ARGS`, its output captured as text."""
    import subprocess
    return subprocess.run([hawser, "sweep", *args], capture_output=True, text=True, **kw)
