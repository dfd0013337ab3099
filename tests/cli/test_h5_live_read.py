#!/usr/bin/python3
"""Result files can be read while being written, and survive the writer being killed.

Drives tests/bench/h5_killtest (built beside the hawser program, in <build>/tests/), which
writes with H5Writer (solver/h5_writer.hpp) and prints "flushed K" each time K rows are durable.
Every check opens the file with plain h5py.File(path, "r") (default driver, no SWMR, no h5clear):
  1. live: while the writer runs, every series holds at least the K rows last reported, each row
     equal to its index, with the right units attribute -- also for a reader that keeps the file
     open while the writer commits many more flushes before it reads; then a few seconds of
     back-to-back reads of the newest rows, which is where a commit and a read can collide
     (B-tree nodes split there: a reader must never lose committed rows to a split);
  2. kill: SIGKILL at random moments, then the file opens and holds every reported row intact,
     and /time (created first, so committed last) is never longer than another series;
  3. a run left to finish holds exactly NROWS rows and status "complete";
  4. crash replay: random kills rarely land in the few microseconds where a flush is fragile,
     so every write(2)/pwrite(2)/ftruncate(2) of a run is recorded (an LD_PRELOAD recorder,
     compiled here with the system C compiler) and the file is rebuilt as it stood between each
     two of them -- every moment a kill could leave -- and checked like (2).
Expected shapes, units and values come from tests/bench/h5_killtest.cpp (the writer's input).
"""
import argparse
import multiprocessing
import os
import random
import shutil
import signal
import struct
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

import h5py
import numpy as np

# name -> (row shape, units), as written by h5_killtest.cpp
SERIES = {
    "/time": ((), "s"),
    "/energy/kinetic": ((), "J"),
    "/elements/tension": ((200,), "N"),
    "/nodes/position": ((201, 3), "m"),
    "/nodes/velocity": ((341, 3), "m/s"),
}
FIRST_SERIES = "/time"
# /nodes/position and /nodes/velocity hold one row per chunk, so their chunk B-trees (64
# entries a node: HDF5's default chunk B-tree K = 32) split at the root near row 64 and below it
# from about row 96 on (h5_writer.cpp series_chunk): replay past both.
REPLAY_ROWS = 140


class Writer:
    """h5_killtest running in the background; a thread records the rows it reports durable."""

    def __init__(self, exe, path, nrows, durability, env=None):
        self.proc = subprocess.Popen([str(exe), str(path), str(nrows), durability],
                                     stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                                     env=env)
        self.flushed = -1      # rows reported durable; -1 before the first report
        self.reports = 0
        self.closed = None
        self.cond = threading.Condition()
        self.reader = threading.Thread(target=self._read, daemon=True)
        self.reader.start()

    def _read(self):
        for line in self.proc.stdout:
            word, _, value = line.strip().partition(" ")
            with self.cond:
                if word == "flushed":
                    self.flushed = int(value)
                    self.reports += 1
                elif word == "closed":
                    self.closed = int(value)
                self.cond.notify_all()

    def wait_reports(self, n, timeout):
        with self.cond:
            return self.cond.wait_for(lambda: self.reports >= n, timeout)

    def durable(self):
        with self.cond:
            return self.flushed

    def running(self):
        return self.proc.poll() is None

    def kill(self):
        self.proc.send_signal(signal.SIGKILL)
        self.proc.wait()
        self.reader.join()     # every line printed before the kill has now been counted
        return self.durable()

    def finish(self, timeout):
        self.proc.wait(timeout=timeout)
        self.reader.join()
        return self.proc.returncode, self.proc.stderr.read()


def check_newest(path, rows, span=200):
    """Problems in the newest `span` of the `rows` committed rows of every series."""
    problems = []
    try:
        with h5py.File(path, "r") as f:
            lo = max(0, rows - span)
            for name in SERIES:
                values = f[name][lo:rows].reshape(rows - lo, -1)
                wrong = np.flatnonzero(np.any(values != np.arange(lo, rows)[:, None], axis=1))
                if wrong.size:
                    problems.append(f"{name}: {wrong.size} committed rows from {lo + wrong[0]} "
                                    f"wrong (NaN: {bool(np.isnan(values[wrong]).all())})")
    except Exception as e:
        problems.append(f"cannot read: {type(e).__name__}: {e}")
    return problems


def check_file(path, rows, exact=False, status=(b"running",), hold_open=0.0, whole=True):
    """Problems found in the file, given `rows` reported durable (empty list: all good).

    whole: read whole datasets; rows past `rows` may be there already, and each must then equal
    its index or be NaN (the fill value, if the reader saw a length before the rows behind it).
    Otherwise only the first `rows` rows are read.
    hold_open: seconds to keep the file open before reading, as an interactive reader would,
    while the writer goes on committing.
    """
    problems = []
    try:
        with h5py.File(path, "r") as f:
            time.sleep(hold_open)
            lengths = {}
            for name, (row_shape, units) in SERIES.items():
                if name not in f:
                    problems.append(f"{name} missing")
                    continue
                d = f[name]
                lengths[name] = d.shape[0]
                if d.shape[1:] != row_shape:
                    problems.append(f"{name} row shape {d.shape[1:]} != {row_shape}")
                if d.attrs.get("units") != units.encode():
                    problems.append(f"{name} units {d.attrs.get('units')!r} != {units!r}")
                if d.shape[0] < rows or (exact and d.shape[0] != rows):
                    problems.append(f"{name} has {d.shape[0]} rows, {rows} reported durable")
                    continue
                n = d.shape[0] if whole else rows
                if n == 0:
                    continue
                values = d[:n].reshape(n, -1)
                wrong = np.any(values != np.arange(n, dtype=float)[:, None], axis=1)
                bad = np.flatnonzero(wrong[:rows])
                if bad.size:
                    problems.append(f"{name} rows {bad[:5].tolist()} differ from their index")
                later = np.flatnonzero(wrong[rows:] & ~np.all(np.isnan(values[rows:]), axis=1))
                if later.size:
                    problems.append(f"{name} rows {(later[:5] + rows).tolist()} (after the "
                                    f"{rows} reported) are neither their index nor NaN")
            others = [n for n in lengths if n != FIRST_SERIES]
            if FIRST_SERIES in lengths and others:
                if any(lengths[FIRST_SERIES] > lengths[n] for n in others):
                    problems.append(f"{FIRST_SERIES} longer than another series: {lengths}")
            if f.attrs.get("status") not in status:
                problems.append(f"status {f.attrs.get('status')!r} not in {status}")
    except Exception as e:  # an unreadable file is the failure this test exists to catch
        problems.append(f"cannot read: {type(e).__name__}: {e}")
    return problems


# ---- crash replay ------------------------------------------------------------------------------

# LD_PRELOAD recorder: logs every write to the file named by $REC_TARGET (kind 'W' offset length
# bytes, 'T' length for ftruncate) and a marker 'M' rows when the program writes "flushed rows"
# to stdout. Records: 1 byte kind, int64 offset or rows, int64 length, then the bytes for 'W'.
RECORDER_C = r"""
#define _GNU_SOURCE
#include <dlfcn.h>
#include <fcntl.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <sys/types.h>
#include <unistd.h>
static int target = -1, log_fd = -1;
static ssize_t (*real_write)(int, const void *, size_t);
static void put(const void *p, size_t n) {
  const char *c = p;
  while (n > 0) { ssize_t k = real_write(log_fd, c, n); if (k <= 0) abort(); c += k; n -= k; }
}
static void rec(char kind, int64_t off, int64_t len, const void *data) {
  if (!real_write) real_write = dlsym(RTLD_NEXT, "write");
  if (log_fd < 0) log_fd = open(getenv("REC_LOG"), O_WRONLY | O_CREAT | O_TRUNC, 0644);
  put(&kind, 1); put(&off, 8); put(&len, 8);
  if (kind == 'W') put(data, len);
}
static int opened(const char *path, int fd) {
  const char *t = getenv("REC_TARGET");
  if (fd >= 0 && t && strcmp(path, t) == 0) target = fd;
  return fd;
}
#define OPEN(name)                                                          \
  int name(const char *path, int flags, ...) {                              \
    static int (*real)(const char *, int, ...);                             \
    if (!real) real = dlsym(RTLD_NEXT, #name);                              \
    mode_t mode = 0;                                                        \
    if (flags & O_CREAT) { va_list a; va_start(a, flags); mode = va_arg(a, int); va_end(a); } \
    return opened(path, real(path, flags, mode));                          \
  }
OPEN(open)
OPEN(open64)
#define PWRITE(name)                                                        \
  ssize_t name(int fd, const void *b, size_t n, off_t off) {                \
    static ssize_t (*real)(int, const void *, size_t, off_t);              \
    if (!real) real = dlsym(RTLD_NEXT, #name);                              \
    ssize_t k = real(fd, b, n, off);                                        \
    if (fd == target && k > 0) rec('W', off, k, b);                         \
    return k;                                                               \
  }
PWRITE(pwrite)
PWRITE(pwrite64)
#define FTRUNCATE(name)                                                     \
  int name(int fd, off_t len) {                                             \
    static int (*real)(int, off_t);                                         \
    if (!real) real = dlsym(RTLD_NEXT, #name);                              \
    int r = real(fd, len);                                                  \
    if (fd == target && r == 0) rec('T', len, 0, 0);                        \
    return r;                                                               \
  }
FTRUNCATE(ftruncate)
FTRUNCATE(ftruncate64)
ssize_t write(int fd, const void *b, size_t n) {
  if (!real_write) real_write = dlsym(RTLD_NEXT, "write");
  if (fd == target) abort();  /* the driver writes with pwrite only; anything else is unrecorded */
  if (fd == 1 && n > 8 && memcmp(b, "flushed ", 8) == 0) rec('M', atoll((const char *)b + 8), 0, 0);
  return real_write(fd, b, n);
}
"""


def read_log(path):
    """[(kind, offset_or_rows, length, bytes)] from the recorder's log."""
    log, ops, p = Path(path).read_bytes(), [], 0
    while p < len(log):
        kind = log[p:p + 1]
        off, n = struct.unpack("<qq", log[p + 1:p + 17])
        p += 17
        data = log[p:p + n] if kind == b"W" else b""
        p += len(data)
        ops.append((kind, off, data))
    return ops


def replay_worker(args):
    """Rebuild the file before every recorded write; check the states with index % step == part."""
    ops, part, step, scratch = args
    image, size, rows, checked, failures = bytearray(), 0, None, 0, []
    path = Path(scratch) / f"crash{part}.h5"
    for i, (kind, off, data) in enumerate(ops):
        if kind == b"M":
            rows = off
            continue
        if rows is not None and i % step == part:
            with open(path, "wb") as fh:        # sparse, like the writer's reserve
                fh.write(image[:size])
                fh.truncate(size)
            checked += 1
            problems = check_file(path, rows, status=(b"running", b"complete"), whole=False)
            if problems:
                failures.append((i, rows, problems))
        if kind == b"W":
            if off + len(data) > len(image):
                image.extend(bytes(off + len(data) - len(image)))
            image[off:off + len(data)] = data
            size = max(size, off + len(data))
        elif kind == b"T":
            size = off
            del image[off:]
    return checked, failures


def crash_replay(exe, scratch, record):
    cc = shutil.which("cc") or shutil.which("gcc")
    if cc is None:
        record("crash replay", ["no C compiler (cc or gcc) on PATH to build the write recorder"])
        return
    src, lib = Path(scratch) / "recorder.c", Path(scratch) / "recorder.so"
    src.write_text(RECORDER_C)
    built = subprocess.run([cc, "-shared", "-fPIC", "-O1", "-o", str(lib), str(src), "-ldl"],
                           capture_output=True, text=True)
    if built.returncode != 0:
        record("crash replay: build recorder", [built.stderr.strip()])
        return
    path, log = Path(scratch) / "replay.h5", Path(scratch) / "replay.log"
    env = dict(os.environ, LD_PRELOAD=str(lib), REC_TARGET=str(path), REC_LOG=str(log))
    w = Writer(exe, path, REPLAY_ROWS, "process_kill", env=env)
    code, err = w.finish(timeout=120)
    if code != 0 or w.closed != REPLAY_ROWS:
        record("crash replay: recorded run", [f"exit {code}, closed {w.closed}: {err.strip()}"])
        return
    ops = read_log(log)
    writes = sum(1 for op in ops if op[0] != b"M")
    markers = sum(1 for op in ops if op[0] == b"M")
    problems = []
    if markers < REPLAY_ROWS // 5 or writes < 10 * markers:
        problems.append(f"recorder saw {writes} writes and {markers} flush reports: too few")
    workers = max(1, min(4, os.cpu_count() or 1))
    with multiprocessing.Pool(workers) as pool:
        results = pool.map(replay_worker, [(ops, k, workers, scratch) for k in range(workers)])
    checked = sum(r[0] for r in results)
    failures = sorted(f for r in results for f in r[1])
    for i, rows, found in failures[:5]:
        problems.append(f"crash before write {i} ({rows} rows reported): {'; '.join(found)}")
    if failures:
        problems.append(f"{len(failures)} of {checked} crash points unreadable or short")
    record(f"crash replay: {checked} crash points between {writes} writes of "
           f"{markers} flushes", problems)


# ---- main -----------------------------------------------------------------------------------


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--hawser", required=True, help="path of the hawser program (in <build>/)")
    ap.add_argument("--source", required=True, help="source directory (unused; ctest passes it)")
    ap.add_argument("--kills", type=int, default=20)
    ap.add_argument("--seed", type=int, default=None)
    args = ap.parse_args()

    exe = Path(args.hawser).resolve().parent / "tests" / "h5_killtest"
    if not exe.is_file():
        print(f"FAIL: helper {exe} not found (it is built from tests/bench/h5_killtest.cpp)")
        return 1
    seed = args.seed if args.seed is not None else int(time.time())
    rng = random.Random(seed)
    print(f"seed {seed} (rerun with --seed {seed})")
    passed, failed = 0, 0

    def record(name, problems):
        nonlocal passed, failed
        if problems:
            failed += 1
            print(f"FAIL {name}:")
            for p in problems:
                print(f"     {p}")
        else:
            passed += 1
            print(f"ok   {name}")
        sys.stdout.flush()

    with tempfile.TemporaryDirectory(prefix="hawser_h5_live_") as tmp:
        # 1. Live reads: quick ones and ones held open across many commits, then a kill.
        path = Path(tmp) / "live.h5"
        w = Writer(exe, path, 10**9, "power_loss")
        if not w.wait_reports(5, timeout=20):
            w.kill()
            record("live: writer reports 5 flushes", [f"only {w.reports} reports in 20 s"])
        else:
            for i in range(10):
                time.sleep(rng.uniform(0.0, 0.05))
                hold = 0.0 if i % 2 == 0 else rng.uniform(0.05, 0.3)
                rows, reports = w.durable(), w.reports
                problems = check_file(path, rows, hold_open=hold)
                if not w.running():
                    problems.append("writer stopped during the read: not a live read")
                if hold > 0 and w.reports - reports < 5:
                    problems.append(f"only {w.reports - reports} flushes while held open")
                record(f"live read {i}: >= {rows} rows, open {hold:.2f} s while the writer "
                       f"flushed {w.reports - reports} times", problems)
            reads, problems, start = 0, [], time.monotonic()
            while time.monotonic() - start < 3.0 and len(problems) < 5:
                problems += check_newest(path, w.durable())
                reads += 1
            if not w.running():
                problems.append("writer stopped during the reads")
            record(f"live: {reads} back-to-back reads of the newest 200 rows", problems)
            rows = w.kill()
            record(f"live: after SIGKILL, >= {rows} rows", check_file(path, rows))

        # 2. SIGKILL at random moments, alternating the two durability settings.
        for k in range(args.kills):
            path = Path(tmp) / f"kill{k}.h5"
            durability = "power_loss" if k % 2 == 0 else "process_kill"
            w = Writer(exe, path, 10**9, durability)
            if not w.wait_reports(1, timeout=20):
                w.kill()
                record(f"kill {k}: first flush", ["no 'flushed 0' within 20 s"])
                continue
            delay = rng.uniform(0.0, 0.3)
            time.sleep(delay)
            alive = w.running()
            rows = w.kill()
            problems = check_file(path, rows)
            if not alive:
                problems.append("writer had already exited before the kill")
            record(f"kill {k} ({durability}) after {delay:.3f} s: >= {rows} rows", problems)

        # 3. A run left to finish.
        path = Path(tmp) / "finished.h5"
        w = Writer(exe, path, 200, "power_loss")
        code, err = w.finish(timeout=60)
        problems = [] if code == 0 else [f"exit code {code}: {err.strip()}"]
        if w.closed != 200:
            problems.append(f"reported 'closed {w.closed}', expected 'closed 200'")
        problems += check_file(path, 200, exact=True, status=(b"complete",))
        record("finished run: exactly 200 rows, status complete", problems)

        # 4. Every crash point of a recorded run.
        crash_replay(exe, tmp, record)

    print(f"{passed} passed, {failed} failed")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
