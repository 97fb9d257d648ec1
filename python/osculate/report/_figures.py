"""The report's figures: files and captions, the truth drawn over a plot, laps named laps."""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np
import numpy.typing as npt

from .._palette import TRUTH

__all__ = ["DEMO_LIMIT", "Figure", "lap_legends", "overlay_truth", "save_figure"]

F64 = npt.NDArray[np.float64]

DEMO_LIMIT = (
    0.3,
    "an invented design envelope of the demo vehicle (not from any code or standard)",
)


@dataclasses.dataclass(frozen=True)
class Figure:
    """A figure file of the report and its one-line caption."""

    path: Any
    caption: str


def overlay_truth(ax: Any, x: F64, y: F64, label: str, loc: str = "best") -> None:
    """Overlay a ground-truth curve (dashed) on a panel, named in a small legend of its own.

    A legend the plot already drew on the panel (e.g. the totals of :func:`osculate.plot.work`)
    stays the panel's legend, where it was; the truth's legend is added beside it at ``loc``.
    """
    from matplotlib.legend import Legend

    (line,) = ax.plot(x, y, color=TRUTH, linestyle=(0, (4, 3)), linewidth=1.0, zorder=3)
    style = {"loc": loc, "fontsize": 7.5, "framealpha": 0.85}
    if ax.get_legend() is None:
        ax.legend(handles=[line], labels=[label], **style)
    else:
        ax.add_artist(Legend(ax, [line], [label], **style))


def lap_legends(fig: Any) -> None:
    """Name the tracks of a figure's legends laps: "track 2" reads "lap 2".

    The electric vehicle has one track per lap, its track labels being the lap numbers.
    """
    from matplotlib.legend import Legend

    panels = [c for a in fig.axes for c in a.get_children() if isinstance(c, Legend)]
    for legend in [*fig.legends, *panels]:  # a figure's few legends
        for text in legend.get_texts():  # a few entries each
            label = text.get_text()
            if label.startswith("track "):
                text.set_text("lap " + label[len("track ") :])


def save_figure(p: Any, target: Any) -> Any:
    p.savefig(target, dpi=130)
    return target
