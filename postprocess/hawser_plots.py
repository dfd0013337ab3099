"""Figures of a hawser run: one function per figure, arrays in, matplotlib Figure out.

No file I/O here (hawser_report.py reads the file and writes the images). Figures are built on
matplotlib.figure.Figure directly, not pyplot, so no global state or display is involved.

Frame (shared design/physics.md section 1): planet-centred, rotating with the planet; the anchor
is at (R, 0, 0), +x up at the anchor, +y east, +z north. Altitude is |r| - R with R the planet's
equatorial radius.
"""

from collections import namedtuple

import numpy as np
from matplotlib.figure import Figure
from matplotlib.ticker import MaxNLocator

FIGSIZE = (9.0, 5.5)  # inches; at 100 dpi a 900 x 550 pixel image
_Z = np.array([0.0, 0.0, 1.0])  # spin axis in the rotating frame

# ---------------------------------------------------------------------------------------------
# Quantities computed from the arrays (pure functions; tests call them directly)
# ---------------------------------------------------------------------------------------------

Deflection = namedtuple("Deflection", ["east_m", "north_m", "up_m"])
Deflection.__doc__ = ("Displacement from equilibrium along local east, north and up, "
                      "each (..., K) in m.")


def node_altitude_km(position_m, planet_radius_m):
    """Altitude h = |r| - R of each position (..., 3) in km."""
    return (np.linalg.norm(np.asarray(position_m, dtype=float), axis=-1) - planet_radius_m) / 1.0e3


def element_altitude_km(node_altitude):
    """Altitude of each element's midpoint from the altitudes of its two end nodes (N+1 -> N)."""
    h = np.asarray(node_altitude, dtype=float)
    return 0.5 * (h[:-1] + h[1:])


def local_axes(equilibrium_m):
    """Unit vectors up, east, north (each (K, 3)) at each equilibrium position (K, 3).

    up = r / |r|; east = z x up / |z x up| (the direction of the planet's rotation); north =
    up x east. At the anchor (R, 0, 0) these are +x, +y, +z. A point on the spin axis has no
    east; it gets +y there (never met by a tether rising from the equator).
    """
    r = np.asarray(equilibrium_m, dtype=float)
    up = r / np.linalg.norm(r, axis=-1, keepdims=True)
    east = np.cross(_Z, up)
    norm = np.linalg.norm(east, axis=-1, keepdims=True)
    east = np.where(norm > 1e-12, east / np.where(norm > 1e-12, norm, 1.0), [0.0, 1.0, 0.0])
    north = np.cross(up, east)
    return up, east, north


def deflection_from_equilibrium(position_m, equilibrium_m):
    """Displacement of each node from its equilibrium position, along local east, north, up.

    position_m: (nt, K, 3) or (K, 3) positions in the rotating frame, m.
    equilibrium_m: (K, 3) equilibrium positions of the same K nodes, m.
    Returns a Deflection of arrays shaped like position_m without its last axis.
    """
    d = np.asarray(position_m, dtype=float) - np.asarray(equilibrium_m, dtype=float)
    up, east, north = local_axes(equilibrium_m)
    return Deflection(east_m=np.sum(d * east, axis=-1),
                      north_m=np.sum(d * north, axis=-1),
                      up_m=np.sum(d * up, axis=-1))


def tension_envelope(tension_history_N):
    """Minimum and maximum over time of each element's tension, (nt, N) -> two (N) arrays."""
    t = np.asarray(tension_history_N, dtype=float)
    return np.nanmin(t, axis=0), np.nanmax(t, axis=0)


def nodes_nearest_altitudes(altitude_km, targets):
    """For each (label, target altitude km), the recorded node nearest to it; a node already
    picked is not repeated. Returns [(label, node position in the array), ...]."""
    h = np.asarray(altitude_km, dtype=float)
    picks, used = [], set()
    for label, target in targets:
        if target is None or not np.isfinite(target) or h.size == 0:
            continue
        i = int(np.argmin(np.abs(h - target)))
        if i not in used:
            used.add(i)
            picks.append((label, i))
    return picks


def evenly_spaced_indices(n, count):
    """Up to `count` distinct indices from 0 to n-1, first and last included."""
    if n <= 0:
        return []
    return sorted(set(np.linspace(0, n - 1, min(count, n)).round().astype(int).tolist()))


# ---------------------------------------------------------------------------------------------
# Axis scaling so that labels read "12.3 MN" rather than "1.23e7 N"
# ---------------------------------------------------------------------------------------------

_PREFIXES = [(1e12, "T"), (1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, "")]


def si_scale(values, unit):
    """(factor, label) so that values / factor are below 1000 in the unit with an SI prefix."""
    a = np.asarray(values, dtype=float)
    peak = np.nanmax(np.abs(a)) if a.size and np.isfinite(a).any() else 0.0
    for factor, prefix in _PREFIXES:
        if peak >= factor:
            return factor, prefix + unit
    return 1.0, unit


def length_scale(values_m):
    """(factor, label): km above 5 km, else m."""
    a = np.asarray(values_m, dtype=float)
    peak = np.nanmax(np.abs(a)) if a.size and np.isfinite(a).any() else 0.0
    return (1.0e3, "km") if peak >= 5.0e3 else (1.0, "m")


def time_scale(time_s):
    """(factor, label) for a time axis: s, min, h or days by the span."""
    t = np.asarray(time_s, dtype=float)
    span = float(t[-1] - t[0]) if t.size > 1 else 0.0
    if span <= 600.0:
        return 1.0, "s"
    if span <= 3.0 * 3600.0:
        return 60.0, "min"
    if span <= 3.0 * 86400.0:
        return 3600.0, "h"
    return 86400.0, "days"


def _legend(ax, **kw):
    """A legend only when something is labelled (an empty one draws a warning)."""
    if ax.get_legend_handles_labels()[0]:
        ax.legend(**kw)


def _geo_line(ax, geo_altitude_km, horizontal=True):
    if geo_altitude_km is None:
        return
    kw = dict(color="0.5", linestyle=":", linewidth=1.0, label="geostationary altitude")
    (ax.axhline if horizontal else ax.axvline)(geo_altitude_km, **kw)


# ---------------------------------------------------------------------------------------------
# Figures
# ---------------------------------------------------------------------------------------------


def tension_figure(element_altitude, equilibrium_tension_N=None, tension_min_N=None,
                   tension_max_N=None, geo_altitude_km=None):
    """Tension in each element against altitude: at equilibrium and its envelope over the run.

    element_altitude: (N) km; the tensions (N) in N; any of them may be None.
    """
    fig = Figure(figsize=FIGSIZE)
    ax = fig.add_subplot(1, 1, 1)
    series = [a for a in (equilibrium_tension_N, tension_min_N, tension_max_N) if a is not None]
    factor, unit = si_scale(np.concatenate(series) if series else [], "N")
    h = np.asarray(element_altitude, dtype=float)
    if tension_min_N is not None and tension_max_N is not None:
        ax.fill_betweenx(h, np.asarray(tension_min_N) / factor, np.asarray(tension_max_N) / factor,
                         color="tab:orange", alpha=0.35, label="range over the run (min to max)")
        ax.plot(np.asarray(tension_max_N) / factor, h, color="tab:orange", linewidth=0.8)
        ax.plot(np.asarray(tension_min_N) / factor, h, color="tab:orange", linewidth=0.8)
    if equilibrium_tension_N is not None:
        ax.plot(np.asarray(equilibrium_tension_N) / factor, h, color="tab:blue", linewidth=1.8,
                label="equilibrium")
    _geo_line(ax, geo_altitude_km)
    ax.set_xlabel(f"tension [{unit}]")
    ax.set_ylabel("altitude [km]")
    ax.set_title("Element tension along the tether")
    ax.grid(True, alpha=0.3)
    _legend(ax, loc="best")
    fig.tight_layout()
    return fig


def moving_components(deflection):
    """[(values, name)] of the deflection components that move: north-south is left out of a
    planar run (where it stays exactly zero)."""
    out = [(deflection.east_m, "east-west (+ east)")]
    if np.size(deflection.north_m) and np.nanmax(np.abs(deflection.north_m)) > 0.0:
        out.append((deflection.north_m, "north-south (+ north)"))
    return out


def deflection_profiles_figure(altitude_km, time_s, deflection, time_indices, geo_altitude_km=None):
    """Deflection from equilibrium against altitude at a few times: east-west, and north-south
    when it is not zero throughout.

    altitude_km: (K) equilibrium altitude of the recorded nodes; time_s: (nt);
    deflection: Deflection with (nt, K) arrays in m; time_indices: which rows to draw.
    """
    fig = Figure(figsize=FIGSIZE)
    comps = moving_components(deflection)
    axes = fig.subplots(1, len(comps), sharey=True, squeeze=False)[0]
    tf, tu = time_scale(time_s)
    rows = list(time_indices)
    for ax, (values, name) in zip(axes, comps):
        lf, lu = length_scale(values[rows] if rows else values)
        for i in rows:
            ax.plot(values[i] / lf, altitude_km, marker=".", markersize=3,
                    label=f"t = {time_s[i] / tf:.4g} {tu}")
        ax.axvline(0.0, color="k", linewidth=0.6)
        ax.xaxis.set_major_locator(MaxNLocator(6))
        _geo_line(ax, geo_altitude_km)
        ax.set_xlabel(f"{name} deflection [{lu}]")
        ax.set_title(f"{name.split(' ')[0].capitalize()} deflection")
        ax.grid(True, alpha=0.3)
    axes[0].set_ylabel("altitude [km]")
    _legend(axes[-1], loc="best", fontsize="small")
    fig.suptitle("Deflection from equilibrium along the tether")
    fig.tight_layout()
    return fig


def deflection_history_figure(time_s, deflection, altitude_km, picks):
    """Time history of the east-west and north-south deflection at chosen nodes.

    picks: [(label, node position in the K recorded nodes)], e.g. from nodes_nearest_altitudes.
    """
    fig = Figure(figsize=FIGSIZE)
    comps = moving_components(deflection)
    axes = fig.subplots(len(comps), 1, sharex=True, squeeze=False)[:, 0]
    tf, tu = time_scale(time_s)
    t = np.asarray(time_s) / tf
    cols = [i for _, i in picks]
    for ax, (values, name) in zip(axes, comps):
        lf, lu = length_scale(values[:, cols] if cols else values)
        for label, i in picks:
            ax.plot(t, values[:, i] / lf, label=f"{altitude_km[i]:,.0f} km ({label})")
        ax.set_ylabel(f"{name}\n[{lu}]")
        ax.grid(True, alpha=0.3)
    _legend(axes[0], loc="upper right", fontsize="small")
    axes[0].set_title("Deflection from equilibrium at chosen altitudes")
    axes[-1].set_xlabel(f"time [{tu}]")
    fig.tight_layout()
    return fig


def deflection_map_figure(time_s, altitude_km, east_m, max_columns=2000):
    """Altitude-time map of the east-west deflection (nt, K) in m; long runs are thinned in time
    to at most max_columns columns (every k-th output), which the title says."""
    fig = Figure(figsize=FIGSIZE)
    ax = fig.add_subplot(1, 1, 1)
    step = max(1, int(np.ceil(len(time_s) / max_columns)))
    t = np.asarray(time_s)[::step]
    e = np.asarray(east_m)[::step]
    tf, tu = time_scale(time_s)
    lf, lu = length_scale(e)
    vmax = float(np.nanmax(np.abs(e))) / lf if e.size else 1.0
    vmax = vmax if vmax > 0 else 1.0
    mesh = ax.pcolormesh(t / tf, altitude_km, (e / lf).T, shading="nearest", cmap="RdBu_r",
                         vmin=-vmax, vmax=vmax)
    cbar = fig.colorbar(mesh, ax=ax)
    cbar.set_label(f"east-west deflection (+ east) [{lu}]")
    ax.set_xlabel(f"time [{tu}]")
    ax.set_ylabel("altitude [km]")
    title = "East-west deflection from equilibrium"
    if step > 1:
        title += f" (every {step}th output shown)"
    ax.set_title(title)
    fig.tight_layout()
    return fig


_ENERGY_LABELS = {"kinetic": "kinetic K", "potential": "potential P", "strain": "strain S",
                  "dissipated": "dissipated D (cumulative)"}


def energy_figure(time_s, energy_J):
    """Energy terms over time as changes since the first output, and the change of the total.

    energy_J: dict with any of "kinetic", "potential" (effective, rotating frame), "strain",
    "dissipated" -> (nt) in J. The total K + P + S + D is the rotating-frame energy integral
    plus what damping removed: constant in a run without time-dependent forcing.
    """
    fig = Figure(figsize=FIGSIZE)
    axes = fig.subplots(2, 1, sharex=True)
    tf, tu = time_scale(time_s)
    t = np.asarray(time_s) / tf
    terms = [k for k in ("kinetic", "potential", "strain", "dissipated") if k in energy_J]
    changes = {k: np.asarray(energy_J[k]) - energy_J[k][0] for k in terms}
    ef, eu = si_scale(np.concatenate(list(changes.values())) if changes else [], "J")
    for k in terms:
        axes[0].plot(t, changes[k] / ef, label=_ENERGY_LABELS[k])
    axes[0].set_ylabel(f"change since t0\n[{eu}]")
    axes[0].set_title("Energy terms (change since the first output)")
    _legend(axes[0], loc="best", fontsize="small")
    axes[0].grid(True, alpha=0.3)
    total = sum(changes.values()) if changes else np.zeros_like(t)
    tf2, tu2 = si_scale(total, "J")
    name = " + ".join(k[0].upper() for k in terms) or "total"
    axes[1].plot(t, total / tf2, color="k")
    axes[1].set_ylabel(f"change\n[{tu2}]")
    # Compare the total's drift with the energy the terms exchange, so round-off reads as such.
    swing = max((float(np.max(np.abs(c))) for c in changes.values()), default=0.0)
    drift = float(np.max(np.abs(total))) if np.size(total) else 0.0
    ratio = f", {drift / swing:.2g} of the largest term change" if swing > 0 else ""
    axes[1].set_title(f"Change of the total {name} since t0")
    axes[1].text(0.01, 0.96, f"max |change| {drift:.3g} J{ratio}", transform=axes[1].transAxes,
                 va="top", fontsize="small", bbox=dict(facecolor="white", alpha=0.8, lw=0))
    axes[1].set_xlabel(f"time [{tu}]")
    axes[1].grid(True, alpha=0.3)
    fig.tight_layout()
    return fig


def anchor_force_figure(time_s, force_N):
    """The recorded anchor force (nt, 3) in N, rotating-frame components: up (+x, mostly the
    base tension) above, east (+y) and north (+z) below."""
    fig = Figure(figsize=FIGSIZE)
    axes = fig.subplots(2, 1, sharex=True)
    tf, tu = time_scale(time_s)
    t = np.asarray(time_s) / tf
    f = np.asarray(force_N, dtype=float)
    uf, uu = si_scale(f[:, 0], "N")
    axes[0].plot(t, f[:, 0] / uf, color="tab:blue", label="up (+x)")
    axes[0].set_ylabel(f"up [{uu}]")
    axes[0].set_title("Anchor force (/anchor/force)")
    hf, hu = si_scale(f[:, 1:], "N")
    axes[1].plot(t, f[:, 1] / hf, color="tab:red", label="east (+y)")
    if np.nanmax(np.abs(f[:, 2])) > 0.0:  # a planar run has none: no line of zeros
        axes[1].plot(t, f[:, 2] / hf, color="tab:green", label="north (+z)")
    axes[1].set_ylabel(f"horizontal [{hu}]")
    axes[1].set_xlabel(f"time [{tu}]")
    for ax in axes:
        ax.grid(True, alpha=0.3)
        _legend(ax, loc="best", fontsize="small")
    fig.tight_layout()
    return fig


def _along_or_east(values, east_component):
    """A climber force for plotting: a (nt) series as is; a (nt, 3) vector's east (+y)
    component if east_component, else its magnitude."""
    v = np.asarray(values, dtype=float)
    if v.ndim == 1:
        return v
    return v[:, 1] if east_component else np.linalg.norm(v, axis=-1)


def climber_figure(time_s, climbers, planet_radius_m, requested_m=None):
    """Climber tracks: altitude reached (and the requested end, material coordinate, dashed),
    drive force along the tether, Coriolis force (east component).

    climbers: name -> dict with any of "position" (nt, 3) m, "s" (nt) m, "drive_force" (nt or
    nt x 3) N, "coriolis_force" (nt x 3 or nt) N.
    """
    fig = Figure(figsize=FIGSIZE)
    axes = fig.subplots(3, 1, sharex=True)
    tf, tu = time_scale(time_s)
    t = np.asarray(time_s) / tf
    for name, c in climbers.items():
        if "altitude" in c:
            line, = axes[0].plot(t[:len(c["altitude"])], np.asarray(c["altitude"]) / 1e3,
                                 label=f"{name}: altitude reached")
        elif "position" in c:
            line, = axes[0].plot(t[:len(c["position"])],
                                 node_altitude_km(c["position"], planet_radius_m),
                                 label=f"{name}: altitude reached")
        elif "s" in c:
            line, = axes[0].plot(t[:len(c["s"])], np.asarray(c["s"]) / 1e3,
                                 label=f"{name} (arc length s)")
        else:
            continue
        if requested_m and name in requested_m:
            axes[0].axhline(requested_m[name] / 1e3, color=line.get_color(), linestyle="--",
                            linewidth=1.0, label=f"{name}: requested end (along the ribbon)")
    drives = {n: _along_or_east(c["drive_force"], False) for n, c in climbers.items()
              if "drive_force" in c}
    df, du = si_scale(np.concatenate(list(drives.values())) if drives else [], "N")
    for name, d in drives.items():
        axes[1].plot(t[:len(d)], d / df, label=name)
    cors = {n: _along_or_east(c["coriolis_force"], True) for n, c in climbers.items()
            if "coriolis_force" in c}
    cf, cu = si_scale(np.concatenate(list(cors.values())) if cors else [], "N")
    for name, d in cors.items():
        axes[2].plot(t[:len(d)], d / cf, label=name)
    axes[0].set_ylabel("altitude [km]")
    axes[0].set_title("Climbers")
    axes[1].set_ylabel(f"drive force\n[{du}]")
    axes[2].set_ylabel(f"Coriolis, east\n[{cu}]")
    axes[2].set_xlabel(f"time [{tu}]")
    for ax in axes:
        ax.grid(True, alpha=0.3)
    _legend(axes[0], loc="best", fontsize="small")
    fig.tight_layout()
    return fig


def mark_events(axes, time_s, events):
    """Vertical lines at the times of cuts and strikes on axes whose x axis is time as drawn by
    the functions here (time_scale of the same times). events: (label, times_s, colour)."""
    tf, _ = time_scale(time_s)
    for n, ax in enumerate(axes):
        for label, times, colour in events:
            for i, te in enumerate(np.asarray(times, dtype=float)):
                ax.axvline(te / tf, color=colour, linestyle="-.", linewidth=1.2,
                           label=label if i == 0 and n == 0 else None)
    _legend(axes[0], loc="best", fontsize="small")


def safety_margin_figure(element_altitude_km, stress_max_pa, stress_eq_pa, sf_min, tension_min_n,
                         ultimate_pa, design_sf=None, geo_altitude_km=None):
    """The safety margins along the tether over the run, each against altitude (km):
    the largest stress each element saw (and its static stress) against the design stress and
    the ultimate strength; the smallest safety factor each element saw against the design's;
    the smallest tension each element saw (the slack margin; 0 is slack)."""
    fig = Figure(figsize=(FIGSIZE[0], FIGSIZE[1] * 1.1))
    axes = fig.subplots(1, 3, sharey=True)
    h = np.asarray(element_altitude_km, dtype=float)
    sf_, su = si_scale([ultimate_pa], "Pa")
    ax = axes[0]
    ax.plot(np.asarray(stress_max_pa) / sf_, h, color="tab:red", label="largest over the run")
    if stress_eq_pa is not None:
        ax.plot(np.asarray(stress_eq_pa) / sf_, h, color="tab:blue", linewidth=0.9,
                label="static state")
    ax.axvline(ultimate_pa / sf_, color="k", linewidth=1.2, label="ultimate strength")
    if design_sf:
        ax.axvline(ultimate_pa / design_sf / sf_, color="k", linestyle="--", linewidth=1.0,
                   label=f"design stress (ultimate / {design_sf:g})")
    ax.set_xlim(0.0, 1.1 * max(ultimate_pa, float(np.nanmax(stress_max_pa))) / sf_)
    ax.set_xlabel(f"stress [{su}]")
    ax.set_ylabel("altitude [km]")
    ax.set_title("Stress envelope", fontsize="medium")
    _legend(ax, loc="best", fontsize="x-small")
    ax = axes[1]
    sf = np.asarray(sf_min, dtype=float)
    sf = np.where(np.isfinite(sf), sf, np.nan)
    ax.plot(sf, h, color="tab:red", label="smallest over the run")
    if design_sf:
        ax.axvline(design_sf, color="k", linestyle="--", linewidth=1.0, label="design")
    ax.axvline(1.0, color="k", linewidth=1.2, label="1 (rupture)")
    # Linear, from 0 to a little past the design value (far larger factors, at slack or
    # lightly loaded elements, run off the axis: they are not the margin that matters).
    top = 1.6 * max(design_sf or 0.0, float(np.nanmin(sf)) if np.isfinite(sf).any() else 1.0, 1.0)
    ax.set_xlim(0.0, top)
    ax.set_xlabel("safety factor [-]")
    ax.set_title("Safety factor", fontsize="medium")
    _legend(ax, loc="best", fontsize="x-small")
    ax = axes[2]
    tf_, tu = si_scale(tension_min_n, "N")
    ax.plot(np.asarray(tension_min_n) / tf_, h, color="tab:purple", label="smallest over the run")
    ax.axvline(0.0, color="k", linewidth=1.2, label="0 (slack)")
    ax.set_xlabel(f"tension [{tu}]")
    ax.set_title("Slack margin", fontsize="medium")
    _legend(ax, loc="best", fontsize="x-small")
    for ax in axes:
        _geo_line(ax, geo_altitude_km)
        ax.grid(True, alpha=0.3)
        ax.xaxis.set_major_locator(MaxNLocator(4))
    fig.suptitle("Safety margins along the tether")
    fig.tight_layout()
    return fig


def weather_figure(element_altitude_km, drag_load_n_per_m, time_s, wind_m_s, node_altitude_km):
    """Weather on the tether: the largest aerodynamic load per length each element saw, against
    altitude; the wind speed over time at the recorded node where it blew hardest."""
    fig = Figure(figsize=FIGSIZE)
    axes = fig.subplots(1, 2)
    load = np.nanmax(np.abs(np.asarray(drag_load_n_per_m, dtype=float)), axis=0)
    h = np.asarray(element_altitude_km, dtype=float)
    axes[0].plot(load, h, color="tab:blue")
    axes[0].set_xlabel("largest load over the run [N/m]")
    axes[0].set_ylabel("altitude [km]")
    top = h[load > 1e-3 * np.nanmax(load)] if np.nanmax(load) > 0 else h
    axes[0].set_ylim(0.0, max(1.2 * float(np.max(top)), 1.0))
    axes[0].set_title("Aerodynamic load", fontsize="medium")
    speed = np.linalg.norm(np.asarray(wind_m_s, dtype=float), axis=-1)  # (nt, K)
    k = int(np.nanargmax(np.nanmax(speed, axis=0)))
    tf, tu = time_scale(time_s)
    axes[1].plot(np.asarray(time_s)[:len(speed)] / tf, speed[:, k], color="tab:green")
    axes[1].set_xlabel(f"time [{tu}]")
    axes[1].set_ylabel("wind speed [m/s]")
    axes[1].set_title(f"Wind at {node_altitude_km[k]:,.1f} km altitude", fontsize="medium")
    for ax in axes:
        ax.grid(True, alpha=0.3)
    fig.tight_layout()
    return fig
