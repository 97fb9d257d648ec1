"""The figure and its words: :class:`Plot`, our look, titles and the caution line."""

from __future__ import annotations

import io
import textwrap
from typing import Any, NamedTuple, Optional

from matplotlib.figure import Figure
from matplotlib.transforms import Bbox

from .. import _palette as palette

__all__ = [
    "CAUTION",
    "CAUTIONED",
    "LIMITS_CAUTION",
    "Plot",
    "add_caution",
    "apply_style",
    "new_figure",
    "put_title",
]

CAUTION = (
    "Indicative values from logged data; local codes and licensed engineers decide acceptability."
)
"""The caution line of every figure that shows lateral acceleration, jerk or radius."""

LIMITS_CAUTION = "Reference circles are indicative only; their values and sources:"
"""Follows :data:`CAUTION` on a g-g diagram with reference circles, before each source."""

#: Quantities whose figures carry :data:`CAUTION`: lateral (normal) acceleration, the total
#: acceleration (it contains the lateral part), jerk and radius of curvature.
CAUTIONED = frozenset({"accel_normal", "acceleration", "jerk", "radius"})

_CAUTION_SIZE = 7.5  # points


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


def apply_style(ax: Any, *, grid: bool = True) -> None:
    """Our look: light grid behind the data, no top/right frame, muted ticks."""
    for side in ("top", "right"):
        if side in ax.spines:
            ax.spines[side].set_visible(False)
    for side in ("left", "bottom"):
        if side in ax.spines:
            ax.spines[side].set_color(palette.MUTED)
            ax.spines[side].set_linewidth(0.8)
    ax.tick_params(colors=palette.MUTED, labelcolor=palette.INK, labelsize=8.5, length=3, width=0.7)
    ax.xaxis.label.set_color(palette.INK)
    ax.yaxis.label.set_color(palette.INK)
    ax.xaxis.label.set_size(9.5)
    ax.yaxis.label.set_size(9.5)
    if grid:
        ax.grid(True, color=palette.GRID, linewidth=0.7)
        ax.set_axisbelow(True)


def _wrap(text: str, fig: Figure, size: float, share: float = 0.92, em: float = 0.55) -> str:
    """Wrap text to about ``share`` of the figure's width (``em``: mean glyph width in ems)."""
    chars = max(24, int(fig.get_figwidth() * 72.0 * share / (em * size)))
    return "\n".join(textwrap.wrap(text, chars)) or text


def put_title(ax: Any, title: Optional[str], subtitle: Optional[str]) -> None:
    """Title above subtitle, stacked so that they never overlap.

    The subtitle is the axes' left title (small, muted); the title is an annotation anchored on
    top of it, so their sizes and line counts do not matter. Both count in the axes' tight box,
    so constrained layout makes room for them, on 2-D and 3-D axes alike. Both are wrapped to
    the figure's width.
    """
    fig = ax.figure
    if subtitle:
        anchor = ax.set_title(
            _wrap(subtitle, fig, 8.5), loc="left", fontsize=8.5, color=palette.MUTED, pad=6.0
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
                color=palette.INK,
                fontweight="bold",
                annotation_clip=False,
            )
    elif title:
        ax.set_title(
            _wrap(title, fig, 11.0, em=0.62),
            loc="left",
            fontsize=11,
            color=palette.INK,
            fontweight="bold",
            pad=8.0,
        )


def add_caution(fig: Figure, ax: Any, text: str) -> Any:
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
        color=palette.MUTED,
        annotation_clip=False,
    )


def new_figure(size: tuple[float, float]) -> Figure:
    return Figure(figsize=size, layout="constrained", facecolor=palette.PAPER)
