"""Reading a hawser result file ("hawser-timehistory") into plain arrays.

The layout is config/result_layout.yaml, the same file the program's recorder writes by: names,
units and meanings come from there, and the units of every value read come from the file's own
`units` attributes (a dataset's attribute; for a group's values, the attributes of its child
group `units`). Nothing here guesses a unit from a name, and nothing parses the scenario's
units: the file holds the planet and the material as resolved, in SI.

Reading is tolerant: a missing or unreadable dataset becomes None and its path is listed in
`Result.missing`, so a file from a failed, older or still-running run can still be reported on.
Only a file that is not HDF5, or not a hawser result at all, is refused (NotAHawserResult).
"""

import os
from pathlib import Path

# A run still being written holds the file open; HDF5 1.10's file locking would refuse a second
# reader. Reading without the lock is safe here: we never write.
os.environ.setdefault("HDF5_USE_FILE_LOCKING", "FALSE")

import h5py  # noqa: E402  (after the environment is set)
import numpy as np  # noqa: E402
import yaml  # noqa: E402  (Debian: python3-yaml, installed by scripts/install-deps)

LAYOUT_PATH = Path(__file__).resolve().parent.parent / "config" / "result_layout.yaml"


def load_layout(path=LAYOUT_PATH):
    """config/result_layout.yaml as nested dicts."""
    with open(path, encoding="utf-8") as fh:
        return yaml.safe_load(fh)


LAYOUT = load_layout()
FORMAT_NAME = LAYOUT["format"]
FORMAT_VERSION = LAYOUT["format_version"]


def pattern_matches(pattern, name):
    """The layout's patterns: `*` stands for one or more characters other than '/'."""
    import re
    rx = "".join("[^/]+" if c == "*" else re.escape(c) for c in pattern)
    return re.fullmatch(rx, name) is not None


def layout_dataset(path):
    """The layout's entry (dict) for dataset `path`, or None."""
    for pattern, entry in LAYOUT["datasets"].items():
        if pattern_matches(pattern, path):
            return entry
    return None


def layout_value(group, name):
    """The layout's entry (dict) for value `name` of group `group`, or None."""
    for gpattern, values in LAYOUT["values"].items():
        if not pattern_matches(gpattern, group):
            continue
        for pattern, entry in values.items():
            if pattern_matches(pattern, name):
                if entry.get("units") == "from /summary":
                    return layout_value("/summary", name)
                return entry
    return None


# Every dataset the report uses, with the unit the figures are drawn for (the layout's).
EXPECTED_UNITS = {p: e["units"] for p, e in LAYOUT["datasets"].items() if "*" not in p}
ENERGY_TERMS = ("kinetic", "potential", "strain", "dissipated")
CLIMBER_FIELDS = ("s", "altitude", "position", "velocity", "drive_force", "coriolis_force")
ENVIRONMENT_FIELDS = ("wind", "drag_load")


class NotAHawserResult(Exception):
    """The file is not HDF5, or HDF5 without the hawser result format attribute."""


def _text(value):
    """An HDF5 attribute or string dataset value as a Python str."""
    if isinstance(value, bytes):
        return value.decode("utf-8", errors="replace")
    if isinstance(value, np.ndarray):
        if value.shape == ():
            return _text(value[()])
        return "".join(_text(v) for v in value.ravel())
    return str(value)


def _plain(value):
    """An attribute value as str, int, float or list."""
    if isinstance(value, (bytes, str)):
        return _text(value)
    if isinstance(value, np.ndarray):
        if value.dtype.kind in "SUO":
            return _text(value)
        return value.item() if value.size == 1 else value.tolist()
    if isinstance(value, np.generic):
        return value.item()
    return value


class Result:
    """Everything read from one result file; None where a part is missing."""

    def __init__(self, path):
        self.path = str(path)
        self.attrs = {}  # root attributes
        self.status = None  # "running", "complete", "failed", "stopped" or None
        self.format_version = None
        self.program_version = None
        self.scenario_text = None
        self.summary = None  # dict of /summary attributes
        self.summary_units = {}  # name -> units, from /summary/units (as stored)
        self.planet = {}  # /planet values (SI, resolved by the program); empty on a bench
        self.planet_units = {}
        self.material = {}  # /material values
        self.material_units = {}
        self.events = {}  # "cut_time", "cut_altitude", "strike_time", "strike_altitude" -> array
        self.climber_attrs = {}  # name -> {attribute: value} (mass_kg, from_m, to_m, ...)
        self.environment = {}  # "wind" (nt, K, 3), "drag_load" (nt, N) when recorded
        self.s0_m = None  # (N+1) unstretched arc length of each node
        self.node_mass_kg = None  # (N+1)
        self.element_area_m2 = None  # (N)
        self.element_L0_m = None  # (N)
        self.eq_position_m = None  # (N+1, 3) rotating frame
        self.as_built_position_m = None  # (N+1, 3) the as-built tether, unloaded
        self.eq_tension_N = None  # (N)
        self.time_s = None  # (nt)
        self.node_index = None  # (K) mesh node of each recorded node
        self.node_position_m = None  # (nt, K, 3)
        self.node_velocity_m_s = None  # (nt, K, 3)
        self.element_tension_N = None  # (nt, N)
        self.energy_J = {}  # term -> (nt); only the terms present
        self.anchor_force_N = None  # (nt, 3)
        self.climbers = {}  # name -> {field: array}
        self.missing = []  # dataset or group paths not in the file (or unreadable)
        self.notes = []  # other things the reader noticed, one sentence each
        self.units = {}  # dataset path -> units attribute as stored

    @property
    def n_elements(self):
        for a in (self.eq_tension_N, self.element_L0_m, self.element_area_m2):
            if a is not None:
                return len(a)
        if self.element_tension_N is not None:
            return self.element_tension_N.shape[1]
        return None

    @property
    def n_times(self):
        return 0 if self.time_s is None else len(self.time_s)

    def time_for(self, history):
        """The output times (s) that go with a history's rows (it may be shorter than /time)."""
        return self.time_s[:len(history)]

    def recorded_equilibrium(self):
        """Equilibrium positions (K, 3) of the recorded nodes, or None."""
        if self.eq_position_m is None:
            return None
        if self.node_index is None:
            return self.eq_position_m
        return self.eq_position_m[self.node_index]


def _read(f, path, result, ndim=None, width3=False):
    """Read one dataset in full; None (and listed as missing) when absent or unreadable."""
    if path not in f:
        result.missing.append(path)
        return None
    obj = f[path]
    if not isinstance(obj, h5py.Dataset):
        result.missing.append(path)
        result.notes.append(f"{path} is a group, not a dataset; ignored.")
        return None
    try:
        data = np.asarray(obj[()], dtype=float)
    except (OSError, ValueError, TypeError) as exc:
        result.missing.append(path)
        result.notes.append(f"{path} could not be read ({exc}); ignored.")
        return None
    units = obj.attrs.get("units")
    if units is None:
        result.notes.append(f"{path} has no units attribute; its figures are left out.")
        result.missing.append(path)
        return None
    else:
        result.units[path] = _text(units)
        entry = layout_dataset(path)
        want = None if entry is None else entry["units"]
        if want is not None and result.units[path] != want:
            result.notes.append(
                f"{path} says units '{result.units[path]}', the layout '{want}'; its figures, "
                "drawn for the layout's units, are left out.")
            result.missing.append(path)
            return None
    if (ndim is not None and data.ndim != ndim) or (width3 and data.shape[-1] != 3):
        result.missing.append(path)
        result.notes.append(f"{path} has shape {data.shape}, not the expected layout; ignored.")
        return None
    return data


def _values(f, group, result):
    """The attributes of `group` and their units from its child group `units` (as stored).
    A value without a unit there is noted, and its unit left out (never guessed)."""
    values = {k: _plain(v) for k, v in f[group].attrs.items()}
    units = {}
    stored = f[group]["units"].attrs if "units" in f[group] else {}
    for k in values:
        if k in stored:
            units[k] = _text(stored[k])
        else:
            result.notes.append(f"{group} value {k} has no unit in {group}/units; "
                                "shown without one.")
    return values, units


def _check_header(f, path):
    fmt = f.attrs.get("format")
    if fmt is None or _text(fmt) != FORMAT_NAME:
        found = "no 'format' attribute" if fmt is None else f"format '{_text(fmt)}'"
        raise NotAHawserResult(f"{path} is HDF5 but not a hawser result file ({found}).")


def _read_header(f, r):
    r.attrs = {k: _plain(v) for k, v in f.attrs.items()}
    r.status = r.attrs.get("status")
    if r.status is None:
        r.notes.append("The file has no 'status' attribute; whether the run finished is unknown.")
    r.program_version = r.attrs.get("program_version")
    r.format_version = r.attrs.get("format_version")
    if r.format_version is None:
        r.notes.append("The file has no 'format_version' attribute; read as version 1.")
    elif r.format_version != FORMAT_VERSION:
        r.notes.append(f"format_version is {r.format_version}; this reader knows version "
                       f"{FORMAT_VERSION}, so parts may be misread.")
    if "/input/scenario" in f and isinstance(f["/input/scenario"], h5py.Dataset):
        r.scenario_text = _text(f["/input/scenario"][()])
    else:
        r.missing.append("/input/scenario")
    if "/summary" in f:
        r.summary, r.summary_units = _values(f, "/summary", r)
    else:
        r.missing.append("/summary")
    r.planet, r.planet_units = _values(f, "/planet", r) if "/planet" in f else ({}, {})
    r.material, r.material_units = _values(f, "/material", r) if "/material" in f else ({}, {})


def _read_static(f, r):
    r.s0_m = _read(f, "/mesh/s0", r, ndim=1)
    r.node_mass_kg = _read(f, "/mesh/node_mass", r, ndim=1)
    r.element_area_m2 = _read(f, "/mesh/element_area", r, ndim=1)
    r.element_L0_m = _read(f, "/mesh/element_L0", r, ndim=1)
    r.eq_position_m = _read(f, "/equilibrium/position", r, ndim=2, width3=True)
    r.as_built_position_m = _read(f, "/mesh/as_built_position", r, ndim=2, width3=True)
    r.eq_tension_N = _read(f, "/equilibrium/tension", r, ndim=1)


def _read_histories(f, r):
    r.time_s = _read(f, "/time", r, ndim=1)
    if "/nodes/index" in f:
        idx = np.asarray(f["/nodes/index"][()]).astype(int).ravel()
        r.node_index = idx
    r.node_position_m = _read(f, "/nodes/position", r, ndim=3, width3=True)
    r.node_velocity_m_s = _read(f, "/nodes/velocity", r, ndim=3, width3=True)
    r.element_tension_N = _read(f, "/elements/tension", r, ndim=2)
    for term in ENERGY_TERMS:
        e = _read(f, f"/energy/{term}", r, ndim=1)
        if e is not None:
            r.energy_J[term] = e
    r.anchor_force_N = _read(f, "/anchor/force", r, ndim=2, width3=True)
    if "/events" in f:
        for key in ("cut_time", "cut_altitude", "strike_time", "strike_altitude"):
            e = _read(f, f"/events/{key}", r, ndim=1)
            r.events[key] = np.zeros(0) if e is None else e
    for key in ENVIRONMENT_FIELDS:
        if f"/environment/{key}" in f:
            e = _read(f, f"/environment/{key}", r)
            if e is not None:
                r.environment[key] = e
    if "/climbers" in f and isinstance(f["/climbers"], h5py.Group):
        for name, grp in f["/climbers"].items():
            if not isinstance(grp, h5py.Group):
                continue
            r.climber_attrs[name] = {k: _plain(v) for k, v in grp.attrs.items()}
            fields = {}
            for field in CLIMBER_FIELDS:
                if field in grp and isinstance(grp[field], h5py.Dataset):
                    fields[field] = _read(f, f"/climbers/{name}/{field}", r)
                else:
                    r.missing.append(f"/climbers/{name}/{field}")
            r.climbers[name] = fields


def _consistent_node_index(r):
    """Check /nodes/index against the recorded node count and the mesh."""
    if r.node_position_m is None:
        return
    k = r.node_position_m.shape[1]
    n_nodes = None if r.eq_position_m is None else r.eq_position_m.shape[0]
    if r.node_index is not None:
        bad = len(r.node_index) != k or (n_nodes is not None and (
            r.node_index.min(initial=0) < 0 or r.node_index.max(initial=0) >= n_nodes))
        if bad:
            r.notes.append("/nodes/index does not match /nodes/position and the mesh; "
                           "node-wise figures are left out.")
            r.node_position_m = r.node_velocity_m_s = r.node_index = None
    elif n_nodes is not None and k != n_nodes:
        r.notes.append(f"/nodes/position holds {k} nodes, the mesh {n_nodes}, and there is no "
                       "/nodes/index; node-wise figures are left out.")
        r.node_position_m = r.node_velocity_m_s = None


def _trim_time_axis(r):
    """Keep the rows written so far. /time is cut to its strictly increasing prefix (a writer
    may extend a dataset before filling it); each history to at most that many rows. A history
    may still be shorter than /time (a running writer extends them one by one): it keeps its own
    length, and Result.time_for() gives the times that go with it."""
    if r.time_s is None:
        return
    t = r.time_s
    nt = len(t)
    for i in range(nt):
        if not np.isfinite(t[i]) or (i > 0 and t[i] <= t[i - 1]):
            nt = i
            break
    if nt < len(t):
        r.notes.append(f"Only the first {nt} of {len(t)} output rows are complete and are used.")
    r.time_s = t[:nt]

    def cut(name, a):
        if a is None:
            return None
        if a.shape[0] < nt:
            r.notes.append(f"{name} holds {a.shape[0]} of the {nt} output rows (still being "
                           "written?); it is shown over the times it covers.")
        return a[:nt]

    r.node_position_m = cut("/nodes/position", r.node_position_m)
    r.node_velocity_m_s = cut("/nodes/velocity", r.node_velocity_m_s)
    r.element_tension_N = cut("/elements/tension", r.element_tension_N)
    r.anchor_force_N = cut("/anchor/force", r.anchor_force_N)
    energy = {k: cut(f"/energy/{k}", v) for k, v in r.energy_J.items()}
    common = min((len(v) for v in energy.values()), default=0)
    r.energy_J = {k: v[:common] for k, v in energy.items()}  # the terms are summed: same rows
    r.climbers = {n: {k: cut(f"/climbers/{n}/{k}", v) for k, v in c.items() if v is not None}
                  for n, c in r.climbers.items()}
    r.environment = {k: cut(f"/environment/{k}", v) for k, v in r.environment.items()}


def load_result(path):
    """Read a result file. Raises FileNotFoundError or NotAHawserResult; never fails on
    missing parts (they are listed in `missing`)."""
    if not os.path.isfile(path):
        raise FileNotFoundError(f"{path}: no such file.")
    try:
        f = h5py.File(path, "r")
    except OSError as exc:
        raise NotAHawserResult(f"{path} is not a readable HDF5 file ({exc}).") from exc
    r = Result(path)
    with f:
        _check_header(f, path)
        _read_header(f, r)
        _read_static(f, r)
        _read_histories(f, r)
    _consistent_node_index(r)
    _trim_time_axis(r)
    return r
