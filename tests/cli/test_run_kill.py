#!/usr/bin/python3
"""`hawser run` result files read while the run goes, after SIGKILL, and continued with
`hawser run --resume` (the writer alone is tested by test_h5_live_read.py).

The case is the demo (scenarios/demo.yaml) with 1000 elements for 5 h, an output a minute and
a flush every 2 outputs, so that a run takes several seconds. Every read is a plain
h5py.File(path, "r") (default driver, no SWMR, no h5clear). Expectations and their sources:
  architecture.md  /work/shared/design/architecture.md, "Result file": "flushed at least every
                   output block so that a killed run leaves a readable file"
  h5_writer.hpp    solver/output/h5_writer.hpp, "The guarantee": after a flush everything written is
                   readable at every later moment, the writer running or killed; /time, the
                   series created first, is committed last, so it is never longer than another
                   series, and after a kill inside a flush the series differ by at most that
                   flush block. Residual risk it accepts: a reader that reads a page at the
                   instant the writer rewrites it can see half of it; such a read is retried
                   (at most twice, 20 ms apart) and the number of retries is printed.
  recorder         solver/output/result_recorder.hpp: root status "running" until the run finishes.
  simulation.cpp   outputs at t = i * output_interval (t_out = output_index * output_interval).
Rows are compared bit for bit with the finished run of the same scenario (the program is
deterministic: same input, same binary, same arithmetic). A killed run continued with --resume
restarts the integrator from the state at its last checkpoint: its rows up to the checkpoint are
unchanged, bit for bit, and its later rows differ from the uninterrupted run's as two integrations
of the same tolerances differ. The measure is the integrator's own (the weighted RMS norm of
CVODE, weights rtol |u| + atol on the displacements u from equilibrium): the resumed run must
differ from the uninterrupted one by less than the uninterrupted one differs from the same run at
10 times tighter tolerances (an estimate of its global error), and its /summary figures by less
than twice the tighter run's change of them. (Within 10 times the local tolerance, taken
literally, no restart can be: measured on this case, the uninterrupted run itself is 127 norm
units from the 10-times-tighter run and 151 from a 1000-times-tighter one, while a resumed run is
about 30 from it.)

Run by ctest as: python3 test_run_kill.py --hawser BIN --source DIR [--seed S]
"""
import argparse
import os
import random
import signal
import subprocess
import sys
import tempfile
import time

import h5py
import numpy as np

from cli_checks import Checks, text_attr

FLUSH_EVERY = 2
INTERVAL_S = 60.0
DURATION_S = 5 * 3600.0
N_EL = 1000
LONG = ["--set", f"mesh.elements={N_EL}", "--set", "simulation.duration=5 h",
        "--set", "simulation.output_interval=1 min", "--set", f"output.flush_every={FLUSH_EVERY}"]
NT = int(round(DURATION_S / INTERVAL_S)) + 1
SERIES = ["/time", "/nodes/position", "/nodes/velocity", "/elements/tension", "/energy/kinetic",
          "/energy/potential", "/energy/strain", "/energy/dissipated", "/anchor/force"]
STATIC = ["/mesh/s0", "/mesh/node_mass", "/mesh/element_area", "/mesh/element_L0", "/equilibrium/position",
          "/equilibrium/tension", "/nodes/index"]



def status_of(f):
    return text_attr(f, "status")


def status_of_file(path):
    with h5py.File(path, "r") as f:
        return status_of(f)


def snapshot(path, hold_s=0.0, keep_rows=False):
    """Read the file once. Returns a dict: status, lengths of every series, n (length of /time),
    problems (list of broken promises), last (row n-1 of every series), rows (every row < n of
    every series, if keep_rows), static (the fixed datasets, if keep_rows)."""
    with h5py.File(path, "r") as f:
        time.sleep(hold_s)  # a reader that keeps the file open while the writer goes on
        snap = {"status": status_of(f), "lengths": {s: f[s].shape[0] for s in SERIES}, "problems": []}
        n = snap["n"] = snap["lengths"]["/time"]
        for s, length in snap["lengths"].items():
            # /time is committed last, and other series lead it by at most one flush block.
            if not n <= length <= n + FLUSH_EVERY:
                snap["problems"].append(f"{s} has {length} rows, /time {n}")
        rows = {s: f[s][:n] for s in SERIES}
        expect_t = np.arange(n) * INTERVAL_S
        if not np.array_equal(rows["/time"], expect_t):
            snap["problems"].append(f"/time is not 0, {INTERVAL_S:g}, ... s: {rows['/time'][:5]}...")
        for s in SERIES:
            if not np.all(np.isfinite(rows[s])):
                snap["problems"].append(f"{s} has non-finite values in its first {n} rows")
        snap["last"] = {s: rows[s][n - 1].copy() for s in SERIES} if n else {}
        if keep_rows:
            snap["rows"] = rows
            snap["static"] = {s: f[s][()] for s in STATIC}
    return snap


def read_with_retry(path, **kw):
    """(snapshot, retries, error): up to three attempts (h5_writer.hpp's accepted torn-page read)."""
    error = None
    for attempt in range(3):
        try:
            return snapshot(path, **kw), attempt, None
        except Exception as e:  # an unreadable file is what this test exists to catch
            error = f"{type(e).__name__}: {e}"
            time.sleep(0.02)
    return None, 3, error


def wait_first_flush(proc, path, timeout):
    """Poll until the file first reads with at least one output, i.e. after a flush: the guarantee
    of h5_writer.hpp begins there (reads while the file is being created may fail)."""
    end = time.monotonic() + timeout
    while time.monotonic() < end and proc.poll() is None:
        if os.path.exists(path):
            try:
                snap = snapshot(path)
                if snap["n"] >= 1:
                    return snap
            except Exception:
                pass
        time.sleep(0.02)
    return None


def check_live(c, exe, demo, tmp):
    """Item 2: read while the run goes; returns the finished file's rows as the reference."""
    out = os.path.join(tmp, "live.h5")
    proc = subprocess.Popen([exe, "run", demo, "-o", out, *LONG], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True, cwd=tmp)
    first = wait_first_flush(proc, out, 120)
    c.check(first is not None, "live: the file becomes readable with its first outputs while the run goes")
    snaps, failures, retries, reads, finished_reads = [], [], 0, 0, 0
    deadline = time.monotonic() + 300
    while first is not None and proc.poll() is None and time.monotonic() < deadline:
        # Every third read keeps the file open 0.3 s before reading, while the writer commits.
        snap, tries, error = read_with_retry(out, hold_s=0.3 if reads % 3 == 2 else 0.0)
        reads += 1
        retries += min(tries, 2)
        if snap is None:
            failures.append(error)
        elif snap["status"] == "complete" and snap["n"] == NT:
            finished_reads += 1  # the read fell between the end of the run and the exit
        elif snap["problems"] and status_of_file(out) == "complete":
            # Residual risk of h5_writer.hpp: a reader that opened the running file just before
            # the run finished and reads after it removed its segments sees NaN; it reopens.
            finished_reads += 1
        else:
            snaps.append(snap)
        time.sleep(0.1)
    try:
        _, err = proc.communicate(timeout=300)
    except subprocess.TimeoutExpired:
        proc.kill()
        _, err = proc.communicate()
    print(f"  live: {reads} reads ({finished_reads} after the end), {retries} retried, lengths of /time seen: "
          f"{sorted(set(s['n'] for s in snaps))}")
    c.check(proc.returncode == 0, "live: the run finishes with exit 0", f"exit {proc.returncode}: {err}")
    c.check(not failures, "live: every read of the running file succeeds", str(failures[:3]))
    # Reads that caught the run in its last moments (status "complete" with every output written,
    # process not yet gone) are left out above; the others must all say "running" (recorder).
    c.check(snaps and all(s["status"] == "running" for s in snaps), "live: status is running during the run",
            str(sorted(set(s["status"] for s in snaps))))
    problems = [p for s in snaps for p in s["problems"]]
    c.check(not problems, "live: /time is 0, 60, 120 ... s, no series shorter than /time nor longer by more "
            f"than a flush block ({FLUSH_EVERY}), all rows finite", str(problems[:3]))
    lengths = [s["n"] for s in snaps]
    c.check(lengths == sorted(lengths), "live: /time never shrinks between reads", str(lengths))
    c.check(len(set(n for n in lengths if n < NT)) >= 3,
            "live: at least three different lengths of /time seen before the end", str(sorted(set(lengths))))

    with h5py.File(out, "r") as f:
        ref = {"status": status_of(f), "rows": {s: f[s][:] for s in SERIES},
               "static": {s: f[s][()] for s in STATIC},
               "summary": {k: float(f["/summary"].attrs[k]) for k in SUMMARY_FIGURES}}
    c.check(ref["status"] == "complete" and all(len(v) == NT for v in ref["rows"].values()),
            f"live: the finished file says complete and holds {NT} outputs in every series",
            f"{ref['status']}, {[len(v) for v in ref['rows'].values()]}")
    mismatch = []
    for s in snaps:
        for k in SERIES:
            if s["n"] and not np.array_equal(s["last"][k], ref["rows"][k][s["n"] - 1]):
                got, want = np.ravel(s["last"][k]), np.ravel(ref["rows"][k][s["n"] - 1])
                bad = np.flatnonzero(got != want)
                mismatch.append(f"row {s['n'] - 1} of {k}: {bad.size} of {got.size} values differ, "
                                f"e.g. [{bad[0]}] {got[bad[0]]!r} vs {want[bad[0]]!r}")
    c.check(not mismatch, "live: the last row visible at each read equals that row of the finished file",
            str(mismatch[:5]))
    return ref


def wait_rows(proc, path, target, timeout):
    """Poll until /time holds `target` rows (or the run ends); returns the last length seen."""
    end, n = time.monotonic() + timeout, 0
    while proc.poll() is None and time.monotonic() < end and n < target:
        try:
            with h5py.File(path, "r") as f:
                n = f["/time"].shape[0]
        except Exception:  # a torn read (h5_writer.hpp); the next poll reopens
            pass
        time.sleep(0.02)
    return n


def check_kills(c, exe, demo, tmp, ref, rng, count):
    """Item 3: SIGKILL at random moments; the file opens, says running, keeps its rows. Kill i
    falls when the run has a random number of outputs from the i-th of `count` equal parts of
    the first 80% of the run, plus a random 0-0.2 s, so early and late files are both seen
    whatever the speed of the machine, and the moment is not tied to a flush."""
    for i in range(count):
        out = os.path.join(tmp, f"killed{i}.h5")
        proc = subprocess.Popen([exe, "run", demo, "-o", out, *LONG], stdout=subprocess.DEVNULL,
                                stderr=subprocess.DEVNULL, cwd=tmp)
        seen = wait_first_flush(proc, out, 120)
        target = 1 + int(rng.uniform(i / count, (i + 1) / count) * 0.8 * NT)
        delay = rng.uniform(0.0, 0.2)
        n_before = max(seen["n"] if seen else 0, wait_rows(proc, out, target, 300))
        time.sleep(delay)
        # Rows seen by a reader just before the kill were durable (h5_writer.hpp).
        try:
            n_before = max(n_before, snapshot(out)["n"])
        except Exception:
            pass
        alive = proc.poll() is None
        proc.send_signal(signal.SIGKILL)
        proc.wait()
        label = f"kill {i + 1} ({delay:.2f} s after {target} outputs)"
        c.check(seen is not None and alive and proc.returncode == -signal.SIGKILL,
                f"{label}: the run was going and died of SIGKILL", f"returncode {proc.returncode}")
        snap, tries, error = read_with_retry(out, keep_rows=True)
        if not c.check(snap is not None and tries == 0, f"{label}: the killed file opens with plain h5py",
                       str(error)):
            continue
        print(f"  {label}: {snap['n']} outputs kept, series lengths {sorted(set(snap['lengths'].values()))}")
        c.check(snap["status"] == "running", f"{label}: status still running (never looks complete)",
                repr(snap["status"]))
        c.check(not snap["problems"], f"{label}: /time 0, 60, ... s, series no shorter than /time and at most "
                "a flush block longer, rows finite", str(snap["problems"][:3]))
        c.check(snap["n"] >= max(n_before, 1), f"{label}: every output seen before the kill is still there",
                f"{snap['n']} < {n_before}")
        n = snap["n"]
        same = all(np.array_equal(snap["rows"][k], ref["rows"][k][:n]) for k in SERIES)
        same_static = all(np.array_equal(snap["static"][k], ref["static"][k]) for k in STATIC)
        c.check(same and same_static, f"{label}: the {n} kept outputs and the mesh and equilibrium equal "
                "the finished run's")
        check_resume(c, exe, demo, out, ref, label, n)


# Integrator tolerances of the runs (scenarios/demo.yaml: rtol 1e-6, atol_velocity 1e-4 m/s;
# atol_position: the default of config/scenario_keys.yaml, 1e-3 m), and 10 times tighter.
RTOL, ATOL_M = 1.0e-6, 1.0e-3
TIGHTER = ["--set", "simulation.rtol=1e-7", "--set", "simulation.atol_position=1e-4",
           "--set", "simulation.atol_velocity=1e-5"]
SUMMARY_FIGURES = ["peak_east_west_m", "peak_tension_n", "min_safety_factor"]


def wrms(diff, u_ref):
    """Per output, CVODE's weighted RMS norm of a position difference over the free nodes."""
    w = RTOL * np.abs(u_ref[:, 1:, :]) + ATOL_M
    return np.sqrt(np.mean((diff[:, 1:, :] / w) ** 2, axis=(1, 2)))


def tighter_reference(c, exe, demo, tmp, ref):
    """The same run at 10 x tighter tolerances: its distance from the reference estimates the
    reference's global error."""
    out = os.path.join(tmp, "tighter.h5")
    run = subprocess.run([exe, "run", demo, "-o", out, *LONG, *TIGHTER], capture_output=True,
                         text=True, cwd=tmp, timeout=900)
    if not c.check(run.returncode == 0, "the 10 x tighter run finishes", run.stderr.strip()):
        return None
    with h5py.File(out, "r") as f:
        x = f["/nodes/position"][:]
        eq = f["/equilibrium/position"][:]
        summ = {k: float(f["/summary"].attrs[k]) for k in SUMMARY_FIGURES}
    x_ref = ref["rows"]["/nodes/position"]
    u_ref = x_ref - ref["static"]["/equilibrium/position"]
    err = wrms(x_ref - x, u_ref).max()
    print(f"  the uninterrupted run is {err:.3g} norm units from the 10 x tighter run")
    return {"err": err, "summary": summ, "u_ref": u_ref}


def check_resume(c, exe, demo, out, ref, label, n_kept):
    """Continue the killed run in its own file and compare with the uninterrupted run."""
    with h5py.File(out, "r") as f:
        ckpt = f["/checkpoint"].attrs["time_s"] if "/checkpoint" in f else None
    if not c.check(ckpt is not None, f"{label}: the killed file holds a checkpoint"):
        return
    run = subprocess.run([exe, "run", demo, "--resume", out, *LONG], capture_output=True, text=True,
                         cwd=os.path.dirname(out), timeout=600)
    if not c.check(run.returncode == 0, f"{label}: `hawser run --resume` finishes with exit 0",
                   f"exit {run.returncode}: {run.stderr.strip()}"):
        return
    with h5py.File(out, "r") as f:
        status = status_of(f)
        rows = {s: f[s][:] for s in SERIES}
        summ = dict(f["/summary"].attrs)
        has_ckpt = "/checkpoint" in f
    c.check(status == "complete" and not has_ckpt and not os.path.exists(out + ".parts"),
            f"{label}: resumed file says complete, has no checkpoint and no parts folder left")
    c.check(all(len(v) == NT for v in rows.values()), f"{label}: resumed file holds all {NT} outputs",
            str([len(v) for v in rows.values()]))
    k = int(round(ckpt / INTERVAL_S)) + 1  # rows up to and including the checkpoint's output
    same = all(np.array_equal(rows[s][:k], ref["rows"][s][:k]) for s in SERIES)
    c.check(k == n_kept and same, f"{label}: the {k} outputs up to the checkpoint (t = {ckpt:g} s) are "
            f"the {n_kept} kept, unchanged, bit for bit")
    c.check(int(summ["outputs"]) == NT, f"{label}: /summary outputs counts the whole run ({NT})",
            str(summ["outputs"]))
    tight = ref.get("tighter")
    if tight is None or any(len(v) != NT for v in rows.values()):
        return
    x, x_ref = rows["/nodes/position"], ref["rows"]["/nodes/position"]
    d = wrms(x - x_ref, tight["u_ref"]).max()
    c.check(d < tight["err"], f"{label}: positions after resuming within the uninterrupted run's accuracy "
            f"({d:.3g} norm units from it, its global error {tight['err']:.3g})")
    for key in SUMMARY_FIGURES:
        got, want = float(summ[key]), float(ref["summary"][key])
        tol = 2 * abs(want - tight["summary"][key]) + 1e-9 * abs(want)
        c.check(abs(got - want) <= tol, f"{label}: /summary {key} {got:.9g} vs uninterrupted {want:.9g} "
                f"(within {tol:.3g})")


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--hawser", required=True)
    ap.add_argument("--source", required=True)
    ap.add_argument("--seed", type=int, default=None, help="seed of the kill moments (default: from the clock)")
    ap.add_argument("--kills", type=int, default=3)
    a = ap.parse_args()
    seed = a.seed if a.seed is not None else int(time.time()) % 100000
    print(f"seed {seed} (rerun with --seed {seed})")
    rng = random.Random(seed)
    c = Checks()
    exe = os.path.abspath(a.hawser)
    demo = os.path.join(a.source, "scenarios", "demo.yaml")
    with tempfile.TemporaryDirectory() as tmp:
        ref = check_live(c, exe, demo, tmp)
        ref["tighter"] = tighter_reference(c, exe, demo, tmp, ref)
        check_kills(c, exe, demo, tmp, ref, rng, a.kills)
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
