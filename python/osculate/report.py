"""The ``osculate demo`` report: every demo scenario through the whole job, estimates against truth.

:func:`run` computes kinematics with smoothing, frames, resampling, work and summaries on the
invented scenarios of :mod:`osculate.demo`, checks each key figure against the scenario's ground
truth, and writes per-sample tables, a per-track summary, the figures (with matplotlib) and
``report.md`` to a folder. A second run into the same folder removes the files of the first that
it does not write again (and nothing else), by the list of files the first left in
``manifest.json``.
"""

from __future__ import annotations

import dataclasses
import json
import re
from typing import Any, Optional

import numpy as np
import numpy.typing as npt

from ._palette import TRUTH
from .demo import spiral_loop, survey_flight, swirl_tracers
from .summary import COLUMNS as SUMMARY_COLUMNS

__all__ = ["CAUTION", "MANIFEST", "Check", "Report", "run", "summary_units", "text_table"]

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
#: The list of files a run wrote, read by the next run into the same folder.
MANIFEST = "manifest.json"
#: Units of the demo's input: every scenario is in metres and seconds (the drone after
#: ``geodetic_to_enu``), so "L" and "T" of ``osculate.SUMMARY_COLUMNS`` are m and s.
DEMO_LENGTH, DEMO_TIME = "m", "s"
#: Units of the entries of ``Kinematics.fit_info`` that the summary appends after the columns of
#: ``osculate.SUMMARY_COLUMNS`` (from the ``fit_info`` documentation of ``osculate.Kinematics``).
FIT_INFO_UNITS = {
    "smoothing": "1",  # dimensionless λ*
    "edf": "1",  # effective degrees of freedom
    "criterion": "L²",  # GCV score or unbiased risk: a mean squared position residual
    "window": "samples or T",  # "local": samples (window) or a time span (window_span)
    "length_error": "L",
    "jerk_smoothing": "1",  # dimensionless λ* of the fit r‴ comes from
    "bandwidth": "samples",  # of the smoothing spline's equivalent kernel
}
LABEL_COLUMNS = ("scenario", "track")  # no unit
_UNIT_HEAD = re.compile(r"1|rad|[LT][²³]?(?:/T[²³]?)?")
_LT = re.compile(r"(?<![A-Za-z])[LT](?![A-Za-z])")


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
        """Signed relative error (estimated − true) / true, or estimated − true if not relative.

        A negative relative error means the estimate falls short of the truth in proportion
        (it is ``estimated / true − 1``, also when the truth is negative).
        """
        diff = self.estimated - self.true
        return diff / self.true if self.relative else diff

    @property
    def passed(self) -> bool:
        """Whether the estimate is within the tolerance."""
        return bool(np.isfinite(self.error) and abs(self.error) <= self.tolerance)

    def cells(self) -> tuple[str, str, str, str, str]:
        """Return the estimate, truth, error, tolerance and verdict as report text.

        Returns
        -------
        tuple of str
            ``(estimated, true, error, tolerance, within)``, with units; a relative error and
            tolerance in percent.

        Examples
        --------
        >>> Check("s", "x", "m", estimated=29.7, true=30.0, tolerance=0.02).cells()
        ('29.7 m', '30 m', '-1.00 %', '2 %', 'yes')
        """
        if self.relative:
            err, tol = f"{100 * self.error:+.2f} %", f"{100 * self.tolerance:g} %"
        else:
            err, tol = f"{self.error:+.3g} {self.unit}", f"{self.tolerance:g} {self.unit}"
        return (
            f"{_fmt(self.estimated)} {self.unit}",
            f"{_fmt(self.true)} {self.unit}",
            err,
            tol,
            "yes" if self.passed else "NO",
        )


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
    removed : list of pathlib.Path
        Files of a previous run into the folder that this run did not write again, deleted.
    """

    folder: Any
    report: Any
    files: list[Any]
    checks: list[Check]
    seconds: float
    figures: bool
    removed: list[Any] = dataclasses.field(default_factory=list)

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
        with target.open("w", newline="", encoding="utf-8") as fh:
            w = csv.writer(fh)
            w.writerow(list(columns))
            w.writerows(zip(*(np.asarray(c).tolist() for c in columns.values())))
        return target
    target = path.with_suffix(".parquet")
    pq.write_table(pa.table({k: np.asarray(v) for k, v in columns.items()}), target)
    return target


def _write_csv(path: Any, columns: dict[str, np.ndarray]) -> Any:
    import csv

    with path.open("w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(list(columns))
        w.writerows(zip(*(np.asarray(c).tolist() for c in columns.values())))
    return path


@dataclasses.dataclass(frozen=True)
class _Figure:
    """A figure file of the report and its one-line caption."""

    path: Any
    caption: str


@dataclasses.dataclass(frozen=True)
class _Section:
    """What one scenario adds to the report."""

    checks: list[Check]
    text: str
    kinematics: Any  # the Kinematics whose per-track summary goes to summary.csv
    figures: list[_Figure]


def _kinematics_columns(
    k: Any, names: tuple[str, ...], track: str = "track"
) -> dict[str, np.ndarray]:
    cols: dict[str, np.ndarray] = {}
    if k.tracks is not None:
        cols[track] = k.tracks
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


def _undefined(normal: F64, rows: npt.NDArray[np.bool_]) -> int:
    """Rows of ``rows`` where the normal is undefined (NaN)."""
    return int(np.sum(~np.isfinite(normal).all(axis=1) & rows))


def _drone(out: Any, figs: bool, files: list[Any]) -> _Section:
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
    turns = k.turns()
    worst_turn = int(np.argmax(np.abs(turns.min_radius - f.turn_radius))) if len(turns) else 0
    checks += [
        Check(
            name,
            "turns found (turn table)",
            "",
            float(len(turns)),
            float(f.turn.max() + 1),
            0.0,
            relative=False,
        ),
        Check(
            name,
            f"turn {worst_turn + 1} (the worst): radius of the circle through its core",
            "m",
            float(turns.min_radius[worst_turn]) if len(turns) else float("nan"),
            f.turn_radius,
            0.02,
        ),
    ]
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
    frenet_gone = _undefined(frenet.normal, legs)
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
{int(k.flagged(Flag.EDGE).sum())} EDGE. Frames: on the straight legs the curvature is within the
noise of zero (STRAIGHT), so the Frenet normal is undefined at {frenet_gone} of {int(legs.sum())}
leg samples and flips {_flips(frenet.normal, leg_pairs)} times between consecutive samples where it
is defined; the rotation-minimizing frame is undefined at {_undefined(k.normal, legs)} of them and
flips {_flips(k.normal, leg_pairs & one)} times.
Smoothing rounds off the corners of curvature where a leg meets a turn, so the radius is read in
the middle half of each turn.
"""
    figures: list[_Figure] = []
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
        figures.append(
            _Figure(
                _save(p, out / "drone_path.png"),
                "Survey drone: the logged path in east-north-up metres, coloured by estimated "
                "speed, with the rotation-minimizing frame every 100 m.",
            )
        )
        p = plot.profile(
            k,
            x="time",
            quantities=["speed", "accel_tangential", "accel_normal"],
            title="Survey drone: speed and acceleration against time",
        )
        _truth(p.axes[0], f.t, f.speed, "true v")
        _truth(p.axes[1], f.t, f.accel_tangential, "true a_t")
        _truth(p.axes[2], f.t, f.speed**2 * f.curvature, "true a_n = v²κ")
        figures.append(
            _Figure(
                _save(p, out / "drone_profile.png"),
                "Survey drone: estimated speed, a_t and a_n against time with 95 % bands, the "
                "truth dashed; shaded: flagged samples.",
            )
        )
        files += [fig.path for fig in figures]
    return _Section(checks, text, k, figures)


def _spiral(out: Any, figs: bool, files: list[Any]) -> _Section:
    from .demo import STANDARD_GRAVITY
    from .elements import elements_of
    from .intrinsic import kinematics
    from .lineint import power as line_power
    from .lineint import work as line_work
    from .reparam import resample

    e = spiral_loop()
    lap = e.lap + 1  # laps are numbered from 1 in the report, its tables and figures
    k = kinematics(e.t, e.xy, method="smooth", tracks=lap)
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
    bends = k.turns()
    worst_bend = int(np.argmax(np.abs(bends.min_radius - e.bend_radius))) if len(bends) else 0
    lap_err = (summary["length"] - e.lap_distance) / e.lap_distance
    worst = int(np.argmax(np.abs(lap_err)))  # an index: lap worst + 1
    w = line_work(e.xy, e.force, t=e.t, tracks=lap, cumulative=True)
    w_err = (w.total - e.drag_work) / np.abs(e.drag_work)
    w_worst = int(np.argmax(np.abs(w_err)))
    power = line_power(e.t, e.xy, e.force, method="smooth", tracks=lap)
    # The element table of every lap: straights, circular arcs and clothoids.
    el = elements_of(k)
    design = _design_kinds()
    laps_in_order = sum(
        int(np.array_equal(el.kind[el.track == n], design)) for n in range(1, laps + 1)
    )  # three laps
    per_lap = np.stack(
        [np.bincount(el.kind[el.track == n], minlength=3) for n in range(1, laps + 1)]
    )
    arcs_off = int(np.argmax(np.abs(per_lap[:, 1] - 2)))  # an index: lap arcs_off + 1
    spirals_off = int(np.argmax(np.abs(per_lap[:, 2] - 4)))
    el_arc, el_spiral = el.kind == 1, el.kind == 2
    spacing = float(np.median(np.diff(k.arclength)[np.diff(lap) == 0]))
    spiral_tol = max(0.05, 2.0 * spacing / e.spiral_length)
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
            "bends found (turn table, two per lap)",
            "",
            float(len(bends)),
            float(2 * laps),
            0.0,
            relative=False,
        ),
        Check(
            name,
            "bend radius from the turn table (circle through the core, worst bend)",
            "m",
            float(bends.min_radius[worst_bend]) if len(bends) else float("nan"),
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
            f"length of lap {worst + 1} (the worst lap)",
            "m",
            float(summary["length"][worst]),
            float(e.lap_distance[worst]),
            0.005,
        ),
        Check(
            name,
            f"work of the resistance force, lap {w_worst + 1} (the worst lap)",
            "J",
            float(w.total[w_worst]),
            float(e.drag_work[w_worst]),
            0.01,
        ),
        Check(
            name,
            f"circular arcs per lap (element table, lap {arcs_off + 1}: the worst)",
            "",
            float(per_lap[arcs_off, 1]),
            2.0,
            0.0,
            relative=False,
        ),
        Check(
            name,
            f"transition spirals per lap (element table, lap {spirals_off + 1}: the worst)",
            "",
            float(per_lap[spirals_off, 2]),
            4.0,
            0.0,
            relative=False,
        ),
        Check(
            name,
            "laps whose elements run straight, spiral, arc, spiral, straight (twice)",
            "",
            float(laps_in_order),
            float(laps),
            0.0,
            relative=False,
        ),
        Check(
            name,
            "arc radius (median over the element table's arcs)",
            "m",
            float(np.median(el.radius[el_arc])) if el_arc.any() else float("nan"),
            e.bend_radius,
            0.02,
        ),
        Check(
            name,
            "spiral parameter A (median over the element table's spirals; A² = RL)",
            "m",
            float(np.median(el.spiral_parameter[el_spiral])) if el_spiral.any() else float("nan"),
            float(np.sqrt(e.bend_radius * e.spiral_length)),
            0.05,
        ),
        Check(
            name,
            "spiral length (median over the element table's spirals)",
            "m",
            float(np.median(el.length[el_spiral])) if el_spiral.any() else float("nan"),
            e.spiral_length,
            spiral_tol,
        ),
    ]
    cols = _kinematics_columns(k, ("x", "y"), track="lap")
    cols.update(
        force_x=e.force[:, 0],
        force_y=e.force[:, 1],
        power=power,
        work=np.asarray(w.cumulative, dtype=float),
        true_speed=e.speed,
        true_curvature=e.curvature,
        true_work=e.cumulative_drag_work,
    )
    files.append(_write_table(out / "ev_samples", cols))
    r = resample(
        e.t,
        e.xy,
        step=1.0,
        method="smooth",
        tracks=lap,
        extra={"force_x": e.force[:, 0], "force_y": e.force[:, 1]},
    )
    rcols: dict[str, np.ndarray] = {"lap": np.asarray(r.tracks), "s": r.s, "t": r.t}
    rcols.update(x=r.position[:, 0], y=r.position[:, 1], **(r.extra or {}))
    files.append(_write_table(out / "ev_resampled", rcols))
    # ∫ P dt per lap (trapezoid), a consistency check of power against work.
    same = e.lap[1:] == e.lap[:-1]
    seg = np.where(same, 0.5 * (power[1:] + power[:-1]) * np.diff(e.t), 0.0)
    energy = np.bincount(e.lap[1:], weights=seg, minlength=laps)
    # The laps are cut at the start/finish line, mid-straight at the top speed: the crossing
    # falls between two logged rows, so each lap's rows span a little less than the loop.
    first = np.searchsorted(e.lap, np.arange(laps), side="left")
    crossing = e.speed[first] * float(np.median(np.diff(e.t)))
    straight = e.segment == "straight"
    frenet_gone = _undefined(k.normal, straight)
    text = f"""## 2. Electric vehicle: a loop with clothoid transitions

Scenario (invented, seed 5): a {e.mass:.0f} kg vehicle laps a {lap_len:.1f} m loop {laps} times:
{e.straight_length:.0f} m straights, clothoids (Euler spirals, curvature linear in arc length) of
{e.spiral_length:.0f} m, and circular arcs of radius {e.bend_radius:.0f} m, at 9 to 14 m/s. The
heading is the exact integral of the curvature and the positions are integrated from it
numerically (exact to about 1e-12 m). Positions are logged at about 20 Hz with clock jitter and
{e.noise * 100:.0f} cm noise per axis, and the resistance force (drag with CdA = {e.drag_area} m²
plus rolling resistance Crr = {e.rolling}) with {e.force_noise:.0f} N noise. {len(e.t)} samples,
one track per lap; laps are numbered 1 to {laps} here and in the tables (column `lap`; the `track`
of `summary.csv`){" and figures" if figs else ""}.

Lap lengths: the loop is {lap_len:.3f} m long by design, 2 × (straight + clothoid + πR). A lap's
true length below is the distance driven between its first and last logged rows,
{", ".join(f"{x:.2f}" for x in e.lap_distance)} m for laps 1 to {laps}. It is shorter because laps
start and end at the start/finish line in the middle of a straight, where the vehicle does
{e.speed[first].max():.0f} m/s and the log's rows are about {crossing.max():.1f} m apart: the part
of each crossing that falls between the last row of one lap and the first of the next belongs to
neither.

Method: `osc.kinematics(t, xy, method="smooth", tracks=lap)` (λ* for laps 1 to {laps}:
{", ".join(f"{x:.3g}" for x in _smoothing(k))}); work of the logged force by
`osc.work(xy, force, t=t, tracks=lap, cumulative=True)` (trapezoid rule; estimated quadrature error
{", ".join(f"{x:.2g}" for x in w.error)} J per lap); power F·v by `osc.power(..., method="smooth")`,
whose time integral per lap ({", ".join(f"{x / 1e3:.2f}" for x in energy)} kJ) agrees with the work
({", ".join(f"{x / 1e3:.2f}" for x in w.total)} kJ; true
{", ".join(f"{x / 1e3:.2f}" for x in e.drag_work)} kJ); points every metre along each lap by
`osc.resample(t, xy, step=1.0, method="smooth", tracks=lap, extra=force)` ({len(r)} points).

{_table(checks)}

Frames: the Frenet normal is undefined at {frenet_gone} of the {int(straight.sum())} samples on
the straights, where the curvature is within the noise of zero (STRAIGHT); where the noise lets it
be defined there, it may point to either side.

Elements: `osculate.elements.elements_of(k)` cuts each lap's curvature diagram into straights,
circular arcs and clothoids and fits the chain to the logged positions ({len(el)} elements over
the {laps} laps; RMS distance of the samples from the chain {100 * float(np.median(el.rms)):.1f} cm,
median over the elements, against the {e.noise * 100:.0f} cm noise). By construction each lap
runs half a straight, then twice spiral → arc → spiral → straight, the last straight halved:
2 arcs and 4 spirals per lap, counted exactly. The arcs' radius is checked against the
{e.bend_radius:.0f} m of the design to 2 %, the spirals' parameter A against √(R·L) =
{np.sqrt(e.bend_radius * e.spiral_length):.3f} m (A² = R·L, the clothoid's usual parameter) to
5 %, and their length against {e.spiral_length:.0f} m to the larger of 5 % and two sample
spacings (2 × {spacing:.2f} m = {100 * 2 * spacing / e.spiral_length:.1f} %): where a spiral
ends is blurred by the smoothing, which rounds the corners of the curvature diagram. Element
tables are reconstructions from logged data, describing how the loop was driven: design values
(radii, spiral parameters, lengths) are decided by local codes and licensed engineers.
"""
    figures: list[_Figure] = []
    if figs:
        from . import plot

        lap1 = e.lap == 0
        p = plot.path(
            k,
            color="curvature",
            frames_every=40.0,
            title="Electric vehicle: loop coloured by estimated curvature",
        )
        _lap_legends(p.figure)
        figures.append(
            _Figure(
                _save(p, out / "ev_path.png"),
                "Electric vehicle: the loop coloured by estimated curvature, with the Frenet "
                "frame every 40 m (none where the normal is undefined).",
            )
        )
        p = plot.profile(
            k,
            quantities=["speed", "curvature", "accel_tangential", "accel_normal"],
            title="Electric vehicle: profiles along each lap",
        )
        s_lap = e.distance[lap1] - e.distance[lap1][0]
        _truth(p.axes[0], s_lap, e.speed[lap1], "true v (lap 1)")
        _truth(p.axes[1], s_lap, np.abs(e.curvature[lap1]), "true κ (lap 1)")
        _truth(p.axes[2], s_lap, e.accel_tangential[lap1], "true a_t (lap 1)")
        _truth(p.axes[3], s_lap, e.accel_normal[lap1], "true a_n (lap 1)")
        _lap_legends(p.figure)
        figures.append(
            _Figure(
                _save(p, out / "ev_profile.png"),
                f"Electric vehicle: speed, curvature, a_t and a_n along laps 1 to {laps} with "
                "95 % bands, the truth of lap 1 dashed; shaded: flagged samples.",
            )
        )
        p = plot.curvature(
            k,
            el,
            tracks=[1],
            title="Electric vehicle: curvature diagram of lap 1 and its fitted elements",
        )
        _truth(p.axes, s_lap, e.curvature[lap1], "true κ (lap 1)", loc="upper right")
        _lap_legends(p.figure)
        figures.append(
            _Figure(
                _save(p, out / "ev_curvature.png"),
                "Electric vehicle: signed curvature along lap 1 with its 95 % band, the fitted "
                "elements over it (straights at 0, arcs constant, spirals linear; spans shaded "
                "by kind) and the truth dashed.",
            )
        )
        p = plot.gg(k, limits=[DEMO_LIMIT], title="Electric vehicle: acceleration share")
        # The truth of lap 1: lateral acceleration v²κ (signed, left turns positive) and a_t, in g.
        lateral = e.speed[lap1] ** 2 * e.curvature[lap1] / STANDARD_GRAVITY
        _truth(
            p.axes,
            lateral,
            e.accel_tangential[lap1] / STANDARD_GRAVITY,
            "truth (lap 1)",
            loc="lower left",
        )
        _lap_legends(p.figure)
        figures.append(
            _Figure(
                _save(p, out / "ev_gg.png"),
                "Electric vehicle: g-g diagram, longitudinal a_t against lateral acceleration in "
                f"g, the truth of lap 1 dashed, with one reference circle at {DEMO_LIMIT[0]} g "
                "drawn only to show how a limit is labelled.",
            )
        )
        p = plot.work(
            k,
            values=w.cumulative,
            truth=e.cumulative_drag_work,  # the true cumulative work at every row, dashed
            title="Electric vehicle: work of the logged resistance force, per lap",
        )
        _lap_legends(p.figure)
        figures.append(
            _Figure(
                _save(p, out / "ev_work.png"),
                f"Electric vehicle: cumulative work of the logged resistance force along laps 1 to "
                f"{laps}, with each lap's total, and the true work dashed.",
            )
        )
        files += [fig.path for fig in figures]
    return _Section(checks, text, k, figures)


def _tracers(out: Any, figs: bool, files: list[Any]) -> _Section:
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
    figures: list[_Figure] = []
    if figs:
        from . import plot

        p = plot.path(k, color="speed", title="Tracer particles: tracks coloured by speed")
        figures.append(
            _Figure(
                _save(p, out / "tracers_path.png"),
                f"Tracer particles: the {m} tracks round the vortex centre, coloured by estimated "
                "speed.",
            )
        )
        files += [fig.path for fig in figures]
    return _Section(checks, text, k, figures)


def _truth(ax: Any, x: F64, y: F64, label: str, loc: str = "best") -> None:
    """Overlay a ground-truth curve (dashed) on a panel, named in a small legend of its own.

    A legend the plot already drew on the panel (e.g. the totals of :func:`osculate.plot.work`)
    stays the panel's legend, where it was; the truth's legend is added beside it at ``loc``.
    """
    from matplotlib.legend import Legend

    (line,) = ax.plot(x, y, color=TRUTH, linestyle=(0, (4, 3)), linewidth=1.0, zorder=3)
    style = {"loc": loc, "fontsize": 7.5, "framealpha": 0.85}
    if ax.get_legend() is None:
        ax.legend(handles=[line], labels=[label], **style)
    else:
        ax.add_artist(Legend(ax, [line], [label], **style))


def _lap_legends(fig: Any) -> None:
    """Name the tracks of a figure's legends laps: "track 2" reads "lap 2".

    The electric vehicle has one track per lap, its track labels being the lap numbers.
    """
    from matplotlib.legend import Legend

    panels = [c for a in fig.axes for c in a.get_children() if isinstance(c, Legend)]
    for legend in [*fig.legends, *panels]:  # a figure's few legends
        for text in legend.get_texts():  # a few entries each
            label = text.get_text()
            if label.startswith("track "):
                text.set_text("lap " + label[len("track ") :])


def _design_kinds() -> npt.NDArray[np.int8]:
    """Element kinds of one lap of the loop by construction, as codes of ``elements.KINDS``.

    Half a straight, then twice spiral, arc, spiral, straight, the last straight halved.
    """
    from .elements import KINDS

    names = ["straight", *(["spiral", "arc", "spiral", "straight"] * 2)]
    return np.array([KINDS.index(n) for n in names], dtype=np.int8)


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


TABLE_HEADER = ("key figure", "estimated", "true", "error", "tolerance", "within")


def _table(checks: list[Check]) -> str:
    rows = ["| " + " | ".join(TABLE_HEADER) + " |", "|---|---|---|---|---|---|"]
    rows += [f"| {c.name} | " + " | ".join(c.cells()) + " |" for c in checks]  # a few figures
    return "\n".join(rows)


def text_table(checks: list[Check]) -> str:
    """Return the key figures as a plain-text table with a header row, columns aligned.

    Parameters
    ----------
    checks : list of Check
        The key figures.

    Returns
    -------
    str
        A header row, a rule, then one row per key figure: the scenario and the figure's name
        left-aligned, the numbers and the verdict right-aligned.

    Examples
    --------
    >>> print(text_table([Check("drone", "radius", "m", 29.7, 30.0, 0.02)]))
    scenario  key figure  estimated  true    error  tolerance  within
    --------  ----------  ---------  ----  -------  ---------  ------
    drone     radius         29.7 m  30 m  -1.00 %        2 %     yes
    """
    header = ("scenario", *TABLE_HEADER)
    rows = [(c.scenario, c.name, *c.cells()) for c in checks]  # a few key figures
    widths = [max(len(r[j]) for r in [header, *rows]) for j in range(len(header))]

    def line(cells: tuple[str, ...]) -> str:
        left = [cells[j].ljust(widths[j]) for j in range(2)]
        right = [cells[j].rjust(widths[j]) for j in range(2, len(cells))]
        return "  ".join(left + right)

    return "\n".join([line(header), line(tuple("-" * w for w in widths)), *map(line, rows)])


def summary_units(
    columns: list[str], length: str = DEMO_LENGTH, time: str = DEMO_TIME
) -> dict[str, str]:
    """Return the unit of each summary column, with the input's length and time units filled in.

    Parameters
    ----------
    columns : list of str
        Column names of a per-track summary (``Kinematics.summary_arrays`` and a ``scenario``
        label).
    length, time : str
        The input's length and time units, for "L" and "T" of ``osculate.SUMMARY_COLUMNS``.

    Returns
    -------
    dict of str to str
        Column → unit: read from the start of the column's description in
        ``osculate.SUMMARY_COLUMNS`` (``"count"`` for numbers of rows or intervals), from
        :data:`FIT_INFO_UNITS` for the fit information, empty for the labels ``scenario`` and
        ``track`` and for a column of unknown unit.

    Examples
    --------
    >>> summary_units(["track", "length", "max_accel_normal", "samples", "smoothing"])
    {'track': '', 'length': 'm', 'max_accel_normal': 'm/s²', 'samples': 'count', 'smoothing': '1'}
    """
    units: dict[str, str] = {}
    for name in columns:  # a few dozen columns
        unit = ""
        if name in SUMMARY_COLUMNS:
            head = SUMMARY_COLUMNS[name].split(",", 1)[0].strip()
            if _UNIT_HEAD.fullmatch(head):
                unit = head
            elif head.startswith(("rows", "samples", "number")):
                unit = "count"
        elif name not in LABEL_COLUMNS:
            unit = FIT_INFO_UNITS.get(name, "")
        units[name] = _LT.sub(lambda m: length if m.group() == "L" else time, unit)
    return units


#: The summary columns shown in report.md (summary.csv has them all).
SUMMARY_SHOWN = (
    "samples",
    "length",
    "duration",
    "mean_speed",
    "max_speed",
    "max_accel_normal",
    "min_radius",
    "turning_angle",
    "stops",
    "stopped_time",
)


def _summary_table(summary: dict[str, np.ndarray], units: dict[str, str], many: str) -> str:
    """Markdown table of a few summary columns, a units row under the header.

    Tracks of the scenario ``many`` are shown as one row of medians over its tracks.
    """
    few = summary["scenario"] != many
    cells = [summary["scenario"][few].astype(str), summary["track"][few].astype(str)]
    medians = [many, f"median of {int(np.sum(~few))} tracks"]
    for name in SUMMARY_SHOWN:  # a few columns
        values = np.asarray(summary[name], dtype=float)
        cells.append(np.char.mod("%.5g", values[few]))
        medians.append(f"{np.nanmedian(values[~few]):.5g}" if np.any(~few) else "")
    body = cells[0]
    for column in cells[1:]:  # a few columns; each row's cells joined at once
        body = np.char.add(np.char.add(body, " | "), column)
    header = ("scenario", "track", *SUMMARY_SHOWN)
    rows = [
        "| " + " | ".join(header) + " |",
        "|" + "---|" * len(header),
        "| *unit* | | " + " | ".join(units[n] for n in SUMMARY_SHOWN) + " |",
        *(f"| {line} |" for line in body.tolist()),  # a few rows of text
        "| " + " | ".join(medians) + " |",
    ]
    return "\n".join(rows)


def _plain(name: str) -> bool:
    """Whether ``name`` is a bare file name (no folder part): all a manifest may delete."""
    import pathlib

    return (
        name not in ("", ".", "..")
        and "/" not in name
        and "\\" not in name
        and pathlib.PurePath(name).name == name
    )


def _previous_files(folder: Any) -> set[str]:
    """Names of the files the previous run into ``folder`` wrote (empty without a manifest)."""
    try:
        data = json.loads((folder / MANIFEST).read_text(encoding="utf-8"))
        names = data["files"] if isinstance(data, dict) else []
    except (OSError, ValueError, KeyError):
        return set()
    if not isinstance(names, list):
        return set()
    return {n for n in names if isinstance(n, str) and _plain(n)}


_DESCRIPTIONS = {
    "drone_samples": "the survey drone's per-sample estimates (east, north, up in metres) with the "
    "true speed and curvature",
    "ev_samples": "the electric vehicle's per-sample estimates with its lap (1 to 3), the logged "
    "force, power, cumulative work, and the true speed, curvature and cumulative work",
    "ev_resampled": "points every metre along each lap, with the force",
    "tracers_samples": "the tracer particles' per-sample estimates (track: particle id) with the "
    "true speed",
    "summary": "one row per track of every scenario",
    "summary_units": "the unit of every column of `summary.csv`",
    "checks": "the key figures: estimate, truth, signed error, tolerance",
    "report": "this report",
    "manifest": "the files this run wrote, so that the next run into this folder removes those "
    "it does not write again",
}


def _listing(names: list[str], captions: dict[str, str]) -> str:
    """Markdown list of the files, each a link with what it holds (a figure: its number)."""
    lines = []
    for name in names:  # a few files
        what = captions.get(name) or _DESCRIPTIONS.get(name.split(".")[0], "")
        lines.append(f"- [`{name}`]({name}): {what}" if what else f"- [`{name}`]({name})")
    return "\n".join(lines)


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
        The files written, the files of a previous run removed, the key figures and the run
        time.

    Notes
    -----
    Writes ``report.md`` (the figures embedded); per-sample results ``drone_samples``,
    ``ev_samples``, ``tracers_samples`` and the resampled laps ``ev_resampled`` (Parquet with
    pyarrow, else CSV); ``summary.csv`` (one row per track of every scenario) and
    ``summary_units.json`` (the unit of each of its columns); ``checks.csv`` (the key figures);
    with matplotlib, the PNG figures; and ``manifest.json``, the list of these files.

    A run into a folder that holds a previous run's ``manifest.json`` deletes the files listed
    there that it did not write again (e.g. the figures, when this run draws none); it touches
    no other file of the folder.

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

    started = time.perf_counter()
    folder = pathlib.Path(out)
    folder.mkdir(parents=True, exist_ok=True)
    previous = _previous_files(folder)
    asked = figures
    if figures is None:
        try:
            import matplotlib  # noqa: F401
        except ImportError:
            figures = False
        else:
            figures = True
    files: list[Any] = []
    checks: list[Check] = []
    sections: list[_Section] = []
    for part in (_drone, _spiral, _tracers):  # three scenarios
        section = part(folder, figures, files)
        checks += section.checks
        sections.append(section)
    # One row per track of every scenario: the summary of the kinematics each section reports.
    scenarios = ("survey drone", "electric vehicle", "tracer particles")
    rows: dict[str, list[np.ndarray]] = {}
    for scenario, section in zip(scenarios, sections):  # three scenarios
        arrays = section.kinematics.summary_arrays()
        rows.setdefault("scenario", []).append(np.full(len(arrays["track"]), scenario))
        for key, value in arrays.items():
            rows.setdefault(key, []).append(np.asarray(value))
    summary = {key: np.concatenate(v) for key, v in rows.items()}
    units = summary_units(list(summary))
    files.append(_write_csv(folder / "summary.csv", summary))
    units_file = folder / "summary_units.json"
    units_file.write_text(json.dumps(units, ensure_ascii=False, indent=1) + "\n", "utf-8")
    files.append(units_file)
    files.append(
        _write_csv(
            folder / "checks.csv",
            {
                "scenario": np.array([c.scenario for c in checks]),
                "figure": np.array([c.name for c in checks]),
                "unit": np.array([c.unit for c in checks]),
                "estimated": np.array([c.estimated for c in checks]),
                "true": np.array([c.true for c in checks]),
                "error": np.array([c.error for c in checks]),
                "tolerance": np.array([c.tolerance for c in checks]),
                "relative": np.array([c.relative for c in checks]),
                "within": np.array([c.passed for c in checks]),
            },
        )
    )
    report = folder / "report.md"
    manifest = folder / MANIFEST
    names = [p.name for p in [*files, report, manifest]]
    stale = sorted(previous - set(names))
    seconds = time.perf_counter() - started
    if figures:
        plots = (
            "The figures follow each scenario's key figures, the ground truth dashed wherever "
            "the scenario knows it."
        )
    elif asked is None:
        plots = "No figures: they need matplotlib, `pip install 'osculate[plot]'`."
    else:
        plots = "No figures: this run was asked not to draw them (`figures=False`)."
    verdict = (
        "Every key figure is within its stated tolerance."
        if all(c.passed for c in checks)
        else "SOME KEY FIGURES ARE OUTSIDE THEIR TOLERANCE (marked NO)."
    )
    body = []
    captions: dict[str, str] = {}
    for section in sections:  # three scenarios, a few figures each
        body.append(section.text)
        for fig in section.figures:
            captions[fig.path.name] = f"Figure {len(captions) + 1}"
            number = captions[fig.path.name]
            body.append(f"![{fig.caption}]({fig.path.name})\n\n*{number}. {fig.caption}*\n")
    cleanup = (
        "\n\nThis run removed the files of an earlier run into this folder that it did not write "
        f"again: {', '.join(f'`{n}`' for n in stale)}."
        if stale
        else ""
    )
    reference = (
        "- Reference values drawn on a figure are the caller's, each named with its source; this "
        f"demo's\n  only one ({DEMO_LIMIT[0]} g) is invented and comes from no code or standard.\n"
        if figures
        else ""
    )
    report.write_text(
        f"""# osculate demo report

Written by `osculate demo` (osculate {__version__}) in {seconds:.1f} s. The three scenarios are
invented: generated by `osculate.demo` with fixed seeds, so the ground truth is known exactly and
every estimate below is compared with it. {verdict}
{plots}

The key-figure tables give each estimate, the truth, the error and the tolerance. The error is
signed and relative, (estimated − true) / true, so −1 % means the estimate falls 1 % short of the
truth in size; figures that are themselves error percentages (the tracer particles' first two)
give the difference estimated − true instead.

{chr(10).join(body)}
## Per-track summary

`summary.csv` has one row per track of every scenario (the survey drone's one track, the electric
vehicle's laps 1 to 3, the tracer particles by id) with every column of `osculate.SUMMARY_COLUMNS`
and then the smoothing spline's fit information; it summarizes the kinematics each section above
reports on.

Units: `osculate.SUMMARY_COLUMNS` gives every column's unit in the input's length and time units,
L and T. The three scenarios are given in metres and seconds (the drone after
`osc.geodetic_to_enu`), so here L = {DEMO_LENGTH} and T = {DEMO_TIME}. `summary_units.json` maps
each column of `summary.csv` to its unit so read: `count` for numbers of rows or intervals, `1`
for dimensionless numbers, `samples` for a width in samples, empty for the labels `scenario` and
`track`. The table shows a few of the columns, with their units in the row under the header; the
tracer particles' row holds the median of each column over the tracks.

{_summary_table(summary, units, "tracer particles")}

## Files

{_listing(names, captions)}

Per-sample tables hold the estimates on the logged rows (`flags` are bits of `osculate.Flag`:
1 STOPPED, 2 STRAIGHT, 4 EDGE, 8 GAP, 16 INVALID) and, for comparison, the truth. In
`checks.csv` the `error` and `tolerance` of a relative check are fractions (0.01 is 1 %).{cleanup}

## Cautions

- {CAUTION}
{reference}- Smoothing trades noise for bias: corners of curvature (a straight meeting a circle) are
  rounded off over the smoothing bandwidth, and estimates within about one bandwidth of a track's
  ends (EDGE) are less accurate. Check estimates against the raw path before trusting them.
""",
        encoding="utf-8",
    )
    files.append(report)
    removed = []
    for name in stale:  # the previous run's few files
        path = folder / name
        if path.is_symlink() or path.is_file():
            path.unlink(missing_ok=True)
            removed.append(path)
    manifest.write_text(
        json.dumps({"written_by": "osculate demo", "files": names}, indent=1) + "\n", "utf-8"
    )
    files.append(manifest)
    return Report(folder, report, files, checks, seconds, bool(figures), removed)
