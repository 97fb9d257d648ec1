"""Turns and speed changes: one row per event of a track, from its per-sample kinematics.

The rules are the kernel's (``src/turns.rs``): hysteresis on the significance of the signed
curvature (or of the tangential acceleration), merging across short blips, stopped samples
transparent inside a turn, and the smallest radius of a turn from a least-squares circle through
the measured positions of its core.
"""

from __future__ import annotations

import dataclasses
from typing import TYPE_CHECKING, Any

import numpy as np
import numpy.typing as npt

from . import _core
from ._validate import as_int, as_real

if TYPE_CHECKING:
    from .intrinsic import Kinematics

__all__ = ["SpeedChanges", "Turns", "find_speed_changes", "find_turns"]

CAUTION = (
    "Turn radii and lateral accelerations estimated from logged data are indicative: local "
    "codes and licensed engineers decide whether a road, rail, ride or vehicle is acceptable."
)


class _Table:
    """Column arrays of equal length, one row per event."""

    start: npt.NDArray[np.float64]

    def __len__(self) -> int:
        return len(self.start)

    def columns(self) -> dict[str, np.ndarray]:
        """Every attribute as a column, in order."""
        return {f.name: getattr(self, f.name) for f in dataclasses.fields(self)}  # type: ignore[arg-type]

    def to_pandas(self) -> Any:
        """Return the table as a :class:`pandas.DataFrame`, one row per event."""
        import pandas as pd

        return pd.DataFrame(self.columns())


@dataclasses.dataclass(frozen=True)
class Turns(_Table):
    """One row per turn, ordered by track and time (see :meth:`osculate.Kinematics.turns`).

    Attributes
    ----------
    track : ndarray
        Track label.
    start, end : ndarray of float
        Times of the first and last sample of the turn (its flanks included).
    start_length, end_length : ndarray of float
        Arc length along the track there.
    direction : ndarray of str
        ``"left"`` or ``"right"`` (about ``up``).
    heading_change : ndarray of float
        Signed change of heading, degrees (left positive), ∫κ ds over the turn.
    min_radius, min_radius_se : ndarray of float
        Radius of the least-squares circle through the measured positions of the turn's core
        (samples whose curvature is at least ``core`` times the peak) and its standard error;
        NaN when the core has fewer than 4 samples.
    core_samples : ndarray of int
        Samples of that core.
    peak_radius, peak_at : ndarray of float
        1 / the largest mean curvature over a short stretch, and the time of its middle sample
        (the smoothed figure, biased low on short turns: compare with ``min_radius``).
    max_accel_normal, max_accel_normal_at : ndarray of float
        Largest mean normal (lateral) acceleration over a short stretch of trusted samples, and
        when.
    speed_in, speed_out, mean_speed : ndarray of float
        Speed at the first and last sample, and length / duration.
    samples, flagged : ndarray of int
        Samples in the turn, and how many carry a flag other than EDGE.
    first_row, last_row : ndarray of int
        Caller's rows (0-based positions) of the first and last sample.
    """

    track: np.ndarray
    start: npt.NDArray[np.float64]
    end: npt.NDArray[np.float64]
    start_length: npt.NDArray[np.float64]
    end_length: npt.NDArray[np.float64]
    direction: npt.NDArray[np.str_]
    heading_change: npt.NDArray[np.float64]
    min_radius: npt.NDArray[np.float64]
    min_radius_se: npt.NDArray[np.float64]
    core_samples: npt.NDArray[np.int64]
    peak_radius: npt.NDArray[np.float64]
    peak_at: npt.NDArray[np.float64]
    max_accel_normal: npt.NDArray[np.float64]
    max_accel_normal_at: npt.NDArray[np.float64]
    speed_in: npt.NDArray[np.float64]
    speed_out: npt.NDArray[np.float64]
    mean_speed: npt.NDArray[np.float64]
    samples: npt.NDArray[np.int64]
    flagged: npt.NDArray[np.int64]
    first_row: npt.NDArray[np.int64]
    last_row: npt.NDArray[np.int64]


@dataclasses.dataclass(frozen=True)
class SpeedChanges(_Table):
    """One row per marked speed-up or slow-down (see :meth:`osculate.Kinematics.speed_changes`).

    Attributes
    ----------
    track : ndarray
        Track label.
    kind : ndarray of str
        ``"speed-up"`` or ``"slow-down"``.
    start, end, duration : ndarray of float
        Times of the first and last sample, and their difference.
    start_length, end_length : ndarray of float
        Arc length along the track there.
    speed_before, speed_after : ndarray of float
        Speed at the first and last sample.
    peak_accel, peak_at : ndarray of float
        Largest |a_t| in it, and when.
    mean_accel : ndarray of float
        (speed_after − speed_before) / duration.
    samples : ndarray of int
        Samples in it.
    first_row, last_row : ndarray of int
        Caller's rows (0-based positions) of the first and last sample.
    """

    track: np.ndarray
    kind: npt.NDArray[np.str_]
    start: npt.NDArray[np.float64]
    end: npt.NDArray[np.float64]
    duration: npt.NDArray[np.float64]
    start_length: npt.NDArray[np.float64]
    end_length: npt.NDArray[np.float64]
    speed_before: npt.NDArray[np.float64]
    speed_after: npt.NDArray[np.float64]
    peak_accel: npt.NDArray[np.float64]
    peak_at: npt.NDArray[np.float64]
    mean_accel: npt.NDArray[np.float64]
    samples: npt.NDArray[np.int64]
    first_row: npt.NDArray[np.int64]
    last_row: npt.NDArray[np.int64]


def _plane(k: Kinematics, up: Any) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Kernel-order signed curvature, positions and velocities in the plane of the turns."""
    g = k.grouping
    kern = g.to_kernel
    c = np.ascontiguousarray
    if k.dim == 2:
        return c(kern(k.signed_curvature)), c(kern(k.position)), c(kern(k.velocity))
    u = np.asarray((0.0, 0.0, 1.0) if up is None else up, dtype=np.float64)
    if u.shape != (3,) or not np.all(np.isfinite(u)) or not np.linalg.norm(u) > 0:
        raise _core.InputError(f"up: expected a non-zero 3-vector, got {up!r}")
    u = u / np.linalg.norm(u)
    # An orthonormal basis (e1, e2) of the plane normal to up, right-handed with up.
    helper = np.array([1.0, 0.0, 0.0]) if abs(u[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
    e1 = np.cross(helper, u)
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(u, e1)
    v, a = kern(k.velocity), kern(k.acceleration)
    side = np.sign(np.cross(v, a) @ u)  # left of the direction of motion about up: positive
    kappa = np.where(side == 0, 0.0, side) * kern(k.curvature)
    x = kern(k.position)
    return c(kappa), c(np.column_stack([x @ e1, x @ e2])), c(np.column_stack([v @ e1, v @ e2]))


#: Half-width of the stretches whose means give a turn's peak (``peak_radius``,
#: ``max_accel_normal``), in smoothing bandwidths: short, so the peak stays where the turn is
#: tightest (a turn's own radius is the circle through its core, ``min_radius``).
PEAK_BANDWIDTHS = 1.5


def _half(k: Kinematics) -> int:
    """Half-width of the stretches for peaks (:data:`PEAK_BANDWIDTHS`)."""
    band = np.asarray((k.fit_info or {}).get("bandwidth", [np.nan]), dtype=float)
    h = np.rint(PEAK_BANDWIDTHS * np.nanmedian(band)) if np.isfinite(band).any() else 1
    return int(max(h, 1))


def _caller_rows(k: Kinematics, rows: np.ndarray) -> npt.NDArray[np.int64]:
    return k.grouping.caller_rows(rows)


def find_turns(
    k: Kinematics,
    *,
    up: npt.ArrayLike | None = None,
    significance: float = 3.0,
    hold: float = 1.0,
    min_heading: float = 10.0,
    merge: int = 5,
    core: float = 0.75,
) -> Turns:
    """Return the turns of every track of ``k``; see :meth:`osculate.Kinematics.turns`.

    Examples
    --------
    Half a circle of radius 15 driven to the right, between two straights:

    >>> import numpy as np
    >>> import osculate as osc
    >>> from osculate.turns import find_turns
    >>> s = np.arange(0.0, 80.0 + 15 * np.pi, 0.5)
    >>> a = np.clip((s - 40.0) / 15.0, 0.0, np.pi)
    >>> x = np.where(s < 40, s, 40 + 15 * np.sin(a)) - np.clip(s - 40 - 15 * np.pi, 0, None)
    >>> y = -15 * (1 - np.cos(a))
    >>> turns = find_turns(osc.kinematics(s / 5.0, np.column_stack([x, y]), method="spline"))
    >>> t0 = turns.to_pandas().iloc[0]
    >>> str(t0.direction), round(float(t0.heading_change)), round(float(t0.min_radius), 2)
    ('right', -180, 15.0)
    """
    g = k.grouping
    kern = g.to_kernel
    kappa, xy, vxy = _plane(k, up)
    se = (k.se or {}).get("curvature")
    raw = _core.find_turns(
        kern(k.t),
        kern(k.arclength),
        kappa,
        None if se is None else np.ascontiguousarray(kern(se)),
        kern(k.speed),
        kern(k.accel_normal),
        kern(k.accel_tangential),
        kern(k.flags),
        xy,
        vxy,
        g.offsets,
        z_on=as_real("significance", significance),
        z_off=as_real("hold", hold),
        min_curvature=1e-6,
        merge_samples=as_int("merge", merge, 0, 2**31),
        min_heading=np.radians(as_real("min_heading", min_heading)),
        core=as_real("core", core),
        half=_half(k),
    )
    t, s = kern(k.t), kern(k.arclength)
    first, last = raw["first"], raw["last"]
    duration = t[last] - t[first]
    with np.errstate(invalid="ignore", divide="ignore"):
        mean_speed = (s[last] - s[first]) / np.where(duration > 0, duration, np.nan)
    return Turns(
        track=g.labels[raw["track"]],
        start=t[first],
        end=t[last],
        start_length=s[first],
        end_length=s[last],
        direction=np.where(raw["direction"] > 0, "left", "right"),
        heading_change=np.degrees(raw["heading"]),
        min_radius=raw["radius"],
        min_radius_se=raw["radius_se"],
        core_samples=raw["core"],
        peak_radius=raw["peak_radius"],
        peak_at=raw["peak_at"],
        max_accel_normal=raw["accel_normal"],
        max_accel_normal_at=raw["accel_normal_at"],
        speed_in=raw["speed_in"],
        speed_out=raw["speed_out"],
        mean_speed=mean_speed,
        samples=(last - first + 1).astype(np.int64),
        flagged=raw["flagged"],
        first_row=_caller_rows(k, first),
        last_row=_caller_rows(k, last),
    )


def find_speed_changes(
    k: Kinematics,
    *,
    threshold: float = 0.5,
    release: float | None = None,
    significance: float = 3.0,
    hold: float = 1.0,
    min_samples: int = 3,
) -> SpeedChanges:
    """Return the speed changes of every track; see :meth:`osculate.Kinematics.speed_changes`.

    Examples
    --------
    Braking from 20 m/s to rest at 4 m/s² on a straight line:

    >>> import numpy as np
    >>> import osculate as osc
    >>> from osculate.turns import find_speed_changes
    >>> t = np.linspace(0.0, 8.0, 161)
    >>> v = np.maximum(20.0 - 4.0 * np.maximum(t - 2.0, 0.0), 0.0)
    >>> x = np.concatenate([[0.0], np.cumsum(0.5 * (v[1:] + v[:-1]) * np.diff(t))])
    >>> k = osc.kinematics(t, np.column_stack([x, np.zeros_like(x)]))
    >>> ch = find_speed_changes(k)
    >>> str(ch.kind[0]), round(float(ch.peak_accel[0]), 1), round(float(ch.speed_before[0]))
    ('slow-down', 4.0, 20)
    """
    g = k.grouping
    kern = g.to_kernel
    on = as_real("threshold", threshold)
    off = on / 2 if release is None else as_real("release", release)
    se = (k.se or {}).get("accel_tangential")
    raw = _core.find_speed_changes(
        kern(k.t),
        kern(k.arclength),
        kern(k.speed),
        kern(k.accel_tangential),
        None if se is None else np.ascontiguousarray(kern(se)),
        kern(k.flags),
        g.offsets,
        accel_on=on,
        accel_off=off,
        z_on=as_real("significance", significance),
        z_off=as_real("hold", hold),
        min_samples=as_int("min_samples", min_samples, 1, 2**31),
    )
    t, s = kern(k.t), kern(k.arclength)
    first, last = raw["first"], raw["last"]
    duration = t[last] - t[first]
    with np.errstate(invalid="ignore", divide="ignore"):
        mean_accel = (raw["speed_after"] - raw["speed_before"]) / np.where(
            duration > 0, duration, np.nan
        )
    return SpeedChanges(
        track=g.labels[raw["track"]],
        kind=np.where(raw["direction"] > 0, "speed-up", "slow-down"),
        start=t[first],
        end=t[last],
        duration=duration,
        start_length=s[first],
        end_length=s[last],
        speed_before=raw["speed_before"],
        speed_after=raw["speed_after"],
        peak_accel=raw["peak"],
        peak_at=raw["peak_at"],
        mean_accel=mean_accel,
        samples=(last - first + 1).astype(np.int64),
        first_row=_caller_rows(k, first),
        last_row=_caller_rows(k, last),
    )
