"""Layers shared by the plots: colour scales, one line per track, flag shading, 95 % bands."""

from __future__ import annotations

from typing import Any, Optional, Union

import numpy as np
import numpy.typing as npt
from matplotlib.collections import LineCollection, PolyCollection
from matplotlib.colors import Colormap, Normalize
from matplotlib.lines import Line2D
from matplotlib.patches import Patch

from .. import _palette as palette
from ..flags import Flag
from ._samples import Samples

__all__ = [
    "BAND_Z",
    "colour_map",
    "pair_mean",
    "robust_norm",
    "se_band",
    "shade_flags",
    "track_colours",
    "track_lines",
]

F64 = npt.NDArray[np.float64]

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
# Thin hatch lines where matplotlib can set them per artist (3.10 and later).
_THIN_HATCH: dict[str, float] = (
    {"hatch_linewidth": 0.5} if hasattr(PolyCollection, "set_hatch_linewidth") else {}
)
#: Half-width of the shaded bands in standard errors (two-sided 95 % of a normal distribution).
BAND_Z = 1.96


def pair_mean(a: F64, b: F64) -> F64:
    """Mean of two arrays, the defined one where only one is finite, NaN where neither is."""
    return np.where(np.isnan(a), b, np.where(np.isnan(b), a, 0.5 * (a + b)))


def robust_norm(values: F64) -> tuple[Normalize, str]:
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


def colour_map(cmap: Union[str, Colormap]) -> Colormap:
    from matplotlib import colormaps

    cm = colormaps[cmap] if isinstance(cmap, str) else cmap
    return cm.with_extremes(bad=palette.UNDEFINED)


def track_colours(m: int) -> list[Any]:
    from matplotlib import colormaps

    if m == 1:
        return [palette.LINE]
    return [colormaps["viridis"](x) for x in np.linspace(0.0, 0.82, m)]


def _runs(mask: npt.NDArray[np.bool_], first: npt.NDArray[np.bool_], last: npt.NDArray[np.bool_]):
    """Start and end rows (sorted order) of runs of True that do not cross a track boundary."""
    prev = np.concatenate([[False], mask[:-1]]) & ~first
    nxt = np.concatenate([mask[1:], [False]]) & ~last
    return np.flatnonzero(mask & ~prev), np.flatnonzero(mask & ~nxt)


def shade_flags(ax: Any, x: F64, flags: npt.NDArray[np.uint8], d: Samples, which: int) -> list[Any]:
    """Shade x-intervals of flagged samples; returns the legend handles of the flags present."""
    handles = []
    prev_x = np.concatenate([[np.nan], x[:-1]])
    next_x = np.concatenate([x[1:], [np.nan]])
    prev_x[d.first] = np.nan
    next_x[d.last] = np.nan
    left_edge = pair_mean(prev_x, x)
    right_edge = pair_mean(x, next_x)
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


def track_lines(
    ax: Any,
    x: F64,
    y: F64,
    d: Samples,
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
        colours = np.array(track_colours(m), dtype=object)
        lc = LineCollection(
            list(segs),
            colors=list(colours[seg_track]),
            linewidths=linewidth,
            linestyles=linestyle,
            zorder=2,
        )
    else:
        lc = LineCollection(list(segs), colors=palette.LINE, linewidths=0.6, alpha=0.35, zorder=2)
    ax.add_collection(lc)
    if len(segs):
        ax.update_datalim(segs.reshape(-1, 2))
    ax.autoscale_view()
    if not d.grouped or m > 8:
        return []
    names = d.track_names()
    return [
        Line2D([], [], color=c, linewidth=1.6, label=f"track {names[i]}")
        for i, c in enumerate(track_colours(m))
    ]


def se_band(ax: Any, x: F64, y: F64, se: F64, d: Samples) -> Any:
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
