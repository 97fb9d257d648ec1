"""Pictures of kinematics: paths, profiles, curvature diagrams, g-g diagrams, work.

Needs matplotlib: ``pip install 'osculate[plot]'``. Every function takes a :class:`Kinematics`
(or the DataFrame returned by ``df.osc.kinematics``), builds its own figure unless given an
``ax``, and returns a :class:`Plot` holding the matplotlib Figure and Axes; nothing here calls
``show()`` or touches pyplot's global state, so the functions are safe in scripts, servers and
notebooks (where a :class:`Plot` displays itself).

Units. Positions and times are taken as metres and seconds unless ``units`` says otherwise
(``units={"length": "km", "time": "h"}``, or a unit per quantity such as ``{"speed": "km/h"}``);
those are labels only, the data are not converted. With positions in metres, lengths (positions,
arc length, radius) are *shown* in the unit that keeps the ticks readable: millimetres when the
path's extent is below 0.5 m, kilometres above 50 km, else metres (``length_unit="auto"``; pass
``"mm"``, ``"m"``, ``"km"``, ... to choose). Only the tick labels change: the drawn data stay in
the caller's units, so curves added to the axes afterwards line up. Rates (speed, acceleration,
curvature) stay in the data's units. :func:`gg` needs SI accelerations since it divides by
standard gravity.

Cautions. Every figure that shows lateral (normal) acceleration, total acceleration, jerk or
radius of curvature carries :data:`CAUTION` in small muted type: such values estimated from
logged data are indicative, not a safety assessment. So does every curvature diagram (curvature
is one over the radius, the figure road and rail engineers judge an alignment by).
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
    from matplotlib.lines import Line2D
    from matplotlib.patches import Circle, Patch
    from matplotlib.ticker import Formatter, MaxNLocator
    from matplotlib.transforms import Bbox
except ImportError as exc:  # pragma: no cover - depends on the environment
    raise ImportError(
        "osculate.plot needs matplotlib; install it with: pip install 'osculate[plot]'"
    ) from exc

from . import _core
from . import _palette as palette
from .elements import KINDS, Elements
from .flags import Flag
from .intrinsic import Kinematics

__all__ = [
    "CAUTION",
    "LIMITS_CAUTION",
    "STANDARD_GRAVITY",
    "Plot",
    "curvature",
    "gg",
    "path",
    "profile",
    "work",
]

F64 = npt.NDArray[np.float64]
Units = Optional[Mapping[str, str]]
Limits = Union[Mapping[str, float], Sequence[Any], None]

STANDARD_GRAVITY = 9.80665
"""Standard gravity in m/s² (SI brochure; 3rd CGPM, 1901): the g of :func:`gg`."""

CAUTION = (
    "Indicative values from logged data; local codes and licensed engineers decide acceptability."
)
"""The caution line of every figure that shows lateral acceleration, jerk or radius."""

LIMITS_CAUTION = "Reference circles are indicative only; their values and sources:"
"""Follows :data:`CAUTION` on a g-g diagram with reference circles, before each source."""

#: Quantities whose figures carry :data:`CAUTION`: lateral (normal) acceleration, the total
#: acceleration (it contains the lateral part), jerk and radius of curvature.
CAUTIONED = frozenset({"accel_normal", "acceleration", "jerk", "radius"})

# -- visual design ------------------------------------------------------------------------------
_INK = palette.INK
_MUTED = palette.MUTED
_GRID = palette.GRID
_LINE = palette.LINE
_UNDEFINED = palette.UNDEFINED
_GLYPHS = palette.GLYPHS
_FLAG_TEXT = {
    Flag.STOPPED: "STOPPED: not moving (speed within noise)",
    Flag.STRAIGHT: "STRAIGHT: curvature within noise of 0",
    Flag.VAGUE: "VAGUE: curvature too uncertain to use",
    Flag.GAP: "GAP: spans a long time step",
    Flag.INVALID: "INVALID: non-finite input row",
    Flag.EDGE: "EDGE: near a track end, less accurate",
}
_FLAG_STYLE = {  # colour, hatch, description
    f: (palette.FLAGS[f.name], palette.HATCHES[f.name], text) for f, text in _FLAG_TEXT.items()
}
#: Samples drawn hollow (less reliable: EDGE, GAP, STOPPED) or not at all (INVALID) by :func:`gg`.
GG_DOUBTFUL = Flag.EDGE | Flag.GAP | Flag.STOPPED | Flag.INVALID
# Thin hatch lines where matplotlib can set them per artist (3.10 and later).
_THIN_HATCH: dict[str, float] = (
    {"hatch_linewidth": 0.5} if hasattr(PolyCollection, "set_hatch_linewidth") else {}
)
#: Half-width of the shaded bands in standard errors (two-sided 95 % of a normal distribution).
BAND_Z = 1.96
_REFERENCE_STYLES = list(
    zip(palette.REFERENCES, [(0, (5, 3)), (0, (2, 2)), (0, (8, 3, 2, 3)), (0, (1, 1))])
)
#: Display units of length per metre, for ``length_unit``.
LENGTH_UNITS = {"µm": 1e6, "um": 1e6, "mm": 1e3, "cm": 1e2, "m": 1.0, "km": 1e-3}
_SMALL, _LARGE = 0.5, 50e3  # auto length unit: mm below 0.5 m of extent, km above 50 km
_CAUTION_SIZE = 7.5  # points

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


def _wrap(text: str, fig: Figure, size: float, share: float = 0.92, em: float = 0.55) -> str:
    """Wrap text to about ``share`` of the figure's width (``em``: mean glyph width in ems)."""
    chars = max(24, int(fig.get_figwidth() * 72.0 * share / (em * size)))
    return "\n".join(textwrap.wrap(text, chars)) or text


def _title(ax: Any, title: Optional[str], subtitle: Optional[str]) -> None:
    """Title above subtitle, stacked so that they never overlap.

    The subtitle is the axes' left title (small, muted); the title is an annotation anchored on
    top of it, so their sizes and line counts do not matter. Both count in the axes' tight box,
    so constrained layout makes room for them, on 2-D and 3-D axes alike. Both are wrapped to
    the figure's width.
    """
    fig = ax.figure
    if subtitle:
        anchor = ax.set_title(
            _wrap(subtitle, fig, 8.5), loc="left", fontsize=8.5, color=_MUTED, pad=6.0
        )
        if title:
            ax.annotate(
                _wrap(title, fig, 11.0, em=0.62),
                xy=(0.0, 1.0),
                xycoords=anchor,
                xytext=(0.0, 4.0),
                textcoords="offset points",
                ha="left",
                va="bottom",
                fontsize=11,
                color=_INK,
                fontweight="bold",
                annotation_clip=False,
            )
    elif title:
        ax.set_title(
            _wrap(title, fig, 11.0, em=0.62),
            loc="left",
            fontsize=11,
            color=_INK,
            fontweight="bold",
            pad=8.0,
        )


def _caution(fig: Figure, ax: Any, text: str) -> Any:
    """Write a caution in small muted type under the axes, where it overlaps nothing.

    The caution hangs under the x axis (tick labels and label; for 3-D axes, under all three
    axes), left-aligned with the axes, and counts in the axes' tight box: constrained layout
    puts the figure's legend below it and other axes clear of it. Returns the Annotation.
    """

    def under_the_axes(renderer: Any) -> Any:
        axes = [ax.xaxis, ax.yaxis, ax.zaxis] if hasattr(ax, "zaxis") else [ax.xaxis]
        boxes = [a.get_tightbbox(renderer) for a in axes]
        boxes = [b for b in boxes if b is not None and b.height > 0]
        return Bbox.union(boxes) if boxes else ax.get_window_extent(renderer)

    return ax.annotate(
        _wrap(text, fig, _CAUTION_SIZE, share=0.85),
        xy=(0.0, 0.0),
        xycoords=("axes fraction", under_the_axes),
        xytext=(0.0, -4.0),
        textcoords="offset points",
        ha="left",
        va="top",
        fontsize=_CAUTION_SIZE,
        color=_MUTED,
        annotation_clip=False,
    )


def _new_figure(size: tuple[float, float]) -> Figure:
    return Figure(figsize=size, layout="constrained", facecolor=palette.PAPER)


class _Scaled(Formatter):
    """Tick labels of the values times ``factor`` (metres shown as mm or km, joules as kJ).

    Plain numbers with as few decimals as the ticks need to differ and read exactly, never an
    offset ("1e-7 + 2.4998e-2") that a reader has to add up; scientific notation only for very
    small or very large values. The axis keeps its data (and its locator) in the data's units.
    """

    def __init__(self, factor: float = 1.0) -> None:
        self.factor = float(factor)
        self.spec = ".0f"

    def set_locs(self, locs: Any) -> None:
        v = np.unique(np.asarray(locs, dtype=float) * self.factor)
        v = v[np.isfinite(v)]
        top = float(np.max(np.abs(v), initial=0.0))
        step = float(np.min(np.diff(v))) if len(v) > 1 else top
        tol = 1e-6 * step if step > 0 else 1e-12 * max(top, 1e-300)
        decimals = next(
            (n for n in range(16) if np.allclose(np.round(v, n), v, rtol=0.0, atol=tol)), 15
        )
        if top == 0.0 or 1e-4 <= top < 1e9:
            self.spec = f".{decimals}f"
        else:  # as many significant digits as the ticks need, all alike
            exact = (p for p in range(15) if all(abs(float(f"{x:.{p}e}") - x) <= tol for x in v))
            self.spec = f".{next(exact, 14)}e"

    def __call__(self, x: float, pos: Optional[int] = None) -> str:
        text = format(x * self.factor, self.spec)
        if float(text) == 0.0:
            text = text.lstrip("-")
        return text.replace("-", "\N{MINUS SIGN}")

    def format_data_short(self, value: float) -> str:
        return f"{value * self.factor:.6g}"


class _Lengths(NamedTuple):
    """How lengths are shown: the unit, the factor from the data's unit, what is scaled."""

    unit: str
    factor: float
    quantities: frozenset[str]  # results whose values are lengths and take the shown unit

    def apply(self, axis: Any) -> None:
        """Label the ticks of an axis holding lengths in the shown unit."""
        axis.set_major_formatter(_Scaled(self.factor))


def _lengths(u: dict[str, str], length_unit: str, d: _Samples) -> _Lengths:
    """Choose the unit lengths are shown in; adds it to ``u`` for arc length and radius."""
    data_unit = u["length"]
    if not isinstance(length_unit, str):
        raise TypeError(f"length_unit: expected a str, got {length_unit!r}")
    if length_unit == "auto":
        if data_unit != "m":  # the caller's own units: shown as they are
            unit, factor = data_unit, 1.0
        else:
            pts = d.position[np.isfinite(d.position).all(axis=1)]
            extent = float(np.max(np.ptp(pts, axis=0))) if len(pts) else 0.0
            unit = "mm" if 0.0 < extent < _SMALL else ("km" if extent > _LARGE else "m")
            factor = LENGTH_UNITS[unit]
    elif length_unit == data_unit:
        unit, factor = data_unit, 1.0
    elif length_unit in LENGTH_UNITS and data_unit in LENGTH_UNITS:
        unit, factor = length_unit, LENGTH_UNITS[length_unit] / LENGTH_UNITS[data_unit]
    else:
        known = ", ".join(repr(k) for k in LENGTH_UNITS)
        raise _core.InputError(
            f"length_unit: expected 'auto' or one of {known} (data in {data_unit!r}), "
            f"got {length_unit!r}"
        )
    scaled = frozenset(q for q in ("arclength", "radius") if q not in u)
    for q in scaled:
        u[q] = unit
    return _Lengths(unit, factor, scaled)


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
    for flag, (colour, hatch, text) in _FLAG_STYLE.items():  # six flags: a handful of layers
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
                hatch=hatch or None,
                **_THIN_HATCH,
                linewidths=0.0,
                alpha=palette.FLAG_ALPHA,
                zorder=0,
            ),
            autolim=False,
        )
        handles.append(
            Patch(
                facecolor=colour,
                edgecolor=colour,
                hatch=hatch or None,
                **_THIN_HATCH,
                linewidth=0.0,
                alpha=palette.FLAG_ALPHA,
                label=text,
            )
        )
    return handles


def _lines(
    ax: Any,
    x: F64,
    y: F64,
    d: _Samples,
    *,
    linewidth: float = 1.2,
    colour: Optional[str] = None,
    linestyle: Any = "solid",
) -> list[Any]:
    """One line per track (no segment across tracks); returns legend handles for a few tracks.

    Tracks take their own colours (up to eight), or all ``colour`` when it is given.
    """
    m = len(d.labels)
    keep = ~d.last[:-1]
    segs = np.stack([np.column_stack([x[:-1], y[:-1]]), np.column_stack([x[1:], y[1:]])], axis=1)
    seg_track = d.codes[:-1]
    finite = keep & np.isfinite(segs).all(axis=(1, 2))
    segs, seg_track = segs[finite], seg_track[finite]
    if colour is not None:
        lc = LineCollection(
            list(segs), colors=colour, linewidths=linewidth, linestyles=linestyle, zorder=3
        )
    elif m <= 8:
        colours = np.array(_track_colours(m), dtype=object)
        lc = LineCollection(
            list(segs),
            colors=list(colours[seg_track]),
            linewidths=linewidth,
            linestyles=linestyle,
            zorder=2,
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
    # The band does not set the axis limits: next to a stop the standard error of κ or a_n is
    # hundreds of times the value, and a band that wide flattened every curve of the panel to
    # zero. The estimates set the limits; a band wider than them is cut at the frame.
    limits, unset = ax.dataLim.frozen(), ax.ignore_existing_data_limits
    ax.fill_between(
        xs,
        lo,
        hi,
        facecolor=palette.BAND,
        edgecolor=palette.NONE,
        alpha=palette.BAND_ALPHA,
        zorder=1.5,
    )
    ax.dataLim.set(limits)
    ax.ignore_existing_data_limits = unset
    ax.update_datalim(np.column_stack([x, y])[np.isfinite(x) & np.isfinite(y)])
    # The figure legend's entry (the fill itself stays out of per-axes legends).
    return Patch(
        facecolor=palette.BAND,
        alpha=palette.BAND_ALPHA,
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
    d = _Samples(k, time=time, position=position, by=by)
    u = _units(units)
    lengths = _lengths(u, length_unit, d)
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
        if isinstance(color, str) and color in lengths.quantities:
            lengths.apply(cb.ax.yaxis)
        else:
            cb.formatter = _Scaled()  # plain numbers, no offset to add up
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
    names = [f"{a} [{lengths.unit}]" for a in d.axis_names]
    if d.dim == 3:
        _frame_3d(ax, finite, names)
    else:
        ax.update_datalim(finite)
        ax.autoscale_view()
        ax.set_aspect("equal", adjustable="datalim")
        ax.set_xlabel(names[0])
        ax.set_ylabel(names[1])
        _style(ax)
    for axis in (ax.xaxis, ax.yaxis, getattr(ax, "zaxis", None)):
        if axis is not None:
            lengths.apply(axis)
    if len(d.labels) <= 10 and len(finite):
        starts = p[d.first]
        starts = starts[np.isfinite(starts).all(axis=1)]
        ax.scatter(
            *starts.T, s=28, facecolors=palette.PAPER, edgecolors=_INK, linewidths=1.0, zorder=4
        )
        handles.append(
            Line2D(
                [],
                [],
                marker="o",
                linestyle="none",
                markerfacecolor=palette.PAPER,
                markeredgecolor=_INK,
                label="track start",
            )
        )
    if frames_every is not None:
        handles += _glyphs(ax, d, float(frames_every), finite, lengths)
    if elements is not None:
        handles += _draw_chain(ax, elements, d)
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
    _title(ax, title, sub)
    if isinstance(color, str) and color in CAUTIONED:
        _caution(fig, ax, CAUTION)
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


def _glyphs(ax: Any, d: _Samples, every: float, pts: F64, lengths: _Lengths) -> list[Any]:
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
        handles.append(Line2D([], [], color=_GLYPHS[key], linewidth=2, label=f"{symbol} ({text})"))
    if handles:
        frame = "Frenet" if d.frame == "frenet" else d.frame
        text = f"{frame} frame every {every * lengths.factor:g} {lengths.unit}"
        handles.insert(0, Patch(facecolor=palette.NONE, edgecolor=palette.NONE, label=text))
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
    d = _Samples(k, time=time, by=by)
    u = _units(units)
    lengths = _lengths(u, length_unit, d)
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
        ylabel = _label(name, u)
        if ax is None:  # our panels are short: a long label takes two lines, not its neighbours'
            ylabel = "\n".join(textwrap.wrap(ylabel, 20))
        a.set_ylabel(ylabel, fontsize=9)
        a.yaxis.set_major_locator(MaxNLocator(4))
        if name in lengths.quantities:
            lengths.apply(a.yaxis)
        else:
            a.yaxis.set_major_formatter(_Scaled())  # plain numbers, no offset to add up
        _style(a)
        if np.isfinite(y).any() and np.nanmin(y) < 0 < np.nanmax(y):
            a.axhline(0.0, color=_MUTED, linewidth=0.6, zorder=1)
    axes[-1].set_xlabel(_label(x, u))
    if x in lengths.quantities:
        lengths.apply(axes[-1].xaxis)  # shared by every panel
    else:
        axes[-1].xaxis.set_major_formatter(_Scaled())
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
        head = title or f"Profiles along the path (against {_QUANTITIES[x][0]})"
        _title(axes[0], head, sub)
    elif handles:
        axes[0].legend(handles=handles, fontsize=8, loc="best")
    if CAUTIONED.intersection(names):
        _caution(fig, axes[-1], CAUTION)
    return Plot(fig, axes)


# -- geometric elements -------------------------------------------------------------------------

#: Legend text of each element kind (``osculate.elements.KINDS``).
ELEMENT_TEXT = {
    "straight": "straight (κ = 0)",
    "arc": "circular arc (κ constant)",
    "spiral": "spiral (clothoid, κ linear in s)",
}
# The dash pattern of each kind where the fitted chain is drawn on a path: a cue besides colour.
_ELEMENT_DASH: dict[str, Any] = {
    "straight": (0, (7.0, 2.5)),
    "arc": "solid",
    "spiral": (0, (1.5, 1.5)),
}
_CHAIN_STEPS = 160  # chords per element where the chain is drawn


def _element_rows(el: Any, d: _Samples) -> tuple[npt.NDArray[np.bool_], npt.NDArray[np.intp]]:
    """Which elements lie on the tracks drawn, and the drawn track (code) of each of those."""
    if not isinstance(el, Elements):
        raise TypeError(
            f"elements: expected an osculate.elements.Elements table, got {type(el).__name__}"
        )
    if not d.grouped:
        return np.ones(len(el), dtype=bool), np.zeros(len(el), dtype=np.intp)
    names = d.labels.astype(str)
    mine = np.asarray(el.track).astype(str)
    keep = np.isin(mine, names)
    order = np.argsort(names)
    codes = order[np.searchsorted(names, mine[keep], sorter=order)]
    return keep, np.asarray(codes, dtype=np.intp)


def _chain_points(el: Elements, steps: int = _CHAIN_STEPS) -> F64:
    """Points of each element of the fitted chain, shape (elements, steps + 1, 2).

    The heading of an element is θ(u) = θ₀ + κ₀ u + (κ₁ − κ₀) u² / (2L) over its length L
    (curvature linear in arc length: constant on arcs, 0 on straights). Consecutive points are
    joined by the chord of the circular arc through both ends with the heading's change between
    them: length h·sin(Δθ/2)/(Δθ/2) along the mean heading. That is exact for straights and
    arcs; on a spiral each chord errs by about κ′h³/12 sideways, so the chain's drift stays
    below Δκ·L²/(12·steps²) (0.2 mm for a 40 m spiral into a 35 m radius).
    """
    length = np.where(np.isfinite(el.length), np.maximum(el.length, 0.0), 0.0)[:, None]
    k0, k1 = el.start_curvature[:, None], el.end_curvature[:, None]
    u = length * np.linspace(0.0, 1.0, steps + 1)[None, :]
    rate = np.divide(k1 - k0, length, out=np.zeros_like(length), where=length > 0)
    theta = el.heading[:, None] + k0 * u + 0.5 * rate * u**2
    turn = np.diff(theta, axis=1)
    chord = (length / steps) * np.sinc(turn / (2.0 * np.pi))  # np.sinc(x) = sin(πx)/(πx)
    mean = 0.5 * (theta[:, 1:] + theta[:, :-1])
    x = np.concatenate([el.x[:, None], el.x[:, None] + np.cumsum(chord * np.cos(mean), 1)], 1)
    y = np.concatenate([el.y[:, None], el.y[:, None] + np.cumsum(chord * np.sin(mean), 1)], 1)
    return np.stack([x, y], axis=-1)


def _draw_chain(ax: Any, el: Any, d: _Samples) -> list[Any]:
    """Draw the fitted chain of elements over a path, a dash pattern per kind; legend handles."""
    keep, codes = _element_rows(el, d)
    if d.dim == 2 and el.plane is not None:
        raise _core.InputError("elements: measured on a 3-D path, but the path drawn is planar")
    if d.dim == 3 and el.plane is None:
        raise _core.InputError("elements: measured on a planar path, but the path drawn is 3-D")
    flat = _chain_points(el)[keep]
    kind = el.kind[keep]
    if d.dim == 3:
        # The chain lies in the plane perpendicular to up (Elements.plane); it is drawn at the
        # height the path has at the same arc length along its track.
        e1, e2 = np.asarray(el.plane, dtype=float)
        up = np.cross(e1, e2)
        frac = np.linspace(0.0, 1.0, flat.shape[1])[None, :]
        s0, s1 = el.start_arclength[keep][:, None], el.end_arclength[keep][:, None]
        at = s0 + frac * (s1 - s0)
        height = np.full(at.shape, np.nan)
        s_all = d.get("arclength")
        h_all = d.position @ up
        for code in np.unique(codes):  # a handful of tracks
            rows = (d.codes == code) & np.isfinite(s_all) & np.isfinite(h_all)
            mine = codes == code
            if rows.any():
                height[mine] = np.interp(at[mine], s_all[rows], h_all[rows])
        pts = flat[..., :1] * e1 + flat[..., 1:] * e2 + height[..., None] * up
        # The chain lies on the path: drawn in order of zorder, not sorted by depth, so that the
        # path never hides it.
        ax.computed_zorder = False
    else:
        pts = flat
    handles: list[Any] = []
    for code, name in enumerate(KINDS):  # three kinds
        mine = kind == code
        if not mine.any():
            continue
        style = {
            "colors": palette.MODEL,
            "linewidths": 1.1,
            "linestyles": _ELEMENT_DASH[name],
            "zorder": 5,
        }
        if d.dim == 3:
            from mpl_toolkits.mplot3d.art3d import Line3DCollection

            lc: Any = Line3DCollection(list(pts[mine]), **style)
        else:
            lc = LineCollection(list(pts[mine]), **style)
        lc.set_gid(f"elements:{name}")
        ax.add_collection(lc)
        handles.append(
            Line2D(
                [],
                [],
                color=palette.MODEL,
                linewidth=1.1,
                linestyle=_ELEMENT_DASH[name],
                label=f"fitted {ELEMENT_TEXT[name]}",
            )
        )
    return handles


def _subset(d: _Samples, keep: npt.NDArray[np.bool_]) -> _Samples:
    """Keep the drawn rows of ``d`` (sorted order), tracks renumbered; do not call its ``get``."""
    import copy

    out = copy.copy(d)
    present = np.unique(d.codes[keep])
    out.labels = d.labels[present]
    out.codes = np.searchsorted(present, d.codes[keep])
    out.position = d.position[keep]
    out.t = None if d.t is None else d.t[keep]
    out.n = int(keep.sum())
    same = out.codes[1:] == out.codes[:-1]
    out.first = np.concatenate([[True], ~same])[: out.n]
    out.last = np.concatenate([~same, [True]])[: out.n]
    return out


def _signed_curvature(d: _Samples, up: Any) -> tuple[F64, str]:
    """Signed curvature (left turns positive, sorted rows) and the words of the subtitle."""
    if up is not None:
        if d.dim == 2:
            raise _core.InputError(f"up: only applies to 3-D paths, got {up!r} for a 2-D path")
        u = np.asarray(up, dtype=float).reshape(-1)
        if u.shape != (3,) or not np.all(np.isfinite(u)) or not np.linalg.norm(u) > 0:
            raise _core.InputError(f"up: expected a finite, non-zero 3-vector, got {up!r}")
        u = u / np.linalg.norm(u)
        v, a = d.vector("velocity")[:, :3], d.vector("acceleration")[:, :3]
        side = np.sign(np.cross(v, a) @ u)  # left of the direction of motion about up: +
        kappa = np.where(side == 0, 0.0, side) * d.get("curvature")
        return kappa, "left turns about up = (" + ", ".join(f"{c:.3g}" for c in u) + ") positive"
    kappa = d.get("signed_curvature") if d.has("signed_curvature") else np.full(d.n, np.nan)
    if d.dim == 3 and not np.isfinite(kappa).any():
        raise _core.InputError(
            "up: 3-D paths need the vertical to sign the curvature (pass up=, or compute the "
            "kinematics with it)"
        )
    return kappa, "left turns positive"


def curvature(
    k: Any,
    elements: Optional[Elements] = None,
    *,
    by: Any = None,
    up: Optional[npt.ArrayLike] = None,
    tracks: Any = None,
    units: Units = None,
    ax: Any = None,
    title: Optional[str] = None,
    bands: bool = True,
    length_unit: str = "auto",
) -> Plot:
    """Draw the curvature diagram: signed curvature against arc length, and an element model.

    Parameters
    ----------
    k : Kinematics or pandas.DataFrame
        Results of :func:`osculate.kinematics` or ``df.osc.kinematics`` (``by`` names the
        DataFrame's track column).
    elements : Elements, optional
        From :func:`osculate.elements.elements_of` (or :func:`osculate.elements.elements`) on
        the same tracks: its piecewise-linear model is drawn over the estimate, one segment per
        element (straights at 0, arcs constant, spirals linear in arc length), and each
        element's span is shaded by kind, the kinds named in the legend.
    by : optional
        DataFrame input only: the track column.
    up : array_like of 3 floats, optional
        For 3-D paths: the vertical, to sign the curvature as sign((v × a)·up)·κ (left turns
        about ``up`` positive, as the turn table does). Without it a 3-D path needs the signed
        curvature that ``osc.kinematics(..., up=...)`` computed, (v × a)·up / |v|³: the same
        on a level path, smaller where the path climbs or falls (see Notes).
    tracks : label or sequence of labels, optional
        Draw only these tracks (e.g. one lap); default all.
    units : mapping, optional
        Unit labels, as in :func:`path`.
    ax : matplotlib Axes, optional
        Draw here instead of in a new figure.
    title : str, optional
        Title.
    bands : bool, default True
        Shade ±1.96 standard errors of the curvature where the results have them.
    length_unit : str, default "auto"
        The unit of arc length, as in :func:`path`; curvature stays in 1/(the data's unit).

    Returns
    -------
    Plot
        ``(figure, axes)``.

    Notes
    -----
    Every track starts at arc length 0, so laps overlay. For 3-D paths the element table is
    fitted to the kinematics' own signed curvature (v × a)·up / |v|³, the component of the
    curvature vector along ``up``; to draw it over the curve it was fitted to, leave ``up``
    unset. With ``up`` the curve is the full κ with the turn's sign, which exceeds it on a
    helix, say, by the factor |v| / |v_horizontal|. The model is drawn over the arc-length
    span each element covers in the results (``start_arclength`` to ``end_arclength``). Every
    curvature diagram carries :data:`CAUTION`: radius and curvature are what an alignment is
    judged by, and an element table reconstructed from logged data describes how the path was
    driven, not its design.

    Examples
    --------
    A straight, a 60 m spiral into a 200 m radius and 80 m of arc (positions from Fresnel
    integrals, as in :func:`osculate.elements.elements`):

    >>> import matplotlib
    >>> matplotlib.use("Agg")
    >>> import numpy as np
    >>> import osculate as osc
    >>> from osculate.elements import elements_of
    >>> from scipy.special import fresnel
    >>> A = np.sqrt(60.0 * 200.0)
    >>> s = np.arange(0.0, 220.0, 2.0)
    >>> S, C = fresnel(np.clip(s - 80.0, 0.0, 60.0) / (A * np.sqrt(np.pi)))
    >>> sx, sy = 80.0 + A * np.sqrt(np.pi) * C, A * np.sqrt(np.pi) * S
    >>> th, v = 60.0 / 400.0, np.clip(s - 140.0, 0.0, None)
    >>> cx = sx[s >= 140][0] - 200.0 * np.sin(th)
    >>> cy = sy[s >= 140][0] + 200.0 * np.cos(th)
    >>> x = np.where(s < 80, s, np.where(s < 140, sx, cx + 200.0 * np.sin(th + v / 200.0)))
    >>> y = np.where(s < 80, 0.0, np.where(s < 140, sy, cy - 200.0 * np.cos(th + v / 200.0)))
    >>> k = osc.kinematics(s / 20.0, np.column_stack([x, y]), method="smooth")
    >>> el = elements_of(k)
    >>> fig, ax = osc.plot.curvature(k, el)
    >>> ax.get_xlabel(), ax.get_ylabel()
    ('arc length s [m]', 'signed curvature (left +) [1/m]')
    >>> [t.get_text() for t in fig.legends[0].get_texts()][-3:]
    ['straight (κ = 0)', 'circular arc (κ constant)', 'spiral (clothoid, κ linear in s)']
    >>> words = " ".join(" ".join(t.get_text().split()) for t in fig.findobj(matplotlib.text.Text))
    >>> osc.plot.CAUTION in words
    True
    """
    d = _Samples(k, by=by)
    u = _units(units)
    s = d.get("arclength")
    kappa, sign_words = _signed_curvature(d, up)
    kappa = np.where(np.isfinite(kappa), kappa, np.nan)
    se = d.standard_error("signed_curvature") if bands else None
    if se is None and bands:
        se = d.standard_error("curvature")
    if tracks is not None:
        if not d.grouped:
            raise _core.InputError("tracks: the results have no tracks to choose from")
        wanted = np.atleast_1d(np.asarray(tracks)).astype(str)
        missing = sorted(set(wanted.tolist()) - set(d.labels.astype(str).tolist()))
        if missing:
            raise _core.InputError(f"tracks: no track {missing[0]!r} in the results")
        keep = np.isin(d.labels.astype(str)[d.codes], wanted)
        s, kappa = s[keep], kappa[keep]
        se = None if se is None else se[keep]
        d = _subset(d, keep)
    lengths = _lengths(u, length_unit, d)
    own = ax is None
    if ax is None:
        fig = _new_figure((8.2, 4.8))
        ax = fig.add_subplot()
    else:
        fig = ax.figure
    handles: list[Any] = []
    model: list[Any] = []
    if elements is not None:
        keep_el, _ = _element_rows(elements, d)
        lo, hi = elements.start_arclength[keep_el], elements.end_arclength[keep_el]
        k0, k1 = elements.start_curvature[keep_el], elements.end_curvature[keep_el]
        kind = elements.kind[keep_el]
        for code, name in enumerate(KINDS):  # three kinds: one shading each
            mine = kind == code
            if not mine.any():
                continue
            a, b = lo[mine], hi[mine]
            verts = np.stack(
                [
                    np.column_stack([a, np.zeros_like(a)]),
                    np.column_stack([a, np.ones_like(a)]),
                    np.column_stack([b, np.ones_like(a)]),
                    np.column_stack([b, np.zeros_like(a)]),
                ],
                axis=1,
            )
            shade = PolyCollection(
                list(verts),
                transform=ax.get_xaxis_transform(),
                facecolors=palette.ELEMENTS[name],
                edgecolors=palette.NONE,
                alpha=palette.ELEMENT_ALPHA,
                zorder=0,
            )
            shade.set_gid(f"elements:{name}")
            ax.add_collection(shade, autolim=False)
            handles.append(
                Patch(
                    facecolor=palette.ELEMENTS[name],
                    alpha=palette.ELEMENT_ALPHA,
                    label=ELEMENT_TEXT[name],
                )
            )
        segs = np.stack([np.column_stack([lo, k0]), np.column_stack([hi, k1])], axis=1)
        lc = LineCollection(list(segs), colors=palette.MODEL, linewidths=1.8, zorder=4)
        lc.set_gid("elements:model")
        ax.add_collection(lc)
        if len(segs):
            ax.update_datalim(segs.reshape(-1, 2))
        model = [
            Line2D(
                [],
                [],
                color=palette.MODEL,
                linewidth=1.8,
                label=f"fitted elements ({len(segs)}): straights, arcs, spirals",
            )
        ]
    track_handles = _lines(ax, s, kappa, d)
    band = [] if se is None else [_band(ax, s, kappa, se, d)]
    ax.axhline(0.0, color=_MUTED, linewidth=0.6, zorder=1)
    ax.set_xlabel(_label("arclength", u))
    ax.set_ylabel(_label("signed_curvature", u))
    lengths.apply(ax.xaxis)
    ax.yaxis.set_major_formatter(_Scaled())
    finite_x = s[np.isfinite(s)]
    if finite_x.size:
        ax.set_xlim(float(finite_x.min()), float(finite_x.max()))
    _style(ax)
    handles = track_handles + band + model + handles
    if handles and own:
        fig.legend(
            handles=handles,
            loc="outside lower center",
            ncols=min(3, len(handles)),
            fontsize=8,
            frameon=False,
        )
    elif handles:
        ax.legend(handles=handles, loc="best", fontsize=8, framealpha=0.85)
    sub = (f"estimator: {d.estimator};  " if d.estimator else "") + sign_words
    _title(ax, title or "Curvature diagram: signed curvature against arc length", sub)
    _caution(fig, ax, CAUTION)
    return Plot(fig, ax)


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
        values in g. Each must name its source; there are no built-in limits. The caution line
        of the figure then says that they are indicative and lists the source of each value.
    color : str or None, default "speed"
        Colour the points by this quantity (None: one colour).
    units : mapping, optional
        Only metres and seconds are accepted here (g is in m/s²); other unit labels are refused.
    cmap : str or Colormap, default "viridis"
        Colour map of ``color``.
    ax : matplotlib Axes, optional
        Draw here instead of in a new figure (the caution then hangs under its x axis).
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
    flagged EDGE, GAP or STOPPED are drawn as hollow grey rings: their estimates are less
    reliable; INVALID rows have no values and are not drawn. The legend names them all
    (:data:`GG_DOUBTFUL`). Every g-g diagram carries :data:`CAUTION`.

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
    >>> words = " ".join(" ".join(t.get_text().split()) for t in fig.findobj(matplotlib.text.Text))
    >>> osc.plot.CAUTION in words, "0.4 g from example value from the caller's brief" in words
    (True, True)

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
    doubtful = (d.flags() & int(GG_DOUBTFUL)) != 0
    good, weak = ok & ~doubtful, ok & doubtful
    own = ax is None
    if ax is None:
        fig = _new_figure((7.0, 7.6 if refs else 7.0))
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
        cb.formatter = _Scaled()
    else:
        ax.scatter(lat_g[good], lon_g[good], s=7, color=_LINE, alpha=0.7, linewidths=0, zorder=3)
    if weak.any():
        ax.scatter(
            lat_g[weak],
            lon_g[weak],
            s=14,
            facecolors=palette.NONE,
            edgecolors=_MUTED,
            linewidths=0.6,
            zorder=2,
        )
    if doubtful.any():  # INVALID rows alone are not drawn, but the legend still says why
        hollow = [f.name for f in Flag if f & GG_DOUBTFUL and f != Flag.INVALID]
        handles.append(
            Line2D(
                [],
                [],
                marker="o",
                linestyle="none",
                markerfacecolor=palette.NONE,
                markeredgecolor=_MUTED,
                label=f"flagged {', '.join(str(n) for n in hollow)}: less reliable; "
                "INVALID: no values, not drawn",
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
    if handles and own:
        fig.legend(handles=handles, loc="outside lower left", fontsize=8, frameon=False)
    elif handles:
        ax.legend(handles=handles, loc="best", fontsize=7.5, framealpha=0.85)
    _title(
        ax,
        title or "Acceleration share: lateral against longitudinal",
        "1 g = 9.80665 m/s² (standard gravity)"
        + (f";  estimator: {d.estimator}" if d.estimator else ""),
    )
    note = CAUTION
    if refs:
        sources = "; ".join(f"{r:g} g from {s}" for r, s in refs)
        note = f"{CAUTION} {LIMITS_CAUTION} {sources}."
    _caution(fig, ax, note)
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
    d = _Samples(k, time=time, by=by)
    u = _units(units)
    lengths = _lengths(u, length_unit, d)
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
        fig = _new_figure((7.6, 4.8))
        ax = fig.add_subplot()
    else:
        fig = ax.figure
    _lines(ax, xs, w, d, linewidth=1.6)
    dashed = (0, (4, 3))
    if true_w is not None:
        _lines(ax, xs, true_w, d, linewidth=1.0, colour=palette.TRUTH, linestyle=dashed)
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
    colours = _track_colours(m)
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
    ax.axhline(0.0, color=_MUTED, linewidth=0.7, zorder=1)
    ax.set_xlabel(_label(x, u))
    if x in lengths.quantities:
        lengths.apply(ax.xaxis)
    else:
        ax.xaxis.set_major_formatter(_Scaled())
    ax.set_ylabel(_label("work", {**u, "energy": shown}))
    ax.yaxis.set_major_formatter(_Scaled(factor))
    _style(ax)
    _title(ax, title or "Work done along the path", "W = ∫ F·dr; negative: energy taken out")
    return Plot(fig, ax)


def _track_last(w: F64, d: _Samples) -> F64:
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
