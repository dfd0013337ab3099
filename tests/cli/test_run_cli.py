#!/usr/bin/python3
"""`hawser run` through the command line: the result file, exit codes, the printed summary and
the progress line (issue: dynamics core, item 3). Live reading and SIGKILL: test_run_kill.py.

Every case is the demo scenario (scenarios/demo.yaml) shortened with --set (40 elements, half an
hour or a minute), so the whole file runs in a few seconds. What each check expects, and where
that expectation comes from, is written beside it:
  architecture.md  /work/shared/design/architecture.md, "Command line" and "Result file"
  keys             config/scenario_keys.yaml (`hawser keys`), the meaning of each key
  recorder         solver/output/result_recorder.hpp (status words "running", "complete", "stopped",
                   "failed")
  CVODE guide      SUNDIALS CVODE user guide, CVodeSetMaxNumSteps: "maximum number of steps to
                   be taken by the solver in its attempt to reach the next output time"
                   (recalled from memory)
Values computed here from the file (peaks, masses, initial shapes) are independent arithmetic
on the recorded arrays, compared with what the program says about them.

Run by ctest as: python3 test_run_cli.py --hawser BIN --source DIR
"""
import json
import math
import os
import re
import subprocess
import sys
import tempfile

import h5py
import numpy as np
import yaml

from cli_checks import Checks, command_line, run_on_terminal, text_attr

# Short demo: 40 elements, 30 min, output every 5 min (the demo's own output_interval).
N_EL = 40
SHORT = ["--set", "simulation.duration=30 min", "--set", f"mesh.elements={N_EL}"]
DURATION_S, INTERVAL_S = 1800.0, 300.0
# The demo's initial displacement (scenarios/demo.yaml): east, 10 km, from 0 km to 50000 km.
DEMO_AMPLITUDE_M, DEMO_FROM_M, DEMO_TO_M = 10e3, 0.0, 50000e3

# Numeric datasets of the contract (architecture.md, "Result file"): path -> (shape, units).
# Shapes use N elements, nt outputs, K recorded nodes; units are the SI unit of the quantity
# (config/units.yaml gives the SI unit of each dimension; J for energy is SI).
def contract(n, nt, k):
    return {
        "/mesh/s0": ((n + 1,), "m"),
        "/mesh/node_mass": ((n + 1,), "kg"),
        "/mesh/element_area": ((n,), "m^2"),
        "/mesh/element_L0": ((n,), "m"),
        "/equilibrium/position": ((n + 1, 3), "m"),
        "/equilibrium/tension": ((n,), "N"),
        "/time": ((nt,), "s"),
        "/nodes/position": ((nt, k, 3), "m"),
        "/nodes/velocity": ((nt, k, 3), "m/s"),
        "/elements/tension": ((nt, n), "N"),
        "/energy/kinetic": ((nt,), "J"),
        "/energy/potential": ((nt,), "J"),
        "/energy/strain": ((nt,), "J"),
        "/energy/dissipated": ((nt,), "J"),
        "/anchor/force": ((nt, 3), "N"),
    }


TIME_SERIES = ["/time", "/nodes/position", "/nodes/velocity", "/elements/tension", "/energy/kinetic",
               "/energy/potential", "/energy/strain", "/energy/dissipated", "/anchor/force"]

# /summary attributes the contract names (architecture.md: peak tension and where and when,
# minimum safety factor, peak east-west and north-south deflections, solver statistics).
SUMMARY_ATTRS = ["peak_tension_n", "peak_tension_element", "peak_tension_time_s", "min_safety_factor",
                 "peak_east_west_m", "peak_east_west_node", "peak_east_west_time_s", "peak_north_south_m",
                 "peak_north_south_node", "peak_north_south_time_s", "steps", "rhs_evals", "jac_evals",
                 "error_test_failures", "nonlinear_failures"]



def replace_block(text, key, block):
    """`text` with its top-level `key:` block (the key line and the indented lines under it)
    replaced by `block` ("" removes it)."""
    pat = re.compile(rf"^{key}:\n(?:(?:[ \t].*)?\n)*", re.M)
    assert pat.search(text), f"no top-level {key} block in the demo"
    return pat.sub(lambda _: block, text, count=1)


def kick_block(node, velocity):
    return f"initial:\n  kicks:\n    - node: {node}\n      velocity: [{velocity}]\n\n"


def printed_stats(stdout):
    """Solver statistics from the printed summary, or None if a figure is missing."""
    pats = {"steps": r"(\d+) steps", "rhs_evals": r"(\d+) rhs evaluations",
            "jac_evals": r"(\d+) Jacobian evaluations", "error_test_failures": r"(\d+) error-test failures",
            "nonlinear_failures": r"(\d+) nonlinear failures"}
    out = {}
    for key, pat in pats.items():
        m = re.search(pat, stdout)
        if not m:
            return None
        out[key] = int(m.group(1))
    return out


class Hawser:
    def __init__(self, exe, tmp):
        self.exe, self.tmp, self.count = exe, tmp, 0

    def __call__(self, *args, cwd=None, **kw):
        return subprocess.run([self.exe, *args], capture_output=True, text=True, timeout=300,
                              cwd=cwd or self.tmp, **kw)

    def scenario(self, text, name):
        path = os.path.join(self.tmp, name)
        with open(path, "w") as f:
            f.write(text)
        return path

    def out(self, name):
        return os.path.join(self.tmp, name)


# ---- 1. the result file of a complete run ------------------------------------------------------

def check_result_file(c, h, demo_path, design):
    out = h.out("short.h5")
    p = h("run", demo_path, "-o", out, *SHORT)
    c.check(p.returncode == 0, "short demo run exits 0 (architecture.md exit codes)",
            f"exit {p.returncode}: {p.stderr}")
    # A pipe is not a terminal: nothing on stderr, no progress line (architecture.md command line).
    c.check(p.stderr == "", "run to a pipe writes nothing to stderr (progress only on a terminal)",
            repr(p.stderr[:200]))
    if not os.path.exists(out):
        c.check(False, "result file written")
        return None
    nt = int(round(DURATION_S / INTERVAL_S)) + 1
    with h5py.File(out, "r") as f:
        # Root attributes (architecture.md, result file; status words from result_recorder.hpp).
        c.check(text_attr(f, "format") == "hawser-timehistory", "root format = hawser-timehistory",
                repr(f.attrs.get("format")))
        c.check(f.attrs.get("format_version") == 2,
                "root format_version = 2 (config/result_layout.yaml)",
                repr(f.attrs.get("format_version")))
        version = subprocess.run([h.exe, "--version"], capture_output=True, text=True).stdout.strip()
        c.check(bool(version) and text_attr(f, "program_version") == version.split()[-1],
                "root program_version equals `hawser --version`", f"{f.attrs.get('program_version')!r} vs {version!r}")
        c.check(text_attr(f, "status") == "complete", "root status = complete", repr(f.attrs.get("status")))

        # Every dataset of the contract, with its shape and units.
        spec = contract(N_EL, nt, N_EL + 1)
        for path, (shape, units) in spec.items():
            if path not in f:
                c.check(False, f"{path} present")
                continue
            d = f[path]
            c.check(d.shape == shape and text_attr(d, "units") == units,
                    f"{path} shape {shape}, units {units}", f"got {d.shape}, {d.attrs.get('units')!r}")
        # "Every dataset carries a units attribute" (architecture.md): every numeric one in the file.
        missing = []
        f.visititems(lambda n, o: missing.append(n) if isinstance(o, h5py.Dataset)
                     and o.dtype.kind in "fiu" and "units" not in o.attrs else None)
        c.check(not missing, "every numeric dataset has a units attribute", str(missing))
        # Time first, extendible, chunked along time (architecture.md); not compressed unless
        # output.compression asks (h5_writer.hpp: compression costs more than it saves here).
        for path in TIME_SERIES:
            d = f[path]
            c.check(d.maxshape[0] is None and d.chunks is not None and d.compression is None
                    and d.chunks[1:] == d.shape[1:],
                    f"{path} extendible along time, chunked along time, not compressed by default",
                    f"maxshape {d.maxshape}, chunks {d.chunks}, compression {d.compression}")

        rows_none = {path: f[path][()] for path in TIME_SERIES}
    # output.compression: deflate gives shuffled, deflated series holding the same values.
    zout = h.out("short_deflate.h5")
    p = h("run", demo_path, "-o", zout, *SHORT, "--set", "output.compression=deflate")
    c.check(p.returncode == 0, "run with output.compression=deflate exits 0", p.stderr)
    with h5py.File(zout, "r") as z:
        c.check(all(z[path].compression == "gzip" and z[path].shuffle for path in TIME_SERIES),
                "output.compression=deflate: every series shuffled and deflated",
                str({path: (z[path].compression, z[path].shuffle) for path in TIME_SERIES}))
        c.check(all(np.array_equal(z[path][()], rows_none[path]) for path in TIME_SERIES),
                "output.compression=deflate: the same values as the uncompressed file")
    with h5py.File(out, "r") as f:
        # The scenario as run, with the --set values (architecture.md, /input/scenario).
        as_run = f["/input/scenario"][()]
        as_run = as_run.decode("utf-8") if isinstance(as_run, bytes) else str(as_run)
        try:
            sc = yaml.safe_load(as_run)
            ok = sc["mesh"]["elements"] == N_EL and str(sc["simulation"]["duration"]).replace(" ", "") == "30min"
        except (yaml.YAMLError, KeyError, TypeError) as e:
            sc, ok = None, False
            print("  as-run scenario:", e)
        c.check(ok, "/input/scenario holds the --set values (mesh.elements 40, duration 30 min)")
        as_run_path = h.scenario(as_run, "as_run.yaml")

        # Mass: sum of lumped masses = tether mass + counterweight of the design (`hawser design
        # --json`, same scenario), relative 1e-6 (lumping conserves mass; the design integrates
        # the same taper).
        m_sum = float(np.sum(f["/mesh/node_mass"][:]))
        m_design = design["tether_mass_kg"] + design["counterweight_mass_kg"]
        c.check(abs(m_sum - m_design) <= 1e-6 * m_design,
                "sum of /mesh/node_mass = design tether mass + counterweight (rel 1e-6)",
                f"{m_sum:.9g} vs {m_design:.9g} kg")
        # s0 is the running sum of the unstretched element lengths (architecture.md: s0 is the
        # unstretched arc length from the anchor).
        s0, l0 = f["/mesh/s0"][:], f["/mesh/element_L0"][:]
        c.check(s0[0] == 0.0 and np.allclose(np.diff(s0), l0, rtol=1e-12, atol=0),
                "/mesh/s0 starts at 0 and grows by /mesh/element_L0")

        # Time: starts at 0, spaced by output_interval, ends at the duration (keys: output_interval).
        t = f["/time"][:]
        c.check(t.size == nt and t[0] == 0.0 and np.allclose(np.diff(t), INTERVAL_S, rtol=1e-12, atol=0),
                f"/time from 0 every {INTERVAL_S:g} s to {DURATION_S:g} s", str(t))

        # Initial state: equilibrium + the half-sine of the demo's displacement at every node
        # whose distance from the anchor lies in [from, to] (keys: initial.displacements, "a
        # half-sine over a stretch"; distance along the reference tether = the altitude).
        eq = f["/equilibrium/position"][:]
        idx = f["/nodes/index"][:]
        dist = np.linalg.norm(eq - eq[0], axis=1)
        inside = (dist >= DEMO_FROM_M) & (dist <= DEMO_TO_M)
        inside[0] = False  # the anchor is fixed
        u_east = np.where(inside, DEMO_AMPLITUDE_M * np.sin(np.pi * (dist - DEMO_FROM_M) / (DEMO_TO_M - DEMO_FROM_M)), 0.0)
        expect0 = eq.copy()
        expect0[:, 1] += u_east
        x0 = f["/nodes/position"][0]
        err = np.max(np.abs(x0 - expect0[idx]))
        c.check(err <= 1e-6, "/nodes/position at t = 0 = equilibrium + half-sine east displacement",
                f"max error {err:.3g} m")
        c.check(np.count_nonzero(u_east[idx]) >= 5, "the displaced stretch covers several recorded nodes",
                str(np.count_nonzero(u_east[idx])))
        c.check(np.all(f["/nodes/velocity"][0] == 0.0), "/nodes/velocity at t = 0 is zero (no kicks)")

        # /summary against the recorded series (architecture.md, /summary). The run observes its
        # outputs, and with node_stride 1 every node is recorded, so the peaks are recomputed.
        s = f["/summary"].attrs
        missing = [a for a in SUMMARY_ATTRS if a not in s]
        c.check(not missing, "/summary has peaks, safety factor, deflections, solver statistics", str(missing))
        if not missing:
            tension = f["/elements/tension"][:]
            it, ie = np.unravel_index(np.argmax(tension), tension.shape)
            c.check(math.isclose(s["peak_tension_n"], tension[it, ie], rel_tol=1e-12)
                    and s["peak_tension_element"] == ie and s["peak_tension_time_s"] == t[it],
                    "summary peak tension, element and time = those of /elements/tension",
                    f"{s['peak_tension_n']} el {s['peak_tension_element']} t {s['peak_tension_time_s']} vs "
                    f"{tension[it, ie]} el {ie} t {t[it]}")
            area = f["/mesh/element_area"][:]
            sf = np.min(design["ultimate_strength_pa"] * area / np.maximum(tension, 1e-300))
            c.check(math.isclose(s["min_safety_factor"], sf, rel_tol=1e-9),
                    "summary min_safety_factor = min over outputs of ultimate * area / tension",
                    f"{s['min_safety_factor']} vs {sf}")
            u = f["/nodes/position"][:] - eq[idx][None]
            for name, axis in (("peak_east_west", 1), ("peak_north_south", 2)):
                mag = np.abs(u[:, :, axis])
                jt, jn = np.unravel_index(np.argmax(mag), mag.shape)
                ok = math.isclose(s[name + "_m"], mag[jt, jn], rel_tol=1e-9, abs_tol=1e-9)
                if mag[jt, jn] > 0:
                    ok = ok and s[name + "_node"] == idx[jn] and s[name + "_time_s"] == t[jt]
                c.check(ok, f"summary {name} deflection, node and time = those of /nodes/position",
                        f"{s[name + '_m']} node {s[name + '_node']} vs {mag[jt, jn]} node {idx[jn]}")
            c.check(s["outputs"] == nt and s["end_time_s"] == DURATION_S and text_attr(f["/summary"], "status") == "complete",
                    "summary outputs, end time and status agree with the file")
            # Printed summary: the solver statistics (item 7), equal to those in the file.
            stats = printed_stats(p.stdout)
            c.check(stats is not None and all(stats[k] == s[k] for k in stats),
                    "printed summary states steps, rhs/Jacobian evaluations, error-test and nonlinear failures "
                    "as in /summary", f"printed {stats}")
            c.check(stats is not None and stats["steps"] > 0 and stats["rhs_evals"] >= stats["steps"]
                    and stats["jac_evals"] >= 1,
                    "solver statistics plausible: steps > 0, rhs evaluations >= steps (one or more per step, "
                    "common practice), a Jacobian for BDF-Newton")
        series = {pth: f[pth][:] for pth in ("/nodes/position", "/nodes/velocity", "/elements/tension")}

    # The scenario as run re-validates and re-runs to the same results.
    p = h("check", as_run_path)
    c.check(p.returncode == 0 and f"{N_EL} elements" in p.stdout,
            "/input/scenario written to a file passes `hawser check`", p.stdout + p.stderr)
    rerun = h.out("rerun.h5")
    p = h("run", as_run_path, "-o", rerun)
    same = p.returncode == 0
    if same:
        with h5py.File(rerun, "r") as g:
            same = all(np.array_equal(g[k][:], v) for k, v in series.items())
    c.check(same, "running /input/scenario again gives identical time histories", p.stderr)
    return series


def check_default_output(c, h, demo_path):
    """Without -o the file is <scenario name>.h5 in the current directory (`hawser run --help`)."""
    d = os.path.join(h.tmp, "cwd")
    os.makedirs(d, exist_ok=True)
    p = h("run", demo_path, *SHORT, cwd=d)
    path = os.path.join(d, "demo.h5")
    ok = p.returncode == 0 and os.path.exists(path)
    if ok:
        with h5py.File(path, "r") as f:
            ok = text_attr(f, "status") == "complete"
    c.check(ok, "without -o the result is demo.h5 in the current directory", p.stderr)


def check_thinning(c, h, demo_path, full):
    """output.node_stride and output.nodes (keys: "every k-th node ... the anchor and the top are
    always kept"; "exactly these nodes"; output_nodes() sorts and removes duplicates)."""
    cases = [
        (["--set", "output.node_stride=7"], list(range(0, N_EL + 1, 7)) + [N_EL]),
        (["--set", "output.node_stride=5"], list(range(0, N_EL + 1, 5))),
        (["--set", "output.nodes=[12, 0, 5, 12]"], [0, 5, 12]),
        (["--set", f"output.nodes=[{N_EL}, 3]"], [3, N_EL]),
    ]
    for extra, expect in cases:
        out = h.out("thin.h5")
        p = h("run", demo_path, "-o", out, *SHORT, *extra)
        if not c.check(p.returncode == 0, f"run with {' '.join(extra[1::2])} exits 0", p.stderr):
            continue
        with h5py.File(out, "r") as f:
            idx = f["/nodes/index"][:].tolist()
            c.check(idx == expect, f"{extra[1]}: /nodes/index = {expect}", str(idx))
            k = len(expect)
            pos, vel = f["/nodes/position"][:], f["/nodes/velocity"][:]
            c.check(pos.shape[1:] == (k, 3) and vel.shape[1:] == (k, 3),
                    f"{extra[1]}: node series have {k} nodes", f"{pos.shape}, {vel.shape}")
            c.check(pos.shape == (full["/nodes/position"].shape[0], k, 3)
                    and np.array_equal(pos, full["/nodes/position"][:, expect])
                    and np.array_equal(vel, full["/nodes/velocity"][:, expect])
                    and np.array_equal(f["/elements/tension"][:], full["/elements/tension"]),
                    f"{extra[1]}: the kept nodes' histories equal the full run's (elements unthinned)")


# ---- 4. exit codes ------------------------------------------------------------------------------

def steps_per_output(h, path, extra, interval_s, count):
    """Integrator steps taken in each of the first `count` output intervals, from runs that end
    after 1, 2, ... intervals (the runs are deterministic, so each is a prefix of the longer)."""
    steps, prev = [], 0
    for j in range(1, count + 1):
        p = h("run", path, "-o", h.out("prefix.h5"), *extra, "--set", f"simulation.duration={j * interval_s} s")
        if p.returncode != 0:
            return steps + [f"run to {j * interval_s} s: exit {p.returncode}"]
        with h5py.File(h.out("prefix.h5"), "r") as f:
            total = int(f["/summary"].attrs["steps"])
        steps.append(total - prev)
        prev = total
    return steps


def check_failed_file(c, h, out, p, label, reference, n_rows, interval_s):
    """A failed run (exit 4) keeps every output before the failure (architecture.md, exit 4;
    recorder: status "failed", /summary failure_message, failure_time_s, failure_node)."""
    c.check(p.returncode == 4, f"{label}: exit code 4", f"exit {p.returncode}: {p.stderr}")
    if not os.path.exists(out):
        c.check(False, f"{label}: result file kept")
        return
    with h5py.File(out, "r") as f:
        s = f["/summary"].attrs
        c.check(text_attr(f, "status") == "failed" and text_attr(f["/summary"], "status") == "failed",
                f"{label}: status failed", repr(f.attrs.get("status")))
        msg = text_attr(f["/summary"], "failure_message") or ""
        t_fail = s.get("failure_time_s", float("nan"))
        node = s.get("failure_node", -1)
        c.check(len(msg) > 0 and (n_rows - 1) * interval_s < t_fail < n_rows * interval_s and 1 <= node <= N_EL,
                f"{label}: failure_message, failure_time_s in output interval {n_rows}, failure_node a free node",
                f"{msg!r}, t {t_fail}, node {node}")
        t = f["/time"][:]
        lengths = {k: f[k].shape[0] for k in TIME_SERIES}
        c.check(all(v == n_rows for v in lengths.values()) and s["outputs"] == n_rows,
                f"{label}: every series holds the {n_rows} outputs before the failure", str(lengths))
        same = all(np.array_equal(f[k][:], reference[k][:n_rows]) for k in reference)
        c.check(same and np.array_equal(t, np.arange(n_rows) * interval_s),
                f"{label}: the kept outputs equal those of the run without the step limit")
    c.check("failed" in p.stdout, f"{label}: printed summary says failed", p.stdout[:200])


def check_integrator_failure(c, h, demo_path, kick_path, kick_args):
    # (a) The demo with at most 10 steps per output fails in the first interval: the file keeps
    #     the output at t = 0, and the step count is exactly the limit (CVODE guide).
    ref = h.out("short_ref.h5")
    h("run", demo_path, "-o", ref, *SHORT)
    out = h.out("fail10.h5")
    p = h("run", demo_path, "-o", out, *SHORT, "--set", "simulation.max_steps_per_output=10")
    with h5py.File(ref, "r") as r:
        reference = {k: r[k][:] for k in TIME_SERIES}
    check_failed_file(c, h, out, p, "max_steps_per_output=10", reference, 1, INTERVAL_S)
    if os.path.exists(out):
        with h5py.File(out, "r") as f:
            c.check(f["/summary"].attrs["steps"] == 10, "max_steps_per_output=10: exactly 10 steps taken (CVODE guide)",
                    str(f["/summary"].attrs["steps"]))

    # (b) A failure after several outputs. The kick case goes slack after about 20 s, and its
    #     intervals after that need more steps than the first three: with the limit set to the
    #     most the first three need, the run fails in the first interval j that needs more, keeps
    #     j outputs, and has taken exactly (steps of intervals 1..j-1) + limit steps.
    interval = 5.0
    d = steps_per_output(h, kick_path, kick_args, interval, 8)
    if not c.check(all(isinstance(x, int) for x in d), "kick case: runs ending after 1 .. 8 outputs succeed", str(d)):
        return
    limit = max(d[:3])
    later = [j for j in range(3, len(d)) if d[j] > limit]
    if not c.check(bool(later), "kick case: a later output interval needs more steps than the first three "
                   "(premise of the next checks)", str(d)):
        return
    j = later[0]  # 0-based: interval j + 1 fails, outputs 0..j are kept
    ref = h.out("kick_ref.h5")
    h("run", kick_path, "-o", ref, *kick_args)
    out = h.out("fail_late.h5")
    p = h("run", kick_path, "-o", out, *kick_args, "--set", f"simulation.max_steps_per_output={limit}")
    with h5py.File(ref, "r") as r:
        reference = {k: r[k][:] for k in TIME_SERIES}
    check_failed_file(c, h, out, p, f"max_steps_per_output={limit} (steps per interval {d})", reference, j + 1, interval)
    if os.path.exists(out):
        with h5py.File(out, "r") as f:
            c.check(f["/summary"].attrs["steps"] == sum(d[:j]) + limit,
                    "late failure: steps = steps of the completed intervals + the limit (CVODE guide)",
                    f"{f['/summary'].attrs['steps']} vs {sum(d[:j]) + limit}")


def check_rupture(c, h, demo_text):
    """Rupture (keys: simulation.stop_on_rupture, material.ultimate_strength; architecture.md
    exit 3). Case: safety factor 1.05 (design stress = ultimate / 1.05) and node 20 kicked upward
    at 300 m/s: the stretch wave takes element 19 past its ultimate strength after about 10 s."""
    text = replace_block(demo_text, "initial", kick_block(20, "300 m/s, 0, 0"))
    path = h.scenario(text, "rupture.yaml")
    args = ["--set", f"mesh.elements={N_EL}", "--set", "simulation.duration=60 s",
            "--set", "simulation.output_interval=5 s", "--set", "tether.safety_factor=1.05"]
    design = json.loads(h("design", path, "--json", *args).stdout)
    ult = design["material"]["ultimate_strength_pa"]
    first = None
    for stop in (True, False):
        out = h.out(f"rupture_{stop}.h5")
        p = h("run", path, "-o", out, *args, "--set", f"simulation.stop_on_rupture={'true' if stop else 'false'}")
        label = f"stop_on_rupture={str(stop).lower()}"
        c.check(p.returncode == (3 if stop else 0), f"{label}: exit {3 if stop else 0}", f"exit {p.returncode}: {p.stderr}")
        if not os.path.exists(out):
            c.check(False, f"{label}: result file written")
            continue
        with h5py.File(out, "r") as f:
            s, g = f["/summary"].attrs, f["/summary"]
            status = "stopped" if stop else "complete"
            c.check(text_attr(f, "status") == status, f"{label}: status {status}", repr(f.attrs.get("status")))
            have = all(k in g for k in ("rupture_time", "rupture_element", "rupture_stress"))
            if not c.check(have and s["ruptures"] >= 1, f"{label}: /summary rupture_time, rupture_element, rupture_stress"):
                continue
            rt, re_, rs = g["rupture_time"][:], g["rupture_element"][:].astype(int), g["rupture_stress"][:]
            c.check(rt.size == s["ruptures"] and np.all(rs >= ult) and np.all((re_ >= 0) & (re_ < N_EL))
                    and np.all((rt > 0) & (rt < 60.0)),
                    f"{label}: every rupture has a time inside the run, an element and stress >= ultimate "
                    f"({ult:.4g} Pa)", f"t {rt}, el {re_}, stress {rs}")
            t = f["/time"][:]
            stress = f["/elements/tension"][:] / f["/mesh/element_area"][:]
            if stop:
                # Stopped at the rupture: the last output is at the rupture time, and the element's
                # stress there, from the recorded tension and area, is at the ultimate strength.
                c.check(s["ruptures"] == 1 and t[-1] == rt[0] and stress[-1, re_[0]] >= ult * (1 - 1e-12)
                        and np.all(np.diff(t[:-1]) == 5.0),
                        "stopped: last output at the rupture time, recorded stress there >= ultimate",
                        f"t {t}, stress {stress[-1, re_[0]]:.6g}")
                c.check("ultimate strength" in p.stdout, "stopped: printed summary names the rupture", p.stdout)
                first = (rt[0], re_[0])
            else:
                # Going on: every output past the ultimate lies at or after a recorded rupture.
                over = np.flatnonzero(np.max(stress, axis=1) >= ult)
                c.check(len(t) == 13 and over.size > 0 and rt[0] <= t[over[0]],
                        "not stopped: runs to the end; outputs past the ultimate come after a recorded rupture",
                        f"{len(t)} outputs, first over at {t[over[0]] if over.size else None}, rupture {rt}")
                if first is not None:
                    c.check(math.isclose(rt[0], first[0], rel_tol=1e-12) and re_[0] == first[1],
                            "not stopped: the first rupture is the one the stopping run stopped at",
                            f"{rt[0]}, {re_[0]} vs {first}")

    # An initial state already past the ultimate strength: "stop the run (exit code 3) when an
    # element's stress reaches the ultimate strength" (keys) holds from t = 0 too. Case: a 30 km
    # upward half-sine over the lowest 1000 km (strain change up to pi * 30 / 1000 = 0.094, against
    # 0.1 - 0.095 = 0.0053 of margin at safety factor 1.05 with E = 900 GPa, ultimate 100 GPa).
    text = replace_block(demo_text, "initial", "initial:\n  displacements:\n    - direction: along\n"
                         "      amplitude: 30 km\n      from: 0 km\n      to: 1000 km\n\n")
    path = h.scenario(text, "rupture_t0.yaml")
    out = h.out("rupture_t0.h5")
    p = h("run", path, "-o", out, "--set", f"mesh.elements={N_EL}", "--set", "simulation.duration=10 s",
          "--set", "simulation.output_interval=5 s", "--set", "tether.safety_factor=1.05")
    over0 = None
    if os.path.exists(out):
        with h5py.File(out, "r") as f:
            over0 = float(np.max(f["/elements/tension"][0] / f["/mesh/element_area"][:]) / ult)
    c.check(over0 is not None and over0 > 1.0, "initial state past ultimate: recorded stress at t = 0 above "
            "ultimate (premise)", str(over0))
    c.check(p.returncode == 3, "initial state past ultimate: exit 3 (stopped), as for a rupture during the run",
            f"exit {p.returncode}; {p.stdout.splitlines()[:1]}")


def check_bad_input(c, h, demo_path, demo_text):
    """Bad input: exit 2, the message, and no file (architecture.md: "2 bad input or usage
    (nothing written but the message)")."""
    nosim = h.scenario(replace_block(demo_text, "simulation", ""), "nosim.yaml")
    cases = [
        ("rtol above its maximum", demo_path, ["--set", "simulation.rtol=5"], ["simulation.rtol"]),
        ("unknown key", demo_path, ["--set", "simulation.colour=red"], ["simulation.colour", "unknown key"]),
        ("negative duration", demo_path, ["--set", "simulation.duration=-1 s"], ["simulation.duration"]),
        ("output node past the top", demo_path, ["--set", f"mesh.elements={N_EL}", "--set", f"output.nodes=[5, {N_EL + 1}]"],
         ["output.nodes"]),
        ("missing simulation block", nosim, [], ["simulation", "missing"]),
        ("missing scenario file", h.out("no_such.yaml"), [], ["no_such.yaml"]),
    ]
    for name, path, extra, words in cases:
        out = h.out("bad.h5")
        p = h("run", path, "-o", out, *extra)
        c.check(p.returncode == 2 and all(w in p.stderr for w in words) and p.stdout == "",
                f"bad input ({name}): exit 2, message names {words}, nothing on stdout",
                f"exit {p.returncode}, stderr {p.stderr.strip()!r}")
        c.check(not os.path.exists(out), f"bad input ({name}): no result file")
    # An existing file at the -o path is left as it was.
    out = h.out("keep.h5")
    with open(out, "wb") as fh:
        fh.write(b"not touched")
    p = h("run", demo_path, "-o", out, "--set", "simulation.rtol=5")
    with open(out, "rb") as fh:
        kept = fh.read()
    c.check(p.returncode == 2 and kept == b"not touched", "bad input leaves an existing -o file untouched")


# ---- 5. slack -------------------------------------------------------------------------------------

def check_slack(c, h, kick_path, kick_args):
    """Slack elements are reported (/summary max_slack_elements, first_slack_time_s; printed).
    The summary observes the outputs, so both figures follow from /elements/tension (a slack
    element carries no tension)."""
    out = h.out("slack.h5")
    p = h("run", kick_path, "-o", out, *kick_args)
    c.check(p.returncode == 0, "slack case runs to the end", p.stderr)
    with h5py.File(out, "r") as f:
        s = dict(f["/summary"].attrs)
        tension, t = f["/elements/tension"][:], f["/time"][:]
    per_output = np.sum(tension == 0.0, axis=1)
    first = t[np.argmax(per_output > 0)] if per_output.any() else -1.0
    c.check(s["max_slack_elements"] > 0 and s["max_slack_elements"] == per_output.max(),
            "slack case: /summary max_slack_elements > 0 and = most zero-tension elements in one output",
            f"{s['max_slack_elements']} vs {per_output.tolist()}")
    c.check(s["first_slack_time_s"] == first and first > 0,
            "slack case: first_slack_time_s = first output with a zero-tension element (after t = 0)",
            f"{s['first_slack_time_s']} vs {first}")
    m = re.search(r"slack elements: up to (\d+) at once, first at t = ([0-9.e+-]+) s", p.stdout)
    c.check(m is not None and int(m.group(1)) == s["max_slack_elements"]
            and math.isclose(float(m.group(2)), first, rel_tol=1e-5),
            "slack case: printed summary states the slack elements and when", p.stdout)


# ---- 6. progress line -------------------------------------------------------------------------------

def check_progress(c, h, demo_path):
    """The progress line (simulated time, % done, steps, ETA) appears when stderr is a terminal
    (architecture.md, command line); the pipe case is checked in check_result_file."""
    proc, text = run_on_terminal([h.exe, "run", demo_path, "-o", h.out("tty.h5"), *SHORT], cwd=h.tmp)
    stdout = proc.stdout.read().decode()
    proc.wait(timeout=60)
    c.check(proc.returncode == 0 and "ETA" in text and "%" in text and "steps" in text,
            "stderr on a terminal: progress line with steps, % and ETA", repr(text[:200]))
    c.check("results:" in stdout and "ETA" not in stdout, "stderr on a terminal: the summary still goes to stdout")


def main():
    a = command_line()
    c = Checks()
    demo_path = os.path.join(a.source, "scenarios", "demo.yaml")
    demo_text = open(demo_path).read()
    with tempfile.TemporaryDirectory() as tmp:
        h = Hawser(os.path.abspath(a.hawser), tmp)
        p = h("design", demo_path, "--json", *SHORT)
        dj = json.loads(p.stdout)
        design = dict(dj["design"], ultimate_strength_pa=dj["material"]["ultimate_strength_pa"])

        full = check_result_file(c, h, demo_path, design)
        check_default_output(c, h, demo_path)
        if full is not None:
            check_thinning(c, h, demo_path, full)

        # The kick case (slack and the late integrator failure): safety factor 4 (prestrain
        # 100 GPa / 4 / 900 GPa = 0.028), node 10 (about 500 km up) kicked down at 1000 m/s; the
        # compression reflected at the fixed anchor slackens elements after about 20 s.
        kick_path = h.scenario(replace_block(demo_text, "initial", kick_block(10, "-1000 m/s, 0, 0")), "kick.yaml")
        kick_args = ["--set", f"mesh.elements={N_EL}", "--set", "simulation.duration=40 s",
                     "--set", "simulation.output_interval=5 s", "--set", "tether.safety_factor=4"]
        check_slack(c, h, kick_path, kick_args)
        check_integrator_failure(c, h, demo_path, kick_path, kick_args)
        check_rupture(c, h, demo_text)
        check_bad_input(c, h, demo_path, demo_text)
        check_progress(c, h, demo_path)

    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
