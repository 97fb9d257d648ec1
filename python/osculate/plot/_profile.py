"""Stacked profiles of quantities against arc length or time, flagged samples shaded."""

from __future__ import annotations

import textwrap
from collections.abc import Sequence
from typing import Any, Optional, Union

import numpy as np
from matplotlib.ticker import MaxNLocator

from .. import _core
from .. import _palette as palette
from ..flags import Flag
from ._figure import CAUTION, CAUTIONED, Plot, add_caution, apply_style, new_figure, put_title
from ._layers import se_band, shade_flags, track_lines
from ._samples import Samples
from ._units import QUANTITIES, PlainTicks, Units, axis_label, length_scale, unit_labels

__all__ = ["profile"]


def profile(
    k: Any,
    *,
    x: str = "arclength",
    quantities: Optional[Sequence[str]] = None,
    flags: Union[bool, int] = True,
    units: Units = None,
    ax: Any = None,
    title: Optional[str] = None,
    time: Any = None,
    by: Any = None,
    bands: bool = True,
    length_unit: str = "auto",
) -> Plot:
    """Stacked panels of quantities against arc length or time, flagged samples shaded.

    Parameters
    ----------
    k : Kinematics or pandas.DataFrame
        Results of :func:`osculate.kinematics` or ``df.osc.kinematics`` (``time`` and ``by``
        name the DataFrame's time and track columns).
    x : {"arclength", "time"}
        The shared horizontal axis. With arc length every track starts at 0, so laps overlay.
    quantities : sequence of str, optional
        One panel each (scalars, or vectors as their length). Default: speed, curvature,
        tangential and normal acceleration. A panel of lateral acceleration, acceleration, jerk
        or radius adds :data:`CAUTION` to the figure.
    flags : bool or int, default True
        Shade the x-ranges of flagged samples, one colour per flag, named in the legend; an int
        (e.g. ``osc.Flag.STOPPED | osc.Flag.GAP``) shades only those flags, False none.
    units : mapping, optional
        Unit labels, as in :func:`path`.
    ax : sequence of Axes, optional
        One axes per quantity, instead of a new figure.
    title : str, optional
        Figure title.
    time, by : optional
        DataFrame input only: the time and track columns.
    bands : bool, default True
        Shade ±1.96 standard errors around each quantity that has them (``k.se`` or
        ``<quantity>_se`` columns): about 95 % of the noise, not the bias of the estimator.
    length_unit : str, default "auto"
        The unit of arc length and radius, as in :func:`path` (chosen from the path's extent).

    Returns
    -------
    Plot
        ``(figure, axes)`` with an array of axes, top to bottom.

    Notes
    -----
    With up to eight tracks each has its own colour and a legend entry; with more, all are drawn
    thin and translucent in one colour.

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> import numpy as np
    >>> import osculate as osc
    >>> t = np.linspace(0.0, 8.0, 161)
    >>> xy = np.column_stack([t, np.where(t > 4, (t - 4) ** 2, 0.0)])  # straight, then a bend
    >>> k = osc.kinematics(t, xy)
    >>> fig, axes = osc.plot.profile(k, x="time", quantities=["speed", "curvature"])
    >>> [a.get_ylabel() for a in axes]
    ['speed v [m/s]', 'curvature κ [1/m]']
    >>> sorted(t.get_text().split(":")[0] for t in fig.legends[0].get_texts())
    ['EDGE', 'STRAIGHT']

    A panel of a_n, jerk or radius brings the caution line; speed and curvature do not:

    >>> def words(fig):
    ...     texts = fig.findobj(matplotlib.text.Text)
    ...     return " ".join(" ".join(t.get_text().split()) for t in texts)
    >>> osc.plot.CAUTION in words(fig)
    False
    >>> fig, axes = osc.plot.profile(k, quantities=["speed", "accel_normal"])
    >>> osc.plot.CAUTION in words(fig)
    True
    """
    d = Samples(k, time=time, by=by)
    u = unit_labels(units)
    lengths = length_scale(u, length_unit, d)
    if x not in ("arclength", "time"):
        raise _core.InputError(f"x: expected 'arclength' or 'time', got {x!r}")
    names = (
        list(quantities)
        if quantities is not None
        else [
            "speed",
            "curvature",
            "accel_tangential",
            "accel_normal",
        ]
    )
    if not names:
        raise _core.InputError("quantities: expected at least one quantity")
    xs = d.get(x)
    which = int(Flag.STOPPED | Flag.STRAIGHT | Flag.VAGUE | Flag.EDGE | Flag.GAP | Flag.INVALID)
    which = which if flags is True else (0 if flags is False else int(flags))
    fl = d.flags()
    if ax is None:
        fig = new_figure((8.2, 1.2 + 1.75 * len(names)))
        axes = np.atleast_1d(fig.subplots(len(names), 1, sharex=True, squeeze=False)[:, 0])
    else:
        axes = np.atleast_1d(np.asarray(ax, dtype=object))
        if len(axes) != len(names):
            raise _core.InputError(f"ax: expected {len(names)} axes, got {len(axes)}")
        fig = axes[0].figure
    track_handles: list[Any] = []
    flag_handles: dict[str, Any] = {}
    band_handle: list[Any] = []
    for a, name in zip(axes, names):  # one panel per quantity: a handful
        y = d.get(name)
        y = np.where(np.isfinite(y), y, np.nan)
        track_handles = track_lines(a, xs, y, d)
        se = d.standard_error(name) if bands else None
        if se is not None:
            band_handle = [se_band(a, xs, y, se, d)]
        if which:
            for h in shade_flags(a, xs, fl, d, which):
                flag_handles.setdefault(h.get_label(), h)
        ylabel = axis_label(name, u)
        if ax is None:  # our panels are short: a long label takes two lines, not its neighbours'
            ylabel = "\n".join(textwrap.wrap(ylabel, 20))
        a.set_ylabel(ylabel, fontsize=9)
        a.yaxis.set_major_locator(MaxNLocator(4))
        if name in lengths.quantities:
            lengths.apply(a.yaxis)
        else:
            a.yaxis.set_major_formatter(PlainTicks())  # plain numbers, no offset to add up
        apply_style(a)
        if np.isfinite(y).any() and np.nanmin(y) < 0 < np.nanmax(y):
            a.axhline(0.0, color=palette.MUTED, linewidth=0.6, zorder=1)
    axes[-1].set_xlabel(axis_label(x, u))
    if x in lengths.quantities:
        lengths.apply(axes[-1].xaxis)  # shared by every panel
    else:
        axes[-1].xaxis.set_major_formatter(PlainTicks())
    finite_x = xs[np.isfinite(xs)]
    if finite_x.size:
        axes[-1].set_xlim(float(finite_x.min()), float(finite_x.max()))
    handles = track_handles + band_handle + list(flag_handles.values())
    if ax is None:
        if handles:
            fig.legend(
                handles=handles,
                loc="outside lower center",
                ncols=min(3, len(handles)),
                fontsize=8,
                frameon=False,
            )
        sub = f"estimator: {d.estimator}" if d.estimator else None
        head = title or f"Profiles along the path (against {QUANTITIES[x][0]})"
        put_title(axes[0], head, sub)
    elif handles:
        axes[0].legend(handles=handles, fontsize=8, loc="best")
    if CAUTIONED.intersection(names):
        add_caution(fig, axes[-1], CAUTION)
    return Plot(fig, axes)
