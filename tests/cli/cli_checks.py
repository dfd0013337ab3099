"""What every command-line test shares: a tally of checks that prints one line per check.

Not a test itself (ctest runs tests/cli/test_*.py only). A test script imports it from its own
directory, which Python puts first on the module path.
"""
import argparse
import os
import select
import subprocess


def command_line():
    """The arguments ctest passes every command-line test: --hawser BIN --source DIR."""
    ap = argparse.ArgumentParser()
    ap.add_argument("--hawser", required=True, help="the hawser program")
    ap.add_argument("--source", required=True, help="the source tree (scenarios/, config/)")
    return ap.parse_args()


class Checks:
    """Counts passed and failed checks; `check` prints `ok   what` or `FAIL what detail`."""

    def __init__(self):
        self.passed = self.failed = 0

    def check(self, ok, what, detail=""):
        ok = bool(ok)
        if ok:
            self.passed += 1
            print(f"ok   {what}")
        else:
            self.failed += 1
            print(f"FAIL {what} {detail}")
        return ok

    def summary(self):
        """Prints the closing line ctest reads and returns the exit code (0: all passed)."""
        print(f"{self.passed} passed, {self.failed} failed")
        return 1 if self.failed else 0


def text_attr(obj, name):
    """An HDF5 string attribute as str (h5py returns bytes for fixed-length strings)."""
    v = obj.attrs.get(name)
    return v.decode("utf-8") if isinstance(v, bytes) else v


def run_on_terminal(cmd, **popen_args):
    """Runs `cmd` with standard error on a pseudo-terminal (what a user at a terminal sees);
    returns (process, text written to the terminal). Standard output is a pipe unless
    popen_args say otherwise; the caller reads it and waits for the process."""
    master, slave = os.openpty()
    popen_args.setdefault("stdout", subprocess.PIPE)
    proc = subprocess.Popen(cmd, stderr=slave, **popen_args)
    os.close(slave)
    got = b""
    while True:
        ready, _, _ = select.select([master], [], [], 0.2)
        if ready:
            try:
                chunk = os.read(master, 4096)
            except OSError:  # the terminal closes when the program exits
                break
            if not chunk:
                break
            got += chunk
        elif proc.poll() is not None:
            break
    os.close(master)
    return proc, got.decode(errors="replace")
