#!/usr/bin/python3
"""hawser_report.py RESULT.h5 [-o OUTDIR]: figures and a self-contained HTML report of a run.

Writes OUTDIR/report.html (figures embedded as base64 PNG, so the one file can be mailed or
archived) and the same figures as OUTDIR/*.png. OUTDIR defaults to RESULT_report beside the
result file. Exit codes: 0 report written; 2 no such file, or not a hawser result file.

A file with parts missing (an older, failed or still-running run) still gets a report, which
says what is missing and which figures were left out for it.
"""

import argparse
import base64
import html
import sys
from pathlib import Path

import matplotlib

matplotlib.use("Agg")  # no display; must precede any other matplotlib import

import numpy as np  # noqa: E402

sys.dont_write_bytecode = True  # keep the source tree free of __pycache__
sys.path.insert(0, str(Path(__file__).resolve().parent))
import hawser_plots as hp  # noqa: E402
from hawser_result import LAYOUT, NotAHawserResult, layout_value, load_result  # noqa: E402

CAUTION = ("hawser is a research tool, not a certification method. Its results must not be used "
           "to decide whether a real structure is safe. For any real structure, defer to licensed "
           "engineering practice and the applicable standards.")

STATUS_TEXT = {
    "complete": "The run completed.",
    "running": ("The run was still in progress when this report was made: the file holds only "
                "the outputs written so far, and the summary may be absent or provisional."),
    "failed": "The run failed; the file keeps everything up to the failure.",
    "stopped": "The run stopped on a physical limit that the scenario asked it to stop on.",
}

# Engineering units for the summary table at the top: the file's unit -> (shown unit, factor
# from the file's unit, smallest magnitude in the file's unit for which it is used). Values
# below it stay in the file's unit. Only these units are converted; any other is shown as
# stored.
DISPLAY_UNITS = {
    "N": [("kN", 1e-3, 1e3)],
    "m": [("km", 1e-3, 1e3)],
    "s": [("h", 1.0 / 3600.0, 3600.0)],
    "Pa": [("GPa", 1e-9, 1e9), ("MPa", 1e-6, 1e6)],
}
SECTION_TITLES = {"margins": "Safety margins", "peaks": "Peaks", "run": "The run",
                  "solver": "Solver counters"}


def display(value, units):
    """(value, unit) for the summary table: kN, km, h, GPa where the file's unit is N, m, s, Pa
    and the value is large enough; as stored otherwise."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        for shown, factor, smallest in DISPLAY_UNITS.get(units, []):
            if abs(value) >= smallest:
                return value * factor, shown
    return value, units


def fmt(value):
    """A value for the report: 6 significant digits for reals, as is otherwise (escaped)."""
    if isinstance(value, bool):
        return str(value)
    if isinstance(value, (int, np.integer)):
        return str(int(value))
    if isinstance(value, (float, np.floating)):
        return f"{float(value):.6g}"
    if isinstance(value, (list, tuple)):
        return ", ".join(fmt(v) for v in value)
    return html.escape(str(value))


def _rows(history):
    """Number of output rows in a history (0 when absent)."""
    return 0 if history is None else history.shape[0]


class Context:
    """What the figures need beyond the raw file: reference lengths and where they came from."""

    def __init__(self, result):
        self.result = result
        self.name = result.attrs.get("scenario_name")
        self.notes = []
        self.radius_m, self.radius_source = self._planet_radius()
        self.geo_km, self.geo_source = self._geostationary_altitude()
        self.equilibrium, self.deflection = self._deflection()
        self.altitude_km = None
        if self.equilibrium is not None and self.radius_m is not None:
            self.altitude_km = hp.node_altitude_km(self.equilibrium, self.radius_m)

    def _planet_radius(self):
        r = self.result
        if r.planet.get("equatorial_radius_m") is not None and r.planet_units.get(
                "equatorial_radius_m") == "m":
            return float(r.planet["equatorial_radius_m"]), "from /planet in the result file"
        if r.eq_position_m is not None:
            return (float(np.linalg.norm(r.eq_position_m[0])),
                    "taken as the distance of node 0 (the anchor) from the planet's centre at "
                    "equilibrium: the scenario text did not give it")
        if _rows(r.node_position_m) and (r.node_index is None or r.node_index[0] == 0):
            return (float(np.linalg.norm(r.node_position_m[0, 0])),
                    "taken as the distance of node 0 (the anchor) from the planet's centre at the "
                    "first output: neither the scenario text nor the equilibrium gave it")
        self.notes.append("The planet radius is unknown, so altitudes and the figures drawn "
                          "against altitude are left out.")
        return None, "unknown"

    def _geostationary_altitude(self):
        r = self.result
        if r.planet.get("synchronous_altitude_m") is not None and r.planet_units.get(
                "synchronous_altitude_m") == "m":
            return (float(r.planet["synchronous_altitude_m"]) / 1e3,
                    "from /planet in the result file (synchronous orbit)")
        if r.eq_tension_N is not None and r.eq_position_m is not None and self.radius_m:
            # With no load but gravity and rotation, dT/dr changes sign at r_g, so the
            # equilibrium tension peaks there (physics.md section 2).
            h = hp.element_altitude_km(hp.node_altitude_km(r.eq_position_m, self.radius_m))
            return float(h[int(np.argmax(r.eq_tension_N))]), (
                "estimated as the altitude of the largest equilibrium tension")
        return None, "unknown"

    def _deflection(self):
        r = self.result
        if not _rows(r.node_position_m):
            return None, None
        eq = r.recorded_equilibrium()
        if eq is None:
            eq = r.node_position_m[0]
            self.notes.append("No equilibrium in the file: deflections are measured from the "
                              "first recorded positions instead.")
        return eq, hp.deflection_from_equilibrium(r.node_position_m, eq)


# ---------------------------------------------------------------------------------------------
# Figures: each entry is (file stem, caption, what it needs, builder or None if not possible)
# ---------------------------------------------------------------------------------------------


def _element_altitude_km(ctx):
    r = ctx.result
    if r.eq_position_m is None or ctx.radius_m is None:
        return None
    return hp.element_altitude_km(hp.node_altitude_km(r.eq_position_m, ctx.radius_m))


def _margin_builder(ctx):
    """The safety-margin figure's builder, or None when the file lacks what it needs."""
    r = ctx.result
    h = _element_altitude_km(ctx)
    ultimate = r.material.get("ultimate_strength_pa")
    if (h is None or not _rows(r.element_tension_N) or r.element_area_m2 is None or ultimate is None
            or r.material_units.get("ultimate_strength_pa") != "Pa"):
        return None
    design_sf = r.material.get("design_safety_factor")

    def build():
        area = r.element_area_m2
        t_max = np.nanmax(r.element_tension_N, axis=0)
        t_min = np.nanmin(r.element_tension_N, axis=0)
        with np.errstate(divide="ignore"):
            sf_min = np.where(t_max > 0.0, ultimate * area / np.maximum(t_max, 1e-300), np.inf)
        eq = None if r.eq_tension_N is None else r.eq_tension_N / area
        return hp.safety_margin_figure(h, t_max / area, eq, sf_min, t_min, float(ultimate),
                                       design_sf, ctx.geo_km)
    return build


def _figure_plan(ctx):
    r = ctx.result
    plan = []
    have_nodes = ctx.deflection is not None and ctx.altitude_km is not None
    tn = r.time_for(r.node_position_m) if have_nodes else None  # times of the node rows
    design_sf = r.material.get("design_safety_factor")
    plan.append(("safety_margins", "Safety margins along the tether: the largest stress each "
                 "element saw over the recorded outputs against the ultimate strength"
                 + (f" and the design stress (ultimate / {design_sf:g})" if design_sf else "")
                 + "; the smallest safety factor each element saw against the design's; the "
                 "smallest tension each element saw (0: slack).",
                 "/elements/tension, /mesh/element_area, /equilibrium/position and "
                 "/material/ultimate_strength_pa", _margin_builder(ctx)))

    if r.eq_position_m is not None and ctx.radius_m is not None and (
            r.eq_tension_N is not None or _rows(r.element_tension_N)):
        def tension():
            h = hp.element_altitude_km(hp.node_altitude_km(r.eq_position_m, ctx.radius_m))
            lo = hi = None
            if _rows(r.element_tension_N):
                lo, hi = hp.tension_envelope(r.element_tension_N)
            return hp.tension_figure(h, r.eq_tension_N, lo, hi, ctx.geo_km)
        builder = tension
    else:
        builder = None
    plan.append(("tension", "Element tension against altitude at equilibrium, and the range "
                 "each element's tension spanned during the run.",
                 "/equilibrium/position with /equilibrium/tension or /elements/tension",
                 builder))

    def profiles():
        rows = hp.evenly_spaced_indices(len(tn), 5)
        peak = int(np.argmax(np.max(np.abs(ctx.deflection.east_m), axis=1)))
        rows = sorted(set(rows) | {peak})
        return hp.deflection_profiles_figure(ctx.altitude_km, tn, ctx.deflection, rows,
                                             ctx.geo_km)
    plan.append(("deflection_profiles", "Deflection from equilibrium along the tether at evenly "
                 "spaced times and at the time of the largest east-west deflection.",
                 "/nodes/position and /time", profiles if have_nodes else None))

    def history():
        targets = [("node nearest 100 km", 100.0), ("node nearest 1,000 km", 1000.0),
                   ("node nearest geostationary", ctx.geo_km),
                   ("top node", float(np.max(ctx.altitude_km)))]
        picks = hp.nodes_nearest_altitudes(ctx.altitude_km, targets)
        return hp.deflection_history_figure(tn, ctx.deflection, ctx.altitude_km, picks)
    plan.append(("deflection_history", "Deflection over time at the recorded nodes nearest "
                 "100 km, 1,000 km, geostationary altitude and the top.",
                 "/nodes/position and /time", history if have_nodes else None))

    def deflection_map():
        return hp.deflection_map_figure(tn, ctx.altitude_km, ctx.deflection.east_m)
    plan.append(("deflection_map", "East-west deflection over altitude and time.",
                 "/nodes/position and /time (two outputs or more)",
                 deflection_map if have_nodes and len(tn) >= 2 else None))

    energy_rows = next(iter(r.energy_J.values()), None)
    plan.append(("energy", "Energy terms as changes since the first output, and the change of "
                 "their sum K + P + S + D, which stays constant when no time-dependent force "
                 "acts (D, the energy removed by damping, is added back).",
                 "/energy/* and /time",
                 (lambda: hp.energy_figure(r.time_for(energy_rows), r.energy_J))
                 if _rows(energy_rows) else None))

    plan.append(("anchor_force", "Anchor force as recorded in /anchor/force, in the "
                 "rotating frame's up, east and north components.", "/anchor/force and /time",
                 (lambda: hp.anchor_force_figure(r.time_for(r.anchor_force_N), r.anchor_force_N))
                 if _rows(r.anchor_force_N) else None))

    if "drag_load" in r.environment or "wind" in r.environment:
        h = _element_altitude_km(ctx)
        ok = ("drag_load" in r.environment and "wind" in r.environment and h is not None
              and have_nodes)
        plan.append(("weather", "Weather on the tether: the largest aerodynamic load per length "
                     "each element saw over the recorded outputs, and the wind speed over time "
                     "at the recorded node where it blew hardest.",
                     "/environment/drag_load, /environment/wind and the equilibrium",
                     (lambda: hp.weather_figure(h, r.environment["drag_load"], r.time_s,
                                                r.environment["wind"], ctx.altitude_km))
                     if ok else None))
    if r.climbers:
        requested = _requested_altitudes(ctx)
        plan.append(("climbers", _climber_caption(ctx, requested),
                     "/climbers/<name>/* with data, /time and the planet radius",
                     (lambda: hp.climber_figure(r.time_s, r.climbers, ctx.radius_m, requested))
                     if r.n_times and ctx.radius_m is not None and any(
                         _rows(v) for c in r.climbers.values() for v in c.values()) else None))
    return plan


def _requested_altitudes(ctx):
    """name -> altitude (m) of the point of the as-built ribbon each climber is told to go to:
    its profile's end `to_m` is a material coordinate, placed with /mesh/s0 on
    /mesh/as_built_position (the tether as built, unloaded)."""
    r = ctx.result
    if r.s0_m is None or r.as_built_position_m is None or ctx.radius_m is None:
        return {}
    built_alt_m = np.linalg.norm(r.as_built_position_m, axis=1) - ctx.radius_m
    return {n: float(np.interp(a["to_m"], r.s0_m, built_alt_m))
            for n, a in r.climber_attrs.items() if isinstance(a.get("to_m"), (int, float))}


def _climber_caption(ctx, requested):
    """The climbers' caption: what was asked and what was reached, and why they differ."""
    r = ctx.result
    text = ("Climber altitude reached (solid) and the requested end of its climb (dashed), "
            "drive force along the tether and the east component of the Coriolis force.")
    for name, to_m in requested.items():
        alt = r.climbers.get(name, {}).get("altitude")
        if alt is None or not np.isfinite(alt).any():
            continue
        reached = float(alt[np.isfinite(alt)][-1])
        text += (f" {name} was told to go to {to_m / 1e3:,.0f} km (that point of the ribbon's "
                 f"altitude as built) and was at {reached / 1e3:,.0f} km altitude at the end "
                 "of the run")
        done = r.climber_attrs.get(name, {}).get("end_time_s", np.inf) <= r.time_s[-1]
        if done and reached < to_m:
            text += (": the tether sags under the climber's weight and the other loads, so "
                     "that point of the ribbon lies lower than it was built.")
        else:
            text += "." if done else " (still climbing)."
    return text


# Figures whose axes all have time along x (as drawn from /time) and get the events marked;
# for "weather", only its second axis.
_TIME_FIGURES = {"deflection_history": None, "energy": None, "anchor_force": None,
                 "climbers": None, "weather": 1}


def _events(ctx):
    e = ctx.result.events
    out = []
    if np.size(e.get("cut_time", [])):
        out.append(("cut", e["cut_time"], "tab:red"))
    if np.size(e.get("strike_time", [])):
        out.append(("strike", e["strike_time"], "tab:purple"))
    return out


def _mark_events(ctx, stem, fig):
    events = _events(ctx)
    if not events or stem not in _TIME_FIGURES or not ctx.result.n_times:
        return
    which = _TIME_FIGURES[stem]
    axes = fig.axes if which is None else [fig.axes[which]]
    hp.mark_events(axes, ctx.result.time_s, events)


def draw_figures(ctx, outdir):
    """Draw every possible figure to OUTDIR/<stem>.png. Returns (drawn, left_out) where drawn
    is [(stem, caption, png bytes)] and left_out is [(stem, reason)]."""
    drawn, left_out = [], []
    for stem, caption, needs, builder in _figure_plan(ctx):
        if builder is None:
            left_out.append((stem, f"needs {needs}"))
            continue
        try:
            fig = builder()
            _mark_events(ctx, stem, fig)
            path = Path(outdir) / f"{stem}.png"
            fig.savefig(path, dpi=100, format="png")
        except Exception as exc:  # a figure that fails must not cost the rest of the report
            print(f"hawser_report: warning: figure '{stem}' failed: {exc}", file=sys.stderr)
            left_out.append((stem, f"drawing failed: {exc}"))
            continue
        drawn.append((stem, caption, path.read_bytes()))
    return drawn, left_out


# ---------------------------------------------------------------------------------------------
# Values computed from the recorded histories (a check on /summary, and all there is while a
# run is still being written)
# ---------------------------------------------------------------------------------------------


def recorded_peaks(ctx):
    """[(label, value, unit)] of peaks found in the recorded histories."""
    r, rows = ctx.result, []
    if _rows(r.element_tension_N):
        i, e = np.unravel_index(int(np.nanargmax(r.element_tension_N)), r.element_tension_N.shape)
        h = _element_altitude_km(ctx)
        rows += [("Peak tension", float(r.element_tension_N[i, e]) / 1e3, "kN"),
                 ("  at altitude", float(h[e]) if h is not None else "unknown", "km"),
                 ("  at time", float(r.time_s[i]) / 3600.0, "h")]
    if ctx.deflection is not None and ctx.deflection.east_m.size:
        for name, values in (("east-west", ctx.deflection.east_m),
                             ("north-south", ctx.deflection.north_m)):
            i, k = np.unravel_index(int(np.nanargmax(np.abs(values))), values.shape)
            rows.append((f"Peak {name} deflection (magnitude)", float(abs(values[i, k])), "m"))
            where = (f"{ctx.altitude_km[k]:.6g}" if ctx.altitude_km is not None else "unknown")
            rows.append(("  at altitude", where, "km"))
            rows.append(("  at time", float(r.time_s[i]) / 3600.0, "h"))
    return rows


# ---------------------------------------------------------------------------------------------
# HTML
# ---------------------------------------------------------------------------------------------

_CSS = """
body { font-family: sans-serif; max-width: 60em; margin: 1.5em auto; padding: 0 1em; color: #222; }
.caution { border: 2px solid #b00; background: #fff3f3; padding: 0.6em 1em; margin: 1em 0; }
.status { border-left: 6px solid #888; padding: 0.4em 1em; background: #f6f6f6; }
.status.running, .status.failed, .status.stopped { border-color: #d80; background: #fff8e8; }
.status.complete { border-color: #2a2; }
table { border-collapse: collapse; margin: 0.5em 0 1em 0; }
td, th { border: 1px solid #ccc; padding: 0.2em 0.6em; text-align: left; }
td.num { text-align: right; font-family: monospace; }
td.sub { padding-left: 2em; color: #444; }
figure { margin: 1.5em 0; } figure img { max-width: 100%; }
pre { background: #f4f4f4; padding: 0.8em; overflow-x: auto; font-size: 90%; }
.missing { color: #a40; }
"""


def _table(rows, head=("Quantity", "Value", "Unit")):
    out = ["<table>", "<tr>" + "".join(f"<th>{h}</th>" for h in head) + "</tr>"]
    for label, value, unit in rows:
        out.append(f"<tr><td>{html.escape(label)}</td><td class=\"num\">{fmt(value)}</td>"
                   f"<td>{html.escape(unit)}</td></tr>")
    out.append("</table>")
    return "\n".join(out)


def _summary_sections(result):
    """{section: [(key, label, value, units)]} of /summary, in the layout's order and sections;
    values the layout does not know go to "other". Units are the file's (/summary/units)."""
    summary, units = result.summary or {}, result.summary_units
    sections = {k: [] for k in ("margins", "peaks", "run", "solver", "other")}
    placed = set()
    for pattern, entry in LAYOUT["values"]["/summary"].items():
        keys = [k for k in summary if k not in placed and layout_value("/summary", k) is entry]
        for k in sorted(keys):
            placed.add(k)
            label = entry.get("label", k)
            if "*" in pattern:  # climber_<name>_...: name the climber
                label = f"{label} ({k})"
            sections[entry.get("section", "other")].append((k, label, summary[k], units.get(k)))
    for k in summary:
        if k not in placed:
            sections["other"].append((k, k, summary[k], units.get(k)))
    return sections


def _value_cell(key, value, units, convert):
    """The value and unit cells of a summary row, and the row's data attributes: the file's
    value and unit, so that a reader (or a test) can check what is shown against the file."""
    entry = layout_value("/summary", key) or {}
    never = entry.get("never")
    shown_unit = "" if units in (None, "1", "text") else units
    if never is not None and value == never:
        shown, shown_unit = "never", ""
    elif convert:
        v, shown_unit = display(value, units)
        shown = fmt(v)
        shown_unit = "" if shown_unit in (None, "1", "text") else shown_unit
    else:
        shown = fmt(value)
    data = (f" data-key=\"{html.escape(key)}\" data-file-units=\"{html.escape(str(units))}\""
            f" data-file-value=\"{html.escape(str(value))}\"")
    return data, shown, shown_unit


def _summary_table(rows, convert, head=("Quantity", "Value", "Unit")):
    out = ["<table class=\"summary\">",
           "<tr>" + "".join(f"<th>{h}</th>" for h in head) + "</tr>"]
    for key, label, value, units in rows:
        data, shown, unit = _value_cell(key, value, units, convert)
        sub = " class=\"sub\"" if label.startswith("  ") else ""  # where, when: under it
        out.append(f"<tr{data}><td{sub}>{html.escape(label.strip())}</td>"
                   f"<td class=\"num\">{shown}</td>"
                   f"<td class=\"unit\">{html.escape(unit)}</td></tr>")
    out.append("</table>")
    return "\n".join(out)


def _computed_text(ctx):
    r = ctx.result
    parts = []
    n = r.n_elements
    if n is not None:
        parts.append(f"a tether of {n} elements ({n + 1} nodes)")
    if r.n_times:
        t0, t1 = float(r.time_s[0]), float(r.time_s[-1])
        parts.append(f"simulated from t = {fmt(t0)} s to {fmt(t1)} s ({fmt(t1 - t0)} s, "
                     f"{r.n_times} outputs)")
    else:
        parts.append("no time history")
    if r.node_position_m is not None:
        k = r.node_position_m.shape[1]
        n_nodes = None if r.n_elements is None else r.n_elements + 1
        thinned = n_nodes is not None and k < n_nodes
        parts.append(f"{k} nodes recorded" + (f" of {n_nodes} (output thinned, see /nodes/index)"
                                              if thinned else ""))
    if r.climbers:
        parts.append("climbers: " + ", ".join(html.escape(c) for c in r.climbers))
    return "Time-domain simulation in the planet's rotating frame: " + "; ".join(parts) + "."


def build_html(ctx, drawn, left_out):
    r = ctx.result
    name = ctx.name or Path(r.path).stem
    status = r.status or "unknown"
    status_text = STATUS_TEXT.get(status, "The file does not say whether the run finished.")
    msg = (r.summary or {}).get("failure_message")
    out = ["<!DOCTYPE html>", "<html lang=\"en\"><head><meta charset=\"utf-8\">",
           f"<title>hawser report: {html.escape(name)}</title>",
           f"<style>{_CSS}</style></head><body>",
           f"<h1>hawser report: {html.escape(name)}</h1>",
           f"<div class=\"caution\"><strong>Caution.</strong> {html.escape(CAUTION)}</div>",
           f"<div class=\"status {html.escape(status)}\"><p><strong>Run status: "
           f"{html.escape(status)}.</strong> {html.escape(status_text)}</p>"]
    if msg:
        out.append(f"<p>Failure message: <code>{html.escape(str(msg))}</code></p>")
    out.append("</div>")
    out.append(f"<p>{_computed_text(ctx)}</p>")
    out.append("<ul>"
               f"<li>Result file: <code>{html.escape(r.path)}</code></li>"
               f"<li>Program version: {fmt(r.program_version or 'not recorded')}; "
               f"file format {fmt(r.attrs.get('format', '?'))}, version "
               f"{fmt(r.format_version if r.format_version is not None else '?')}</li>")
    if ctx.radius_m is not None:
        out.append(f"<li>Planet equatorial radius {fmt(ctx.radius_m)} m, "
                   f"{html.escape(ctx.radius_source)}; altitude = |r| &minus; radius.</li>")
    if ctx.geo_km is not None:
        out.append(f"<li>Geostationary altitude {fmt(ctx.geo_km)} km, "
                   f"{html.escape(ctx.geo_source)}.</li>")
    out.append("<li>Frame: planet-centred, rotating with the planet; +x up at the anchor, "
               "+y east, +z north. Deflections are measured from each node's equilibrium "
               "position along the local east, north and up directions.</li></ul>")

    out.append("<h2>Summary</h2>")
    sections = _summary_sections(r)
    if r.summary is None:
        out.append("<p class=\"missing\">The file has no /summary"
                   + (" yet (the run is still being written)" if status == "running" else "")
                   + ".</p>")
    else:
        out.append("<p>Peaks and margins over every step of the run; where = altitude of the "
                   "element or node in the static state the run started from. Forces in kN, "
                   "lengths in km, times in h (small values in N, m, s).</p>")
        for sec in ("margins", "peaks", "run"):
            # Indices of elements and nodes stay in the table of values as stored: here the
            # altitude says where.
            rows = [row for row in sections[sec] if row[0] != "failure_message"
                    and not row[0].endswith(("_element", "_node"))]
            if rows:
                out.append(f"<h3>{SECTION_TITLES[sec]}</h3>")
                out.append(_summary_table(rows, convert=True))
    peaks = recorded_peaks(ctx)
    if peaks:
        out.append("<h3>Found in the recorded time histories</h3>")
        out.append("<p>Recomputed from the saved outputs, so they can fall short of the "
                   "summary's values, which the program takes at every step.</p>")
        out.append(_table(peaks))

    out.append("<h2>Solver counters</h2>")
    out.append(_summary_table(sections["solver"], False, ("Counter", "Value", "Unit"))
               if sections["solver"] else
               "<p class=\"missing\">No solver counters in the file.</p>")

    if r.missing or left_out or r.notes or ctx.notes:
        out.append("<h2>Missing parts and notes</h2>")
        if r.missing:
            out.append("<p class=\"missing\">Missing from the file: "
                       + ", ".join(f"<code>{html.escape(m)}</code>" for m in r.missing) + ".</p>")
        if left_out:
            out.append("<p>Figures left out:</p><ul>" + "".join(
                f"<li>{html.escape(s)}: {html.escape(why)}</li>" for s, why in left_out)
                + "</ul>")
        notes = r.notes + ctx.notes
        if notes:
            out.append("<ul>" + "".join(f"<li>{html.escape(n)}</li>" for n in notes) + "</ul>")

    out.append("<h2>Figures</h2>")
    if not drawn:
        out.append("<p class=\"missing\">No figure could be drawn from this file.</p>")
    for stem, caption, png in drawn:
        b64 = base64.b64encode(png).decode("ascii")
        out.append(f"<figure id=\"{stem}\"><img alt=\"{html.escape(caption)}\" "
                   f"src=\"data:image/png;base64,{b64}\"><figcaption>{html.escape(caption)} "
                   f"({stem}.png)</figcaption></figure>")

    if r.summary:
        out.append("<h2>Every /summary value as stored</h2>")
        out.append("<p>Names, values and units exactly as in the result file (units from "
                   "/summary/units; the layout: config/result_layout.yaml).</p>")
        rows = [(k, k, v, r.summary_units.get(k)) for k, v in sorted(r.summary.items())]
        out.append(_summary_table(rows, False, ("Name", "Value", "Unit")))
    out.append("<h2>Scenario as run</h2>")
    if r.scenario_text is not None:
        out.append(f"<pre>{html.escape(r.scenario_text)}</pre>")
    else:
        out.append("<p class=\"missing\">The file does not hold the scenario text "
                   "(/input/scenario).</p>")
    out.append("</body></html>")
    return "\n".join(out) + "\n"


def main(argv=None):
    ap = argparse.ArgumentParser(description="Plots and an HTML report of a hawser result file.")
    ap.add_argument("result", help="result file written by 'hawser run' (HDF5)")
    ap.add_argument("-o", "--outdir", help="output folder (default: RESULT_report beside it)")
    args = ap.parse_args(argv)
    try:
        result = load_result(args.result)
    except (FileNotFoundError, NotAHawserResult) as exc:
        print(f"hawser_report: error: {exc}", file=sys.stderr)
        return 2
    outdir = Path(args.outdir) if args.outdir else Path(args.result).with_name(
        Path(args.result).stem + "_report")
    outdir.mkdir(parents=True, exist_ok=True)
    ctx = Context(result)
    drawn, left_out = draw_figures(ctx, outdir)
    report = outdir / "report.html"
    report.write_text(build_html(ctx, drawn, left_out), encoding="utf-8")
    print(f"hawser_report: wrote {report} ({len(drawn)} figures"
          + (f", {len(left_out)} left out" if left_out else "") + ")")
    if result.status == "running":
        print("hawser_report: note: the run is still being written; the report shows it so far.")
    return 0


if __name__ == "__main__":
    sys.exit(main())
