"""Cumulative work along the path, one line per track, with each track's total."""

from __future__ import annotations

from typing import Any, Optional

import numpy as np
import numpy.typing as npt
from matplotlib.lines import Line2D

from .. import _core
from .. import _palette as palette
from ._figure import Plot, apply_style, new_figure, put_title
from ._layers import track_colours, track_lines
from ._samples import Samples
from ._units import PlainTicks, Units, axis_label, length_scale, unit_labels

__all__ = ["work"]

F64 = npt.NDArray[np.float64]


def _cumulative_work(d: Samples, force: Any, options: dict[str, Any]) -> F64:
    """Cumulative work per caller row by :func:`osculate.work` (Kinematics input only)."""
    if not d.is_kinematics:
        raise _core.InputError("force: with a DataFrame, pass the cumulative work as values=")
    from ..lineint import work as line_work

    k = d.k
    res = line_work(k.position, force, t=k.t, tracks=k.tracks, cumulative=True, **options)
    return np.asarray(res.cumulative, dtype=float)


def work(
    k: Any,
    force: Any = None,
    *,
    values: Optional[npt.ArrayLike] = None,
    x: str = "arclength",
    units: Units = None,
    ax: Any = None,
    title: Optional[str] = None,
    time: Any = None,
    by: Any = None,
    truth: Optional[npt.ArrayLike] = None,
    length_unit: str = "auto",
    **options: Any,
) -> Plot:
    """Cumulative work along the path, one line per track, with each track's total.

    Parameters
    ----------
    k : Kinematics or pandas.DataFrame
        The path's kinematics (positions, arc length, time, tracks).
    force : optional
        A force for :func:`osculate.work` (sampled at the rows, a :class:`osculate.GridField`
        or a vectorized callable), used when ``values`` is not given (Kinematics input only).
    values : array_like, shape (n,), optional
        Cumulative work at every row (energy units), e.g. ``osc.work(..., cumulative=True)``.
    x : {"arclength", "time"}
        The horizontal axis.
    units : mapping, optional
        Unit labels: ``length``, ``time``, ``energy`` (default "J"), or ``work``. With the
        default joules the axis and the totals take one prefix (J, kJ, MJ, GJ) chosen from the
        largest magnitude drawn; a unit given here is used as it is.
    ax : matplotlib Axes, optional
        Draw here instead of in a new figure.
    title : str, optional
        Title.
    time, by : optional
        DataFrame input only: the time and track columns.
    truth : array_like, optional
        A known true work to compare with, drawn dashed: shape (n,), the true cumulative work
        at every row (in the caller's row order, like ``values``), or shape (tracks,), each
        track's true total (tracks in sorted order of their ids), drawn as a level across the
        track. The legend then gives each track's true total beside its estimate.
    length_unit : str, default "auto"
        The unit of arc length on the horizontal axis, as in :func:`path`.
    **options
        Passed to ``osculate.work`` with ``force``.

    Returns
    -------
    Plot
        ``(figure, axes)``.

    Notes
    -----
    The work of a force F along a path is W = ∫ F·dr; negative work takes energy out of the
    moving body (drag, braking). The legend gives each track's total (last finite value), with
    three significant digits for the largest. The drawn data stay in the caller's energy unit
    and only the tick labels carry the prefix, so curves added to the axes afterwards line up.

    Examples
    --------
    Pushing with 2 N along x for 10 m does 20 J:

    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> import numpy as np
    >>> import osculate as osc
    >>> t = np.linspace(0.0, 5.0, 11)
    >>> k = osc.kinematics(t, np.column_stack([2 * t, 0 * t]))
    >>> fig, ax = osc.plot.work(k, values=2.0 * k.arclength)
    >>> type(fig).__name__, ax.get_ylabel(), ax.get_legend().get_texts()[0].get_text()
    ('Figure', 'cumulative work W [J]', 'total 20.0 J')

    The same from the force itself, through :func:`osculate.work`:

    >>> fig, ax = osc.plot.work(k, np.tile([2.0, 0.0], (11, 1)))
    >>> ax.get_legend().get_texts()[0].get_text()
    'total 20.0 J'

    Two kilonewtons do 20 kJ; axis and legend say kJ, and a true total is drawn dashed:

    >>> fig, ax = osc.plot.work(k, values=2e3 * k.arclength, truth=[2.05e4])
    >>> ax.get_ylabel(), [t.get_text() for t in ax.get_legend().get_texts()]
    ('cumulative work W [kJ]', ['total 20.0 kJ (true 20.5 kJ)', 'true totals (dashed)'])
    """
    d = Samples(k, time=time, by=by)
    u = unit_labels(units)
    lengths = length_scale(u, length_unit, d)
    if "work" in u:
        u["energy"] = u["work"]
    if values is None:
        if force is None:
            raise _core.InputError("values, force: give the cumulative work or a force")
        w = _cumulative_work(d, force, options)
    else:
        w = np.asarray(values, dtype=float).reshape(-1)
        if w.shape != (d.n,):
            raise _core.InputError(f"values: expected {d.n} values, got shape {w.shape}")
    w = w[d.order]
    if x not in ("arclength", "time"):
        raise _core.InputError(f"x: expected 'arclength' or 'time', got {x!r}")
    xs = d.get(x)
    m = len(d.labels)
    true_w: Optional[F64] = None  # per sorted row
    true_total: Optional[F64] = None  # per track
    if truth is not None:
        tr = np.asarray(truth, dtype=float).reshape(-1)
        if tr.shape == (d.n,):
            true_w = tr[d.order]
            true_total = _track_last(true_w, d)
        elif tr.shape == (m,):
            true_total = tr
        else:
            raise _core.InputError(
                f"truth: expected {d.n} values (one per row) or {m} (one per track), "
                f"got shape {tr.shape}"
            )
    if ax is None:
        fig = new_figure((7.6, 4.8))
        ax = fig.add_subplot()
    else:
        fig = ax.figure
    track_lines(ax, xs, w, d, linewidth=1.6)
    dashed = (0, (4, 3))
    if true_w is not None:
        track_lines(ax, xs, true_w, d, linewidth=1.0, colour=palette.TRUTH, linestyle=dashed)
    elif true_total is not None:  # a level across each track's x-range
        x_ok = np.where(np.isfinite(xs), xs, np.nan)
        starts = np.flatnonzero(d.first)
        lo = np.fmin.reduceat(x_ok, starts)
        hi = np.fmax.reduceat(x_ok, starts)
        ok = np.isfinite(lo) & np.isfinite(hi) & np.isfinite(true_total)
        ax.hlines(
            true_total[ok],
            lo[ok],
            hi[ok],
            colors=palette.TRUTH,
            linestyles=dashed,
            linewidth=1.0,
            zorder=3,
        )
    totals = _track_last(w, d)
    unit = u["energy"]
    drawn = np.concatenate([w, [] if true_w is None else true_w])
    drawn = np.concatenate([drawn, [] if true_total is None else true_total])
    scale = float(np.max(np.abs(drawn[np.isfinite(drawn)]), initial=0.0))
    prefix, factor = _energy_prefix(scale) if unit == "J" else ("", 1.0)
    shown = f"{prefix}{unit}"
    names = d.track_names()
    colours = track_colours(m)
    digits = max(0, 2 - int(np.floor(np.log10(scale * factor)))) if scale > 0 else 0
    if m <= 8:
        handles: list[Any] = []
        for i in range(m):  # a few tracks
            text = (f"track {names[i]}: " if d.grouped else "") + "total "
            text += _amount(totals[i] * factor, shown, digits)
            if true_total is not None:
                text += f" (true {_amount(true_total[i] * factor, shown, digits)})"
            handles.append(Line2D([], [], color=colours[i], linewidth=1.8, label=text))
        if true_total is not None:
            handles.append(
                Line2D(
                    [],
                    [],
                    color=palette.TRUTH,
                    linestyle=dashed,
                    linewidth=1.0,
                    label="true work (dashed)" if true_w is not None else "true totals (dashed)",
                )
            )
        # The curves run from 0 at the left towards their totals: the legend goes to the right,
        # on the side away from them (matplotlib's "best" does not see line collections).
        falling = bool(np.nanmedian(totals) < 0) if np.isfinite(totals).any() else False
        ax.legend(handles=handles, fontsize=8, loc="upper right" if falling else "lower right")
    ax.axhline(0.0, color=palette.MUTED, linewidth=0.7, zorder=1)
    ax.set_xlabel(axis_label(x, u))
    if x in lengths.quantities:
        lengths.apply(ax.xaxis)
    else:
        ax.xaxis.set_major_formatter(PlainTicks())
    ax.set_ylabel(axis_label("work", {**u, "energy": shown}))
    ax.yaxis.set_major_formatter(PlainTicks(factor))
    apply_style(ax)
    put_title(ax, title or "Work done along the path", "W = ∫ F·dr; negative: energy taken out")
    return Plot(fig, ax)


def _track_last(w: F64, d: Samples) -> F64:
    """Return the last finite value of each track (sorted rows, vectorized), NaN if none."""
    idx = np.where(np.isfinite(w), np.arange(d.n), -1)
    last = np.maximum.reduceat(idx, np.flatnonzero(d.first))
    return np.where(last >= 0, w[np.maximum(last, 0)], np.nan)


def _energy_prefix(scale: float) -> tuple[str, float]:
    """Return the SI prefix of joules for values up to ``scale``, and the factor to it."""
    for limit, prefix in ((1e9, "G"), (1e6, "M"), (1e3, "k")):
        if scale >= limit:
            return prefix, 1.0 / limit
    return "", 1.0


def _amount(value: float, unit: str, digits: int) -> str:
    """Format a value already in ``unit`` with ``digits`` decimals, e.g. ``-61.9 kJ``."""
    if not np.isfinite(value):
        return f"undefined {unit}"
    return f"{value:.{digits}f} {unit}"
