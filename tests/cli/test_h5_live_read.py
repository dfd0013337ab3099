#!/usr/bin/python3
"""Result files can be read while being written, and survive the writer being killed.

Drives tests/bench/h5_killtest (built beside the hawser program, in <build>/tests/), which
writes with H5Writer (solver/output/h5_writer.hpp) and prints "flushed K" each time K rows are durable.
Every check opens the file with plain h5py.File(path, "r") (default driver, no SWMR, no h5clear).
The writer's promise (h5_writer.hpp, "The guarantee"): at every instant the file is a complete
HDF5 file holding every row up to the last flush.
  1. live: while the writer runs, every series holds at least the K rows last reported, each row
     equal to its index, with the right units attribute -- also for a reader that keeps the file
     open while the writer publishes many more flushes (and merges segments) before it reads;
     then a few seconds of back-to-back reads of the newest rows;
  2. kill: SIGKILL at random moments, then the file opens and holds every reported row intact,
     and every series is as long as /time;
  3. a run left to finish holds exactly NROWS rows and status "complete";
  4. crash replay: random kills rarely land in the few microseconds of a rename, so every change
     the writer makes to its folder (open with truncation, pwrite(2), ftruncate(2), rename(2),
     unlink(2)) is recorded by an LD_PRELOAD recorder compiled here with the system C compiler,
     and the folder is rebuilt as it stood before each rename and unlink and before every 7th
     write -- moments a kill could leave -- and checked like (2).
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
# 140 rows in flushes of 1..5 rows make 47 flushes: segments merge at two levels (every 8 of a
# level, h5_writer.hpp), so the replay passes through merges, publications and deletions.
REPLAY_ROWS = 140
REPLAY_STRIDE = 7


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
    hold_open: seconds to keep the file open before reading, as an interactive reader would
    (or a function to call while it is open, which waits for the writer),
    while the writer goes on committing.
    """
    problems = []
    try:
        with h5py.File(path, "r") as f:
            hold_open() if callable(hold_open) else time.sleep(hold_open)
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

# LD_PRELOAD recorder: logs every change the writer makes to the files in the folder $REC_DIR
# (the result file and its .parts folder): 'O' open with O_TRUNC or O_CREAT (length 0 for a
# truncation), 'W' pwrite (offset, bytes), 'T' ftruncate (length), 'R' rename (to a second
# path), 'U' unlink, and a marker 'M' rows when the program writes "flushed rows" to stdout.
# Record: 1 byte kind, int64 offset/rows/length, int64 data length, uint16 path length, path,
# then the data (the bytes of 'W', the target path of 'R').
RECORDER_C = r"""
#define _GNU_SOURCE
#include <dlfcn.h>
#include <fcntl.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/types.h>
#include <unistd.h>
#define MAXFD 4096
static char *names[MAXFD];
static int log_fd = -1;
static ssize_t (*real_write)(int, const void *, size_t);
static void put(const void *p, size_t n) {
  const char *c = p;
  while (n > 0) { ssize_t k = real_write(log_fd, c, n); if (k <= 0) abort(); c += k; n -= k; }
}
static void rec(char kind, int64_t off, const char *path, const void *data, int64_t len) {
  if (!real_write) real_write = dlsym(RTLD_NEXT, "write");
  if (log_fd < 0) log_fd = open(getenv("REC_LOG"), O_WRONLY | O_CREAT | O_TRUNC | O_APPEND, 0644);
  uint16_t pl = path ? (uint16_t)strlen(path) : 0;
  put(&kind, 1); put(&off, 8); put(&len, 8); put(&pl, 2);
  if (pl) put(path, pl);
  if (len) put(data, len);
}
/* The name inside $REC_DIR, or NULL for files elsewhere. */
static const char *inside(const char *path) {
  const char *d = getenv("REC_DIR");
  size_t n = d ? strlen(d) : 0;
  if (!d || strncmp(path, d, n) != 0 || path[n] != '/') return NULL;
  return path + n + 1;
}
static int opened(const char *path, int flags, int fd) {
  const char *rel = inside(path);
  if (fd < 0 || fd >= MAXFD) return fd;
  free(names[fd]); names[fd] = NULL;
  if (rel && (flags & (O_WRONLY | O_RDWR))) {
    names[fd] = strdup(rel);
    if (flags & (O_TRUNC | O_CREAT)) rec('O', (flags & O_TRUNC) ? 0 : -1, rel, 0, 0);
  }
  return fd;
}
#define OPEN(name)                                                          \
  int name(const char *path, int flags, ...) {                              \
    static int (*real)(const char *, int, ...);                             \
    if (!real) real = dlsym(RTLD_NEXT, #name);                              \
    mode_t mode = 0;                                                        \
    if (flags & O_CREAT) { va_list a; va_start(a, flags); mode = va_arg(a, int); va_end(a); } \
    return opened(path, flags, real(path, flags, mode));                    \
  }
OPEN(open)
OPEN(open64)
int close(int fd) {
  static int (*real)(int);
  if (!real) real = dlsym(RTLD_NEXT, "close");
  if (fd >= 0 && fd < MAXFD) { free(names[fd]); names[fd] = NULL; }
  return real(fd);
}
#define PWRITE(name)                                                        \
  ssize_t name(int fd, const void *b, size_t n, off_t off) {                \
    static ssize_t (*real)(int, const void *, size_t, off_t);              \
    if (!real) real = dlsym(RTLD_NEXT, #name);                              \
    ssize_t k = real(fd, b, n, off);                                        \
    if (fd >= 0 && fd < MAXFD && names[fd] && k > 0) rec('W', off, names[fd], b, k); \
    return k;                                                               \
  }
PWRITE(pwrite)
PWRITE(pwrite64)
#define FTRUNCATE(name)                                                     \
  int name(int fd, off_t len) {                                             \
    static int (*real)(int, off_t);                                         \
    if (!real) real = dlsym(RTLD_NEXT, #name);                              \
    int r = real(fd, len);                                                  \
    if (fd >= 0 && fd < MAXFD && names[fd] && r == 0) rec('T', len, names[fd], 0, 0); \
    return r;                                                               \
  }
FTRUNCATE(ftruncate)
FTRUNCATE(ftruncate64)
int rename(const char *from, const char *to) {
  static int (*real)(const char *, const char *);
  if (!real) real = dlsym(RTLD_NEXT, "rename");
  int r = real(from, to);
  const char *a = inside(from), *b = inside(to);
  if (r == 0 && a && b) rec('R', 0, a, b, (int64_t)strlen(b));
  else if (r == 0 && (a || b)) abort();  /* a move across the folder's edge: not modelled */
  return r;
}
int unlink(const char *path) {
  static int (*real)(const char *);
  if (!real) real = dlsym(RTLD_NEXT, "unlink");
  int r = real(path);
  const char *rel = inside(path);
  if (r == 0 && rel) rec('U', 0, rel, 0, 0);
  return r;
}
ssize_t write(int fd, const void *b, size_t n) {
  if (!real_write) real_write = dlsym(RTLD_NEXT, "write");
  if (fd >= 0 && fd < MAXFD && names[fd]) abort();  /* HDF5 writes with pwrite; anything else is unrecorded */
  if (fd == 1 && n > 8 && memcmp(b, "flushed ", 8) == 0) rec('M', atoll((const char *)b + 8), 0, 0, 0);
  return real_write(fd, b, n);
}
"""


def read_log(path):
    """[(kind, number, path, data)] from the recorder's log."""
    log, ops, p = Path(path).read_bytes(), [], 0
    while p < len(log):
        kind = log[p:p + 1]
        num, n, pl = struct.unpack("<qqH", log[p + 1:p + 19])
        p += 19
        name = log[p:p + pl].decode()
        p += pl
        data = log[p:p + n]
        p += n
        ops.append((kind, num, name, data))
    return ops


def apply_op(files, op):
    """Apply one recorded change to `files` (name -> bytearray)."""
    kind, num, name, data = op
    if kind == b"O":
        if num == 0 or name not in files:
            files[name] = bytearray()
    elif kind == b"W":
        image = files.setdefault(name, bytearray())
        if num + len(data) > len(image):
            image.extend(bytes(num + len(data) - len(image)))
        image[num:num + len(data)] = data
    elif kind == b"T":
        image = files.setdefault(name, bytearray())
        del image[num:]
        image.extend(bytes(max(0, num - len(image))))
    elif kind == b"R":
        files[data.decode()] = files.pop(name)
    elif kind == b"U":
        files.pop(name, None)


def replay_worker(args):
    """Rebuild the folder as it stood before every chosen change; check the result file."""
    ops, points, part, scratch, target = args
    files, rows, checked, failures = {}, None, 0, []
    folder = Path(scratch) / f"crash{part}"
    wanted = set(points)
    for i, op in enumerate(ops):
        if op[0] == b"M":
            rows = op[1]
            continue
        if rows is not None and i in wanted:
            shutil.rmtree(folder, ignore_errors=True)
            for name, image in files.items():
                dest = folder / name
                dest.parent.mkdir(parents=True, exist_ok=True)
                dest.write_bytes(bytes(image))
            checked += 1
            problems = check_file(folder / target, rows, status=(b"running", b"complete"),
                                  whole=False)
            if problems:
                failures.append((i, rows, problems))
        apply_op(files, op)
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
    folder = Path(scratch) / "replay"
    folder.mkdir()
    path, log = folder / "replay.h5", Path(scratch) / "replay.log"
    env = dict(os.environ, LD_PRELOAD=str(lib), REC_DIR=str(folder), REC_LOG=str(log))
    w = Writer(exe, path, REPLAY_ROWS, "process_kill", env=env)
    code, err = w.finish(timeout=120)
    if code != 0 or w.closed != REPLAY_ROWS:
        record("crash replay: recorded run", [f"exit {code}, closed {w.closed}: {err.strip()}"])
        return
    ops = read_log(log)
    changes = [i for i, op in enumerate(ops) if op[0] != b"M"]
    renames = [i for i, op in enumerate(ops) if op[0] in (b"R", b"U")]
    markers = sum(1 for op in ops if op[0] == b"M")
    problems = []
    if markers < REPLAY_ROWS // 5 or len(renames) < markers:
        problems.append(f"recorder saw {len(changes)} changes, {len(renames)} renames and "
                        f"unlinks, {markers} flush reports: too few")
    # Every moment around a rename or an unlink (where the published file changes), and every
    # REPLAY_STRIDE-th write besides (the published file must never change between renames).
    points = sorted(set(renames) | {i + 1 for i in renames if i + 1 < len(ops)} |
                    set(changes[::REPLAY_STRIDE]))
    workers = max(1, min(4, os.cpu_count() or 1))
    with multiprocessing.Pool(workers) as pool:
        results = pool.map(replay_worker, [(ops, points[k::workers], k, scratch, path.name)
                                           for k in range(workers)])
    checked = sum(r[0] for r in results)
    failures = sorted(f for r in results for f in r[1])
    for i, rows, found in failures[:5]:
        problems.append(f"crash before change {i} ({rows} rows reported): {'; '.join(found)}")
    if failures:
        problems.append(f"{len(failures)} of {checked} crash points unreadable or short")
    record(f"crash replay: {checked} crash points among {len(changes)} file changes of "
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
                held = [0.0]

                def hold_open():
                    # Held for `hold` seconds and at least five publications of the writer.
                    start = time.monotonic()
                    time.sleep(hold)
                    w.wait_reports(reports + 5, timeout=20)
                    held[0] = time.monotonic() - start

                problems = check_file(path, rows, hold_open=hold_open if hold > 0 else 0.0)
                if not w.running():
                    problems.append("writer stopped during the read: not a live read")
                if hold > 0 and w.reports - reports < 5:
                    problems.append(f"only {w.reports - reports} flushes while held open")
                hold = held[0]
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
