#!/usr/bin/python3
"""A sweep killed with SIGKILL part-way and started again runs only what is not finished.

The study: four variants of the traffic scenario over 16 simulated hours (about 2 s each), two
at a time. The sweep is killed as soon as its log records the first run ended, while others
run. Expectations (the issue's brief; sweep_folder.hpp and variant_process.hpp):
- the killed sweep's runs die with it (no orphan keeps writing a result file);
- the second sweep starts no variant that had ended before the kill (counted from sweep.log,
  where every process start and end is written), resumes those killed while running (their
  files say "running") with `hawser run --resume`, or starts anew one killed before its
  first publication; every variant ends complete, each with exactly one successful end;
- summary.csv then lists all four complete.

Run by ctest as: python3 test_sweep_kill.py --hawser BIN --source DIR
"""
import os
import shutil
import signal
import subprocess
import sys
import tempfile
import time

import h5py

from cli_checks import Checks, command_line, text_attr
from sweep_cases import log_events, read_rows, sweep, write_study


def hawser_runs_in(folder):
    """PIDs of processes whose command line names `folder` (the sweep's runs)."""
    pids = []
    for p in os.listdir("/proc"):
        if not p.isdigit():
            continue
        try:
            with open(f"/proc/{p}/cmdline", "rb") as f:
                cmd = f.read().decode(errors="replace")
        except OSError:
            continue
        if folder in cmd and "\0run\0" in cmd:
            pids.append(int(p))
    return pids


def main():
    args = command_line()
    c = Checks()
    tmp = tempfile.mkdtemp(prefix="hawser-sweep-kill-")
    try:
        study = write_study(tmp, args.source, hours=16)
        out = os.path.join(tmp, "out")
        p = subprocess.Popen([args.hawser, "sweep", study, "-j", "2", "-o", out],
                             stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        deadline = time.time() + 60
        while time.time() < deadline and not any(e[0] == "end" for e in log_events(out)):
            time.sleep(0.02)
        p.send_signal(signal.SIGKILL)
        p.wait()
        before = log_events(out)
        ended = {e[1] for e in before if e[0] == "end" and e[2].startswith("exit 0")}
        started = {e[1] for e in before if e[0] == "start"}
        c.check(1 <= len(ended) < 4,
                f"killed part-way: {len(ended)} of 4 ended, {len(started)} started", before)
        orphans = []
        for _ in range(50):
            orphans = hawser_runs_in(out)
            if not orphans:
                break
            time.sleep(0.1)
        c.check(not orphans, "the killed sweep's runs died with it", orphans)

        # Files a killed run left "running" must be continued, not started again.
        left_running = set()
        for e in before:
            path = os.path.join(out, e[1] + ".h5")
            if e[1] not in ended and os.path.exists(path):
                with h5py.File(path, "r") as f:
                    if text_attr(f, "status") == "running":
                        left_running.add(e[1])

        r = sweep(args.hawser, study, "-j", "2", "-o", out)
        c.check(r.returncode == 0, "the restarted sweep completes",
                r.stdout[-400:] + r.stderr[-400:])
        after = log_events(out)[len(before):]
        rerun = [e for e in after if e[0] == "start" and e[1] in ended]
        c.check(not rerun, "no variant that ended before the kill is started again", rerun)
        killed_running = {e[1] for e in before if e[0] == "start"} - ended
        resumed = {e[1] for e in after if e[0] == "start" and e[2] == "resume"}
        c.check(resumed == left_running and resumed <= killed_running,
                f"exactly the {len(left_running)} files left 'running' are resumed",
                (resumed, left_running))
        rows = read_rows(out)
        c.check(len(rows) == 4 and all(x["status"] == "complete" for x in rows),
                "all four variants complete",
                [(x["id"], x["status"]) for x in rows])
        all_events = before + after
        for x in rows:
            ok_ends = [e for e in all_events
                       if e[0] == "end" and e[1] == x["id"] and e[2].startswith("exit 0")]
            c.check(len(ok_ends) == 1, f"{x['id']}: one successful run in all", ok_ends)
        starts = len([e for e in after if e[0] == "start"])
        print(f"kill after {len(ended)} ended; second sweep: {starts} "
              f"starts, {len(resumed)} resumed")
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
