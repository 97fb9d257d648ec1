"""Section 1 of the report: the survey drone's GPS log against its flight plan."""

from __future__ import annotations

from typing import Any

import numpy as np

from ..demo import survey_flight
from ._checks import Check, Section, check_table
from ._figures import Figure, overlay_truth, save_figure
from ._tables import (
    flips,
    kinematics_columns,
    middle_rows,
    smoothing_of,
    undefined,
    write_table,
)

__all__ = ["drone_section"]


def drone_section(out: Any, figs: bool, files: list[Any]) -> Section:
    from ..flags import Flag
    from ..geodesy import geodetic_to_enu
    from ..intrinsic import kinematics

    f = survey_flight()
    enu = geodetic_to_enu(f.lat, f.lon, f.height)
    opts: dict[str, Any] = {"method": "smooth", "up": (0.0, 0.0, 1.0)}
    k = kinematics(f.t, enu, frame="rotation-minimizing", **opts)
    frenet = kinematics(f.t, enu, **opts)
    one = np.ones(len(f.t) - 1, dtype=bool)
    legs = (f.turn < 0) & (f.distance > f.altitude + 10) & (np.abs(f.speed - f.cruise_speed) < 1e-9)
    in_turns = middle_rows(f.turn >= 0, f.turn, 0.5)
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
    cols = kinematics_columns(k, ("east", "north", "up"))
    cols.update(true_speed=f.speed, true_curvature=f.curvature)
    files.append(write_table(out / "drone_samples", cols))
    stopped = k.flagged(Flag.STOPPED)
    leg_pairs = legs[1:] & legs[:-1]
    frenet_gone = undefined(frenet.normal, legs)
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
smoothing spline, λ* = {smoothing_of(k)[0]:.3g} chosen by generalized cross-validation for
positions to accelerations (r‴ from a second fit tuned for the third derivative), standard
errors from the spline's exact weights, STOPPED and STRAIGHT when speed or curvature is within
3 standard errors of zero. The summary's smallest radius is
{summary["min_radius"][0]:.1f} ± {summary["min_radius_se"][0]:.1f} m
(at t = {summary["min_radius_at"][0]:.1f} s; 5th percentile {summary["p5_radius"][0]:.1f} m).

{check_table(checks)}

Stops found: {_stops_text(k)}.

Flags: {int(stopped.sum())} samples STOPPED (not moving within the noise: at the start, at the
top of the climb, in the hover and at the end), {int(k.flagged(Flag.GAP).sum())} GAP (the outage),
{int(k.flagged(Flag.EDGE).sum())} EDGE. Frames: on the straight legs the curvature is within the
noise of zero (STRAIGHT), so the Frenet normal is undefined at {frenet_gone} of {int(legs.sum())}
leg samples and flips {flips(frenet.normal, leg_pairs)} times between consecutive samples where it
is defined; the rotation-minimizing frame is undefined at {undefined(k.normal, legs)} of them and
flips {flips(k.normal, leg_pairs & one)} times.
Smoothing rounds off the corners of curvature where a leg meets a turn, so the radius is read in
the middle half of each turn.
"""
    figures: list[Figure] = []
    if figs:
        from .. import plot

        names = ("east", "north", "up")
        p = plot.path(
            k,
            color="speed",
            frames_every=100.0,
            axis_names=names,
            title="Survey drone: logged path, coloured by estimated speed",
        )
        figures.append(
            Figure(
                save_figure(p, out / "drone_path.png"),
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
        overlay_truth(p.axes[0], f.t, f.speed, "true v")
        overlay_truth(p.axes[1], f.t, f.accel_tangential, "true a_t")
        overlay_truth(p.axes[2], f.t, f.speed**2 * f.curvature, "true a_n = v²κ")
        figures.append(
            Figure(
                save_figure(p, out / "drone_profile.png"),
                "Survey drone: estimated speed, a_t and a_n against time with 95 % bands, the "
                "truth dashed; shaded: flagged samples.",
            )
        )
        files += [fig.path for fig in figures]
    return Section(checks, text, k, figures)


def _stops_text(k: Any) -> str:
    """Describe the stop intervals of one track as text."""
    st = k.stops
    if len(st) == 0:
        return "none"
    return "; ".join(
        f"{a:.1f}–{b:.1f} s ({d:.1f} s, {n} samples)"
        for a, b, d, n in zip(st.start, st.end, st.duration, st.samples)
    )
