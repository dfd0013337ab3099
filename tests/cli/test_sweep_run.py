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
- a ranking metric no result records (a misspelt name) is named in the ranking;
- variant ids do not depend on where the study lies or where the sweep writes;
- not a terminal: no progress line on standard error; on a terminal (a pseudo-terminal here),
  a progress line with the finished, running and failed counts and an ETA;
- the example study scenarios/studies/traffic_study.yaml runs and gives what its comment says:
  the east-west peak grows with the cruise speed, the 200 km/h variants and the heavy, slow
  one break a limit, and the heavy one ranks last.

Run by ctest as: python3 test_sweep_run.py --hawser BIN --source DIR
"""
import json
import os
import shutil
import subprocess
import sys
import tempfile

from cli_checks import Checks, command_line, run_on_terminal
from sweep_cases import log_events, read_rows, same_bits, summary_attrs, sweep, write_study

STALL = """\
variants:
  - name: stalls
    set: {simulation.max_steps_per_output: 3}
"""


def progress_on_terminal(c, args, study, out):
    """Standard error on a pseudo-terminal: the sweep's progress line appears."""
    p, text = run_on_terminal([args.hawser, "sweep", study, "-j", "2", "-o", out],
                              stdout=subprocess.DEVNULL)
    p.wait()
    c.check("\r  sweep: " in text and "5 of 5 finished, 0 running, 1 failed" in text
            and "ETA" in text,
            "on a terminal: a progress line with counts and an ETA", text[-300:])


def example(c, args, out):
    """The example study runs and shows what its comment promises."""
    study = os.path.join(args.source, "scenarios", "studies", "traffic_study.yaml")
    r = sweep(args.hawser, study, "-j", "2", "-o", out)
    rows = read_rows(out)
    c.check(r.returncode == 0 and len(rows) == 7 and all(x["status"] == "complete" for x in rows),
            "the example study runs its seven variants", r.stdout[-300:] + r.stderr[-300:])
    key = "schedules[0].cruise_speed"
    for damping in ("0.5 s", "2 s"):
        ew = [float(x["peak_east_west_m"]) for x in rows
              if x["material.damping_time"] == damping]
        c.check(len(ew) == 3 and ew[0] < ew[1] < ew[2],
                f"example: the east-west peak grows with the cruise speed (damping {damping})", ew)
    broken = sorted(x["name"] or x[key] for x in rows if x["limits"] == "broken")
    c.check(broken == ["200 km/h", "200 km/h", "heavy_slow"],
            "example: the 200 km/h variants and the heavy one break a limit", broken)
    with open(os.path.join(out, "ranking.md")) as f:
        last = [l for l in f.read().splitlines() if l.startswith("| ") and l[2].isdigit()][-1]
    c.check("heavy_slow" in last, "example: the heavy, slow variant ranks last", last)


def main():
    args = command_line()
    c = Checks()
    tmp = tempfile.mkdtemp(prefix="hawser-sweep-")
    try:
        study = write_study(tmp, args.source, extra=STALL)
        out = os.path.join(tmp, "out")
        r = sweep(args.hawser, study, "-j", "2", "-o", out)
        c.check(r.returncode == 0, "sweep exits 0 when every variant has a final result",
                r.stderr + r.stdout[-400:])
        c.check("\r" not in r.stderr, "no progress line when standard error is not a terminal",
                repr(r.stderr[:200]))
        rows = read_rows(out)
        c.check(len(rows) == 5, "summary.csv has one row per variant", len(rows))
        for key in ("schedules[0].cruise_speed", "material.damping_time", "status", "exit_code",
                    "wall_s",
                    "min_safety_factor", "peak_east_west_m", "steps"):
            c.check(key in rows[0], f"summary.csv has the column {key}")
        stall = [x for x in rows if x["name"] == "stalls"]
        c.check(len(stall) == 1 and stall[0]["status"] == "failed" and stall[0]["exit_code"] == "4",
                "the failing variant is recorded with status failed and exit code 4", stall)
        c.check(stall and "CV_TOO_MUCH_WORK" in stall[0]["message"],
                "its message is the integrator's",
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
            diff = [k for k in set(a) | set(b)
                    if k not in a or k not in b or not same_bits(a[k], b[k])]
            c.check(rr.returncode == 0 and not diff and len(a) > 20,
                    f"{x['id']}: /summary bit for bit as `hawser run` alone ({len(a)} attributes)",
                    diff)

        with open(os.path.join(out, "ranking.md")) as f:
            md = f.read()
        lines = [l for l in md.splitlines() if l.startswith("| ") and l[2].isdigit()]
        c.check(len(lines) == 5 and "stalls" in lines[-1],
                "ranking.md ranks all five, the failed one last",
                lines)
        breakers = [x for x in good if float(x["peak_east_west_m"]) > 1.2e3]
        c.check(breakers and sum("**BREAKS**" in l for l in lines) == len(breakers),
                f"ranking.md marks the {len(breakers)} variants past 1.2 km east-west", md[-600:])

        starts = len([e for e in log_events(out) if e[0] == "start"])
        r2 = sweep(args.hawser, study, "-o", out)
        restarts = len([e for e in log_events(out) if e[0] == "start"])
        c.check(r2.returncode == 0 and restarts == starts,
                "a second sweep of a finished study starts no run", r2.stdout[-300:])

        # A misspelt metric is named in the ranking (the folder serves the edited study: ranking
        # and limits are not part of what its results depend on).
        with open(study) as f:
            text = f.read()
        typo = os.path.join(tmp, "typo.yaml")
        with open(typo, "w") as f:
            f.write(text.replace("metric: min_safety_factor", "metric: min_safety_factr"))
        r4 = sweep(args.hawser, typo, "--collect", "-o", out)
        c.check(r4.returncode == 0 and "no result records `min_safety_factr`" in r4.stdout,
                "--collect names a ranking metric that no result records", r4.stdout[:600])

        other = os.path.join(tmp, "elsewhere")
        os.makedirs(other)
        study2 = shutil.copy(study, os.path.join(other, "copy.yaml"))
        r3 = sweep(args.hawser, study2, "--slurm", "--dry-run", "-o", os.path.join(other, "o"))
        with open(os.path.join(other, "o", "study.json")) as f:
            ids2 = [x["id"] for x in json.load(f)["variants"]]
        c.check(r3.returncode == 0 and ids2 == [x["id"] for x in rows],
                "variant ids do not depend on the study's folder or the sweep's", (ids2, r3.stderr))
        c.check("--variant \"$SLURM_ARRAY_TASK_ID\"" in r3.stdout
                and "#SBATCH --array=0-4" in r3.stdout,
                "--slurm --dry-run prints a job array of one task per variant", r3.stdout)
        progress_on_terminal(c, args, study, os.path.join(tmp, "tty"))
        example(c, args, os.path.join(tmp, "example"))
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
