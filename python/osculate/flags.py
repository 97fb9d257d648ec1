"""Bit flags that mark samples whose estimates are degenerate or less accurate."""

from __future__ import annotations

import enum

__all__ = ["Flag"]


class Flag(enum.IntFlag):
    """Per-sample flags; a sample may carry several.

    Attributes
    ----------
    STOPPED
        Speed below ``min_speed``: tangent, normal, binormal, curvature, torsion, radius and angular
        speed are NaN (the direction of motion is undefined).
    STRAIGHT
        Curvature below ``min_curvature`` or indistinguishable from zero in floating point:
        curvature is 0, radius infinite, normal, binormal and torsion NaN.
    EDGE
        A one-sided or narrowed stencil was used (near the ends of a track): lower-order estimate.
    GAP
        The estimate spans a time step longer than ``gap_factor`` times the track's median step,
        or a skipped INVALID row.
    INVALID
        The input row is not finite (or its track has too few finite rows): every result is NaN.
    VAGUE
        Moving and curved, but the standard error of the curvature (or of the speed) exceeds
        ``max_relative_se`` (default 1/4) of its value: the values are defined but too uncertain
        to use, and per-track extremes skip the sample. Set only where standard errors exist.

    With ``min_speed="auto"`` a sample is also STOPPED when its speed is within ``significance``
    (default 3) standard errors of zero, and with ``min_curvature="auto"`` STRAIGHT likewise for
    the curvature.

    Examples
    --------
    >>> from osculate import Flag
    >>> Flag(5) == Flag.STOPPED | Flag.EDGE
    True
    >>> [f.name for f in Flag]
    ['STOPPED', 'STRAIGHT', 'EDGE', 'GAP', 'INVALID', 'VAGUE']
    """

    STOPPED = 1
    STRAIGHT = 2
    EDGE = 4
    GAP = 8
    INVALID = 16
    VAGUE = 32
