"""The g-g diagram: lateral against longitudinal acceleration in g, with reference circles."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any, Optional, Union

import numpy as np
from matplotlib.colors import Colormap
from matplotlib.lines import Line2D
from matplotlib.patches import Circle

from .. import _core
from .. import _palette as palette
from ..flags import Flag
from ._figure import CAUTION, LIMITS_CAUTION, Plot, add_caution, apply_style, new_figure, put_title
from ._layers import colour_map, robust_norm
from ._samples import Samples
from ._units import PlainTicks, Units, axis_label, unit_labels

__all__ = ["GG_DOUBTFUL", "STANDARD_GRAVITY", "gg"]

Limits = Union[Mapping[str, float], Sequence[Any], None]

STANDARD_GRAVITY = 9.80665
"""Standard gravity in m/s² (SI brochure; 3rd CGPM, 1901): the g of :func:`gg`."""

GG_DOUBTFUL = Flag.EDGE | Flag.GAP | Flag.STOPPED | Flag.INVALID
_REFERENCE_STYLES = list(
    zip(palette.REFERENCES, [(0, (5, 3)), (0, (2, 2)), (0, (8, 3, 2, 3)), (0, (1, 1))])
)


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
    u = unit_labels(units)
    if u["length"] != "m" or u["time"] != "s":
        raise _core.InputError(
            "units: the g-g diagram divides by g = 9.80665 m/s², so it needs metres and seconds"
        )
    refs = _limits(limits)
    d = Samples(k, by=by)
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
        fig = new_figure((7.0, 7.6 if refs else 7.0))
        ax = fig.add_subplot()
    else:
        fig = ax.figure
    handles: list[Any] = []
    if color is not None:
        c = d.get(color)
        norm, extend = robust_norm(c[good])
        sc = ax.scatter(
            lat_g[good],
            lon_g[good],
            c=c[good],
            cmap=colour_map(cmap),
            norm=norm,
            s=7,
            alpha=0.8,
            linewidths=0,
            zorder=3,
        )
        cax = ax.inset_axes((1.03, 0.0, 0.035, 1.0))  # follows the square box of the axes
        cb = fig.colorbar(sc, cax=cax, extend=extend)
        cb.set_label(axis_label(color, u), color=palette.INK, fontsize=9.5)
        cb.outline.set_edgecolor(palette.MUTED)
        cb.ax.tick_params(labelsize=8.5, colors=palette.MUTED, labelcolor=palette.INK)
        cb.formatter = PlainTicks()
    else:
        ax.scatter(
            lat_g[good], lon_g[good], s=7, color=palette.LINE, alpha=0.7, linewidths=0, zorder=3
        )
    if weak.any():
        ax.scatter(
            lat_g[weak],
            lon_g[weak],
            s=14,
            facecolors=palette.NONE,
            edgecolors=palette.MUTED,
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
                markeredgecolor=palette.MUTED,
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
    ax.axhline(0.0, color=palette.MUTED, linewidth=0.7, zorder=1)
    ax.axvline(0.0, color=palette.MUTED, linewidth=0.7, zorder=1)
    ax.set_xlim(-reach, reach)
    ax.set_ylim(-reach, reach)
    ax.set_aspect("equal")
    side = "lateral acceleration, left turn + [g]" if use_signed else "|a_n| = κv² (unsigned) [g]"
    ax.set_xlabel(side)
    ax.set_ylabel("longitudinal acceleration a_t, speeding up + [g]")
    apply_style(ax)
    if handles and own:
        fig.legend(handles=handles, loc="outside lower left", fontsize=8, frameon=False)
    elif handles:
        ax.legend(handles=handles, loc="best", fontsize=7.5, framealpha=0.85)
    put_title(
        ax,
        title or "Acceleration share: lateral against longitudinal",
        "1 g = 9.80665 m/s² (standard gravity)"
        + (f";  estimator: {d.estimator}" if d.estimator else ""),
    )
    note = CAUTION
    if refs:
        sources = "; ".join(f"{r:g} g from {s}" for r, s in refs)
        note = f"{CAUTION} {LIMITS_CAUTION} {sources}."
    add_caution(fig, ax, note)
    return Plot(fig, ax)
