"""Work and line integrals along sampled paths: ∫ F·dr, ∫ f ds, circulation, power F·v."""

from __future__ import annotations

import dataclasses
from typing import Any, Callable, Optional, Union

import numpy as np
import numpy.typing as npt

from . import _core
from ._validate import as_positions, as_real_array, as_times, call_kernel, group_rows
from .field import GridField  # osculate.lineint.GridField stays importable
from .intrinsic import derivatives

__all__ = ["LineIntegral", "line_integral", "power", "work"]

F64 = npt.NDArray[np.float64]


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
    arr = as_real_array(name, value)
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
    pos = as_real_array("positions", positions)
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
    # Option values and ranges are checked by the kernel (Options::new); here only their types.
    if rule is not None and not isinstance(rule, str):
        raise TypeError(f"rule: expected a string, got {rule!r}")
    if nodes is not None and (
        isinstance(nodes, (bool, np.bool_)) or not isinstance(nodes, (int, np.integer))
    ):
        raise TypeError(f"nodes: expected an integer, got {nodes!r}")
    if nodes is not None and not -(2**63) <= int(nodes) < 2**63:  # beyond the kernel's int64
        raise _core.InputError(f"nodes: {int(nodes)} is out of range")
    opts = {
        "rule": rule,
        "nodes": None if nodes is None else int(nodes),
        "kind": kind,
        "closed": bool(closed),
        "estimate": bool(estimate_error),
    }
    if time_varying and not (callable(f) and not isinstance(f, GridField)):
        raise _core.InputError("time_varying: applies to a callable field only")
    if isinstance(f, GridField):
        raw = call_kernel(
            g,
            _core.line_integral_grid,
            xk,
            g.offsets,
            t=tk,
            **f._kernel_args(),
            cumulative=cumulative,
            **opts,
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
            **opts,
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
            cumulative=cumulative,
            **opts,
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
            cumulative=cumulative,
            **opts,
        )
    cum = raw["cumulative"]
    return LineIntegral(
        total=raw["total"],
        error=raw["error"],
        cumulative=None if cum is None else g.to_caller(cum),
        skipped=raw["skipped"],
        tracks=g.labels,
        kind=kind,
        rule=raw["rule"],
        closed=bool(closed),
    )


def _node_values(out: Any, m: int, width: Optional[int], name: str, dim: int) -> F64:
    """Check what a callable returned for ``m`` nodes (finiteness is checked in Rust)."""
    arr = as_real_array(f"{name} (the callable's result)", out)
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
    g = group_rows(n, tracks, offsets)
    kw: dict[str, Any]
    if isinstance(force, GridField):
        kw = {
            "grid_values": force.values,
            "origin": list(force.origin),
            "spacing": list(force.spacing),
            "outside": force.outside,
        }
    elif callable(force):
        # Called once on the finite rows; the kernel checks what it returned there.
        ok = np.isfinite(x).all(axis=1)
        f = np.full((n, dim), np.nan)
        if ok.any():
            pts = np.ascontiguousarray(x[ok])
            out = force(pts, tt[ok]) if time_varying else force(pts)
            f[ok] = _node_values(out, len(pts), dim, "force", dim)
        kw = {"force": g.to_kernel(f), "returned": True}
    else:
        kw = {"force": g.to_kernel(_sampled(force, n, dim, "force"))}
    v = np.ascontiguousarray(g.to_kernel(d.velocity), dtype=np.float64)
    p = call_kernel(g, _core.line_power, g.to_kernel(x), g.offsets, v, **kw)
    return g.to_caller(p)
