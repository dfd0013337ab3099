#!/usr/bin/python3
"""What a result file carries besides the contract's time histories: the XDMF description for
ParaView and VisIt, the climbers' own attributes, the folder layout while a run goes, and the
refusals of `hawser run --resume`.

Sources of the expectations:
  XDMF 3    the XDMF model and format (xdmf.org, "XDMF Model and Format"): a temporal collection
            Grid of uniform Grids, each with Time, Topology (Polyline, NodesPerElement 2),
            Geometry (XYZ) and Attributes; HyperSlab DataItems select (start, stride, count)
            rows of an HDF DataItem named "file.h5:/path" (recalled from memory, checked with
            Python's xml parser only: ParaView is not needed in CI).
  h5_writer.hpp   a running file's segments live in "<file>.parts" beside it, referred to by
            relative names, so the file reads from any working directory.
  result_recorder.hpp   /checkpoint while running, none when finished; --resume refuses a
            finished file, another scenario, and an -o that names another file (exit 2, the
            architecture's code for bad input).
  scenarios/demo.yaml   the climber "kite": 20 t, leaving at t = 0 from 0 km.

Run by ctest as: python3 test_result_files.py --hawser BIN --source DIR
"""
import os
import signal
import subprocess
import sys
import tempfile
import time
import xml.etree.ElementTree as ET

import h5py
import numpy as np

from cli_checks import Checks, command_line, text_attr

N_EL = 40
SHORT = ["--set", "simulation.duration=30 min", "--set", f"mesh.elements={N_EL}"]


def hdf_ref(item):
    """'file.h5:/path' of an HDF DataItem -> (file, path)."""
    name, _, path = item.text.strip().partition(":")
    return name, path


def check_xdmf(c, h5_path, label, cells):
    xmf = os.path.splitext(h5_path)[0] + ".xmf"
    if not c.check(os.path.exists(xmf), f"{label}: {os.path.basename(xmf)} written beside the result"):
        return
    root = ET.parse(xmf).getroot()
    c.check(root.tag == "Xdmf" and root.get("Version") == "3.0", f"{label}: an Xdmf 3.0 document")
    series = root.find("Domain/Grid")
    c.check(series is not None and series.get("GridType") == "Collection"
            and series.get("CollectionType") == "Temporal", f"{label}: a temporal collection of grids")
    grids = series.findall("Grid")
    with h5py.File(h5_path, "r") as f:
        t = f["/time"][:]
        k = f["/nodes/index"].shape[0]
        n = f["/elements/tension"].shape[1]
        c.check(len(grids) == len(t), f"{label}: one grid per output ({len(t)})", str(len(grids)))
        times = [float(g.find("Time").get("Value")) for g in grids]
        c.check(np.array_equal(times, t), f"{label}: grid times equal /time")
        problems = []
        for i, g in enumerate(grids):
            topo = g.find("Topology")
            if topo.get("TopologyType") != "Polyline" or int(topo.get("NumberOfElements")) != k - 1:
                problems.append(f"grid {i}: topology {topo.attrib}")
            file_name, path = hdf_ref(topo.find("DataItem"))
            if file_name != os.path.basename(h5_path) or f[path].shape != (k - 1, 2):
                problems.append(f"grid {i}: connectivity {file_name}:{path}")
            slabs = g.findall(".//DataItem[@ItemType='HyperSlab']")
            for slab in slabs:
                select, source = slab.findall("DataItem")
                start = [int(v) for v in select.text.split()]
                _, path = hdf_ref(source)
                dims = tuple(int(v) for v in source.get("Dimensions").split())
                if dims != f[path].shape or start[0] != i:
                    problems.append(f"grid {i}: slab of {path} dims {dims} vs {f[path].shape}, row {start[0]}")
            names = [a.get("Name") for a in g.findall("Attribute")]
            want = ["velocity [m/s]"] + (["tension [N]", "stress [Pa]", "safety factor [-]"] if cells else [])
            if names != want:
                problems.append(f"grid {i}: attributes {names}")
            for fn in g.findall(".//DataItem[@ItemType='Function']"):
                _, area = hdf_ref(fn.findall("DataItem")[1])
                if area != "/mesh/element_area" or f[area].shape != (n,):
                    problems.append(f"grid {i}: function over {area}")
            if len(problems) > 5:
                break
        c.check(not problems, f"{label}: every grid's topology, slabs and fields match the datasets",
                str(problems[:5]))
        if cells:
            # safety factor = sigma_u A / T: the strength in the Function is the material's.
            fn = grids[0].findall(".//DataItem[@ItemType='Function']")[1].get("Function")
            sigma_u = float(fn.split("*")[0])
            c.check(sigma_u == f["/mesh"].attrs["ultimate_strength_pa"] and sigma_u > 0,
                    f"{label}: safety factor uses the material's ultimate strength ({sigma_u:g} Pa)")


def main():
    a = command_line()
    c = Checks()
    exe = os.path.abspath(a.hawser)
    demo = os.path.join(os.path.abspath(a.source), "scenarios", "demo.yaml")
    with tempfile.TemporaryDirectory() as tmp:
        def run(*args, cwd=tmp):
            return subprocess.run([exe, *args], capture_output=True, text=True, cwd=cwd, timeout=300)

        out = os.path.join(tmp, "demo.h5")
        p = run("run", demo, "-o", out, *SHORT)
        c.check(p.returncode == 0, "short demo run exits 0", p.stderr)
        check_xdmf(c, out, "every node kept", cells=True)
        with h5py.File(out, "r") as f:
            g = f["/climbers/kite"]
            c.check(float(g.attrs["mass_kg"]) == 20000.0 and float(g.attrs["start_time_s"]) == 0.0
                    and float(g.attrs["from_m"]) == 0.0,
                    "/climbers/kite carries its mass (20 t), start time and start point",
                    str(dict(g.attrs)))
            profile = text_attr(g, "profile").splitlines()
            last = [float(v) for v in profile[-1].split(",")]
            c.check(len(profile) >= 3 and last[2] == 0.0 and abs(last[1] - float(g.attrs["to_m"])) < 1e-3,
                    "the climber's profile table ends at its end point, at rest", str(profile))
            c.check("/checkpoint" not in f, "a finished file has no /checkpoint")

        thin = os.path.join(tmp, "thin.h5")
        p = run("run", demo, "-o", thin, *SHORT, "--set", "output.node_stride=4")
        c.check(p.returncode == 0, "thinned run exits 0", p.stderr)
        check_xdmf(c, thin, "every 4th node kept", cells=False)

        # Resume refusals: exit 2 with the file named.
        for args, why in [(["--resume", out], "holds no checkpoint"),
                          (["--resume", out, "-o", thin], "names another")]:
            p = run("run", demo, *SHORT, *args)
            c.check(p.returncode == 2 and why in p.stderr,
                    f"--resume {' '.join(os.path.basename(x) for x in args[1:])}: exit 2, says '{why}'",
                    f"{p.returncode}: {p.stderr}")

        # A run writing into a subfolder, killed, then read from another working directory, then
        # resumed with another scenario (refused) and with its own (finishes).
        sub = os.path.join(tmp, "runs")
        os.mkdir(sub)
        killed = os.path.join(sub, "killed.h5")
        slow = [*SHORT[:2], "--set", "mesh.elements=400", "--set", "simulation.duration=6 h",
                "--set", "simulation.output_interval=1 min", "--set", "output.flush_every=1"]
        proc = subprocess.Popen([exe, "run", demo, "-o", killed, *slow], cwd=tmp,
                                stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        end = time.monotonic() + 60
        rows = 0
        while time.monotonic() < end and rows < 5 and proc.poll() is None:
            try:
                with h5py.File(killed, "r") as f:
                    rows = f["/time"].shape[0]
            except Exception:
                pass
            time.sleep(0.05)
        proc.send_signal(signal.SIGKILL)
        proc.wait()
        c.check(os.path.isdir(killed + ".parts"), "a killed run leaves its segments in <file>.parts")
        probe = subprocess.run([sys.executable, "-c",
                                "import h5py,sys,numpy as np; f=h5py.File(sys.argv[1]); t=f['/time'][:]; "
                                "print(len(t), int(np.isfinite(f['/nodes/position'][:]).all()))",
                                killed], capture_output=True, text=True, cwd="/")
        got = probe.stdout.split()
        c.check(probe.returncode == 0 and len(got) == 2 and int(got[0]) >= 5 and got[1] == "1",
                "the killed file reads from another working directory, all rows finite",
                probe.stdout + probe.stderr)
        p = run("run", demo, *slow, "--set", "simulation.rtol=1e-7", "--resume", killed)
        c.check(p.returncode == 2 and "another scenario" in p.stderr,
                "--resume with another --set value: exit 2, 'another scenario'", f"{p.returncode}: {p.stderr}")
        p = run("run", demo, *slow, "--resume", killed)
        c.check(p.returncode == 0 and "resuming" in p.stdout, "--resume with the same scenario finishes",
                f"{p.returncode}: {p.stderr}")
        with h5py.File(killed, "r") as f:
            c.check(text_attr(f, "status") == "complete" and f["/time"].shape[0] == 361
                    and not os.path.exists(killed + ".parts"),
                    "the resumed file is complete with all 361 outputs and no parts folder")
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
