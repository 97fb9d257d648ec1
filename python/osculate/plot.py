"""Pictures of kinematics: the path coloured by a quantity, stacked profiles, g-g diagrams, work.

Needs matplotlib: ``pip install 'osculate[plot]'``. Every function takes a :class:`Kinematics`
(or the DataFrame returned by ``df.osc.kinematics``), builds its own figure unless given an
``ax``, and returns a :class:`Plot` holding the matplotlib Figure and Axes; nothing here calls
``show()`` or touches pyplot's global state, so the functions are safe in scripts, servers and
notebooks (where a :class:`Plot` displays itself).

Units are labels only: positions and times are taken as they are. The defaults are metres and
seconds; pass ``units={"length": "km", "time": "h"}`` (or a unit per quantity, e.g.
``{"speed": "km/h"}``) when the data are in other units. :func:`gg` needs SI accelerations since
it divides by standard gravity.
"""

from __future__ import annotations

import io
import textwrap
from collections.abc import Mapping, Sequence
from typing import Any, NamedTuple, Optional, Union

import numpy as np
import numpy.typing as npt

try:
    from matplotlib.collections import LineCollection, PolyCollection
    from matplotlib.colors import Colormap, Normalize
    from matplotlib.figure import Figure
    from matplotlib.layout_engine import ConstrainedLayoutEngine
    from matplotlib.lines import Line2D
    from matplotlib.patches import Circle, Patch
    from matplotlib.ticker import MaxNLocator
except ImportError as exc:  # pragma: no cover - depends on the environment
    raise ImportError(
        "osculate.plot needs matplotlib; install it with: pip install 'osculate[plot]'"
    ) from exc

from . import _core
from . import _palette as palette
from .flags import Flag
from .intrinsic import Kinematics

__all__ = ["STANDARD_GRAVITY", "Plot", "gg", "path", "profile", "work"]

F64 = npt.NDArray[np.float64]
Units = Optional[Mapping[str, str]]
Limits = Union[Mapping[str, float], Sequence[Any], None]

STANDARD_GRAVITY = 9.80665
"""Standard gravity in m/s² (SI brochure; 3rd CGPM, 1901): the g of :func:`gg`."""

LIMITS_CAUTION = (
    "Reference circles are indicative only: local codes and licensed engineers decide what is "
    "acceptable for a road, track, ride or vehicle."
)

# -- visual design ------------------------------------------------------------------------------
_INK = palette.INK
_MUTED = palette.MUTED
_GRID = palette.GRID
_LINE = palette.LINE
_UNDEFINED = palette.UNDEFINED
_GLYPHS = palette.GLYPHS
_FLAG_STYLE = {  # colour, description
    Flag.STOPPED: (palette.FLAGS["STOPPED"], "STOPPED: not moving (speed within noise)"),
    Flag.STRAIGHT: (palette.FLAGS["STRAIGHT"], "STRAIGHT: curvature within noise of 0"),
    Flag.VAGUE: (palette.FLAGS["VAGUE"], "VAGUE: curvature too uncertain to use"),
    Flag.GAP: (palette.FLAGS["GAP"], "GAP: spans a long time step"),
    Flag.INVALID: (palette.FLAGS["INVALID"], "INVALID: non-finite input row"),
    Flag.EDGE: (palette.FLAGS["EDGE"], "EDGE: near a track end, less accurate"),
}
#: Half-width of the shaded bands in standard errors (two-sided 95 % of a normal distribution).
BAND_Z = 1.96
_REFERENCE_STYLES = list(
    zip(palette.REFERENCES, [(0, (5, 3)), (0, (2, 2)), (0, (8, 3, 2, 3)), (0, (1, 1))])
)

# name: (label, unit template); {L} length, {T} time, {F} force, {E} energy.
_QUANTITIES: dict[str, tuple[str, str]] = {
    "speed": ("speed v", "{L}/{T}"),
    "arclength": ("arc length s", "{L}"),
    "curvature": ("curvature κ", "1/{L}"),
    "signed_curvature": ("signed curvature (left +)", "1/{L}"),
    "radius": ("radius of curvature ρ", "{L}"),
    "torsion": ("torsion τ", "1/{L}"),
    "accel_tangential": ("tangential accel. a_t", "{L}/{T}²"),
    "accel_normal": ("normal accel. a_n", "{L}/{T}²"),
    "angular_speed": ("turn rate ω", "rad/{T}"),
    "angular_accel": ("turn-rate change dω/dt", "rad/{T}²"),
    "velocity": ("|velocity|", "{L}/{T}"),
    "acceleration": ("|acceleration|", "{L}/{T}²"),
    "jerk": ("|jerk|", "{L}/{T}³"),
    "twist": ("frame twist", "rad"),
    "time": ("time t", "{T}"),
    "work": ("cumulative work W", "{E}"),
}
_DEFAULT_UNITS = {"length": "m", "time": "s", "force": "N", "energy": "J"}


class Plot(NamedTuple):
    """A figure and its axes; unpacks as ``fig, ax = osc.plot.path(k)``.

    Attributes
    ----------
    figure : matplotlib.figure.Figure
        The figure (the caller's when an ``ax`` was given).
    axes : matplotlib.axes.Axes or ndarray of Axes
        The axes drawn on (an array for :func:`profile`).
    """

    figure: Figure
    axes: Any

    def savefig(self, fname: Any, **kwargs: Any) -> None:
        """Save the figure (``Figure.savefig``; 150 dpi unless ``dpi`` is given)."""
        kwargs.setdefault("dpi", 150)
        self.figure.savefig(fname, **kwargs)

    def _repr_png_(self) -> bytes:
        buf = io.BytesIO()
        self.figure.savefig(buf, format="png", dpi=100)
        return buf.getvalue()


# -- access to per-sample results ---------------------------------------------------------------


class _Samples:
    """Per-sample arrays of a Kinematics or of an accessor DataFrame, in track-then-time order."""

    def __init__(
        self,
        k: Any,
        *,
        time: Any = None,
        position: Optional[Sequence[Any]] = None,
        by: Any = None,
    ) -> None:
        self.k = k
        self.is_kinematics = isinstance(k, Kinematics)
        if self.is_kinematics:
            self.n = len(k)
            self.axis_names: list[str] = list("xyz"[: k.dim])
            pos = k.position
            t: Optional[F64] = k.t
            tracks = k.tracks
            self.frame = k.frame
            self.estimator: Optional[str] = k.estimator
        elif hasattr(k, "columns") and hasattr(k, "index"):
            cols = list(k.columns)
            self.n = len(k)
            names = list(position) if position is not None else self._guess_position(cols)
            missing = [c for c in names if c not in cols]
            if missing:
                raise _core.InputError(f"position: no column {missing[0]!r} in the frame")
            self.axis_names = [str(c) for c in names]
            pos = np.column_stack([np.asarray(k[c], dtype=float) for c in names])
            t = self._time(k, cols, time)
            if by is not None and by not in cols:
                raise _core.InputError(f"by: no column {by!r} in the frame")
            tracks = None if by is None else np.asarray(k[by])
            # The accessor gives a twist column only with the rotation-minimizing frame.
            self.frame = "rotation-minimizing" if "twist" in cols else "frenet"
            self.estimator = None
        else:
            raise TypeError(
                "expected an osculate.Kinematics or a pandas DataFrame of df.osc.kinematics "
                f"results, got {type(k).__name__}"
            )
        if pos.shape[1] not in (2, 3):
            raise _core.InputError(f"position: expected 2 or 3 columns, got {pos.shape[1]}")
        self.dim = int(pos.shape[1])
        if tracks is None:
            self.labels = np.array([0])
            codes = np.zeros(self.n, dtype=np.intp)
        else:
            ids = np.asarray(tracks)
            ids = ids.astype(str) if ids.dtype.kind == "O" else ids
            self.labels, codes = np.unique(ids, return_inverse=True)
            codes = codes.reshape(-1)
        self.grouped = tracks is not None
        key = np.arange(self.n) if t is None else np.where(np.isfinite(t), t, np.inf)
        self.order = np.lexsort((np.arange(self.n), key, codes))
        self.codes = codes[self.order]
        self.position = pos[self.order]
        self.t = None if t is None else t[self.order]
        same = self.codes[1:] == self.codes[:-1]
        self.first = np.concatenate([[True], ~same])  # first row of each track (sorted order)
        self.last = np.concatenate([~same, [True]])

    @staticmethod
    def _guess_position(cols: list[Any]) -> list[Any]:
        for names in (("east", "north", "up"), ("x", "y", "z"), ("position_x", "position_y")):
            present = [c for c in names if c in cols]
            if len(present) >= 2 and present == list(names[: len(present)]):
                if names[0] == "position_x" and "position_z" in cols:
                    present.append("position_z")
                return present
        raise _core.InputError(
            "position: name the position columns (e.g. position=['x', 'y']); the frame has none "
            "of east/north[/up], x/y[/z] (run df.osc.kinematics(..., keep=True) to keep them)"
        )

    @staticmethod
    def _time(k: Any, cols: list[Any], time: Any) -> Optional[F64]:
        name = time if time is not None else next((c for c in ("t", "time") if c in cols), None)
        if name is None:
            return None
        if name not in cols:
            raise _core.InputError(f"time: no column {name!r} in the frame")
        col = k[name]
        kind = np.asarray(col).dtype.kind
        if kind in "mM" or str(getattr(col, "dtype", "")).startswith("datetime64"):
            import pandas as pd

            stamps = pd.to_datetime(col)
            seconds = (stamps - stamps.min()).dt.total_seconds()
            return np.asarray(seconds, dtype=float)
        return np.asarray(col, dtype=float)

    # Quantities, in sorted order.
    def has(self, name: str) -> bool:
        if self.is_kinematics:
            return getattr(self.k, name, None) is not None
        return name in self.k.columns or f"{name}_x" in self.k.columns

    def get(self, name: str) -> F64:
        """Return a scalar quantity (vectors give their length), sorted."""
        if name == "time":
            if self.t is None:
                raise _core.InputError("time: the frame has no time column; pass time='column'")
            return self.t
        if self.is_kinematics:
            a = getattr(self.k, name, None)
            if a is None or not isinstance(a, np.ndarray) or a.shape[:1] != (self.n,):
                raise _core.InputError(f"quantity: unknown or unavailable result {name!r}")
        elif name in self.k.columns:
            a = np.asarray(self.k[name], dtype=float)
        elif f"{name}_x" in self.k.columns:
            a = self.vector(name, sort=False)
        else:
            raise _core.InputError(f"quantity: no column {name!r} (nor {name}_x) in the frame")
        a = np.asarray(a, dtype=float)
        if a.ndim == 2:
            a = np.sqrt(np.sum(a**2, axis=1))
        return a[self.order]

    def standard_error(self, name: str) -> Optional[F64]:
        """Return the standard error of a scalar quantity (sorted), or None if there is none."""
        if self.is_kinematics:
            se = self.k.se
            a = None if se is None or name not in se or se[name].ndim != 1 else se[name]
        else:
            col = f"{name}_se"
            a = self.k[col] if col in self.k.columns else None
        return None if a is None else np.asarray(a, dtype=float)[self.order]

    def vector(self, name: str, *, sort: bool = True) -> F64:
        if self.is_kinematics:
            a = np.asarray(getattr(self.k, name), dtype=float)
        else:
            names = [f"{name}_{c}" for c in "xyz" if f"{name}_{c}" in self.k.columns]
            if not names:
                raise _core.InputError(f"quantity: no columns {name}_x, {name}_y in the frame")
            a = np.column_stack([np.asarray(self.k[c], dtype=float) for c in names])
        return a[self.order] if sort else a

    def flags(self) -> npt.NDArray[np.uint8]:
        if self.is_kinematics:
            f = self.k.flags
        elif "flags" in self.k.columns:
            f = np.asarray(self.k["flags"])
        else:
            return np.zeros(self.n, dtype=np.uint8)
        return np.asarray(f).astype(np.uint8)[self.order]

    def track_names(self) -> list[str]:
        return [str(x) for x in self.labels] if self.grouped else ["path"]


# -- helpers ------------------------------------------------------------------------------------


def _units(units: Units) -> dict[str, str]:
    u = dict(_DEFAULT_UNITS)
    if units is not None:
        if not isinstance(units, Mapping):
            raise TypeError(f"units: expected a mapping such as {{'length': 'm'}}, got {units!r}")
        u.update({str(k): str(v) for k, v in units.items()})
    return u


def _unit_of(name: str, u: dict[str, str]) -> str:
    if name in u:
        return u[name]
    template = _QUANTITIES.get(name, (name, ""))[1]
    return template.format(L=u["length"], T=u["time"], F=u["force"], E=u["energy"])


def _label(name: str, u: dict[str, str], label: Optional[str] = None) -> str:
    text = label if label is not None else _QUANTITIES.get(name, (name.replace("_", " "), ""))[0]
    unit = _unit_of(name, u)
    return f"{text} [{unit}]" if unit else text


def _style(ax: Any, *, grid: bool = True) -> None:
    """Our look: light grid behind the data, no top/right frame, muted ticks."""
    for side in ("top", "right"):
        if side in ax.spines:
            ax.spines[side].set_visible(False)
    for side in ("left", "bottom"):
        if side in ax.spines:
            ax.spines[side].set_color(_MUTED)
            ax.spines[side].set_linewidth(0.8)
    ax.tick_params(colors=_MUTED, labelcolor=_INK, labelsize=8.5, length=3, width=0.7)
    ax.xaxis.label.set_color(_INK)
    ax.yaxis.label.set_color(_INK)
    ax.xaxis.label.set_size(9.5)
    ax.yaxis.label.set_size(9.5)
    if grid:
        ax.grid(True, color=_GRID, linewidth=0.7)
        ax.set_axisbelow(True)


def _title(ax: Any, title: Optional[str], subtitle: Optional[str]) -> None:
    if title:
        ax.set_title(title, loc="left", fontsize=11, color=_INK, fontweight="bold", pad=14)
    if subtitle:
        place = ax.text2D if hasattr(ax, "text2D") else ax.text  # 3-D axes take 2-D text apart
        place(
            0.0,
            1.01,
            subtitle,
            transform=ax.transAxes,
            fontsize=8.5,
            color=_MUTED,
            va="bottom",
            ha="left",
        )


def _new_figure(size: tuple[float, float]) -> Figure:
    fig = Figure(figsize=size, layout="constrained", facecolor="white")
    return fig


def _pair_mean(a: F64, b: F64) -> F64:
    """Mean of two arrays, the defined one where only one is finite, NaN where neither is."""
    return np.where(np.isnan(a), b, np.where(np.isnan(b), a, 0.5 * (a + b)))


def _robust_norm(values: F64) -> tuple[Normalize, str]:
    """Colour limits and extend arrows.

    The limits are the 1st and 99th percentiles of the finite values where the values beyond
    them would stretch the scale by more than 5 % (spikes at stops, say), else the full range;
    the colour bar's arrows show any clipping (an infinite radius counts as beyond the top).
    """
    finite = values[np.isfinite(values)]
    if finite.size == 0:
        return Normalize(0.0, 1.0), "neither"
    lo_all, hi_all = float(finite.min()), float(finite.max())
    lo_p, hi_p = (float(v) for v in np.percentile(finite, [1.0, 99.0]))
    core = hi_p - lo_p
    lo = lo_p if lo_p - lo_all > 0.05 * core else lo_all
    hi = hi_p if hi_all - hi_p > 0.05 * core else hi_all
    scale = max(abs(lo), abs(hi))
    if hi - lo <= 1e-9 * scale or not hi > lo:  # constant: a narrow band around the value
        mid = 0.5 * (lo + hi)
        half = 0.005 * abs(mid) if mid != 0 else 0.5
        lo, hi = mid - half, mid + half
    over = bool(np.any(values > hi))
    under = bool(np.any(values < lo))
    extend = {(True, True): "both", (True, False): "max", (False, True): "min"}.get(
        (over, under), "neither"
    )
    return Normalize(lo, hi), extend


def _cmap(cmap: Union[str, Colormap]) -> Colormap:
    from matplotlib import colormaps

    cm = colormaps[cmap] if isinstance(cmap, str) else cmap
    return cm.with_extremes(bad=_UNDEFINED)


def _track_colours(m: int) -> list[Any]:
    from matplotlib import colormaps

    if m == 1:
        return [_LINE]
    return [colormaps["viridis"](x) for x in np.linspace(0.0, 0.82, m)]


def _runs(mask: npt.NDArray[np.bool_], first: npt.NDArray[np.bool_], last: npt.NDArray[np.bool_]):
    """Start and end rows (sorted order) of runs of True that do not cross a track boundary."""
    prev = np.concatenate([[False], mask[:-1]]) & ~first
    nxt = np.concatenate([mask[1:], [False]]) & ~last
    return np.flatnonzero(mask & ~prev), np.flatnonzero(mask & ~nxt)


def _shade(ax: Any, x: F64, flags: npt.NDArray[np.uint8], d: _Samples, which: int) -> list[Any]:
    """Shade x-intervals of flagged samples; returns the legend handles of the flags present."""
    handles = []
    prev_x = np.concatenate([[np.nan], x[:-1]])
    next_x = np.concatenate([x[1:], [np.nan]])
    prev_x[d.first] = np.nan
    next_x[d.last] = np.nan
    left_edge = _pair_mean(prev_x, x)
    right_edge = _pair_mean(x, next_x)
    for flag, (colour, text) in _FLAG_STYLE.items():  # five flags: a handful of layers
        if not int(flag) & which:
            continue
        mask = (flags & int(flag)) != 0
        if not mask.any():
            continue
        starts, ends = _runs(mask, d.first, d.last)
        lo, hi = left_edge[starts], right_edge[ends]
        ok = np.isfinite(lo) & np.isfinite(hi)
        lo, hi = lo[ok], hi[ok]
        verts = np.stack(
            [
                np.column_stack([lo, np.zeros_like(lo)]),
                np.column_stack([lo, np.ones_like(lo)]),
                np.column_stack([hi, np.ones_like(lo)]),
                np.column_stack([hi, np.zeros_like(lo)]),
            ],
            axis=1,
        )
        ax.add_collection(
            PolyCollection(
                list(verts),
                transform=ax.get_xaxis_transform(),
                facecolors=colour,
                edgecolors=colour,
                linewidths=0.6,
                alpha=0.35,
                zorder=0,
            ),
            autolim=False,
        )
        handles.append(Patch(facecolor=colour, edgecolor=colour, alpha=0.5, label=text))
    return handles


def _lines(ax: Any, x: F64, y: F64, d: _Samples, *, linewidth: float = 1.2) -> list[Any]:
    """One line per track (no segment across tracks); returns legend handles for a few tracks."""
    m = len(d.labels)
    keep = ~d.last[:-1]
    segs = np.stack([np.column_stack([x[:-1], y[:-1]]), np.column_stack([x[1:], y[1:]])], axis=1)
    seg_track = d.codes[:-1]
    finite = keep & np.isfinite(segs).all(axis=(1, 2))
    segs, seg_track = segs[finite], seg_track[finite]
    if m <= 8:
        colours = np.array(_track_colours(m), dtype=object)
        lc = LineCollection(
            list(segs), colors=list(colours[seg_track]), linewidths=linewidth, zorder=2
        )
    else:
        lc = LineCollection(list(segs), colors=_LINE, linewidths=0.6, alpha=0.35, zorder=2)
    ax.add_collection(lc)
    if len(segs):
        ax.update_datalim(segs.reshape(-1, 2))
    ax.autoscale_view()
    if not d.grouped or m > 8:
        return []
    names = d.track_names()
    return [
        Line2D([], [], color=c, linewidth=1.6, label=f"track {names[i]}")
        for i, c in enumerate(_track_colours(m))
    ]


def _band(ax: Any, x: F64, y: F64, se: F64, d: _Samples) -> Any:
    """Shade y ± 1.96 se (a 95 % band) along each track, none across tracks."""
    # One fill for all tracks: a NaN row after each track's last sample separates them.
    cut = np.flatnonzero(d.last[:-1]) + 1
    xs, lo, hi = (np.insert(v, cut, np.nan) for v in (x, y - BAND_Z * se, y + BAND_Z * se))
    ax.fill_between(xs, lo, hi, facecolor=palette.BAND, edgecolor="none", alpha=0.45, zorder=1.5)
    # The figure legend's entry (the fill itself stays out of per-axes legends).
    return Patch(
        facecolor=palette.BAND,
        alpha=0.45,
        label="95 % band: ±1.96 se (noise, not bias)",
    )


# -- path ---------------------------------------------------------------------------------------


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
        show it. Undefined values are grey.
    frames_every : float, optional
        Draw the moving frame (T, N and, in 3-D, B) at the first sample past every multiple of
        this arc length (position units) along each track. ``k`` must hold ``tangent``,
        ``normal`` (and ``binormal``); samples where the frame is undefined are skipped.
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

    A straight path has no normal: only tangent glyphs are drawn.

    >>> k = osc.kinematics([0.0, 1.0, 2.0, 3.0], [[0, 0], [1, 0], [2, 0], [3, 0]])
    >>> fig, ax = osc.plot.path(k, frames_every=1.0)
    >>> [t.get_text() for t in ax.get_legend().get_texts()]
    ['track start', 'Frenet frame every 1 m', 'T (tangent)']
    """
    d = _Samples(k, time=time, position=position, by=by)
    u = _units(units)
    own = ax is None
    if ax is None:
        fig = _new_figure(_path_size(d.position, d.dim))
        ax = fig.add_subplot(projection="3d") if d.dim == 3 else fig.add_subplot()
    else:
        fig = ax.figure
    values: Optional[F64] = None
    if isinstance(color, str):
        values = d.get(color)
        cbar_label = _label(color, u)
        quantity = _QUANTITIES.get(color, (color, ""))[0]
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
        seg_values = _pair_mean(values[:-1], values[1:])[keep]
        norm, extend = _robust_norm(seg_values)
        lc.set_cmap(_cmap(cmap))
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
        cb.set_label(cbar_label, color=_INK, fontsize=9.5)
        cb.outline.set_edgecolor(_MUTED)
        cb.ax.tick_params(labelsize=8.5, colors=_MUTED, labelcolor=_INK)
        if np.isnan(seg_values).any():
            handles.append(Line2D([], [], color=_UNDEFINED, linewidth=2, label="undefined"))
    else:
        lc.set_color(_LINE)
    ax.add_collection(lc)
    finite = p[np.isfinite(p).all(axis=1)]
    if axis_names is not None:
        if len(axis_names) != d.dim:
            raise _core.InputError(f"axis_names: expected {d.dim} names, got {len(axis_names)}")
        d.axis_names = [str(a) for a in axis_names]
    names = [f"{a} [{u['length']}]" for a in d.axis_names]
    if d.dim == 3:
        _frame_3d(ax, finite, names)
    else:
        ax.update_datalim(finite)
        ax.autoscale_view()
        ax.set_aspect("equal", adjustable="datalim")
        ax.set_xlabel(names[0])
        ax.set_ylabel(names[1])
        _style(ax)
    if len(d.labels) <= 10 and len(finite):
        starts = p[d.first]
        starts = starts[np.isfinite(starts).all(axis=1)]
        ax.scatter(*starts.T, s=28, facecolors="white", edgecolors=_INK, linewidths=1.0, zorder=4)
        handles.append(
            Line2D(
                [],
                [],
                marker="o",
                linestyle="none",
                markerfacecolor="white",
                markeredgecolor=_INK,
                label="track start",
            )
        )
    if frames_every is not None:
        handles += _glyphs(ax, d, float(frames_every), finite, u["length"])
    if handles and d.dim == 3 and own:
        fig.legend(handles=handles, loc="outside lower center", ncols=3, fontsize=8, frameon=False)
    elif handles and own:
        ax.legend(
            handles=handles,
            loc="upper left",
            bbox_to_anchor=(0.0, -0.15),
            ncols=min(4, len(handles)),
            fontsize=8,
            frameon=False,
            borderaxespad=0.0,
        )
    elif handles:
        ax.legend(handles=handles, loc="best", fontsize=8, frameon=True, framealpha=0.85)
    sub = f"estimator: {d.estimator}" if d.estimator else None
    if title is None:
        title = f"Path coloured by {quantity}" if values is not None else "Path"
    _title(ax, title, sub)
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
    ax.set_xlabel(names[0], fontsize=9.5, color=_INK, labelpad=6)
    ax.set_ylabel(names[1], fontsize=9.5, color=_INK, labelpad=6)
    zname = names[2] + (f"  (vertical ×{stretch:.1f})" if stretch > 1.05 else "")
    ax.set_zlabel(zname, fontsize=9.5, color=_INK, labelpad=6)
    ax.tick_params(labelsize=8, colors=_MUTED, labelcolor=_INK)
    for axis in (ax.xaxis, ax.yaxis, ax.zaxis):
        axis.set_major_locator(MaxNLocator(5))
        axis.pane.set_facecolor(palette.PANE)
        axis.pane.set_edgecolor(_GRID)
        axis._axinfo["grid"].update(color=_GRID, linewidth=0.6)


def _glyphs(ax: Any, d: _Samples, every: float, pts: F64, length_unit: str) -> list[Any]:
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
    axes = (("T", "tangent"), ("N", "normal"), ("B", "binormal"))
    for key, name in axes[: 3 if d.dim == 3 else 2]:
        if not d.has(name):
            continue
        vec = d.vector(name)[at][:, : d.dim]
        ok = np.isfinite(vec).all(axis=1) & np.isfinite(origin).all(axis=1)
        if not ok.any():
            continue
        o, v = origin[ok], vec[ok] * size
        if d.dim == 3:
            ax.quiver(*o.T, *v.T, color=_GLYPHS[key], linewidth=1.2, arrow_length_ratio=0.3)
        else:
            ax.quiver(
                *o.T,
                *v.T,
                color=_GLYPHS[key],
                angles="xy",
                scale_units="xy",
                scale=1.0,
                width=0.004,
                headwidth=3.5,
                headlength=4.0,
                zorder=5,
            )
        handles.append(Line2D([], [], color=_GLYPHS[key], linewidth=2, label=f"{key} ({name})"))
    if handles:
        frame = "Frenet" if d.frame == "frenet" else d.frame
        text = f"{frame} frame every {every:g} {length_unit}"
        handles.insert(0, Patch(facecolor="none", edgecolor="none", label=text))
    return handles


# -- profile ------------------------------------------------------------------------------------


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
        tangential and normal acceleration.
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
    """
    d = _Samples(k, time=time, by=by)
    u = _units(units)
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
        fig = _new_figure((8.2, 1.2 + 1.75 * len(names)))
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
        track_handles = _lines(a, xs, y, d)
        se = d.standard_error(name) if bands else None
        if se is not None:
            band_handle = [_band(a, xs, y, se, d)]
        if which:
            for h in _shade(a, xs, fl, d, which):
                flag_handles.setdefault(h.get_label(), h)
        a.set_ylabel(_label(name, u), fontsize=9)
        a.yaxis.set_major_locator(MaxNLocator(4))
        _style(a)
        if np.isfinite(y).any() and np.nanmin(y) < 0 < np.nanmax(y):
            a.axhline(0.0, color=_MUTED, linewidth=0.6, zorder=1)
    axes[-1].set_xlabel(_label(x, u))
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
        sub = f"estimator: {d.estimator}" if d.estimator else ""
        head = title or f"Profiles along the path (against {_QUANTITIES[x][0]})"
        fig.suptitle(head, x=0.01, ha="left", fontsize=11, color=_INK, fontweight="bold")
        if sub:
            _title(axes[0], None, sub)
    elif handles:
        axes[0].legend(handles=handles, fontsize=8, loc="best")
    return Plot(fig, axes)


# -- g-g diagram --------------------------------------------------------------------------------


def _limits(limits: Limits) -> list[tuple[float, str]]:
    """Parse reference circles as ``(value in g, source)``; each must name its source."""
    if limits is None:
        return []
    items: list[Any]
    if isinstance(limits, Mapping):
        items = [(v, s) for s, v in limits.items()]
    else:
        items = list(limits)
    out = []
    for item in items:
        if isinstance(item, Mapping):
            value, source = item.get("value"), item.get("source")
        elif isinstance(item, (tuple, list)) and len(item) == 2:
            value, source = item
        else:
            raise _core.InputError(
                f"limits: expected (value in g, source) pairs or {{source: value}}, got {item!r}"
            )
        if not isinstance(source, str) or not source.strip():
            raise _core.InputError(
                f"limits: every reference value needs the name of its source, got {source!r}"
            )
        v = float(value)  # type: ignore[arg-type]
        if not (np.isfinite(v) and v > 0):
            raise _core.InputError(f"limits: expected a positive value in g, got {value!r}")
        out.append((v, source.strip()))
    return out


def gg(
    k: Any,
    *,
    limits: Limits = None,
    color: Optional[str] = "speed",
    units: Units = None,
    cmap: Union[str, Colormap] = "viridis",
    ax: Any = None,
    title: Optional[str] = None,
    by: Any = None,
) -> Plot:
    """Lateral against longitudinal acceleration in units of standard gravity (a g-g diagram).

    Parameters
    ----------
    k : Kinematics or pandas.DataFrame
        Results of :func:`osculate.kinematics` or ``df.osc.kinematics``, in metres and seconds.
    limits : sequence of (float, str) or mapping of str to float, optional
        Reference circles: ``[(0.3, "source of this value"), ...]`` or ``{"source": 0.3}``,
        values in g. Each must name its source; there are no built-in limits. Whenever circles
        are drawn, a note on the figure says that they are indicative and that local codes and
        licensed engineers decide, and lists the source of each value.
    color : str or None, default "speed"
        Colour the points by this quantity (None: one colour).
    units : mapping, optional
        Only metres and seconds are accepted here (g is in m/s²); other unit labels are refused.
    cmap : str or Colormap, default "viridis"
        Colour map of ``color``.
    ax : matplotlib Axes, optional
        Draw here instead of in a new figure (the note then sits inside the axes).
    title : str, optional
        Title.
    by : optional
        DataFrame input only: the track column.

    Returns
    -------
    Plot
        ``(figure, axes)``.

    Notes
    -----
    Lateral acceleration is ``signed_curvature`` · v² (positive in left turns) where the signed
    curvature is defined — always for planar paths, for 3-D paths computed with ``up=`` — and
    otherwise the unsigned a_n = κv² (the axis label says which). Longitudinal acceleration is
    a_t = dv/dt. g = 9.80665 m/s², standard gravity (SI brochure; 3rd CGPM, 1901). Samples
    flagged EDGE, GAP, STOPPED or INVALID are drawn as hollow grey rings: their estimates are
    less reliable.

    Examples
    --------
    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> import numpy as np
    >>> import osculate as osc
    >>> t = np.linspace(0.0, 20.0, 401)
    >>> k = osc.kinematics(t, 50 * np.column_stack([np.cos(0.3 * t), np.sin(0.3 * t)]))
    >>> fig, ax = osc.plot.gg(k, limits=[(0.4, "example value from the caller's brief")])
    >>> type(fig).__name__, round(float(np.median(k.accel_normal)) / 9.80665, 3)
    ('Figure', 0.459)
    >>> any("licensed engineers decide" in t.get_text() for t in fig.findobj(matplotlib.text.Text))
    True

    A reference value without a source is refused:

    >>> osc.plot.gg(k, limits=[(0.4, "")])
    Traceback (most recent call last):
    ...
    osculate.InputError: limits: every reference value needs the name of its source, got ''
    """
    u = _units(units)
    if u["length"] != "m" or u["time"] != "s":
        raise _core.InputError(
            "units: the g-g diagram divides by g = 9.80665 m/s², so it needs metres and seconds"
        )
    refs = _limits(limits)
    d = _Samples(k, by=by)
    v = d.get("speed")
    a_t = d.get("accel_tangential")
    signed = d.get("signed_curvature") if d.has("signed_curvature") else np.full(d.n, np.nan)
    a_n = d.get("accel_normal")
    use_signed = bool(np.all(np.isfinite(signed) | ~np.isfinite(a_n))) and np.isfinite(signed).any()
    lateral = signed * v**2 if use_signed else a_n
    lat_g, lon_g = lateral / STANDARD_GRAVITY, a_t / STANDARD_GRAVITY
    ok = np.isfinite(lat_g) & np.isfinite(lon_g)
    doubtful = (d.flags() & int(Flag.EDGE | Flag.GAP | Flag.STOPPED | Flag.INVALID)) != 0
    good, weak = ok & ~doubtful, ok & doubtful
    own = ax is None
    if ax is None:
        fig = _new_figure((7.0, 7.7 if refs else 6.9))
        ax = fig.add_subplot()
    else:
        fig = ax.figure
    handles: list[Any] = []
    if color is not None:
        c = d.get(color)
        norm, extend = _robust_norm(c[good])
        sc = ax.scatter(
            lat_g[good],
            lon_g[good],
            c=c[good],
            cmap=_cmap(cmap),
            norm=norm,
            s=7,
            alpha=0.8,
            linewidths=0,
            zorder=3,
        )
        cax = ax.inset_axes((1.03, 0.0, 0.035, 1.0))  # follows the square box of the axes
        cb = fig.colorbar(sc, cax=cax, extend=extend)
        cb.set_label(_label(color, u), color=_INK, fontsize=9.5)
        cb.outline.set_edgecolor(_MUTED)
        cb.ax.tick_params(labelsize=8.5, colors=_MUTED, labelcolor=_INK)
    else:
        ax.scatter(lat_g[good], lon_g[good], s=7, color=_LINE, alpha=0.7, linewidths=0, zorder=3)
    if weak.any():
        ax.scatter(
            lat_g[weak],
            lon_g[weak],
            s=14,
            facecolors="none",
            edgecolors=_MUTED,
            linewidths=0.6,
            zorder=2,
        )
        handles.append(
            Line2D(
                [],
                [],
                marker="o",
                linestyle="none",
                markerfacecolor="none",
                markeredgecolor=_MUTED,
                label="flagged (EDGE, GAP, STOPPED): less reliable",
            )
        )
    reach = max(
        [
            float(np.max(np.abs(lat_g[ok]), initial=0.0)),
            float(np.max(np.abs(lon_g[ok]), initial=0.0)),
        ]
        + [r for r, _ in refs]
    )
    reach = 1.15 * reach if reach > 0 else 0.1
    for i, (r, source) in enumerate(refs):  # a few reference circles
        colour, dash = _REFERENCE_STYLES[i % len(_REFERENCE_STYLES)]
        ax.add_patch(
            Circle((0, 0), r, fill=False, edgecolor=colour, linestyle=dash, linewidth=1.3, zorder=4)
        )
        ax.annotate(
            f"{r:g} g",
            xy=(r * np.cos(np.pi / 4), r * np.sin(np.pi / 4)),
            xytext=(4, 4),
            textcoords="offset points",
            fontsize=8,
            color=colour,
            zorder=5,
        )
        handles.append(Line2D([], [], color=colour, linestyle=dash, label=f"{r:g} g: {source}"))
    ax.axhline(0.0, color=_MUTED, linewidth=0.7, zorder=1)
    ax.axvline(0.0, color=_MUTED, linewidth=0.7, zorder=1)
    ax.set_xlim(-reach, reach)
    ax.set_ylim(-reach, reach)
    ax.set_aspect("equal")
    side = "lateral acceleration, left turn + [g]" if use_signed else "|a_n| = κv² (unsigned) [g]"
    ax.set_xlabel(side)
    ax.set_ylabel("longitudinal acceleration a_t, speeding up + [g]")
    _style(ax)
    if handles:
        ax.legend(
            handles=handles,
            loc="upper left",
            bbox_to_anchor=(0.0, -0.1),
            fontsize=8,
            frameon=False,
            borderaxespad=0.0,
        )
    _title(
        ax,
        title or "Acceleration share: lateral against longitudinal",
        "1 g = 9.80665 m/s² (standard gravity)"
        + (f";  estimator: {d.estimator}" if d.estimator else ""),
    )
    if refs:
        sources = "; ".join(f"{r:g} g from {s}" for r, s in refs)
        note = f"{LIMITS_CAUTION} Reference values: {sources}."
        if own:
            fig.text(
                0.02,
                0.01,
                "\n".join(textwrap.wrap(note, 105)),
                va="bottom",
                ha="left",
                fontsize=8.3,
                color=palette.CAUTION_TEXT,
                bbox={
                    "boxstyle": "round,pad=0.5",
                    "facecolor": palette.CAUTION_FILL,
                    "edgecolor": palette.CAUTION_EDGE,
                },
            )
            engine = fig.get_layout_engine()
            if isinstance(engine, ConstrainedLayoutEngine):  # room for the note below
                engine.set(rect=(0.0, 0.09, 1.0, 0.91))
        else:
            ax.text(
                0.02,
                0.02,
                "\n".join(textwrap.wrap(note, 60)),
                transform=ax.transAxes,
                va="bottom",
                ha="left",
                fontsize=7.5,
                color=palette.CAUTION_TEXT,
                zorder=6,
                bbox={
                    "boxstyle": "round,pad=0.4",
                    "facecolor": palette.CAUTION_FILL,
                    "alpha": 0.92,
                    "edgecolor": palette.CAUTION_EDGE,
                },
            )
    return Plot(fig, ax)


# -- work ---------------------------------------------------------------------------------------


def _cumulative_work(d: _Samples, force: Any, options: dict[str, Any]) -> F64:
    """Cumulative work per caller row by :func:`osculate.work` (Kinematics input only)."""
    if not d.is_kinematics:
        raise _core.InputError("force: with a DataFrame, pass the cumulative work as values=")
    from .lineint import work as line_work

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
        Unit labels: ``length``, ``time``, ``energy`` (default "J"), or ``work``.
    ax : matplotlib Axes, optional
        Draw here instead of in a new figure.
    title : str, optional
        Title.
    time, by : optional
        DataFrame input only: the time and track columns.
    **options
        Passed to ``osculate.work`` with ``force``.

    Returns
    -------
    Plot
        ``(figure, axes)``.

    Notes
    -----
    The work of a force F along a path is W = ∫ F·dr; negative work takes energy out of the
    moving body (drag, braking). The legend gives each track's total (last finite value).

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
    ('Figure', 'cumulative work W [J]', 'total 20 J')

    The same from the force itself, through :func:`osculate.work`:

    >>> fig, ax = osc.plot.work(k, np.tile([2.0, 0.0], (11, 1)))
    >>> ax.get_legend().get_texts()[0].get_text()
    'total 20 J'
    """
    d = _Samples(k, time=time, by=by)
    u = _units(units)
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
    if ax is None:
        fig = _new_figure((7.6, 4.6))
        ax = fig.add_subplot()
    else:
        fig = ax.figure
    _lines(ax, xs, w, d, linewidth=1.6)
    # Totals: the last finite value of each track (vectorized over tracks).
    idx = np.where(np.isfinite(w), np.arange(d.n), -1)
    last = np.maximum.reduceat(idx, np.flatnonzero(d.first))
    totals = np.where(last >= 0, w[np.maximum(last, 0)], np.nan)
    names = d.track_names()
    colours = _track_colours(len(d.labels))
    unit = u["energy"]
    if len(d.labels) <= 8:
        handles = [
            Line2D(
                [],
                [],
                color=colours[i],
                linewidth=1.8,
                label=(f"track {names[i]}: " if d.grouped else "")
                + f"total {_si(totals[i], unit)}",
            )
            for i in range(len(d.labels))
        ]
        ax.legend(handles=handles, fontsize=8, loc="best")
    ax.axhline(0.0, color=_MUTED, linewidth=0.7, zorder=1)
    ax.set_xlabel(_label(x, u))
    ax.set_ylabel(_label("work", u))
    _style(ax)
    _title(ax, title or "Work done along the path", "W = ∫ F·dr; negative: energy taken out")
    return Plot(fig, ax)


def _si(value: float, unit: str) -> str:
    """Format a value with a k/M prefix when large, e.g. ``-61.9 kJ``."""
    if not np.isfinite(value):
        return f"undefined {unit}"
    a = abs(value)
    for factor, prefix in ((1e6, "M"), (1e3, "k")):
        if a >= factor:
            return f"{value / factor:.1f} {prefix}{unit}"
    return f"{value:.3g} {unit}"
