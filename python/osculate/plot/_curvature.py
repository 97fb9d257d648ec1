"""The curvature diagram: signed curvature against arc length, and a fitted element model."""

from __future__ import annotations

from typing import Any, Optional

import numpy as np
import numpy.typing as npt
from matplotlib.collections import LineCollection, PolyCollection
from matplotlib.lines import Line2D
from matplotlib.patches import Patch

from .. import _core
from .. import _palette as palette
from ..elements import KINDS, Elements
from ._elements import ELEMENT_TEXT, element_rows
from ._figure import CAUTION, Plot, add_caution, apply_style, new_figure, put_title
from ._layers import se_band, track_lines
from ._samples import Samples
from ._units import PlainTicks, Units, axis_label, length_scale, unit_labels

__all__ = ["curvature"]

F64 = npt.NDArray[np.float64]


def _subset(d: Samples, keep: npt.NDArray[np.bool_]) -> Samples:
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


def _signed_curvature(d: Samples, up: Any) -> tuple[F64, str]:
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
    d = Samples(k, by=by)
    u = unit_labels(units)
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
    lengths = length_scale(u, length_unit, d)
    own = ax is None
    if ax is None:
        fig = new_figure((8.2, 4.8))
        ax = fig.add_subplot()
    else:
        fig = ax.figure
    handles: list[Any] = []
    model: list[Any] = []
    if elements is not None:
        keep_el, _ = element_rows(elements, d)
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
    track_handles = track_lines(ax, s, kappa, d)
    band = [] if se is None else [se_band(ax, s, kappa, se, d)]
    ax.axhline(0.0, color=palette.MUTED, linewidth=0.6, zorder=1)
    ax.set_xlabel(axis_label("arclength", u))
    ax.set_ylabel(axis_label("signed_curvature", u))
    lengths.apply(ax.xaxis)
    ax.yaxis.set_major_formatter(PlainTicks())
    finite_x = s[np.isfinite(s)]
    if finite_x.size:
        ax.set_xlim(float(finite_x.min()), float(finite_x.max()))
    apply_style(ax)
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
    put_title(ax, title or "Curvature diagram: signed curvature against arc length", sub)
    add_caution(fig, ax, CAUTION)
    return Plot(fig, ax)
