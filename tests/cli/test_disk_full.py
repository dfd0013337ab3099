#!/usr/bin/python3
"""A run whose result file cannot be finished (no space left) fails cleanly.

Once, a full disk made `hawser run` print "No space left on device" and then die of a
segmentation fault in HDF5's clean-up at exit (exit 139), leaving the file with status
"running". Expected now (README, "Results"): exit code 1, a message that says the file could
not be written, and a file that reads, holds the run up to its last publication, and whose
root attributes say status "failed" and why ("failure").

The full disk is made without root or a mount: RLIMIT_FSIZE caps the size of any file the
program writes (POSIX setrlimit; writes past it fail with EFBIG, and SIGXFSZ, ignored here,
would otherwise end the process). A 150 kB cap lets the first publication through (about
85 kB) and stops the final file of a two-hour demo run (about 350 kB).

Run by ctest as: python3 test_disk_full.py --hawser BIN --source DIR
"""
import os
import resource
import signal
import subprocess
import sys
import tempfile

import h5py

from cli_checks import Checks, command_line, text_attr

CAP_BYTES = 150_000


def capped():
    signal.signal(signal.SIGXFSZ, signal.SIG_IGN)
    resource.setrlimit(resource.RLIMIT_FSIZE, (CAP_BYTES, CAP_BYTES))


def main():
    a = command_line()
    c = Checks()
    demo = os.path.join(a.source, "scenarios", "demo.yaml")
    with tempfile.TemporaryDirectory() as tmp:
        out = os.path.join(tmp, "demo.h5")
        p = subprocess.run([a.hawser, "run", demo, "-o", out, "--set", "simulation.duration=2 h"],
                           capture_output=True, text=True, timeout=300, preexec_fn=capped)
        c.check(p.returncode == 1, "exit code 1, not a signal", f"got {p.returncode}: {p.stderr[-400:]}")
        c.check("could not be written" in p.stderr, "the message says the file could not be written",
                p.stderr[-400:])
        try:
            with h5py.File(out, "r") as f:
                status, failure = text_attr(f, "status"), text_attr(f, "failure") or ""
                rows = f["time"].shape[0]
        except OSError as e:
            c.check(False, "the file reads", str(e))
            sys.exit(c.summary())
        c.check(status == "failed", "status failed", f"got {status!r}")
        c.check("could not be written" in failure, "the file says why", repr(failure[:200]))
        c.check(rows >= 1, f"the file holds the run up to its last publication ({rows} rows)")
        c.check(not os.path.exists(os.path.join(out + ".parts", "final.tmp")),
                "the half-written final file is gone (its space given back)")
    sys.exit(c.summary())


if __name__ == "__main__":
    main()
