"""Per-track summaries that only trust what the noise allows: extremes, where they occur, errors."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np
import numpy.typing as npt

from .flags import Flag

if TYPE_CHECKING:
    from .intrinsic import Kinematics

__all__ = ["COLUMNS", "group_quantile", "summarize"]

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
    "max_abs_accel_tangential": "L/T², largest |a_t| of a trusted sample",
    "max_abs_accel_tangential_at": "T",
    "max_abs_accel_tangential_se": "L/T²",
    "max_accel_normal": "L/T², largest normal (centripetal, lateral) acceleration, curved samples",
    "max_accel_normal_at": "T",
    "max_accel_normal_se": "L/T²",
    "p95_accel_normal": "L/T², 95th percentile of a_n over curved samples",
    "min_radius": "L, smallest radius of curvature of a curved sample",
    "min_radius_at": "T",
    "min_radius_se": "L",
    "p5_radius": "L, 5th percentile of the radius over curved samples",
    "max_jerk_magnitude": "L/T³, largest |r‴| (magnitude of the jerk vector) of a trusted sample",
    "max_jerk_magnitude_at": "T",
    "max_jerk_magnitude_se": "L/T³, standard error of one component of r‴ there",
    "turning_angle": "rad, ∫ω dt over moving samples (trapezoids, stopped samples skipped)",
    "stops": "number of stop intervals",
    "stopped_time": "T, total duration of the stops",
    "flagged": "samples with any flag but EDGE",
    "noise": "L, noise standard deviation of the positions seen by the estimator",
}

#: Extremes are taken over samples whose standard error is at most this multiple of the track's
#: median standard error of the same quantity (on a noisy 25 m circle with stops, the smallest
#: radius moved from 18.1 ± 4.4 m, at a slow sample next to a stop, to 22.3 ± 1.6 m).
PRECISE = 2.0

_UNTRUSTED = int(Flag.STOPPED | Flag.EDGE | Flag.GAP | Flag.INVALID | Flag.VAGUE)


def _extreme(
    code: np.ndarray, m: int, value: np.ndarray, ok: np.ndarray, largest: bool
) -> npt.NDArray[np.intp]:
    """Row of the largest (or smallest) ``value`` among rows ``ok`` of each track; −1 if none."""
    v = np.where(ok & ~np.isnan(value), value, np.nan)
    key = -v if largest else v
    key = np.where(np.isnan(key), np.inf, key)
    order = np.lexsort((key, code))
    first = np.searchsorted(code[order], np.arange(m), side="left")
    out = np.full(m, -1, np.intp)
    has = first < len(order)
    rows = order[np.minimum(first, len(order) - 1)]
    good = has & (code[rows] == np.arange(m)) & np.isfinite(key[rows])
    out[good] = rows[good]
    return out


def group_quantile(
    code: np.ndarray, m: int, value: np.ndarray, ok: np.ndarray, q: float
) -> np.ndarray:
    """Per-track quantile (linear interpolation, as numpy.quantile) over rows ``ok``."""
    keep = ok & np.isfinite(value)
    c, v = code[keep], value[keep]
    order = np.lexsort((v, c))
    c, v = c[order], v[order]
    counts = np.bincount(c, minlength=m)
    starts = np.concatenate([[0], np.cumsum(counts)[:-1]])
    pos = q * (counts - 1)
    lo = np.floor(pos).astype(np.intp)
    frac = pos - lo
    out = np.full(m, np.nan)
    has = counts > 0
    i0 = starts[has] + lo[has]
    i1 = np.minimum(i0 + 1, starts[has] + counts[has] - 1)
    out[has] = v[i0] * (1 - frac[has]) + v[i1] * frac[has]
    return out


def summarize(k: Kinematics) -> dict[str, np.ndarray]:
    """Per-track figures of :class:`osculate.Kinematics` (see :data:`COLUMNS`)."""
    with np.errstate(over="ignore", invalid="ignore"):  # |r‴| of huge coordinates may be inf
        return _summarize(k)


def _summarize(k: Kinematics) -> dict[str, np.ndarray]:
    g = k._grouping
    kern = g.to_kernel
    m = g.n_tracks
    starts = g.offsets[:-1]
    counts = np.diff(g.offsets)
    code = np.repeat(np.arange(m), counts)
    t = kern(k.t)
    flags = kern(k.flags)
    trusted = (flags & _UNTRUSTED) == 0
    curved = trusted & ((flags & int(Flag.STRAIGHT)) == 0)
    se = k.se if k.se is not None else {}
    nan_rows = np.full(len(t), np.nan)

    def kse(name: str) -> np.ndarray:
        a = se.get(name)
        if a is None:
            return nan_rows
        a = kern(np.asarray(a))
        return a if a.ndim == 1 else a[:, 0]

    out: dict[str, np.ndarray] = {"track": g.labels}
    out["start"] = t[starts] if m else np.zeros(0)
    out["end"] = t[g.offsets[1:] - 1] if m else np.zeros(0)
    out["samples"] = counts
    out["trusted"] = np.bincount(code, weights=trusted, minlength=m).astype(np.int64)
    out["curved"] = np.bincount(code, weights=curved, minlength=m).astype(np.int64)
    length = np.fmax.reduceat(kern(k.arclength), starts) if m else np.zeros(0)
    duration = t[g.offsets[1:] - 1] - t[starts] if m else np.zeros(0)
    out["length"] = length
    out["duration"] = duration
    with np.errstate(invalid="ignore", divide="ignore"):
        out["mean_speed"] = length / np.where(duration > 0, duration, np.nan)
    jerk = np.hypot.reduce(kern(k.jerk), axis=1)  # scale-safe, unlike a sum of squares
    a_t = np.abs(kern(k.accel_tangential))
    a_n, radius = kern(k.accel_normal), kern(k.radius)
    extremes = (
        ("max_speed", kern(k.speed), kse("speed"), True, trusted),
        ("max_abs_accel_tangential", a_t, kse("accel_tangential"), True, trusted),
        ("max_accel_normal", a_n, kse("accel_normal"), True, curved),
        ("min_radius", radius, kse("radius"), False, curved),
        ("max_jerk_magnitude", jerk, kse("jerk"), True, trusted),
    )
    for name, value, err, largest, ok in extremes:
        # The most extreme of many noisy values is usually the noisiest one: only samples whose
        # standard error is within PRECISE times the track's median for the quantity compete.
        typical = group_quantile(code, m, err, ok, 0.5)
        precise = ~(err > PRECISE * typical[code])  # all, where there is no standard error
        rows = _extreme(code, m, value, ok & precise, largest)
        found = rows >= 0
        r = np.where(found, rows, 0)
        out[name] = np.where(found, value[r] if len(value) else np.nan, np.nan)
        out[f"{name}_at"] = np.where(found, t[r] if len(t) else np.nan, np.nan)
        out[f"{name}_se"] = np.where(found, err[r] if len(err) else np.nan, np.nan)
    out["p95_accel_normal"] = group_quantile(code, m, a_n, curved, 0.95)
    out["p5_radius"] = group_quantile(code, m, radius, curved, 0.05)
    # ∫ω dt over segments whose ends are both moving and define ω.
    om = kern(k.angular_speed)
    moving = (flags & int(Flag.STOPPED | Flag.INVALID)) == 0
    om = np.where(moving, om, np.nan)
    seg = 0.5 * (om[1:] + om[:-1]) * np.diff(t)
    seg = np.concatenate([[0.0], np.where(np.isnan(seg), 0.0, seg)])
    seg[starts[counts > 0]] = 0.0
    out["turning_angle"] = np.bincount(code, weights=seg, minlength=m)
    stops = k.stops
    out["stops"] = np.bincount(stops.track_index, minlength=m).astype(np.int64)
    out["stopped_time"] = np.bincount(stops.track_index, weights=stops.duration, minlength=m)
    not_edge = int(Flag.STOPPED | Flag.STRAIGHT | Flag.GAP | Flag.INVALID | Flag.VAGUE)
    out["flagged"] = np.bincount(code, weights=(flags & not_edge) != 0, minlength=m).astype(
        np.int64
    )
    info = dict(k.fit_info or {})
    out["noise"] = info.pop("noise", np.full(m, np.nan))
    out.update(info)
    return out
