"""The ``osculate demo`` report: every demo scenario through the whole job, estimates against truth.

:func:`run` computes kinematics with smoothing, frames, resampling, work and summaries on the
invented scenarios of :mod:`osculate.demo`, checks each key figure against the scenario's ground
truth, and writes per-sample tables, a per-track summary, the figures (with matplotlib) and
``report.md`` to a folder.
"""

from __future__ import annotations

import dataclasses
from typing import Any, Optional

import numpy as np
import numpy.typing as npt

from ._palette import TRUTH
from .demo import spiral_loop, survey_flight, swirl_tracers

__all__ = ["CAUTION", "Check", "Report", "run"]

F64 = npt.NDArray[np.float64]


CAUTION = (
    "Values are indicative. Lateral acceleration, jerk and radius estimated from logged data are "
    "not a safety assessment: local codes and licensed engineers decide whether a road, track, "
    "ride or vehicle is acceptable."
)
DEMO_LIMIT = (
    0.3,
    "an invented design envelope of the demo vehicle (not from any code or standard)",
)


@dataclasses.dataclass(frozen=True)
class Check:
    """One key figure of the demo: an estimate against the scenario's ground truth.

    Attributes
    ----------
    scenario, name, unit : str
        Where, what, and in which unit.
    estimated, true : float
        The estimate and the ground truth of the generator.
    tolerance : float
        Allowed relative error (``relative=True``) or absolute difference.
    relative : bool
        Whether ``tolerance`` is relative to ``true``.
    """

    scenario: str
    name: str
    unit: str
    estimated: float
    true: float
    tolerance: float
    relative: bool = True

    @property
    def error(self) -> float:
        """Relative error (or absolute difference) of the estimate."""
        diff = self.estimated - self.true
        return diff / abs(self.true) if self.relative else diff

    @property
    def passed(self) -> bool:
        """Whether the estimate is within the tolerance."""
        return bool(np.isfinite(self.error) and abs(self.error) <= self.tolerance)


@dataclasses.dataclass(frozen=True)
class Report:
    """What :func:`run` wrote.

    Attributes
    ----------
    folder, report : pathlib.Path
        The report folder and its ``report.md``.
    files : list of pathlib.Path
        Every file written.
    checks : list of Check
        The key figures.
    seconds : float
        Wall time of the run.
    figures : bool
        Whether PNG figures were drawn (matplotlib present).
    """

    folder: Any
    report: Any
    files: list[Any]
    checks: list[Check]
    seconds: float
    figures: bool

    @property
    def passed(self) -> bool:
        """Whether every key figure is within its tolerance."""
        return all(c.passed for c in self.checks)


def _fmt(x: float) -> str:
    return f"{x:.5g}"


def _middle(mask: npt.NDArray[np.bool_], groups: npt.NDArray[np.int64], keep: float) -> Any:
    """Rows of ``mask`` in the middle ``keep`` fraction (by row order) of each group's run."""
    rows = np.flatnonzero(mask)
    g = groups[rows]
    order = np.argsort(g, kind="stable")
    rows, g = rows[order], g[order]
    starts = np.searchsorted(g, g, side="left")
    ends = np.searchsorted(g, g, side="right")
    pos = (np.arange(len(rows)) - starts) / np.maximum(ends - starts - 1, 1)
    margin = 0.5 * (1.0 - keep)
    return rows[(pos >= margin) & (pos <= 1.0 - margin)]


def _median_by_track(values: F64, codes: npt.NDArray[np.intp], m: int) -> F64:
    """Median of the finite values of each of ``m`` tracks (NaN for a track without any)."""
    ok = np.isfinite(values)
    v, c = values[ok], codes[ok]
    order = np.lexsort((v, c))
    v, c = v[order], c[order]
    counts = np.bincount(c, minlength=m)
    start = np.concatenate([[0], np.cumsum(counts)[:-1]])
    lo = start + (counts - 1) // 2
    hi = start + counts // 2
    has = counts > 0
    out = np.full(m, np.nan)
    out[has] = 0.5 * (v[lo[has]] + v[hi[has]])
    return out


def _write_table(path: Any, columns: dict[str, np.ndarray]) -> Any:
    """Write columns as Parquet when pyarrow is present (``.parquet``), else as CSV."""
    import csv

    try:
        import pyarrow as pa
        import pyarrow.parquet as pq
    except ImportError:
        target = path.with_suffix(".csv")
        with target.open("w", newline="") as fh:
            w = csv.writer(fh)
            w.writerow(list(columns))
            w.writerows(zip(*(np.asarray(c).tolist() for c in columns.values())))
        return target
    target = path.with_suffix(".parquet")
    pq.write_table(pa.table({k: np.asarray(v) for k, v in columns.items()}), target)
    return target


def _write_csv(path: Any, columns: dict[str, np.ndarray]) -> Any:
    import csv

    with path.open("w", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(list(columns))
        w.writerows(zip(*(np.asarray(c).tolist() for c in columns.values())))
    return path


def _kinematics_columns(k: Any, names: tuple[str, ...]) -> dict[str, np.ndarray]:
    cols: dict[str, np.ndarray] = {}
    if k.tracks is not None:
        cols["track"] = k.tracks
    cols["t"] = k.t
    for j, axis in enumerate(names):
        cols[axis] = k.position[:, j]
    for name in (
        "speed",
        "arclength",
        "curvature",
        "signed_curvature",
        "radius",
        "torsion",
        "accel_tangential",
        "accel_normal",
        "angular_speed",
    ):
        cols[name] = getattr(k, name)
    for j, axis in enumerate("xyz"[: k.dim]):
        cols[f"normal_{axis}"] = k.normal[:, j]
    if k.twist is not None:
        cols["twist"] = k.twist
    cols["flags"] = k.flags
    return cols


def _smoothing(k: Any) -> F64:
    """Return the smoothing λ* chosen for each track (NaN when the estimator has none)."""
    info = k.fit_info or {}
    return np.asarray(info.get("smoothing", [np.nan]), dtype=float)


def _flips(normal: F64, same_track: npt.NDArray[np.bool_]) -> int:
    """Consecutive samples whose normals differ by more than 90° (a flip of the frame)."""
    dot = np.einsum("ij,ij->i", normal[1:], normal[:-1])
    return int(np.sum((dot < 0) & same_track))


def _drone(out: Any, figs: bool, files: list[Any]) -> tuple[list[Check], str]:
    from .flags import Flag
    from .geodesy import geodetic_to_enu
    from .intrinsic import kinematics

    f = survey_flight()
    enu = geodetic_to_enu(f.lat, f.lon, f.height)
    opts: dict[str, Any] = {"method": "smooth", "up": (0.0, 0.0, 1.0)}
    k = kinematics(f.t, enu, frame="rotation-minimizing", **opts)
    frenet = kinematics(f.t, enu, **opts)
    one = np.ones(len(f.t) - 1, dtype=bool)
    legs = (f.turn < 0) & (f.distance > f.altitude + 10) & (np.abs(f.speed - f.cruise_speed) < 1e-9)
    in_turns = _middle(f.turn >= 0, f.turn, 0.5)
    name = "survey drone"
    checks = [
        Check(
            name,
            "turn radius (median, middle half of each turn)",
            "m",
            float(np.median(k.radius[in_turns])),
            f.turn_radius,
            0.02,
        ),
        Check(
            name,
            "centripetal acceleration in turns (median a_n)",
            "m/s²",
            float(np.median(k.accel_normal[in_turns])),
            f.cruise_speed**2 / f.turn_radius,
            0.03,
        ),
        Check(
            name,
            "cruise speed on the legs (median)",
            "m/s",
            float(np.median(k.speed[legs])),
            f.cruise_speed,
            0.01,
        ),
        Check(
            name, "length of the flight path", "m", float(np.nanmax(k.arclength)), f.length, 0.01
        ),
    ]
    # The hover: the stop interval that overlaps it, against the plan (a few 0.1 s samples).
    hover = np.flatnonzero((k.stops.end > f.hover_span[0]) & (k.stops.start < f.hover_span[1]))
    found = hover[0] if len(hover) else None
    checks.append(
        Check(
            name,
            "hover: duration of the stop interval found",
            "s",
            float(k.stops.duration[found]) if found is not None else float("nan"),
            f.hover_span[1] - f.hover_span[0],
            0.1,
        )
    )
    summary = k.summary_arrays()
    checks.append(
        Check(
            name,
            "summary: smallest radius (min_radius, over trusted curved samples)",
            "m",
            float(summary["min_radius"][0]),
            f.turn_radius,
            0.1,
        )
    )
    cols = _kinematics_columns(k, ("east", "north", "up"))
    cols.update(true_speed=f.speed, true_curvature=f.curvature)
    files.append(_write_table(out / "drone_samples", cols))
    stopped = k.flagged(Flag.STOPPED)
    leg_pairs = legs[1:] & legs[:-1]
    text = f"""## 1. Survey drone: a GPS log in latitude, longitude and height

Scenario (invented, seed 11): the drone climbs {f.altitude:.0f} m vertically, then flies
{len(np.unique(f.turn[f.turn >= 0])) + 1} lawn-mower legs of {f.leg_length:.0f} m joined by
half-circle turns of radius {f.turn_radius:.0f} m at {f.cruise_speed:.0f} m/s, hovers
{f.hover:.0f} s in the middle of the third leg and comes to rest. The receiver logs WGS 84
latitude, longitude and ellipsoidal height at about 10 Hz with clock jitter, drops 3 % of the
fixes and has one {f.outage:.1f} s outage; position noise {f.noise_horizontal} m per horizontal
axis and {f.noise_vertical} m vertically. {len(f.t)} fixes.

Method: `osc.geodetic_to_enu(lat, lon, height)` (east-north-up metres about the first fix), then
`osc.kinematics(t, enu, method="smooth", up=(0, 0, 1), frame="rotation-minimizing")`: quintic
smoothing spline, λ* = {_smoothing(k)[0]:.3g} chosen by generalized cross-validation for
positions to accelerations (r‴ from a second fit tuned for the third derivative), standard
errors from the spline's exact weights, STOPPED and STRAIGHT when speed or curvature is within
3 standard errors of zero. The summary's smallest radius is
{summary["min_radius"][0]:.1f} ± {summary["min_radius_se"][0]:.1f} m
(at t = {summary["min_radius_at"][0]:.1f} s; 5th percentile {summary["p5_radius"][0]:.1f} m).

{_table(checks)}

Stops found: {_stops_text(k)}.

Flags: {int(stopped.sum())} samples STOPPED (not moving within the noise: at the start, at the
top of the climb, in the hover and at the end), {int(k.flagged(Flag.GAP).sum())} GAP (the outage),
{int(k.flagged(Flag.EDGE).sum())} EDGE. Frames: on the straight legs the Frenet normal follows the
noise and flips {_flips(frenet.normal, leg_pairs)} times between consecutive samples; the
rotation-minimizing frame flips {_flips(k.normal, leg_pairs & one)} times there.
Smoothing rounds off the corners of curvature where a leg meets a turn, so the radius is read in
the middle half of each turn.
"""
    if figs:
        from . import plot

        names = ("east", "north", "up")
        p = plot.path(
            k,
            color="speed",
            frames_every=100.0,
            axis_names=names,
            title="Survey drone: logged path, coloured by estimated speed",
        )
        files.append(_save(p, out / "drone_path.png"))
        p = plot.profile(
            k,
            x="time",
            quantities=["speed", "accel_tangential", "accel_normal"],
            title="Survey drone: speed and acceleration against time",
        )
        _truth(p.axes[0], f.t, f.speed, "true v")
        _truth(p.axes[1], f.t, f.accel_tangential, "true a_t")
        _truth(p.axes[2], f.t, f.speed**2 * f.curvature, "true a_n = v²κ")
        files.append(_save(p, out / "drone_profile.png"))
    return checks, text


def _spiral(out: Any, figs: bool, files: list[Any]) -> tuple[list[Check], str]:
    from .intrinsic import kinematics
    from .lineint import power as line_power
    from .lineint import work as line_work
    from .reparam import resample

    e = spiral_loop()
    k = kinematics(e.t, e.xy, method="smooth", tracks=e.lap)
    laps = len(e.lap_distance)
    lap_len = e.lap_length
    u = np.mod(e.distance, lap_len)
    half = np.mod(u, 0.5 * lap_len)  # position within each half of the loop
    arc = e.segment == "arc"
    arc_id = (u >= 0.5 * lap_len).astype(np.int64) + 2 * e.lap
    centre = _middle(arc, arc_id, 1.0 / 3.0)
    s0 = 0.5 * e.straight_length  # the entry clothoids start half a straight into each half
    entry = (half > s0 + 0.1 * e.spiral_length) & (half < s0 + 0.9 * e.spiral_length)
    slope = np.polyfit(half[entry] - s0, k.signed_curvature[entry], 1)[0]
    summary = k.summary_arrays()
    lap_err = (summary["length"] - e.lap_distance) / e.lap_distance
    worst = int(np.argmax(np.abs(lap_err)))
    w = line_work(e.xy, e.force, t=e.t, tracks=e.lap, cumulative=True)
    w_err = (w.total - e.drag_work) / np.abs(e.drag_work)
    w_worst = int(np.argmax(np.abs(w_err)))
    power = line_power(e.t, e.xy, e.force, method="smooth", tracks=e.lap)
    name = "electric vehicle"
    checks = [
        Check(
            name,
            "bend radius (median over the circular arcs)",
            "m",
            float(np.median(k.radius[arc])),
            e.bend_radius,
            0.02,
        ),
        Check(
            name,
            "clothoid rate dκ/ds (fit over the entry spirals)",
            "1/m²",
            float(slope),
            e.spiral_rate,
            0.05,
        ),
        Check(
            name,
            "a_n mid-bend (median, middle third of each arc)",
            "m/s²",
            float(np.median(k.accel_normal[centre])),
            float(np.median(e.accel_normal[centre])),
            0.03,
        ),
        Check(
            name,
            f"length of lap {worst} (the worst lap)",
            "m",
            float(summary["length"][worst]),
            float(e.lap_distance[worst]),
            0.005,
        ),
        Check(
            name,
            f"work of the resistance force, lap {w_worst} (the worst lap)",
            "J",
            float(w.total[w_worst]),
            float(e.drag_work[w_worst]),
            0.01,
        ),
    ]
    cols = _kinematics_columns(k, ("x", "y"))
    cols.update(
        force_x=e.force[:, 0],
        force_y=e.force[:, 1],
        power=power,
        work=np.asarray(w.cumulative, dtype=float),
        true_speed=e.speed,
        true_curvature=e.curvature,
    )
    files.append(_write_table(out / "ev_samples", cols))
    r = resample(
        e.t,
        e.xy,
        step=1.0,
        method="smooth",
        tracks=e.lap,
        extra={"force_x": e.force[:, 0], "force_y": e.force[:, 1]},
    )
    rcols: dict[str, np.ndarray] = {"track": np.asarray(r.tracks), "s": r.s, "t": r.t}
    rcols.update(x=r.position[:, 0], y=r.position[:, 1], **(r.extra or {}))
    files.append(_write_table(out / "ev_resampled", rcols))
    # ∫ P dt per lap (trapezoid), a consistency check of power against work.
    same = e.lap[1:] == e.lap[:-1]
    seg = np.where(same, 0.5 * (power[1:] + power[:-1]) * np.diff(e.t), 0.0)
    energy = np.bincount(e.lap[1:], weights=seg, minlength=laps)
    text = f"""## 2. Electric vehicle: a loop with clothoid transitions

Scenario (invented, seed 5): a {e.mass:.0f} kg vehicle laps a {lap_len:.1f} m loop {laps} times:
{e.straight_length:.0f} m straights, clothoids (Euler spirals, curvature linear in arc length) of
{e.spiral_length:.0f} m, and circular arcs of radius {e.bend_radius:.0f} m, at 9 to 14 m/s. The
geometry is built by integrating the heading numerically. Positions are logged at about 20 Hz with
clock jitter and {e.noise * 100:.0f} cm noise per axis, and the resistance force (drag with
CdA = {e.drag_area} m² plus rolling resistance Crr = {e.rolling}) with {e.force_noise:.0f} N noise.
{len(e.t)} samples, one track per lap.

Method: `osc.kinematics(t, xy, method="smooth", tracks=lap)` (λ* per lap
{", ".join(f"{x:.3g}" for x in _smoothing(k))}); work of the logged force by
`osc.work(xy, force, t=t, tracks=lap, cumulative=True)` (trapezoid rule; estimated quadrature error
{", ".join(f"{x:.2g}" for x in w.error)} J per lap); power F·v by `osc.power(..., method="smooth")`,
whose time integral per lap ({", ".join(f"{x / 1e3:.2f}" for x in energy)} kJ) agrees with the work
({", ".join(f"{x / 1e3:.2f}" for x in w.total)} kJ); points every metre along each lap by
`osc.resample(t, xy, step=1.0, method="smooth", tracks=lap, extra=force)` ({len(r)} points).

{_table(checks)}

The path figure draws the Frenet frame every 40 m: on the straights its normal follows the noise
and points to either side (compare the rotation-minimizing frame of the drone figure). The g-g
figure draws one reference circle at {DEMO_LIMIT[0]} g: {DEMO_LIMIT[1]}. It is there to show how a
limit is drawn and labelled, nothing more.
"""
    if figs:
        from . import plot

        p = plot.path(
            k,
            color="curvature",
            frames_every=40.0,
            title="Electric vehicle: loop coloured by estimated curvature",
        )
        files.append(_save(p, out / "ev_path.png"))
        p = plot.profile(
            k,
            quantities=["speed", "curvature", "accel_tangential", "accel_normal"],
            title="Electric vehicle: profiles along each lap",
        )
        lap0 = e.lap == 0
        s_lap = e.distance[lap0] - e.distance[lap0][0]
        _truth(p.axes[0], s_lap, e.speed[lap0], "true v (lap 0)")
        _truth(p.axes[1], s_lap, np.abs(e.curvature[lap0]), "true κ (lap 0)")
        _truth(p.axes[2], s_lap, e.accel_tangential[lap0], "true a_t (lap 0)")
        _truth(p.axes[3], s_lap, e.accel_normal[lap0], "true a_n (lap 0)")
        files.append(_save(p, out / "ev_profile.png"))
        p = plot.gg(k, limits=[DEMO_LIMIT], title="Electric vehicle: acceleration share")
        files.append(_save(p, out / "ev_gg.png"))
        p = plot.work(
            k,
            values=w.cumulative,
            title="Electric vehicle: work of the logged resistance force, per lap",
        )
        files.append(_save(p, out / "ev_work.png"))
    return checks, text


def _tracers(out: Any, figs: bool, files: list[Any]) -> tuple[list[Check], str]:
    from .intrinsic import kinematics
    from .lineint import GridField
    from .lineint import work as line_work

    d = swirl_tracers()
    k = kinematics(d.t, d.xy, method="smooth", tracks=d.particle)
    m = len(d.radius)
    radius = _median_by_track(k.radius, d.particle, m)
    speed = _median_by_track(k.speed, d.particle, m)
    true_speed = d.swirl_speed(d.radius)
    r_err = np.abs(radius / d.radius - 1.0)
    v_err = np.abs(speed / true_speed - 1.0)
    field = GridField(
        d.grid_velocity,
        origin=(d.grid_x[0], d.grid_y[0]),
        spacing=(d.grid_x[1] - d.grid_x[0], d.grid_y[1] - d.grid_y[0]),
    )
    rings = np.array([0.01, 0.02, 0.05])
    a = np.linspace(0.0, 2 * np.pi, 721)[:-1]
    circle = np.column_stack([np.cos(a), np.sin(a)])
    loops = (rings[:, None, None] * circle[None]).reshape(-1, 2)
    circ = line_work(loops, field, tracks=np.repeat(np.arange(len(rings)), len(a)), closed=True)
    name = "tracer particles"
    checks = [
        Check(
            name,
            "radius of curvature: median absolute relative error over tracks",
            "%",
            float(100 * np.median(r_err)),
            0.0,
            2.0,
            relative=False,
        ),
        Check(
            name,
            "speed: median absolute relative error over tracks",
            "%",
            float(100 * np.median(v_err)),
            0.0,
            1.0,
            relative=False,
        ),
    ] + [
        Check(
            name,
            f"circulation of the gridded field, circle r = {r * 1e3:.0f} mm",
            "m²/s",
            float(c),
            float(d.enclosed_circulation(r)),
            0.01,
        )
        for r, c in zip(rings, circ.total)  # three rings
    ]
    cols = _kinematics_columns(k, ("x", "y"))
    cols.update(true_speed=d.speed)
    files.append(_write_table(out / "tracers_samples", cols))
    text = f"""## 3. Tracer particles in a swirling flow

Scenario (invented, seed 3): {m} particles tracked at {d.fps:.0f} frames per second in a steady
Lamb–Oseen vortex (circulation Γ = {d.circulation} m²/s, core radius {d.core_radius * 1e3:.0f} mm),
tracks of 40 to 150 frames at radii 8 to 70 mm, tracking noise {d.noise * 1e6:.0f} µm per axis;
{len(d.t)} positions. Every particle runs round a circle, so its radius of curvature is its
distance from the centre and its speed is the swirl speed there. The velocity is also given on a
{len(d.grid_x)} × {len(d.grid_y)} grid ({(d.grid_x[1] - d.grid_x[0]) * 1e3:.0f} mm spacing).

Method: `osc.kinematics(t, xy, method="smooth", tracks=particle)`, one λ* per track (median
{np.median(_smoothing(k)):.3g}); per-track medians of radius and speed against the
truth. Circulation ∮ u·dr of the gridded field round centred circles (720-gons) by
`osc.work(circle, osc.GridField(...), closed=True)` (bilinear interpolation, Gauss–Legendre
nodes), against Γ(1 − exp(−r²/r_c²)).

{_table(checks)}

The worst track's radius is off by {100 * np.max(r_err):.1f} %: short tracks far from the centre
turn through a few degrees only, and curvature from a short arc is uncertain.
"""
    if figs:
        from . import plot

        p = plot.path(k, color="speed", title="Tracer particles: tracks coloured by speed")
        files.append(_save(p, out / "tracers_path.png"))
    return checks, text


def _truth(ax: Any, x: F64, y: F64, label: str) -> None:
    """Overlay a ground-truth curve (dashed) on a panel, with its own small legend."""
    ax.plot(x, y, color=TRUTH, linestyle=(0, (4, 3)), linewidth=1.0, label=label, zorder=3)
    ax.legend(loc="best", fontsize=7.5, framealpha=0.85)


def _stops_text(k: Any) -> str:
    """Describe the stop intervals of one track as text."""
    st = k.stops
    if len(st) == 0:
        return "none"
    return "; ".join(
        f"{a:.1f}–{b:.1f} s ({d:.1f} s, {n} samples)"
        for a, b, d, n in zip(st.start, st.end, st.duration, st.samples)
    )


def _save(p: Any, target: Any) -> Any:
    p.savefig(target, dpi=130)
    return target


def _table(checks: list[Check]) -> str:
    rows = [
        "| key figure | estimated | true | error | tolerance | within |",
        "|---|---|---|---|---|---|",
    ]
    for c in checks:
        if c.relative:
            err, tol = f"{100 * c.error:+.2f} %", f"{100 * c.tolerance:g} %"
        else:
            err, tol = f"{c.error:+.3g} {c.unit}", f"{c.tolerance:g} {c.unit}"
        rows.append(
            f"| {c.name} | {_fmt(c.estimated)} {c.unit} | {_fmt(c.true)} {c.unit} | {err} | {tol} "
            f"| {'yes' if c.passed else 'NO'} |"
        )
    return "\n".join(rows)


def run(out: Any, *, figures: Optional[bool] = None) -> Report:
    """Run the whole job on the three scenarios and write the report folder.

    Parameters
    ----------
    out : path-like
        The report folder (created if needed).
    figures : bool, optional
        Draw the PNG figures; by default when matplotlib is importable.

    Returns
    -------
    Report
        The files written, the key figures and the run time.

    Notes
    -----
    Writes ``report.md``; per-sample results ``drone_samples``, ``ev_samples``,
    ``tracers_samples`` and the resampled laps ``ev_resampled`` (Parquet with pyarrow, else
    CSV); ``summary.csv`` (one row per track of every scenario); ``checks.csv`` (the key figures);
    and, with matplotlib, the PNG figures.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> from osculate.report import run
    >>> with tempfile.TemporaryDirectory() as tmp:
    ...     rep = run(pathlib.Path(tmp), figures=False)
    ...     rep.passed, rep.report.name, sorted(c.scenario for c in rep.checks)[0]
    (True, 'report.md', 'electric vehicle')
    """
    import pathlib
    import time

    from . import __version__
    from .intrinsic import kinematics

    started = time.perf_counter()
    folder = pathlib.Path(out)
    folder.mkdir(parents=True, exist_ok=True)
    if figures is None:
        try:
            import matplotlib  # noqa: F401
        except ImportError:
            figures = False
        else:
            figures = True
    files: list[Any] = []
    checks: list[Check] = []
    sections = []
    for part in (_drone, _spiral, _tracers):  # three scenarios
        c, text = part(folder, figures, files)
        checks += c
        sections.append(text)
    # One row per track of every scenario.
    from .geodesy import geodetic_to_enu

    f, e, d = survey_flight(), spiral_loop(), swirl_tracers()
    enu = geodetic_to_enu(f.lat, f.lon, f.height)
    parts = [
        ("survey drone", kinematics(f.t, enu, method="smooth", up=(0, 0, 1), min_speed=0.2)),
        ("electric vehicle", kinematics(e.t, e.xy, method="smooth", tracks=e.lap)),
        ("tracer particles", kinematics(d.t, d.xy, method="smooth", tracks=d.particle)),
    ]
    rows: dict[str, list[np.ndarray]] = {}
    for scenario, k in parts:  # three scenarios
        arrays = k.summary_arrays()
        rows.setdefault("scenario", []).append(np.full(len(arrays["track"]), scenario))
        for key, value in arrays.items():
            rows.setdefault(key, []).append(np.asarray(value))
    summary = {key: np.concatenate(v) for key, v in rows.items()}
    files.append(_write_csv(folder / "summary.csv", summary))
    files.append(
        _write_csv(
            folder / "checks.csv",
            {
                "scenario": np.array([c.scenario for c in checks]),
                "figure": np.array([c.name for c in checks]),
                "unit": np.array([c.unit for c in checks]),
                "estimated": np.array([c.estimated for c in checks]),
                "true": np.array([c.true for c in checks]),
                "tolerance": np.array([c.tolerance for c in checks]),
                "relative": np.array([c.relative for c in checks]),
                "within": np.array([c.passed for c in checks]),
            },
        )
    )
    seconds = time.perf_counter() - started
    report = folder / "report.md"
    listing = "\n".join(f"- `{p.name}`" for p in [*files, report])
    plots = (
        "The PNG figures show the paths, the profiles with the ground truth dashed, a g-g diagram "
        "and the work along each lap."
        if figures
        else "No figures: they need matplotlib, `pip install 'osculate[plot]'`."
    )
    verdict = (
        "Every key figure is within its stated tolerance."
        if all(c.passed for c in checks)
        else "SOME KEY FIGURES ARE OUTSIDE THEIR TOLERANCE (marked NO)."
    )
    report.write_text(
        f"""# osculate demo report

Written by `osculate demo` (osculate {__version__}) in {seconds:.1f} s. The three scenarios are
invented: generated by `osculate.demo` with fixed seeds, so the ground truth is known exactly and
every estimate below is compared with it. {verdict}

{chr(10).join(sections)}
## Files

{listing}

Per-sample tables hold the estimates on the logged rows (`flags` are bits of `osculate.Flag`:
1 STOPPED, 2 STRAIGHT, 4 EDGE, 8 GAP, 16 INVALID) and, for comparison, the true speed and
curvature. `summary.csv` has one row per track of each scenario, `checks.csv` the key figures.
{plots}

## Cautions

- {CAUTION}
- Reference values drawn on a figure are the caller's, each named with its source; this demo's
  only one ({DEMO_LIMIT[0]} g) is invented and comes from no code or standard.
- Smoothing trades noise for bias: corners of curvature (a straight meeting a circle) are rounded
  off over the smoothing bandwidth, and estimates within about one bandwidth of a track's ends
  (EDGE) are less accurate. Check estimates against the raw path before trusting them.
"""
    )
    files.append(report)
    return Report(folder, report, files, checks, seconds, bool(figures))
