"""Element tables on the plots: which elements lie on the tracks drawn, the fitted chain."""

from __future__ import annotations

from typing import Any

import numpy as np
import numpy.typing as npt
from matplotlib.collections import LineCollection
from matplotlib.lines import Line2D

from .. import _core
from .. import _palette as palette
from ..elements import KINDS, Elements
from ._samples import Samples

__all__ = ["ELEMENT_TEXT", "draw_chain", "element_rows"]

F64 = npt.NDArray[np.float64]

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


def element_rows(el: Any, d: Samples) -> tuple[npt.NDArray[np.bool_], npt.NDArray[np.intp]]:
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


def draw_chain(ax: Any, el: Any, d: Samples) -> list[Any]:
    """Draw the fitted chain of elements over a path, a dash pattern per kind; legend handles."""
    keep, codes = element_rows(el, d)
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
