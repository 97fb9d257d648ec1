"""The path in 2-D or 3-D, coloured by a quantity, with frame glyphs and fitted elements."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any, Optional, Union

import numpy as np
import numpy.typing as npt
from matplotlib.collections import LineCollection
from matplotlib.colors import Colormap
from matplotlib.lines import Line2D
from matplotlib.patches import Patch
from matplotlib.ticker import MaxNLocator

from .. import _core
from .. import _palette as palette
from ..elements import Elements
from ._elements import draw_chain
from ._figure import CAUTION, CAUTIONED, Plot, add_caution, apply_style, new_figure, put_title
from ._layers import colour_map, pair_mean, robust_norm
from ._samples import Samples
from ._units import (
    QUANTITIES,
    LengthScale,
    PlainTicks,
    Units,
    axis_label,
    length_scale,
    unit_labels,
)

__all__ = ["path"]

F64 = npt.NDArray[np.float64]


def path(
    k: Any,
    *,
    color: Union[str, npt.ArrayLike, None] = "curvature",
    frames_every: Optional[float] = None,
    units: Units = None,
    cmap: Union[str, Colormap] = "viridis",
    label: Optional[str] = None,
    ax: Any = None,
    title: Optional[str] = None,
    time: Any = None,
    position: Optional[Sequence[Any]] = None,
    by: Any = None,
    axis_names: Optional[Sequence[str]] = None,
    length_unit: str = "auto",
    elements: Optional[Elements] = None,
) -> Plot:
    """Draw the path in 2-D or 3-D, coloured by a quantity, with optional frame glyphs.

    Parameters
    ----------
    k : Kinematics or pandas.DataFrame
        Results of :func:`osculate.kinematics`, or of ``df.osc.kinematics`` (then ``position``
        names the coordinate columns unless they are ``east, north[, up]`` or ``x, y[, z]``, and
        ``by`` the track column).
    color : str, array_like or None, default "curvature"
        A scalar result (``"curvature"``, ``"speed"``, ``"accel_normal"``, ``"torsion"``,
        ``"radius"``, ...; vectors such as ``"jerk"`` give their length), one value per row, or
        None for a plain line. Isolated extremes (beyond the 1st and 99th percentiles, if they
        would stretch the scale by more than 5 %) are clipped, and arrows on the colour bar
        show it. Undefined values are grey. Colouring by lateral acceleration, acceleration,
        jerk or radius adds :data:`CAUTION` to the figure.
    frames_every : float, optional
        Draw the moving frame at the first sample past every multiple of this arc length
        (position units) along each track: the tangent T and the normal and (in 3-D) binormal
        that ``k`` holds, named after its frame (Frenet N and B, or the rotation-minimizing
        U and V). Samples where the frame is undefined are skipped.
    units : mapping, optional
        Unit labels: ``length`` (default "m"), ``time`` ("s"), or one per quantity name.
    cmap : str or Colormap, default "viridis"
        A perceptually uniform colour map is best (viridis, cividis, magma, ...).
    label : str, optional
        Colour-bar label when ``color`` is an array.
    ax : matplotlib Axes, optional
        Draw here (a 3-D axes for 3-D paths) instead of in a new figure.
    title : str, optional
        Title; by default it names the quantity.
    time, position, by : optional
        DataFrame input only: the time, position and track columns.
    axis_names : sequence of str, optional
        Names of the position axes, e.g. ``("east", "north", "up")``; by default the position
        columns of a DataFrame, else x, y, z.
    length_unit : str, default "auto"
        The unit positions (and a radius or arc-length colour bar) are shown in: with data in
        metres, "auto" picks mm below 0.5 m of extent, km above 50 km, else m; or name one of
        "µm", "mm", "cm", "m", "km". Only the tick labels change.
    elements : Elements, optional
        From :func:`osculate.elements.elements_of` on the same tracks: the fitted chain of
        straights, arcs and spirals is drawn over the path, a dash pattern per kind, rebuilt
        from each element's start point, heading, curvatures and length. For 3-D paths the
        chain lies in the plane of ``Elements.plane`` (perpendicular to ``up``) and is drawn at
        the path's height at the same arc length.

    Returns
    -------
    Plot
        ``(figure, axes)``.

    Notes
    -----
    Each segment between consecutive samples of a track takes the mean colour of its two ends.
    For 3-D paths the vertical axis may be stretched so that a flat path stays readable; the axis
    label then says by how much.

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> import numpy as np
    >>> import osculate as osc
    >>> t = np.linspace(0.0, 10.0, 201)
    >>> k = osc.kinematics(t, np.column_stack([10 * np.cos(0.3 * t), 5 * np.sin(0.3 * t)]))
    >>> fig, ax = osc.plot.path(k, color="speed", frames_every=5.0)
    >>> type(fig).__name__, ax.get_xlabel()
    ('Figure', 'x [m]')

    A path 4 cm across is shown in millimetres; colouring by radius adds the caution:

    >>> fig, ax = osc.plot.path(osc.kinematics(t, 0.004 * k.position), color="radius")
    >>> ax.get_xlabel(), fig.axes[-1].get_ylabel()
    ('x [mm]', 'radius of curvature ρ [mm]')
    >>> texts = [" ".join(t.get_text().split()) for t in fig.findobj(matplotlib.text.Text)]
    >>> osc.plot.CAUTION in texts
    True

    A straight path has no normal: only tangent glyphs are drawn.

    >>> k = osc.kinematics([0.0, 1.0, 2.0, 3.0], [[0, 0], [1, 0], [2, 0], [3, 0]])
    >>> fig, ax = osc.plot.path(k, frames_every=1.0)
    >>> [t.get_text() for t in fig.legends[0].get_texts()]
    ['track start', 'Frenet frame every 1 m', 'T (tangent)']

    The fitted elements of a straight and a quarter circle of radius 50 m, drawn over it:

    >>> from osculate.elements import elements_of
    >>> s = np.arange(0.0, 100.0 + 25 * np.pi, 0.5)
    >>> a = np.clip(s - 100.0, 0.0, None) / 50.0
    >>> x = np.where(s < 100, s, 100 + 50 * np.sin(a))
    >>> y = np.where(s < 100, 0.0, 50 * (1 - np.cos(a)))
    >>> k = osc.kinematics(s / 10.0, np.column_stack([x, y]), method="smooth")
    >>> fig, ax = osc.plot.path(k, color=None, elements=elements_of(k))
    >>> [t.get_text() for t in fig.legends[0].get_texts()][1:]
    ['fitted straight (κ = 0)', 'fitted circular arc (κ constant)']
    """
    d = Samples(k, time=time, position=position, by=by)
    u = unit_labels(units)
    lengths = length_scale(u, length_unit, d)
    own = ax is None
    if ax is None:
        fig = new_figure(_path_size(d.position, d.dim))
        ax = fig.add_subplot(projection="3d") if d.dim == 3 else fig.add_subplot()
    else:
        fig = ax.figure
    values: Optional[F64] = None
    if isinstance(color, str):
        values = d.get(color)
        cbar_label = axis_label(color, u)
        quantity = QUANTITIES.get(color, (color, ""))[0]
    elif color is not None:
        values = np.asarray(color, dtype=float).reshape(-1)
        if values.shape != (d.n,):
            raise _core.InputError(f"color: expected {d.n} values, got shape {values.shape}")
        values = values[d.order]
        cbar_label = label or "value"
        quantity = label or "value"
    p = d.position
    keep = ~d.last[:-1] & np.isfinite(p[:-1]).all(axis=1) & np.isfinite(p[1:]).all(axis=1)
    segs = np.stack([p[:-1], p[1:]], axis=1)[keep]
    handles: list[Any] = []
    if d.dim == 3:
        from mpl_toolkits.mplot3d.art3d import Line3DCollection

        lc: Any = Line3DCollection(list(segs), linewidths=1.5)
    else:
        width = 1.8 if len(d.labels) <= 10 else 1.2
        lc = LineCollection(list(segs), linewidths=width, capstyle="round")
    if values is not None:
        seg_values = pair_mean(values[:-1], values[1:])[keep]
        norm, extend = robust_norm(seg_values)
        lc.set_cmap(colour_map(cmap))
        lc.set_norm(norm)
        lc.set_array(np.ma.masked_invalid(np.where(np.isinf(seg_values), np.nan, seg_values)))
        if np.isinf(seg_values).any():  # an infinite radius is beyond the top, not undefined
            top = np.where(np.isposinf(seg_values), float(norm.vmax or 0.0), seg_values)
            top = np.where(np.isneginf(top), float(norm.vmin or 0.0), top)
            lc.set_array(np.ma.masked_invalid(top))
        if d.dim == 3:
            cb = fig.colorbar(lc, ax=ax, extend=extend, shrink=0.6, aspect=25, pad=0.1)
        else:
            cb = fig.colorbar(lc, ax=ax, extend=extend, pad=0.02)
        cb.set_label(cbar_label, color=palette.INK, fontsize=9.5)
        cb.outline.set_edgecolor(palette.MUTED)
        cb.ax.tick_params(labelsize=8.5, colors=palette.MUTED, labelcolor=palette.INK)
        if isinstance(color, str) and color in lengths.quantities:
            lengths.apply(cb.ax.yaxis)
        else:
            cb.formatter = PlainTicks()  # plain numbers, no offset to add up
        if np.isnan(seg_values).any():
            handles.append(Line2D([], [], color=palette.UNDEFINED, linewidth=2, label="undefined"))
    else:
        lc.set_color(palette.LINE)
    ax.add_collection(lc)
    finite = p[np.isfinite(p).all(axis=1)]
    if axis_names is not None:
        if len(axis_names) != d.dim:
            raise _core.InputError(f"axis_names: expected {d.dim} names, got {len(axis_names)}")
        d.axis_names = [str(a) for a in axis_names]
    names = [f"{a} [{lengths.unit}]" for a in d.axis_names]
    if d.dim == 3:
        _frame_3d(ax, finite, names)
    else:
        ax.update_datalim(finite)
        ax.autoscale_view()
        ax.set_aspect("equal", adjustable="datalim")
        ax.set_xlabel(names[0])
        ax.set_ylabel(names[1])
        apply_style(ax)
    for axis in (ax.xaxis, ax.yaxis, getattr(ax, "zaxis", None)):
        if axis is not None:
            lengths.apply(axis)
    if len(d.labels) <= 10 and len(finite):
        starts = p[d.first]
        starts = starts[np.isfinite(starts).all(axis=1)]
        ax.scatter(
            *starts.T,
            s=28,
            facecolors=palette.PAPER,
            edgecolors=palette.INK,
            linewidths=1.0,
            zorder=4,
        )
        handles.append(
            Line2D(
                [],
                [],
                marker="o",
                linestyle="none",
                markerfacecolor=palette.PAPER,
                markeredgecolor=palette.INK,
                label="track start",
            )
        )
    if frames_every is not None:
        handles += _glyphs(ax, d, float(frames_every), finite, lengths)
    if elements is not None:
        handles += draw_chain(ax, elements, d)
    if handles and own:  # below everything, where constrained layout leaves room for it
        fig.legend(
            handles=handles,
            loc="outside lower center",
            ncols=min(3 if d.dim == 3 else 4, len(handles)),
            fontsize=8,
            frameon=False,
        )
    elif handles:
        ax.legend(handles=handles, loc="best", fontsize=8, frameon=True, framealpha=0.85)
    sub = f"estimator: {d.estimator}" if d.estimator else None
    if title is None:
        title = f"Path coloured by {quantity}" if values is not None else "Path"
    put_title(ax, title, sub)
    if isinstance(color, str) and color in CAUTIONED:
        add_caution(fig, ax, CAUTION)
    return Plot(fig, ax)


def _path_size(p: F64, dim: int) -> tuple[float, float]:
    """Figure size: 3-D fixed; 2-D as tall as the path's aspect ratio asks, within bounds."""
    if dim == 3:
        return (8.4, 6.6)
    pts = p[np.isfinite(p).all(axis=1)]
    if len(pts) == 0:
        return (7.6, 5.6)
    span = np.ptp(pts, axis=0)
    ratio = float(span[1] / span[0]) if span[0] > 0 else 1.0
    return (7.6, float(np.clip(6.2 * ratio + 2.0, 4.2, 8.4)))


def _frame_3d(ax: Any, pts: F64, names: list[str]) -> None:
    if len(pts) == 0:
        return
    lo, hi = pts.min(axis=0), pts.max(axis=0)
    span = np.maximum(hi - lo, 1e-12)
    pad = 0.04 * span.max()
    ax.set_xlim(lo[0] - pad, hi[0] + pad)
    ax.set_ylim(lo[1] - pad, hi[1] + pad)
    ax.set_zlim(lo[2] - pad, hi[2] + pad)
    horizontal = max(span[0], span[1])
    box_z = max(span[2], 0.25 * horizontal)
    stretch = (box_z + 2 * pad) / (span[2] + 2 * pad)
    ax.set_box_aspect((span[0] + 2 * pad, span[1] + 2 * pad, box_z + 2 * pad), zoom=1.08)
    ax.set_xlabel(names[0], fontsize=9.5, color=palette.INK, labelpad=6)
    ax.set_ylabel(names[1], fontsize=9.5, color=palette.INK, labelpad=6)
    zname = names[2] + (f"  (vertical ×{stretch:.1f})" if stretch > 1.05 else "")
    ax.set_zlabel(zname, fontsize=9.5, color=palette.INK, labelpad=6)
    ax.tick_params(labelsize=8, colors=palette.MUTED, labelcolor=palette.INK)
    for axis in (ax.xaxis, ax.yaxis, ax.zaxis):
        axis.set_major_locator(MaxNLocator(5))
        axis.pane.set_facecolor(palette.PANE)
        axis.pane.set_edgecolor(palette.GRID)
        axis._axinfo["grid"].update(color=palette.GRID, linewidth=0.6)


def _glyph_names(frame: str) -> tuple[tuple[str, str, str, str], ...]:
    """(palette key, attribute, symbol, description) of the frame's arrows, by frame."""
    if frame == "frenet":
        return (
            ("T", "tangent", "T", "tangent"),
            ("N", "normal", "N", "normal"),
            ("B", "binormal", "B", "binormal"),
        )
    return (
        ("T", "tangent", "T", "tangent"),
        ("N", "normal", "U", "rotation-minimizing normal"),
        ("B", "binormal", "V", "T × U"),
    )


def _glyphs(ax: Any, d: Samples, every: float, pts: F64, lengths: LengthScale) -> list[Any]:
    """Arrows of the moving frame at the first sample past every multiple of ``every``."""
    if not every > 0:
        raise _core.InputError(f"frames_every: expected a positive arc length, got {every!r}")
    s = d.get("arclength")
    bucket = np.where(np.isfinite(s), np.floor(s / every), -1.0)
    new = d.first | np.concatenate([[True], bucket[1:] != bucket[:-1]])
    at = np.flatnonzero(new & (bucket >= 0))
    extent = float(np.max(np.ptp(pts, axis=0))) if len(pts) else 1.0
    size = min(0.6 * every, 0.07 * extent)
    origin = d.position[at]
    handles: list[Any] = []
    for key, name, symbol, text in _glyph_names(d.frame)[: 3 if d.dim == 3 else 2]:
        if not d.has(name):
            continue
        vec = d.vector(name)[at][:, : d.dim]
        ok = np.isfinite(vec).all(axis=1) & np.isfinite(origin).all(axis=1)
        if not ok.any():
            continue
        o, v = origin[ok], vec[ok] * size
        if d.dim == 3:
            ax.quiver(*o.T, *v.T, color=palette.GLYPHS[key], linewidth=1.2, arrow_length_ratio=0.3)
        else:
            ax.quiver(
                *o.T,
                *v.T,
                color=palette.GLYPHS[key],
                angles="xy",
                scale_units="xy",
                scale=1.0,
                width=0.004,
                headwidth=3.5,
                headlength=4.0,
                zorder=5,
            )
        handles.append(
            Line2D([], [], color=palette.GLYPHS[key], linewidth=2, label=f"{symbol} ({text})")
        )
    if handles:
        frame = "Frenet" if d.frame == "frenet" else d.frame
        text = f"{frame} frame every {every * lengths.factor:g} {lengths.unit}"
        handles.insert(0, Patch(facecolor=palette.NONE, edgecolor=palette.NONE, label=text))
    return handles
