#!/usr/bin/python3
"""`hawser sweep` on the local cores: a study of four variants of the traffic scenario (cruise
speed x fibre damping, 2 simulated hours) and one that makes the integrator give up (at most 3
steps per output: exit 4).

Checks and where the expectation comes from (the issue's brief and architecture.md):
- every variant has a row in summary.csv: the keys varied, status, exit code, wall time, every
  /summary attribute; the failing variant is reported (status failed, exit 4, the integrator's
  message) and the other four complete;
- each variant's /summary equals, bit for bit, that of `hawser run` with the same --set values
  run alone (same input, same binary: the program is deterministic), wall time aside;
- ranking.md lists every variant, the failed one last, and marks the limit breakers;
- a second sweep of the same study in the same folder starts no run (everything is finished);
- variant ids do not depend on where the study lies or where the sweep writes;
- not a terminal: no progress line on standard error.

Run by ctest as: python3 test_sweep_run.py --hawser BIN --source DIR
"""
import os
import shutil
import subprocess
import sys
import tempfile

from cli_checks import Checks, command_line, text_attr
from sweep_cases import log_events, read_rows, same_bits, summary_attrs, write_study

STALL = """\
variants:
  - name: stalls
    set: {simulation.max_steps_per_output: 3}
"""


def main():
    args = command_line()
    c = Checks()
    tmp = tempfile.mkdtemp(prefix="hawser-sweep-")
    try:
        study = write_study(tmp, args.source, extra=STALL)
        out = os.path.join(tmp, "out")
        r = subprocess.run([args.hawser, "sweep", study, "-j", "2", "-o", out], capture_output=True, text=True)
        c.check(r.returncode == 0, "sweep exits 0 when every variant has a final result", r.stderr + r.stdout[-400:])
        c.check("\r" not in r.stderr, "no progress line when standard error is not a terminal", repr(r.stderr[:200]))
        rows = read_rows(out)
        c.check(len(rows) == 5, "summary.csv has one row per variant", len(rows))
        for key in ("schedules[0].cruise_speed", "material.damping_time", "status", "exit_code", "wall_s",
                    "min_safety_factor", "peak_east_west_m", "steps"):
            c.check(key in rows[0], f"summary.csv has the column {key}")
        stall = [x for x in rows if x["name"] == "stalls"]
        c.check(len(stall) == 1 and stall[0]["status"] == "failed" and stall[0]["exit_code"] == "4",
                "the failing variant is recorded with status failed and exit code 4", stall)
        c.check(stall and "CV_TOO_MUCH_WORK" in stall[0]["message"], "its message is the integrator's",
                stall[0]["message"] if stall else "")
        good = [x for x in rows if x["name"] != "stalls"]
        c.check(all(x["status"] == "complete" and x["exit_code"] == "0" for x in good),
                "the other four complete", [(x["id"], x["status"]) for x in good])

        # Bit for bit against the same runs made alone.
        scenario = os.path.join(args.source, "scenarios", "traffic.yaml")
        for x in good:
            alone = os.path.join(tmp, x["id"] + "-alone.h5")
            cmd = [args.hawser, "run", scenario, "--set", "simulation.duration=2 h",
                   "--set", "schedules[0].cruise_speed=" + x["schedules[0].cruise_speed"],
                   "--set", "material.damping_time=" + x["material.damping_time"], "-o", alone]
            rr = subprocess.run(cmd, capture_output=True, text=True)
            a, b = summary_attrs(os.path.join(out, x["id"] + ".h5")), summary_attrs(alone)
            diff = [k for k in set(a) | set(b) if k not in a or k not in b or not same_bits(a[k], b[k])]
            c.check(rr.returncode == 0 and not diff and len(a) > 20,
                    f"{x['id']}: /summary bit for bit as `hawser run` alone ({len(a)} attributes)", diff)

        with open(os.path.join(out, "ranking.md")) as f:
            md = f.read()
        lines = [l for l in md.splitlines() if l.startswith("| ") and l[2].isdigit()]
        c.check(len(lines) == 5 and "stalls" in lines[-1], "ranking.md ranks all five, the failed one last",
                lines)
        breakers = [x for x in good if float(x["peak_east_west_m"]) > 1.2e3]
        c.check(breakers and sum("**BREAKS**" in l for l in lines) == len(breakers),
                f"ranking.md marks the {len(breakers)} variants past 1.2 km east-west", md[-600:])

        starts = len([e for e in log_events(out) if e[0] == "start"])
        r2 = subprocess.run([args.hawser, "sweep", study, "-o", out], capture_output=True, text=True)
        c.check(r2.returncode == 0 and len([e for e in log_events(out) if e[0] == "start"]) == starts,
                "a second sweep of a finished study starts no run", r2.stdout[-300:])

        other = os.path.join(tmp, "elsewhere")
        os.makedirs(other)
        study2 = shutil.copy(study, os.path.join(other, "copy.yaml"))
        r3 = subprocess.run([args.hawser, "sweep", study2, "--slurm", "--dry-run", "-o", os.path.join(other, "o")],
                            capture_output=True, text=True)
        ids2 = [x["id"] for x in __import__("json").load(open(os.path.join(other, "o", "study.json")))["variants"]]
        c.check(r3.returncode == 0 and ids2 == [x["id"] for x in rows],
                "variant ids do not depend on the study's folder or the sweep's", (ids2, r3.stderr))
        c.check("--variant \"$SLURM_ARRAY_TASK_ID\"" in r3.stdout and "#SBATCH --array=0-4" in r3.stdout,
                "--slurm --dry-run prints a job array of one task per variant", r3.stdout)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
