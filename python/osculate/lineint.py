"""Work and line integrals along sampled paths: ∫ F·dr, ∫ f ds, circulation, power F·v."""

from __future__ import annotations

import dataclasses
from typing import Any, Callable, Optional, Union

import numpy as np
import numpy.typing as npt

from . import _core
from ._validate import Grouping, _real, as_positions, as_times, call_kernel, group_rows
from .intrinsic import derivatives

__all__ = ["GridField", "LineIntegral", "line_integral", "power", "work"]

F64 = npt.NDArray[np.float64]
_OUTSIDE = ("error", "nan", "clamp")
_RULES = ("trapezoid", "cubic")
_FIELD_RULE = "gauss-legendre"
DEFAULT_NODES = 2
MAX_NODES = 5


class GridField:
    """A field on a regular 2-D or 3-D grid, interpolated bilinearly or trilinearly.

    Parameters
    ----------
    values : array_like
        Node values with the grid axes first: shape (n0, n1[, n2]) for a scalar field (for
        :func:`line_integral`), or (n0, n1[, n2], ndim) for a vector field (for :func:`work`
        and :func:`power`). Node ``(i, j[, k])`` sits at ``origin + (i*dx, j*dy[, k*dz])``, the
        ``indexing="ij"`` layout of :func:`numpy.meshgrid`. Every axis needs at least 2 nodes;
        values must be finite.
    origin : array_like, shape (ndim,)
        Position of node ``(0, 0[, 0])``; its length sets the number of grid axes (2 or 3).
    spacing : float or array_like, shape (ndim,)
        Node spacing along each axis, finite and > 0.
    outside : {"error", "nan", "clamp"}, default "error"
        Evaluating outside the grid box is an error naming the track and row (``"error"``),
        gives NaN (``"nan"``; an integral touching it is NaN), or takes the value at the nearest
        point of the box (``"clamp"``). Points within 1e-9 of a cell of the box count as inside.

    Attributes
    ----------
    values : ndarray
        The node values, float64 and C-contiguous (shared with the caller when already so).
    ndim : int
        Grid axes, 2 or 3.
    components : int or None
        Values per node of a vector field, None for a scalar field.
    origin, spacing : tuple of float
        As given.
    outside : str
        As given.

    Notes
    -----
    Bilinear / trilinear interpolation is linear interpolation along each axis in turn (W. H.
    Press et al., *Numerical Recipes*, 3rd ed. (2007), §3.6): continuous, exact for fields that
    are linear in each coordinate (so for constant and linear fields), second-order accurate
    for smooth fields, with kinks at the cell faces. The interpolation runs in Rust.

    Examples
    --------
    >>> import numpy as np
    >>> import osculate as osc
    >>> x, y = np.meshgrid(np.arange(4.0), np.arange(3.0), indexing="ij")
    >>> g = osc.GridField(2 * x + y, origin=(0, 0), spacing=1.0)
    >>> g([[1.5, 0.25], [3.0, 2.0]]).tolist()      # linear fields are reproduced exactly
    [3.25, 8.0]
    >>> g([[4.0, 0.0]])
    Traceback (most recent call last):
    ...
    osculate.InputError: points: row 0: point [4.0, 0.0] is outside the grid box ...
    """

    def __init__(
        self,
        values: npt.ArrayLike,
        origin: npt.ArrayLike,
        spacing: Union[float, npt.ArrayLike],
        *,
        outside: str = "error",
    ) -> None:
        org = _real("origin", origin)
        if org.ndim != 1 or len(org) not in (2, 3):
            raise _core.InputError(
                f"origin: expected 2 or 3 coordinates (one per grid axis), got shape {org.shape}"
            )
        ndim = len(org)
        sp = _real("spacing", spacing)
        if np.ndim(spacing) == 0:  # one step for every axis
            sp = np.full(ndim, sp.item())
        if sp.shape != (ndim,):
            raise _core.InputError(
                f"spacing: expected a number or {ndim} steps (one per grid axis), got shape "
                f"{sp.shape}"
            )
        vals = _real("values", values)
        if vals.ndim not in (ndim, ndim + 1) or (vals.ndim == ndim + 1 and vals.shape[-1] != ndim):
            raise _core.InputError(
                f"values: a {ndim}-D grid needs shape (n0, ..., n{ndim - 1}) for a scalar field "
                f"or (n0, ..., n{ndim - 1}, {ndim}) for a vector field, got {vals.shape}"
            )
        if outside not in _OUTSIDE:
            raise _core.InputError(f"outside: expected one of {_OUTSIDE}, got {outside!r}")
        self.values: F64 = vals
        self.ndim: int = ndim
        self.components: Optional[int] = ndim if vals.ndim == ndim + 1 else None
        self.origin: tuple[float, ...] = tuple(float(v) for v in org)
        self.spacing: tuple[float, ...] = tuple(float(v) for v in sp)
        self.outside: str = outside
        # The kernel checks node counts and spacing; evaluating no point runs those checks once.
        self._eval(np.empty((0, ndim)))
        finite = np.isfinite(vals)
        if not finite.all():
            bad = tuple(int(i) for i in np.argwhere(~finite)[0])
            raise _core.InputError(
                f"values: node {bad[:ndim]} is not finite ({vals[bad]}); fill gaps first"
            )

    def __repr__(self) -> str:
        kind = "scalar" if self.components is None else f"{self.components}-vector"
        shape = "x".join(str(s) for s in self.values.shape[: self.ndim])
        return (
            f"<osculate.GridField: {self.ndim}-D {kind} field on {shape} nodes, "
            f"origin {self.origin}, spacing {self.spacing}, outside={self.outside!r}>"
        )

    @property
    def bounds(self) -> tuple[F64, F64]:
        """Lowest and highest corner of the grid box."""
        lo = np.asarray(self.origin)
        return lo, lo + (np.asarray(self.values.shape[: self.ndim]) - 1) * np.asarray(self.spacing)

    def _eval(self, points: F64) -> F64:
        try:
            return _core.grid_eval(
                self.values,
                points,
                grid_ndim=self.ndim,
                origin=list(self.origin),
                spacing=list(self.spacing),
                outside=self.outside,
            )
        except _core.InputError as err:
            row = getattr(err, "row", None)
            if row is None:
                raise
            new = _core.InputError(f"points: row {row}: {err.detail}")
            new.argument, new.track, new.row, new.detail = "points", None, row, err.detail
            raise new from None

    def __call__(self, points: npt.ArrayLike) -> F64:
        """Interpolate at ``points`` of shape (m, ndim).

        Returns
        -------
        ndarray
            Shape (m,) for a scalar field, (m, ndim) for a vector field.
        """
        p = _real("points", points)
        if p.ndim != 2 or p.shape[1] != self.ndim:
            raise _core.InputError(
                f"points: expected shape (m, {self.ndim}) for a {self.ndim}-D grid, got {p.shape}"
            )
        return self._eval(p)

    def _kernel_args(self) -> dict[str, Any]:
        return {
            "values": self.values,
            "grid_ndim": self.ndim,
            "origin": list(self.origin),
            "spacing": list(self.spacing),
            "outside": self.outside,
        }


@dataclasses.dataclass(frozen=True, eq=False)
class LineIntegral:
    """Result of :func:`work` and :func:`line_integral`, one value per track.

    Attributes
    ----------
    total : ndarray, shape (m,)
        The integral over each track (closing segment included when ``closed``); NaN for a track
        without a usable row, 0 for a track with one.
    error : ndarray, shape (m,)
        Estimated quadrature error: |total − the same integral by the companion rule| (see the
        Notes of :func:`work`); NaN when not estimated.
    cumulative : ndarray, shape (n,), or None
        With ``cumulative=True``, the integral from the first usable row of the track to each
        row, on the caller's rows; NaN on skipped rows. It excludes the closing segment.
    skipped : ndarray of int, shape (m,)
        Rows left out per track because their position (or sampled value) is not finite.
    tracks : ndarray, shape (m,)
        Track labels (sorted), matching ``total``; ``[0]`` for a single track.
    kind : str
        ``"work"`` (∫ F·dr) or ``"scalar"`` (∫ f ds).
    rule : str
        The quadrature, e.g. ``"trapezoid"`` or ``"gauss-legendre, 2 nodes per segment"``.
    closed : bool
        Whether the paths were closed into loops.
    """

    total: F64
    error: F64
    cumulative: Optional[F64]
    skipped: npt.NDArray[np.int64]
    tracks: np.ndarray
    kind: str
    rule: str
    closed: bool

    def __len__(self) -> int:
        return len(self.total)

    def summary_arrays(self) -> dict[str, np.ndarray]:
        """Per-track ``track``, ``total``, ``error`` and ``skipped`` as NumPy arrays."""
        return {
            "track": self.tracks,
            "total": self.total,
            "error": self.error,
            "skipped": self.skipped,
        }

    def summary(self) -> Any:
        """One row per track (pandas DataFrame indexed by track): total, error, skipped."""
        try:
            import pandas as pd
        except ImportError as exc:  # pragma: no cover - depends on the environment
            raise ImportError(
                "this needs pandas; install it with: pip install 'osculate[pandas]'"
            ) from exc
        data = self.summary_arrays()
        labels = data.pop("track")
        return pd.DataFrame(data, index=pd.Index(labels, name="track"))


Integrand = Union[npt.ArrayLike, GridField, Callable[..., Any]]


def _sampled(value: Any, n: int, width: Optional[int], name: str) -> F64:
    """Values at the rows: (n, width) for vectors, (n,) for scalars (width None)."""
    arr = _real(name, value)
    want = (n,) if width is None else (n, width)
    if arr.shape != want:
        if arr.ndim >= 1 and arr.shape[0] != n:
            raise _core.InputError(
                f"{name}: has {arr.shape[0]} rows but positions has {n}"
                if arr.ndim in (1, 2)
                else f"{name}: expected shape {want}, got {arr.shape}"
            )
        what = "one value per row" if width is None else f"one {width}-vector per row"
        raise _core.InputError(f"{name}: expected shape {want} ({what}), got {arr.shape}")
    return arr


def _integrate(
    positions: npt.ArrayLike,
    f: Integrand,
    *,
    kind: str,
    name: str,
    t: Optional[npt.ArrayLike],
    tracks: Optional[npt.ArrayLike],
    offsets: Optional[npt.ArrayLike],
    rule: Optional[str],
    nodes: Optional[int],
    cumulative: bool,
    closed: bool,
    time_varying: bool,
    estimate_error: bool,
) -> LineIntegral:
    """Integrate for :func:`work` and :func:`line_integral` (the common body)."""
    pos = _real("positions", positions)
    n = pos.shape[0] if pos.ndim >= 1 else 0
    if n == 0:
        raise _core.InputError("positions: is empty (no samples)")
    x = as_positions(pos, n, "positions")
    dim = x.shape[1]
    tt = None if t is None else as_times(t)
    if tt is not None and len(tt) != n:
        raise _core.InputError(f"t: has {len(tt)} values but positions has {n} rows")
    g = group_rows(n, tracks, offsets)
    xk = g.to_kernel(x)
    tk = None if tt is None else g.to_kernel(tt)
    flags = {"closed": bool(closed), "estimate": bool(estimate_error)}
    is_field = isinstance(f, GridField) or callable(f)
    if time_varying and not (callable(f) and not isinstance(f, GridField)):
        raise _core.InputError("time_varying: applies to a callable field only")
    if is_field:
        if rule not in (None, _FIELD_RULE):
            raise _core.InputError(
                f"rule: gridded and callable fields use {_FIELD_RULE!r} with nodes=; "
                f"{_RULES} are for sampled values, got {rule!r}"
            )
        q = DEFAULT_NODES if nodes is None else _nodes(nodes)
        label = f"{_FIELD_RULE}, {q} node{'s' if q > 1 else ''} per segment"
    else:
        if nodes is not None:
            raise _core.InputError(
                "nodes: applies to gridded and callable fields; sampled values use rule="
            )
        rule = "trapezoid" if rule is None else rule
        if rule not in _RULES:
            raise _core.InputError(f"rule: expected one of {_RULES}, got {rule!r}")
        label = rule
    if isinstance(f, GridField):
        raw = call_kernel(
            g,
            _core.line_integral_grid,
            xk,
            g.offsets,
            t=tk,
            **f._kernel_args(),
            nodes=q,
            kind=kind,
            cumulative=cumulative,
            **flags,
        )
    elif callable(f):
        if time_varying and tt is None:
            raise _core.InputError("time_varying: the field's times need t")
        if time_varying and closed:
            raise _core.InputError(
                "time_varying: a closed path's closing segment has no times; repeat the first "
                "sample at the end instead of closed=True"
            )
        pts, node_t = call_kernel(
            g,
            _core.segment_nodes,
            xk,
            g.offsets,
            t=tk,
            nodes=q,
            **flags,
        )
        width = dim if kind == "work" else None
        if len(pts) == 0:
            values = np.empty((0,) if width is None else (0, width))
        else:
            out = f(pts, node_t) if time_varying else f(pts)
            values = _node_values(out, len(pts), width, name, dim)
        raw = call_kernel(
            g,
            _core.line_integral_values,
            xk,
            g.offsets,
            values,
            nodes=q,
            kind=kind,
            cumulative=cumulative,
            **flags,
        )
    else:
        values = g.to_kernel(_sampled(f, n, dim if kind == "work" else None, name))
        raw = call_kernel(
            g,
            _core.line_integral_sampled,
            xk,
            values,
            g.offsets,
            t=tk,
            rule=rule,
            kind=kind,
            cumulative=cumulative,
            **flags,
        )
    cum = raw["cumulative"]
    return LineIntegral(
        total=raw["total"],
        error=raw["error"],
        cumulative=None if cum is None else g.to_caller(cum),
        skipped=raw["skipped"],
        tracks=g.labels,
        kind=kind,
        rule=label,
        closed=bool(closed),
    )


def _nodes(nodes: Any) -> int:
    if isinstance(nodes, (bool, np.bool_)) or not isinstance(nodes, (int, np.integer)):
        raise TypeError(f"nodes: expected an integer, got {nodes!r}")
    if not 1 <= int(nodes) <= MAX_NODES:
        raise _core.InputError(f"nodes: must be 1 to {MAX_NODES} per segment, got {nodes}")
    return int(nodes)


def _node_values(out: Any, m: int, width: Optional[int], name: str, dim: int) -> F64:
    """Check what a callable returned for ``m`` nodes (finiteness is checked in Rust)."""
    arr = _real(f"{name} (the callable's result)", out)
    want = (m,) if width is None else (m, width)
    if arr.shape != want:
        raise _core.InputError(
            f"{name}: the callable returned shape {arr.shape} for {m} points of {dim} "
            f"coordinates; expected {want}"
        )
    return arr


def work(
    positions: npt.ArrayLike,
    force: Integrand,
    *,
    t: npt.ArrayLike | None = None,
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
    rule: str | None = None,
    nodes: int | None = None,
    cumulative: bool = False,
    closed: bool = False,
    time_varying: bool = False,
    estimate_error: bool = True,
) -> LineIntegral:
    """Work ∫ F·dr of a force along each track, total or cumulative, with an error estimate.

    Parameters
    ----------
    positions : array_like, shape (n, 2) or (n, 3)
        Samples of the path(s).
    force : array_like, GridField or callable
        The force, in one of three forms:

        * sampled at the rows, shape (n, dim): integrated with ``rule``;
        * a vector :class:`GridField` of the path's dimension, interpolated in Rust at
          ``nodes`` Gauss–Legendre nodes on each straight segment between samples;
        * a callable ``force(points)`` (or ``force(points, times)`` with ``time_varying``) taking
          an (m, dim) array and returning (m, dim): called ONCE with the nodes of all segments of
          all tracks, so it must be vectorized.
    t : array_like, shape (n,), optional
        Sample times, strictly increasing within each track. Sampled forces with
        ``rule="cubic"`` use them as the interpolation parameter; ``time_varying`` callables get
        the node times from them. Otherwise they are only checked.
    tracks, offsets : array_like, optional
        Several tracks at once, as in :func:`osculate.kinematics`.
    rule : {"trapezoid", "cubic"}, default "trapezoid"
        For sampled forces: the trapezoid rule on each segment (second order) or four-point
        cubic interpolation of path and force (fourth order); see Notes. Gridded and callable
        forces use ``"gauss-legendre"`` (the only value accepted for them).
    nodes : int, default 2
        For gridded and callable forces: Gauss–Legendre nodes per segment, 1 to 5. Two nodes
        integrate a bi/trilinear field exactly on a segment inside one cell.
    cumulative : bool, default False
        Also return the work from the start of the track to every row.
    closed : bool, default False
        Close each track into a loop with the straight segment from its last usable sample back
        to its first (circulation ∮ F·dr). Leave it False when the first sample is already
        repeated at the end.
    time_varying : bool, default False
        Call ``force(points, times)`` with the node times (interpolated linearly along each
        segment; needs ``t``; not with ``closed``).
    estimate_error : bool, default True
        Evaluate the companion rule for ``error``; False skips it (faster, ``error`` is NaN).

    Returns
    -------
    LineIntegral
        ``total`` and ``error`` per track, ``cumulative`` per row (caller's rows) or None,
        ``skipped`` rows per track, ``tracks`` labels.

    Raises
    ------
    InputError
        Mismatched shapes; a grid whose dimension or components do not match the path; a path
        leaving a grid with ``outside="error"``; a callable returning the wrong shape or a
        non-finite value; bad times or options. The message names the argument, track and row.
    TypeError
        Non-real input or non-integer ``nodes``.

    Notes
    -----
    **Path between samples.** Gridded and callable forces are integrated along the straight
    segments between consecutive usable samples (the polyline), which is exact for polygonal
    paths and second-order accurate in the sample spacing for curved ones; on curved paths
    sample densely or resample a fitted :func:`osculate.fit` path first. Sampled forces: the
    trapezoid rule, (F₀ + F₁)/2 · (r₁ − r₀) per segment, integrates the linear interpolants of
    force and path (the same polyline). ``rule="cubic"`` interpolates both force and path by
    the cubic through four neighbouring samples, centred on the segment and one-sided at the
    track ends, as P. E. Gill and G. F. Miller do for tabulated integrands (*An algorithm for
    the integration of unequally spaced data*, Comput. J. 15 (1972) 80–83), and integrates the
    product F·r′ (degree 5) exactly by 3-point Gauss–Legendre quadrature. Its parameter is
    ``t`` when given on an open path, otherwise the cumulative chord length, which keeps the
    fourth order (M. S. Floater, IMA J. Numer. Anal. 26 (2006) 25–33); on closed paths the
    stencils wrap around the loop. Gauss–Legendre nodes and weights: M. Abramowitz and I. A.
    Stegun, *Handbook of Mathematical Functions* (1964), Table 25.4.

    **Error estimate.** ``error`` = |total − total by a companion rule of different order|:
    the other sampled rule (cubic ↔ trapezoid), or Gauss–Legendre with one node fewer (two
    nodes for ``nodes=1``). The difference measures the error of the lower-order rule of the
    pair, so it is realistic for ``rule="trapezoid"`` and ``nodes=1`` and pessimistic
    otherwise. It covers the quadrature only: not the straight-segment path model, the grid's
    interpolation error, or noise in the data. With the estimate, a callable is evaluated on
    2·nodes − 1 points per segment (3 for ``nodes=1``).

    **Skipped rows.** A row whose position (or sampled force) is not finite is skipped: the
    path runs straight from the previous usable sample of the track to the next, whose segment
    is integrated like any other (the cubic rule's stencils pass over the row). Its cumulative
    value is NaN and ``skipped`` counts it. ``outside="nan"`` makes every integral that
    touches the outside NaN.

    The kernels run in Rust, in parallel over tracks and over pieces of long tracks, with the
    interpreter released except while a callable runs.

    Examples
    --------
    Gravity on 1 kg does m g (z₀ − z₁) = 73.549875 J whatever the path:

    >>> import numpy as np
    >>> import osculate as osc
    >>> xyz = np.array([[0, 0, 10.0], [3, 1, 7], [-2, 5, 4], [1, 1, 2.5]])
    >>> g = [0, 0, -9.80665]
    >>> round(float(osc.work(xyz, [g] * 4, rule="cubic").total[0]), 9)
    73.549875
    >>> field = osc.GridField(np.broadcast_to(g, (2, 2, 2, 3)), origin=(-5, -5, 0), spacing=20)
    >>> round(float(osc.work(xyz, field).total[0]), 9)
    73.549875

    Circulation of F = (−y, x) around the unit circle is 2π (Stokes' theorem); along the
    inscribed 64-gon through the samples it is 64 sin(2π/64):

    >>> a = np.linspace(0.0, 2 * np.pi, 64, endpoint=False)
    >>> loop = np.column_stack([np.cos(a), np.sin(a)])
    >>> c = osc.work(loop, lambda p: np.column_stack([-p[:, 1], p[:, 0]]), closed=True)
    >>> round(float(c.total[0]), 6), round(float(64 * np.sin(2 * np.pi / 64)), 6)
    (6.273097, 6.273097)

    A NaN row is skipped (the path goes straight across it) and a single sample does no work:

    >>> w = osc.work([[0, 0], [1, 0], [np.nan, 0], [2, 0]], [[2.0, 0]] * 4, cumulative=True)
    >>> w.cumulative.tolist(), w.skipped.tolist()
    ([0.0, 2.0, nan, 4.0], [1])
    >>> osc.work([[1.0, 2.0]], [[3.0, 4.0]]).total.tolist()
    [0.0]
    """
    return _integrate(
        positions,
        force,
        kind="work",
        name="force",
        t=t,
        tracks=tracks,
        offsets=offsets,
        rule=rule,
        nodes=nodes,
        cumulative=cumulative,
        closed=closed,
        time_varying=time_varying,
        estimate_error=estimate_error,
    )


def line_integral(
    positions: npt.ArrayLike,
    f: Integrand,
    *,
    t: npt.ArrayLike | None = None,
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
    rule: str | None = None,
    nodes: int | None = None,
    cumulative: bool = False,
    closed: bool = False,
    time_varying: bool = False,
    estimate_error: bool = True,
) -> LineIntegral:
    """Scalar line integral ∫ f ds along each track (f = 1 gives the length).

    Parameters
    ----------
    positions : array_like, shape (n, 2) or (n, 3)
        Samples of the path(s).
    f : array_like, GridField or callable
        The scalar integrand: sampled at the rows, shape (n,); a scalar :class:`GridField`; or a
        vectorized callable ``f(points)`` (``f(points, times)`` with ``time_varying``) returning
        shape (m,), called once with all quadrature nodes.
    t, tracks, offsets, rule, nodes, cumulative, closed, time_varying, estimate_error
        As in :func:`work`.

    Returns
    -------
    LineIntegral
        With ``kind="scalar"``.

    Notes
    -----
    The same paths, rules, error estimate and skipped rows as :func:`work`, with the integrand
    f |r′| instead of F·r′: the trapezoid rule gives (f₀ + f₁)/2 · |r₁ − r₀| per segment, so
    ∫ 1 ds is the polyline length of :func:`osculate.arclength`; the cubic rule integrates f
    along the four-point cubic through the samples (Gill and Miller, Comput. J. 15 (1972)
    80–83) by 3-point Gauss–Legendre quadrature.

    Examples
    --------
    The mean of f = x along a path is ∫ f ds / length:

    >>> import osculate as osc
    >>> xy = [[0.0, 0.0], [3.0, 4.0], [6.0, 0.0]]
    >>> osc.line_integral(xy, [1.0, 1.0, 1.0]).total.tolist()       # 5 + 5
    [10.0]
    >>> osc.line_integral(xy, lambda p: p[:, 0]).total.tolist()     # ∫ x ds = 5·1.5 + 5·4.5
    [30.0]

    Two tracks by id, and a track with no usable row (NaN):

    >>> r = osc.line_integral([[0, 0], [1, 0], [float("nan"), 0]], [1, 1, 1], tracks=[7, 7, 8])
    >>> r.tracks.tolist(), r.total.tolist(), r.skipped.tolist()
    ([7, 8], [1.0, nan], [0, 1])
    """
    return _integrate(
        positions,
        f,
        kind="scalar",
        name="f",
        t=t,
        tracks=tracks,
        offsets=offsets,
        rule=rule,
        nodes=nodes,
        cumulative=cumulative,
        closed=closed,
        time_varying=time_varying,
        estimate_error=estimate_error,
    )


def power(
    t: npt.ArrayLike,
    positions: npt.ArrayLike,
    force: Integrand,
    *,
    method: str = "fd",
    tracks: npt.ArrayLike | None = None,
    offsets: npt.ArrayLike | None = None,
    time_varying: bool = False,
    **options: Any,
) -> F64:
    """Instantaneous power P = F·v of a force at every sample.

    Parameters
    ----------
    t, positions, tracks, offsets
        As in :func:`osculate.kinematics`.
    force : array_like, GridField or callable
        Sampled at the rows, shape (n, dim); a vector :class:`GridField` (interpolated at the
        samples); or a vectorized callable ``force(points)`` (``force(points, times)`` with
        ``time_varying``) called once with every finite sample.
    method : {"fd", "spline", "smooth", "local"}, default "fd"
        The derivative estimator of the velocity, with its ``**options``, exactly as in
        :func:`osculate.derivatives`.
    time_varying : bool, default False
        Pass the sample times to a callable as a second argument.
    **options
        Options of the estimator (``order``, ``degree``, ``smoothing``, ...).

    Returns
    -------
    ndarray, shape (n,)
        F·v on the caller's rows; NaN on rows with a non-finite position or force.

    Notes
    -----
    The velocity is that of :func:`osculate.derivatives` (references there), so ∫ P dt over a
    track agrees with :func:`work` along it up to the discretisation errors of the two.

    Examples
    --------
    Gravity on a body falling at 3 m/s: P = m g v = 29.41995 W for 1 kg.

    >>> import numpy as np
    >>> import osculate as osc
    >>> t = np.linspace(0.0, 1.0, 5)
    >>> xyz = np.column_stack([0 * t, 0 * t, 10 - 3 * t])
    >>> osc.power(t, xyz, [[0, 0, -9.80665]] * 5).round(6).tolist()
    [29.41995, 29.41995, 29.41995, 29.41995, 29.41995]
    """
    tt = as_times(t)
    x = as_positions(positions, len(tt))
    n, dim = x.shape
    d = derivatives(t, x, method=method, tracks=tracks, offsets=offsets, **options)
    if time_varying and not (callable(force) and not isinstance(force, GridField)):
        raise _core.InputError("time_varying: applies to a callable field only")
    ok = np.asarray(np.isfinite(x).all(axis=1), dtype=np.bool_)
    if isinstance(force, GridField):
        if force.ndim != dim or force.components != dim:
            raise _core.InputError(
                f"force: power needs a vector field of {dim} components on a {dim}-D grid, "
                f"got {force!r}"
            )
        f = np.full((n, dim), np.nan)
        f[ok] = _labelled(tt, tracks, offsets, ok, lambda: force._eval(np.ascontiguousarray(x[ok])))
    elif callable(force):
        f = np.full((n, dim), np.nan)
        if ok.any():
            pts = np.ascontiguousarray(x[ok])
            out = force(pts, tt[ok]) if time_varying else force(pts)
            vals = _node_values(out, len(pts), dim, "force", dim)
            finite = np.isfinite(vals).all(axis=1)
            if not finite.all():
                row = int(np.flatnonzero(ok)[np.flatnonzero(~finite)[0]])
                g = group_rows(n, tracks, offsets)
                label = _label_of(g, row)
                raise _core.InputError(
                    f"force: track {label!r}, row {row}: the callable returned a non-finite "
                    f"value {vals[~finite][0].tolist()}"
                )
            f[ok] = vals
    else:
        f = _sampled(force, n, dim, "force")
    return np.einsum("ij,ij->i", f, d.velocity)


def _label_of(g: Grouping, row: int) -> Any:
    """Track label of caller row ``row``."""
    codes = np.repeat(np.arange(g.n_tracks), np.diff(g.offsets))
    k = int(g.to_caller(codes)[row])
    label = g.labels[k]
    return label.item() if isinstance(label, np.generic) else label


def _labelled(
    t: F64, tracks: Any, offsets: Any, ok: npt.NDArray[np.bool_], fn: Callable[[], F64]
) -> F64:
    """Run ``fn`` (which sees the rows ``ok`` only); re-word its row errors with caller rows."""
    try:
        return fn()
    except _core.InputError as err:
        row = getattr(err, "row", None)
        if row is None:
            raise
        caller = int(np.flatnonzero(ok)[row])
        label = _label_of(group_rows(len(t), tracks, offsets), caller)
        new = _core.InputError(f"force: track {label!r}, row {caller}: {err.detail}")
        new.argument, new.track, new.row, new.detail = "force", None, caller, err.detail
        raise new from None
