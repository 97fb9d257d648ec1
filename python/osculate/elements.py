"""Geometric elements of recorded paths: straights, circular arcs and transition spirals."""

from __future__ import annotations

import dataclasses
from typing import TYPE_CHECKING, Any, Optional

import numpy as np
import numpy.typing as npt

from . import _core
from ._validate import as_real, call_kernel

if TYPE_CHECKING:
    from .intrinsic import Kinematics

__all__ = ["ELEMENT_COLUMNS", "KINDS", "Elements", "elements", "elements_of"]

#: Element kinds by code.
KINDS = ("straight", "arc", "spiral")

#: Every column of :class:`Elements` with its unit ("L" and "T": the input's length and time).
ELEMENT_COLUMNS: dict[str, str] = {
    "track": "track label",
    "kind": "0 straight, 1 arc, 2 spiral (see KINDS)",
    "start_arclength": "L, arc length (as Kinematics.arclength) where the element starts",
    "end_arclength": "L, where it ends",
    "start_time": "T, time at the start (interpolated between samples)",
    "end_time": "T, time at the end",
    "length": "L, length of the fitted element",
    "start_curvature": "1/L, signed curvature at the start (left turns positive)",
    "end_curvature": "1/L, signed curvature at the end",
    "radius": "L, 1/|κ| of an arc (NaN for other kinds)",
    "spiral_parameter": "L, A of a spiral, A² = L/|κ_end − κ_start| (NaN for other kinds)",
    "x": "L, start point (for 3-D paths: along Elements.plane[0])",
    "y": "L, start point (for 3-D paths: along Elements.plane[1])",
    "heading": "rad, direction at the start, counter-clockwise from +x",
    "rms": "L, RMS distance of the element's samples from the fitted chain",
    "max_distance": "L, largest distance of the element's samples from the fitted chain",
    "samples": "samples whose nearest chain point lies on the element",
    "refined": "whether the chain was fitted to the positions (else from κ(s) alone)",
}

_FLOATS = [c for c in ELEMENT_COLUMNS if c not in ("track", "kind", "samples", "refined")]


@dataclasses.dataclass(frozen=True, eq=False)
class Elements:
    """One entry per element, tracks in order, elements in order of arc length.

    The columns are NumPy arrays described with their units in ``ELEMENT_COLUMNS``.
    ``plane`` holds, for 3-D paths, the two unit vectors (rows) of the plane perpendicular to
    ``up`` along which ``x`` and ``y`` are measured; None for planar paths.
    """

    track: np.ndarray
    kind: npt.NDArray[np.int8]
    start_arclength: npt.NDArray[np.float64]
    end_arclength: npt.NDArray[np.float64]
    start_time: npt.NDArray[np.float64]
    end_time: npt.NDArray[np.float64]
    length: npt.NDArray[np.float64]
    start_curvature: npt.NDArray[np.float64]
    end_curvature: npt.NDArray[np.float64]
    radius: npt.NDArray[np.float64]
    spiral_parameter: npt.NDArray[np.float64]
    x: npt.NDArray[np.float64]
    y: npt.NDArray[np.float64]
    heading: npt.NDArray[np.float64]
    rms: npt.NDArray[np.float64]
    max_distance: npt.NDArray[np.float64]
    samples: npt.NDArray[np.int64]
    refined: npt.NDArray[np.bool_]
    plane: Optional[npt.NDArray[np.float64]] = None

    def __len__(self) -> int:
        return len(self.kind)

    @property
    def kind_name(self) -> np.ndarray:
        """The kinds as strings (``"straight"``, ``"arc"``, ``"spiral"``)."""
        return np.asarray(KINDS, dtype=object)[self.kind]

    def to_pandas(self) -> Any:
        """One row per element; ``kind`` as its name."""
        try:
            import pandas as pd
        except ImportError as exc:  # pragma: no cover - depends on the environment
            raise ImportError(
                "this needs pandas; install it with: pip install 'osculate[pandas]'"
            ) from exc
        cols = {c: getattr(self, c) for c in ELEMENT_COLUMNS}
        cols["kind"] = pd.Categorical(self.kind_name, categories=list(KINDS))
        return pd.DataFrame(cols)


def _plane(up: Any) -> np.ndarray:
    u = np.asarray(up, dtype=float).reshape(-1)
    if u.shape != (3,) or not np.all(np.isfinite(u)) or not np.any(u):
        raise _core.InputError(f"up: expected a finite, non-zero 3-vector, got {up!r}")
    u = u / np.linalg.norm(u)
    axis = np.eye(3)[int(np.argmin(np.abs(u)))] if abs(u[0]) > 0.9 else np.eye(3)[0]
    e1 = axis - (axis @ u) * u
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(u, e1)  # e1 × e2 = up: left turns about up are positive
    return np.stack([e1, e2])


def _per_track(name: str, value: Any, m: int) -> np.ndarray:
    if value is None:
        return np.full(m, np.nan)
    v = as_real(name, value)
    if not (np.isfinite(v) and v >= 0):
        raise _core.InputError(f"{name}: must be finite and >= 0, got {value!r}")
    return np.full(m, v)


def elements_of(
    k: Kinematics,
    *,
    up: npt.ArrayLike | None = None,
    penalty: float | None = None,
    min_length: float | None = None,
    significance: float = 3.0,
    resolution: float = 1e-3,
    refine: bool = True,
    max_iterations: int = 50,
) -> Elements:
    """Straights, arcs and spirals of the paths behind an existing :class:`Kinematics`.

    Parameters
    ----------
    k : Kinematics
        From :func:`osculate.kinematics`, best with ``method="smooth"`` (standard errors of
        the curvature weight the segmentation; without them the curvature's scatter is estimated
        from successive differences).
    up : array_like of 3 floats, optional
        For 3-D paths: the vertical. The elements are those of the path's projection on the
        plane perpendicular to it, curvature signed about it (the same ``up`` as given to
        :func:`osculate.kinematics`).
    penalty : float, optional
        Cost of one more element, in units of the weighted χ² of the curvature diagram. Default
        ``3 ln n_eff``: BIC-like, for the level, slope and change point of each piece over
        ``n_eff`` = samples / (3 smoothing bandwidths) independent curvature values (smoothed
        curvatures are correlated over about that many samples). Larger: fewer elements.
    min_length : float, optional
        Shortest element in arc length (default: ``max(3, 6 · bandwidth)`` median sample
        spacings of the track; the smoother rounds the curvature diagram over a few
        bandwidths, so shorter elements are not resolved).
    significance : float
        Standard errors within which a piece's curvature (straight) or its slope (arc) count as
        zero.
    resolution : float
        Floor of the curvature's standard error relative to the track's 95th percentile of
        |κ|, so that noise-free data do not split at the smoother's rounding.
    refine : bool
        Fit the chain of elements to the positions (Levenberg–Marquardt); False: elements from
        the curvature diagram alone, placed by a rigid fit.
    max_iterations : int
        Most Levenberg–Marquardt iterations per track.

    Returns
    -------
    Elements
        See ``ELEMENT_COLUMNS`` for the columns and units.

    Raises
    ------
    InputError
        Naming ``curvature`` and the track when a track's curvature diagram is not finite or
        turns more than π per sample interval on average (no sampled path turns like that: the
        curvature is not that of the positions, e.g. data mixed from several sources); the
        chains fitted are held to the same bound.

    Notes
    -----
    Three steps per track, all in Rust (``src/elements/``): the signed curvature against arc
    length is cut into pieces linear in s by exact penalized segmentation (optimal partitioning
    with the PELT pruning of R. Killick, P. Fearnhead & I. A. Eckley, JASA 107 (2012)
    1590–1598; weighted least squares with weights 1/(3 bandwidths · se²)); each piece is a
    straight, an arc or a spiral by tests on its level and slope, neighbours of one kind
    merged unless keeping them apart pays for the penalty; then the chain, continuous in
    position and heading and in curvature at spiral ends, is fitted to the positions by
    Levenberg–Marquardt on the samples' normal distances, its coordinates from Fresnel
    integrals. Samples that are STOPPED, INVALID or GAP take no part.

    An element table reconstructed from a logged path is indicative: it describes how the path
    was driven, not the design alignment, and design values (radii, spiral parameters, lengths)
    are decided by local codes and licensed engineers.

    Examples
    --------
    A straight of 100 m, then a left arc of radius 50 m over a quarter turn, at 10 m/s:

    >>> import numpy as np
    >>> import osculate as osc
    >>> from osculate.elements import KINDS, elements_of
    >>> s = np.arange(0.0, 100.0 + 25 * np.pi, 0.5)
    >>> a = np.clip(s - 100.0, 0.0, None) / 50.0
    >>> x = np.where(s < 100, s, 100 + 50 * np.sin(a))
    >>> y = np.where(s < 100, 0.0, 50 * (1 - np.cos(a)))
    >>> k = osc.kinematics(s / 10.0, np.column_stack([x, y]), method="smooth")
    >>> el = elements_of(k)
    >>> [KINDS[c] for c in el.kind]
    ['straight', 'arc']
    >>> round(float(el.radius[1]), 1)
    50.0

    A track too short for any element gives none:

    >>> len(elements_of(osc.kinematics([0.0, 1.0, 2.0], [[0, 0], [1, 0], [2, 0]])))
    0
    """
    g = k.grouping
    kern = g.to_kernel
    m = g.n_tracks
    dim = k.dim
    plane = None
    if dim == 3:
        if up is None:
            raise _core.InputError(
                "up: 3-D paths need the vertical, to sign the curvature and project the path"
            )
        plane = _plane(up)
        xy = np.ascontiguousarray(kern(k.position) @ plane.T)
    else:
        if up is not None:
            raise _core.InputError(f"up: only applies to 3-D paths, got {up!r} for a 2-D path")
        xy = np.ascontiguousarray(kern(k.position))
    kappa = k.signed_curvature
    if dim == 3 and not np.any(np.isfinite(kappa)):
        # Computed without up: sign κ here, left of the motion about up positive.
        u = np.cross(plane[0], plane[1])
        side = np.sign(np.cross(k.velocity, k.acceleration) @ u)
        kappa = np.where(side == 0, 0.0, side) * k.curvature
    se = (k.se or {}).get("signed_curvature")
    se = np.full(len(k.t), np.nan) if se is None else se
    band = (k.fit_info or {}).get("bandwidth")
    band = np.full(m, np.nan) if band is None else np.asarray(band, dtype=float)
    if penalty is None:
        beta = np.nan
    else:
        beta = as_real("penalty", penalty)
        if not (np.isfinite(beta) and beta >= 0):
            raise _core.InputError(f"penalty: must be finite and >= 0, got {penalty!r}")
    iters = int(max_iterations)
    if iters != max_iterations or iters < 0:
        raise _core.InputError(f"max_iterations: expected an integer >= 0, got {max_iterations!r}")
    raw = call_kernel(
        g,
        _core.find_elements,
        np.ascontiguousarray(kern(k.t), dtype=float),
        np.ascontiguousarray(kern(k.arclength)),
        np.ascontiguousarray(kern(kappa)),
        np.ascontiguousarray(kern(np.asarray(se, dtype=float))),
        np.ascontiguousarray(kern(k.flags)),
        xy,
        g.offsets,
        penalty=beta,
        min_length=_per_track("min_length", min_length, m),
        bandwidth=np.ascontiguousarray(band, dtype=float),
        significance=as_real("significance", significance),
        resolution=as_real("resolution", resolution),
        refine=bool(refine),
        max_iterations=iters,
    )
    return Elements(
        track=g.labels[raw["track"]],
        kind=raw["kind"].astype(np.int8),
        samples=raw["samples"].astype(np.int64),
        refined=raw["refined"] > 0,
        plane=plane,
        **{c: raw[c] for c in _FLOATS},
    )


def elements(
    t: npt.ArrayLike,
    positions: npt.ArrayLike,
    *,
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
    up: npt.ArrayLike | None = None,
    method: str = "smooth",
    penalty: float | None = None,
    min_length: float | None = None,
    significance: float = 3.0,
    resolution: float = 1e-3,
    refine: bool = True,
    max_iterations: int = 50,
    **options: Any,
) -> Elements:
    """Straights, circular arcs and transition spirals (clothoids) of recorded paths.

    Computes ``osculate.kinematics(t, positions, method=method, tracks=tracks,
    offsets=offsets, up=up, **options)`` (with standard errors) and passes it to
    :func:`elements_of`; see there for the options, the method and its references.

    Parameters
    ----------
    t, positions, tracks, offsets, up, method, **options
        As for :func:`osculate.kinematics`; ``method`` defaults to ``"smooth"`` here.
    penalty, min_length, significance, resolution, refine, max_iterations
        As for :func:`elements_of`.

    Returns
    -------
    Elements
        One entry per element; ``.to_pandas()`` gives a DataFrame.

    Notes
    -----
    An element table reconstructed from a logged path is indicative: design values (radii,
    spiral parameters, lengths) are decided by local codes and licensed engineers.

    Examples
    --------
    A straight, a 60 m spiral into a 200 m radius, 80 m of arc, sampled every 2 m at 20 m/s:

    >>> import numpy as np
    >>> from osculate.elements import KINDS, elements
    >>> from scipy.special import fresnel
    >>> A = np.sqrt(60.0 * 200.0)                 # A² = R L
    >>> s = np.arange(0.0, 80.0 + 60.0 + 80.0, 2.0)
    >>> u = np.clip(s - 80.0, 0.0, 60.0)
    >>> S, C = fresnel(u / (A * np.sqrt(np.pi)))
    >>> sx, sy = 80.0 + A * np.sqrt(np.pi) * C, A * np.sqrt(np.pi) * S
    >>> th, v = 60.0 / (2 * 200.0), np.clip(s - 140.0, 0.0, None)
    >>> ex, ey = sx[s >= 140][0], sy[s >= 140][0]
    >>> cx, cy = ex - 200.0 * np.sin(th), ey + 200.0 * np.cos(th)
    >>> ax = cx + 200.0 * np.sin(th + v / 200.0)
    >>> ay = cy - 200.0 * np.cos(th + v / 200.0)
    >>> x = np.where(s < 80, s, np.where(s < 140, sx, ax))
    >>> y = np.where(s < 80, 0.0, np.where(s < 140, sy, ay))
    >>> el = elements(s / 20.0, np.column_stack([x, y]))
    >>> [KINDS[c] for c in el.kind]
    ['straight', 'spiral', 'arc']
    >>> round(float(el.radius[2])), round(float(el.spiral_parameter[1]) ** 2 / 200.0)
    (200, 60)
    """
    from .intrinsic import kinematics

    k = kinematics(t, positions, method=method, tracks=tracks, offsets=offsets, up=up, **options)
    return elements_of(
        k,
        up=up,
        penalty=penalty,
        min_length=min_length,
        significance=significance,
        resolution=resolution,
        refine=refine,
        max_iterations=max_iterations,
    )
