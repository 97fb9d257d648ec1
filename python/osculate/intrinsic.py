"""Intrinsic kinematics of sampled paths: speed, Frenet frame, curvature, torsion, a_t / a_n."""

from __future__ import annotations

import dataclasses
from typing import Any, NamedTuple, Optional

import numpy as np
import numpy.typing as npt

from . import _core
from ._validate import Grouping, as_positions, as_times, call_kernel, group_rows
from .flags import Flag

__all__ = ["Derivatives", "Kinematics", "arclength", "derivatives", "kinematics"]

F64 = npt.NDArray[np.float64]
METHODS = ("fd",)

_VECTORS = ("velocity", "acceleration", "jerk", "tangent", "normal", "binormal", "center")
_SCALARS = (
    "speed",
    "arclength",
    "curvature",
    "signed_curvature",
    "torsion",
    "radius",
    "accel_tangential",
    "accel_normal",
    "angular_speed",
    "angular_accel",
)


@dataclasses.dataclass(frozen=True, eq=False)
class Kinematics:
    """Kinematics of every sample, on the caller's rows.

    Vectors have the path's dimension ``dim`` except ``binormal``, which is always 3-D (for planar
    paths it is (0, 0, ±1)). Undefined quantities are NaN and their samples carry ``flags``.

    Attributes
    ----------
    t, position : ndarray
        The input, as float64.
    velocity, acceleration, jerk : ndarray, shape (n, dim)
        r′, r″, r‴.
    speed, arclength : ndarray, shape (n,)
        |r′| and the cumulative path length from the first finite sample of each track.
    tangent, normal : ndarray, shape (n, dim)
        Unit tangent T and principal normal N.
    binormal : ndarray, shape (n, 3)
        Binormal B = T × N.
    curvature, radius, torsion : ndarray, shape (n,)
        κ ≥ 0, ρ = 1/κ and τ.
    signed_curvature : ndarray, shape (n,)
        κ with the sign of the turn about ``up`` (left turns positive); always present for planar
        paths, NaN for 3-D paths without ``up``.
    center : ndarray, shape (n, dim)
        Centre of the osculating circle r + ρN.
    accel_tangential, accel_normal : ndarray, shape (n,)
        a_t = dv/dt and a_n = κv² ≥ 0, so that r″ = a_t T + a_n N.
    angular_speed, angular_accel : ndarray, shape (n,)
        ω = κv (rad per time unit) and dω/dt.
    flags : ndarray of uint8, shape (n,)
        Bits of :class:`osculate.Flag`.
    tracks : ndarray or None
        Track label of each row when the input had several tracks.
    method, order : str, int
        How the derivatives were estimated.
    """

    t: F64
    position: F64
    velocity: F64
    acceleration: F64
    jerk: F64
    speed: F64
    arclength: F64
    tangent: F64
    normal: F64
    binormal: F64
    curvature: F64
    signed_curvature: F64
    torsion: F64
    radius: F64
    center: F64
    accel_tangential: F64
    accel_normal: F64
    angular_speed: F64
    angular_accel: F64
    flags: npt.NDArray[np.uint8]
    tracks: Optional[np.ndarray]
    method: str
    order: int
    _grouping: Grouping = dataclasses.field(repr=False)

    @property
    def dim(self) -> int:
        """2 for planar paths, 3 for space curves."""
        return int(self.position.shape[1])

    def __len__(self) -> int:
        return len(self.t)

    def flagged(self, flag: Flag | int) -> npt.NDArray[np.bool_]:
        """Rows that carry any of the bits of ``flag``."""
        return (self.flags & int(flag)) != 0

    def to_pandas(self, index: Any = None) -> Any:
        """All per-sample results as a :class:`pandas.DataFrame`, one column per component.

        Vector components are suffixed ``_x``, ``_y`` (and ``_z``); ``index`` defaults to the row
        number.
        """
        pd = _require_pandas()
        cols: dict[str, Any] = {}
        if self.tracks is not None:
            cols["track"] = self.tracks
        cols["t"] = self.t
        for name in ("position", *_VECTORS, *_SCALARS):
            a = getattr(self, name)
            if a.ndim == 1:
                cols[name] = a
            else:
                for j, axis in enumerate("xyz"[: a.shape[1]]):
                    cols[f"{name}_{axis}"] = a[:, j]
        cols["flags"] = self.flags
        return pd.DataFrame(cols, index=index)

    def summary(self) -> Any:
        """One row per track: length, duration, speeds, accelerations, radius, jerk, turning.

        Returns
        -------
        pandas.DataFrame
            Indexed by track label, with the columns of :meth:`summary_arrays`.
        """
        pd = _require_pandas()
        data = self.summary_arrays()
        labels = data.pop("track")
        return pd.DataFrame(data, index=pd.Index(labels, name="track"))

    def summary_arrays(self) -> dict[str, np.ndarray]:
        """Per-track figures as NumPy arrays (no pandas needed).

        Returns
        -------
        dict of str to ndarray
            One element per track: ``track`` (label), ``samples``, ``length``, ``duration``,
            ``mean_speed``, ``max_speed``, ``max_abs_accel_tangential``, ``max_accel_normal``,
            ``min_radius``, ``max_abs_jerk``, ``turning_angle`` (∫ω dt in radians, trapezoids over
            segments whose ends both have a defined ω) and ``flagged`` (samples with any flag but
            EDGE). NaN samples are ignored; an entry is NaN when no sample of the track defines it.
        """
        g = self._grouping
        starts = g.offsets[:-1]
        k = g.to_kernel

        def reduce(ufunc: np.ufunc, a: np.ndarray) -> np.ndarray:
            return ufunc.reduceat(k(a), starts)

        t = k(self.t)
        om = k(self.angular_speed)
        seg = 0.5 * (om[1:] + om[:-1]) * np.diff(t)
        seg = np.concatenate([[0.0], np.where(np.isnan(seg), 0.0, seg)])
        seg[starts] = 0.0  # no segment across a track boundary
        duration = t[g.offsets[1:] - 1] - t[starts]
        length = reduce(np.fmax, self.arclength)
        counts = np.diff(g.offsets)
        not_edge = int(Flag.STOPPED | Flag.STRAIGHT | Flag.GAP | Flag.INVALID)
        return {
            "track": g.labels,
            "samples": counts,
            "length": length,
            "duration": duration,
            "mean_speed": length / np.where(duration > 0, duration, np.nan),
            "max_speed": reduce(np.fmax, self.speed),
            "max_abs_accel_tangential": reduce(np.fmax, np.abs(self.accel_tangential)),
            "max_accel_normal": reduce(np.fmax, self.accel_normal),
            "min_radius": reduce(np.fmin, self.radius),
            "max_abs_jerk": reduce(np.fmax, np.sqrt(np.sum(self.jerk**2, axis=1))),
            "turning_angle": np.add.reduceat(seg, starts),
            "flagged": np.add.reduceat(((k(self.flags) & not_edge) != 0).astype(np.int64), starts),
        }


class Derivatives(NamedTuple):
    """Time derivatives r′, r″, r‴ on the caller's rows, with the EDGE/GAP/INVALID flags."""

    velocity: F64
    acceleration: F64
    jerk: F64
    flags: npt.NDArray[np.uint8]


def _require_pandas() -> Any:
    try:
        import pandas as pd
    except ImportError as exc:  # pragma: no cover - depends on the environment
        raise ImportError(
            "this needs pandas; install it with: pip install 'osculate[pandas]'"
        ) from exc
    return pd


def _check_method(method: str) -> None:
    if method not in METHODS:
        raise _core.InputError(f"method: expected one of {METHODS}, got {method!r}")


def _threshold(name: str, value: float) -> float:
    v = float(value)
    if not np.isfinite(v) or v < 0:
        raise _core.InputError(f"{name}: must be finite and >= 0, got {value!r}")
    return v


def _up(up: Any, dim: int) -> tuple[float, float, float] | None:
    if up is None:
        return None
    u = np.asarray(up, dtype=float).reshape(-1)
    if dim != 3 or u.shape != (3,):
        raise _core.InputError(f"up: expected a 3-vector for a 3-D path, got {up!r} (dim {dim})")
    return (float(u[0]), float(u[1]), float(u[2]))


def kinematics(
    t: npt.ArrayLike,
    positions: npt.ArrayLike,
    *,
    method: str = "fd",
    order: int = 2,
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
    min_speed: float = 1e-3,
    min_curvature: float = 1e-6,
    gap_factor: float = 5.0,
    up: npt.ArrayLike | None = None,
) -> Kinematics:
    """Speed, Frenet frame, curvature, torsion and acceleration split of sampled paths.

    Parameters
    ----------
    t : array_like, shape (n,)
        Sample times, strictly increasing within each track.
    positions : array_like, shape (n, 2) or (n, 3)
        Positions. Rows with a NaN or infinite coordinate are flagged INVALID and skipped; their
        neighbours are estimated from the finite rows around them and flagged GAP.
    method : {"fd"}
        Derivative estimator: finite differences on the non-uniform grid.
    order : {2, 4}
        Accuracy order of the finite differences: 2 uses 3-point stencils for r′ and r″ and 5 points
        for r‴; 4 uses 5 and 7 points. Needs at least 3 (order 2) or 5 (order 4) samples per track.
    tracks : array_like, shape (n,), optional
        Track id of each row; rows of a track need not be contiguous (they keep their order).
    offsets : array_like of int, shape (m + 1,), optional
        Alternative to ``tracks`` for rows already grouped: track k is rows
        ``offsets[k]:offsets[k+1]``.
    min_speed : float, default 1e-3
        Samples slower than this are STOPPED (position units per time unit; 1 mm/s for metres and
        seconds).
    min_curvature : float, default 1e-6
        Samples with a smaller curvature are STRAIGHT (1/position units; a radius of 1000 km in
        metres).
    gap_factor : float, default 5.0
        A time step longer than ``gap_factor`` times the track's median step is a gap; estimates
        whose stencil spans it are flagged GAP. ``numpy.inf`` disables the check.
    up : array_like, shape (3,), optional
        For 3-D paths, the axis about which ``signed_curvature`` is measured (left turns positive),
        e.g. ``(0, 0, 1)`` for vehicles in an east-north-up frame. Planar paths always use +z.

    Returns
    -------
    Kinematics
        Per-sample arrays on the caller's rows; see :class:`Kinematics`.

    Raises
    ------
    InputError
        Mismatched shapes, times not finite or not strictly increasing, too few samples, bad
        options; the message names the argument, the track and the row.
    TypeError
        Non-real input (boolean, complex, object, string, datetime).

    Notes
    -----
    Derivatives come from finite differences with weights by Fornberg's algorithm (B. Fornberg,
    Math. Comp. 51 (1988) 699–706), centred in the interior and one-sided of the same width at the
    ends (flagged EDGE). With c = r′ × r″ and v = |r′|: T = r′/v, B = c/|c|, N = B × T,
    κ = |c|/v³, τ = (c·r‴)/|c|², a_t = r′·r″/v, a_n = κv², ω = κv. Arc length is the
    polyline length.

    Finite differences amplify noise by 1/h² in r″ and 1/h³ in r‴: on noisy data, curvature and
    especially torsion and jerk need a smoothing estimator.

    Examples
    --------
    A circle of radius 2 travelled at 3 m/s: κ = 1/2 and a_n = v²/r = 4.5.

    >>> import numpy as np
    >>> import osculate as osc
    >>> t = np.linspace(0.0, 4.0, 401)
    >>> xy = 2.0 * np.column_stack([np.cos(1.5 * t), np.sin(1.5 * t)])
    >>> k = osc.kinematics(t, xy)
    >>> round(float(k.curvature[200]), 4), round(float(k.accel_normal[200]), 3)
    (0.5, 4.5)

    A straight line is flagged STRAIGHT, with zero curvature and an undefined normal:

    >>> k = osc.kinematics([0.0, 1.0, 2.0], [[0.0, 0.0], [1.0, 1.0], [2.0, 2.0]])
    >>> k.curvature.tolist(), bool(k.flagged(osc.Flag.STRAIGHT).all())
    ([0.0, 0.0, 0.0], True)
    >>> bool(np.isnan(k.normal).all())
    True

    A NaN row is kept, flagged INVALID, and does not poison its neighbours:

    >>> xy = [[0, 0], [1, 0.1], [np.nan, 0], [3, 0.9], [4, 1.6], [5, 2.5]]
    >>> k = osc.kinematics([0, 1, 2, 3, 4, 5], xy)
    >>> osc.Flag(int(k.flags[2])).name, bool(np.isfinite(k.speed[3]))
    ('INVALID', True)
    """
    _check_method(method)
    tt = as_times(t)
    x = as_positions(positions, len(tt))
    g = group_rows(len(tt), tracks, offsets)
    raw = call_kernel(
        g,
        _core.fd_kinematics,
        g.to_kernel(tt),
        g.to_kernel(x),
        g.offsets,
        order=int(order),
        min_speed=_threshold("min_speed", min_speed),
        min_curvature=_threshold("min_curvature", min_curvature),
        gap_factor=float(gap_factor),
        up=_up(up, x.shape[1]),
    )
    res = {name: g.to_caller(a) for name, a in raw.items()}
    track_ids = None if tracks is None and offsets is None else g.labels[_row_codes(g)]
    return Kinematics(
        t=tt,
        position=x,
        tracks=track_ids,
        method=method,
        order=int(order),
        _grouping=g,
        **res,
    )


def _row_codes(g: Grouping) -> npt.NDArray[np.intp]:
    codes = np.repeat(np.arange(g.n_tracks), np.diff(g.offsets))
    return g.to_caller(codes)


def derivatives(
    t: npt.ArrayLike,
    positions: npt.ArrayLike,
    *,
    method: str = "fd",
    order: int = 2,
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
    gap_factor: float = 5.0,
) -> Derivatives:
    """Time derivatives r′, r″ and r‴ of sampled paths.

    Parameters
    ----------
    t, positions, method, order, tracks, offsets, gap_factor
        As in :func:`kinematics`.

    Returns
    -------
    Derivatives
        ``velocity``, ``acceleration``, ``jerk`` of shape (n, dim) and ``flags`` (EDGE, GAP,
        INVALID bits only).

    Notes
    -----
    Finite differences with Fornberg weights (B. Fornberg, Math. Comp. 51 (1988) 699–706). This
    runs the kinematics kernel and keeps the derivatives, so it costs about as much as
    :func:`kinematics`.

    Examples
    --------
    Exact on quadratics, even on uneven times:

    >>> import numpy as np
    >>> import osculate as osc
    >>> t = np.array([0.0, 0.3, 1.0, 1.2, 2.0])
    >>> d = osc.derivatives(t, np.column_stack([t**2, 3 * t]))
    >>> np.allclose(d.velocity[:, 0], 2 * t), np.allclose(d.acceleration[:, 0], 2.0)
    (True, True)
    """
    k = kinematics(
        t,
        positions,
        method=method,
        order=order,
        tracks=tracks,
        offsets=offsets,
        gap_factor=gap_factor,
    )
    keep = np.uint8(Flag.EDGE | Flag.GAP | Flag.INVALID)
    return Derivatives(k.velocity, k.acceleration, k.jerk, k.flags & keep)


def arclength(
    t: npt.ArrayLike,
    positions: npt.ArrayLike,
    *,
    method: str = "fd",
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
) -> F64:
    """Cumulative arc length of each sample from the start of its track.

    Parameters
    ----------
    t, positions, method, tracks, offsets
        As in :func:`kinematics`; ``t`` is only checked (finite, strictly increasing per track).

    Returns
    -------
    ndarray, shape (n,)
        Path length from the first finite sample of the track; NaN on rows with a non-finite
        position (the chord across them is counted).

    Notes
    -----
    ``"fd"`` measures the polyline through the samples, which underestimates the length of a curved
    path by O(h²) (for a circle, the inscribed-polygon error).

    Examples
    --------
    >>> import osculate as osc
    >>> osc.arclength([0, 1, 2, 3], [[0, 0], [3, 4], [3, 4.5], [6, 8.5]]).tolist()
    [0.0, 5.0, 5.5, 10.5]
    """
    _check_method(method)
    tt = as_times(t)
    x = as_positions(positions, len(tt))
    g = group_rows(len(tt), tracks, offsets)
    s = call_kernel(g, _core.polyline_arclength, g.to_kernel(tt), g.to_kernel(x), g.offsets)
    return g.to_caller(s)
