"""Fit once, evaluate anywhere: paths fitted to sampled tracks."""

from __future__ import annotations

from typing import Any

import numpy as np
import numpy.typing as npt

from . import _core
from ._estimators import EstimatorOptions, fit_core
from ._results import OUTPUTS, Kinematics, assemble
from ._validate import (
    Grouping,
    as_positions,
    as_real,
    as_times,
    call_kernel,
    group_rows,
    kernel_times,
    ticks_of,
)
from .intrinsic import up_vector

__all__ = ["Path", "fit"]

F64 = npt.NDArray[np.float64]


class Path:
    """Fitted tracks, evaluable at any time with derivatives up to the third.

    Built by :func:`fit`. Outside a track's time range the end pieces extrapolate (splines) or the
    end windows are used (local fits); treat such values with care.

    Attributes
    ----------
    tracks : ndarray
        Track labels, in sorted order.
    dim : int
        2 or 3.
    fit_info : dict of str to ndarray
        Per track: ``smoothing`` (λ*), ``edf``, ``criterion``, ``window`` (NaN where a value does
        not apply); see :func:`osculate.kinematics`.
    """

    def __init__(
        self,
        fitted: _core.FittedPaths,
        g: Grouping,
        opts: EstimatorOptions,
        origin: tuple[npt.NDArray[np.int64], float] | None = None,
    ) -> None:
        self._fitted = fitted
        self._g = g
        self._opts = opts
        # Integer or datetime times: each track's first time (ticks) and ticks per time unit;
        # the fits are in time since it, so queries are shifted the same way.
        self._origin = origin
        self.tracks: np.ndarray = g.labels
        self.dim: int = fitted.dim
        self.fit_info: dict[str, np.ndarray] = fitted.info()

    def __repr__(self) -> str:
        return (
            f"<osculate.Path: {len(self.tracks)} track(s), {self.dim}-D, {self._opts.describe()}>"
        )

    def _queries(self, t: npt.ArrayLike, track: Any) -> tuple[F64, Grouping, F64]:
        tq = as_times(np.reshape(np.asarray(t), -1) if np.ndim(t) == 0 else t, "t")
        if track is None:
            if len(self.tracks) != 1:
                raise _core.InputError(
                    f"track: this path holds {len(self.tracks)} tracks; say which one per query"
                )
            codes = np.zeros(len(tq), dtype=np.intp)
            # One track, queries in the caller's order: nothing to group.
            g = Grouping(np.array([0, len(tq)], dtype=np.int64), None, self.tracks, codes=codes)
        else:
            ids = np.asarray(track)
            ids = np.broadcast_to(ids, tq.shape) if ids.ndim == 0 else ids
            if ids.shape != tq.shape:
                raise _core.InputError(f"track: expected one label per time, got shape {ids.shape}")
            codes = np.searchsorted(self.tracks, ids)
            bad = (codes >= len(self.tracks)) | (
                self.tracks[np.minimum(codes, len(self.tracks) - 1)] != ids
            )
            if bad.any():
                row = int(np.flatnonzero(bad)[0])
                label = ids[row].item() if isinstance(ids[row], np.generic) else ids[row]
                raise _core.InputError(f"track: row {row}: unknown track {label!r}")
            g = Grouping.from_codes(codes, self.tracks)
        order = np.arange(len(tq)) if g.order is None else g.order
        if self._origin is None:
            return tq, g, np.ascontiguousarray(tq[order])
        first, per_unit = self._origin
        code = codes[order]
        ticks = ticks_of(t if np.ndim(t) else np.reshape(np.asarray(t), -1))
        if ticks is not None and ticks[1] == per_unit:  # exact: differences in int64
            rel = (ticks[0][order] - first[code]).astype(np.float64) / per_unit
        else:
            rel = tq[order] - first[code].astype(np.float64) / per_unit
        return tq, g, np.ascontiguousarray(rel)

    def __call__(self, t: npt.ArrayLike, nu: int = 0, *, track: Any = None) -> F64:
        """Position (``nu=0``) or its ``nu``-th time derivative (up to 3) at times ``t``.

        Parameters
        ----------
        t : array_like
            Times.
        nu : {0, 1, 2, 3}
            Derivative order.
        track : label or array_like, optional
            Track of each time (a single label applies to all); needed when the path holds
            several tracks.

        Returns
        -------
        ndarray, shape (len(t), dim)
        """
        if isinstance(nu, (bool, np.bool_)) or not isinstance(nu, (int, np.integer)):
            raise TypeError(f"nu: expected an integer, got {nu!r}")
        if not 0 <= int(nu) <= 3:
            raise _core.InputError(f"nu: must be 0, 1, 2 or 3, got {nu}")
        nu = int(nu)
        _, g, tk = self._queries(t, track)
        out = call_kernel(g, self._fitted.evaluate, tk, g.offsets, nu)
        return g.to_caller(out)

    def kinematics(
        self,
        t: npt.ArrayLike,
        *,
        track: Any = None,
        min_speed: float = 1e-3,
        min_curvature: float = 1e-6,
        up: npt.ArrayLike | None = None,
    ) -> Kinematics:
        """Kinematics at any times, as :func:`osculate.kinematics` returns at the samples.

        ``position`` holds the fitted positions and ``arclength`` the length from the track's
        first sample (negative before it). No EDGE or GAP flags are set. Lateral acceleration,
        jerk and radius are indicative: local codes and licensed engineers decide whether a
        road, rail, ride or vehicle is acceptable.
        """
        tq, g, tk = self._queries(t, track)
        raw = call_kernel(
            g,
            self._fitted.kinematics_at,
            tk,
            g.offsets,
            options={
                "min_speed": as_real("min_speed", min_speed),
                "min_curvature": as_real("min_curvature", min_curvature),
                "up": up_vector(up, self.dim),
                "outputs": [*OUTPUTS, "position"],
            },
        )
        pos = g.to_caller(raw.pop("position"))
        opts = self._opts
        return assemble(
            tq, pos, g, raw, opts.method, opts.describe(), self.fit_info, grouped=track is not None
        )

    def arclength(self, t: npt.ArrayLike, *, track: Any = None) -> F64:
        """Arc length from the track's first sample to each time in ``t``."""
        return self.kinematics(t, track=track).arclength


def fit(
    t: npt.ArrayLike,
    positions: npt.ArrayLike,
    *,
    method: str = "smooth",
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
    **options: Any,
) -> Path:
    """Fit every track once; evaluate positions, derivatives and kinematics anywhere.

    Parameters
    ----------
    t, positions, tracks, offsets
        As in :func:`osculate.kinematics`.
    method : {"smooth", "spline", "local"}
        The estimator (see :func:`osculate.kinematics`).
    **options
        Its options, as in :func:`osculate.kinematics` (only those of the chosen estimator).

    Returns
    -------
    Path
        Callable as ``path(t_new, nu)``, with ``.kinematics(t_new)`` and ``.arclength(t_new)``.

    Notes
    -----
    The same machinery serves ``osculate.kinematics(..., method=...)``; the references are listed
    there.

    Examples
    --------
    >>> import numpy as np
    >>> import osculate as osc
    >>> t = np.linspace(0.0, 2.0, 21)
    >>> path = osc.fit(t, np.column_stack([t, t**3]), method="spline")
    >>> path([0.5, 1.5], nu=1)[:, 1].round(6).tolist()  # d/dt t³ = 3t², exact for not-a-knot
    [0.75, 6.75]
    >>> path
    <osculate.Path: 1 track(s), 2-D, spline (bc not-a-knot)>

    Several tracks: say which track each time belongs to.

    >>> ids = np.repeat(["a", "b"], 21)
    >>> both = osc.fit(np.tile(t, 2), np.tile(np.column_stack([t, t**3]), (2, 1)), tracks=ids,
    ...                method="spline")
    >>> both(1.0, track="b").tolist()
    [[1.0, 1.0]]
    """
    opts = EstimatorOptions.for_fit(method, options)
    tt = as_times(t)
    x = as_positions(positions, len(tt))
    g = group_rows(len(tt), tracks, offsets, tt)
    tk, _ = kernel_times(t, tt, g)
    fitted = fit_core(opts, g, tk, g.to_kernel(x))
    ticks = ticks_of(t)
    origin = None
    if ticks is not None:
        ik = g.to_kernel(ticks[0])
        first = ik[np.minimum(g.offsets[:-1], max(len(ik) - 1, 0))]
        origin = (np.asarray(first, dtype=np.int64), ticks[1])
    return Path(fitted, g, opts, origin)
