"""Per-track summaries that only trust what the noise allows: extremes, where they occur, errors."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from . import _core

if TYPE_CHECKING:
    from .intrinsic import Kinematics

__all__ = ["COLUMNS", "summarize"]

#: Every summary column with its unit ("L" and "T" stand for the input's length and time units).
COLUMNS: dict[str, str] = {
    "start": "T, time of the first sample",
    "end": "T, time of the last sample",
    "samples": "rows of the track",
    "trusted": "samples with no flag but STRAIGHT (speed, |a_t| and |r‴| extremes use these)",
    "curved": "samples with no flag at all (a_n and radius extremes use these)",
    "length": "L, path length",
    "duration": "T, last minus first time",
    "mean_speed": "L/T, length / duration",
    "max_speed": "L/T, largest speed of a trusted sample (extremes: among samples whose standard "
    "error is at most twice the track's median for the quantity)",
    "max_speed_at": "T, time of max_speed",
    "max_speed_se": "L/T, standard error of max_speed",
    "max_abs_accel_tangential": "L/T², largest mean |a_t| over a stretch of 2h + 1 trusted "
    "samples (h about 1.5 smoothing bandwidths, at most 8; 1 for estimators without one)",
    "max_abs_accel_tangential_at": "T",
    "max_abs_accel_tangential_se": "L/T²",
    "max_accel_normal": "L/T², largest mean normal (centripetal, lateral) acceleration over a "
    "stretch of 2h + 1 curved samples",
    "max_accel_normal_at": "T",
    "max_accel_normal_se": "L/T²",
    "p95_accel_normal": "L/T², 95th percentile of a_n over curved samples",
    "min_radius": "L, 1 / the largest mean curvature over a stretch of 2h + 1 curved samples",
    "min_radius_at": "T, time of the middle sample of the stretch (the same for every extreme)",
    "min_radius_se": "L",
    "p5_radius": "L, 5th percentile of the radius over curved samples",
    "max_jerk_magnitude": "L/T³, largest mean |r‴| (magnitude of the jerk vector) over a "
    "stretch of 2h + 1 trusted samples",
    "max_jerk_magnitude_at": "T",
    "max_jerk_magnitude_se": "L/T³, standard error of one component of r‴ there (extremes: "
    "the mean standard error over the stretch, an upper bound for that of the mean)",
    "turning_angle": "rad, ∫ω dt over moving samples (trapezoids, stopped samples skipped)",
    "stops": "number of stop intervals",
    "stopped_time": "T, total duration of the stops",
    "flagged": "samples with any flag but EDGE",
    "noise": "L, noise standard deviation of the positions seen by the estimator",
}

#: Half-width of the stretches whose means compete for an extreme, in bandwidths of the
#: smoothing spline's equivalent kernel (its main lobe spans about ±3.3 bandwidths for the cubic
#: spline, Silverman 1984), at most ``MAX_HALF`` = 8 samples of the kernel; estimators without a
#: bandwidth use stretches of three samples, which cancel alternating ringing. The extreme of
#: many noisy means is biased by their noise: on the invented routes of ``tests/test_turns.py``
#: (18 tracks, radii 5–40 m, 3–14 m/s, 3–5 cm noise) the smallest radius was 4–9 % low with 1.5
#: bandwidths, and is −7 % to +5 % with 3 (on a 45 m turn at 14 m/s: −12 % → −6 %).
STRETCH_BANDWIDTHS = 3.0


def _half_widths(k: Kinematics, m: int) -> np.ndarray:
    band = (k.fit_info or {}).get("bandwidth")
    if band is None:
        return np.ones(m, np.int64)
    h = np.rint(STRETCH_BANDWIDTHS * np.asarray(band, dtype=float))
    return np.where(np.isfinite(h), np.maximum(h, 1), 1).astype(np.int64)


def summarize(k: Kinematics) -> dict[str, np.ndarray]:
    """Per-track figures of :class:`osculate.Kinematics` (see :data:`COLUMNS`)."""
    with np.errstate(over="ignore", invalid="ignore"):  # |r‴| of huge coordinates may be inf
        return _summarize(k)


def _summarize(k: Kinematics) -> dict[str, np.ndarray]:
    g = k.grouping
    kern = g.to_kernel
    m = g.n_tracks
    starts = g.offsets[:-1]
    t = kern(k.t)
    se = k.se if k.se is not None else {}

    def kse(name: str) -> np.ndarray | None:
        a = se.get(name)
        if a is None:
            return None
        a = kern(np.asarray(a))
        return np.ascontiguousarray(a if a.ndim == 1 else a[:, 0])

    figures = _core.summarize(
        t,
        kern(k.flags),
        kern(k.speed),
        kern(k.accel_tangential),
        kern(k.accel_normal),
        kern(k.curvature),
        kern(k.angular_speed),
        kern(k.arclength),
        np.ascontiguousarray(kern(k.jerk)),
        [kse(q) for q in ("speed", "accel_tangential", "accel_normal", "curvature", "jerk")],
        g.offsets,
        _half_widths(k, m),
    )
    out: dict[str, np.ndarray] = {"track": g.labels}
    out["start"] = t[starts] if m else np.zeros(0)
    out["end"] = t[g.offsets[1:] - 1] if m else np.zeros(0)
    out["samples"] = np.diff(g.offsets)
    for name in ("trusted", "curved", "length", "duration"):
        out[name] = figures[name]
    duration = figures["duration"]
    with np.errstate(invalid="ignore", divide="ignore"):
        out["mean_speed"] = figures["length"] / np.where(duration > 0, duration, np.nan)
    for name, q in (
        ("max_speed", "speed"),
        ("max_abs_accel_tangential", "accel_tangential"),
        ("max_accel_normal", "accel_normal"),
    ):
        for suffix in ("", "_at", "_se"):
            out[name + suffix] = figures[q + suffix]
    kappa, kappa_se = figures["curvature"], figures["curvature_se"]
    with np.errstate(invalid="ignore", divide="ignore"):
        out["min_radius"] = 1.0 / kappa
        out["min_radius_at"] = figures["curvature_at"]
        out["min_radius_se"] = kappa_se / kappa**2  # first-order propagation of 1/κ
    out["p95_accel_normal"] = figures["p95_accel_normal"]
    out["p5_radius"] = figures["p5_radius"]
    for suffix in ("", "_at", "_se"):
        out["max_jerk_magnitude" + suffix] = figures["jerk" + suffix]
    out["turning_angle"] = figures["turning_angle"]
    stops = k.stops
    out["stops"] = np.bincount(stops.track_index, minlength=m).astype(np.int64)
    out["stopped_time"] = np.bincount(stops.track_index, weights=stops.duration, minlength=m)
    out["flagged"] = figures["flagged"]
    info = dict(k.fit_info or {})
    out["noise"] = info.pop("noise", np.full(m, np.nan))
    # The documented order (COLUMNS), then the estimator's own choices.
    ordered = {"track": out.pop("track"), **{c: out.pop(c) for c in COLUMNS if c in out}}
    ordered.update(out)
    ordered.update(info)
    return ordered
