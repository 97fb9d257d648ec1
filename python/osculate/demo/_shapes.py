"""Pieces the invented scenarios share: plane curves, speed timelines, a jittery log clock.

Plane curves are chains of straights, circular arcs and clothoids; timelines are rest-to-rest
moves and holds.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import numpy.typing as npt

__all__ = ["STANDARD_GRAVITY", "PlaneCurve", "Timeline", "log_clock", "plane_curve", "timeline"]

F64 = npt.NDArray[np.float64]
STANDARD_GRAVITY = 9.80665  # m/s², standard gravity (SI brochure; CGPM 1901)

_GL_X, _GL_W = np.polynomial.legendre.leggauss(6)


@dataclasses.dataclass(frozen=True)
class PlaneCurve:
    """A plane curve whose curvature is piecewise linear in arc length.

    Straights (κ = 0), circular arcs (κ constant) and clothoids (κ linear in s) are all pieces of
    this kind. The heading is the exact integral of κ; positions are integrated numerically: on a
    fine grid aligned with the pieces, then from the nearest grid node to the query point.
    """

    starts: F64  # arc length at the start of each piece and the total length at the end
    k0: F64  # curvature at the start of each piece
    k1: F64  # curvature at the end of each piece
    theta: F64  # heading at the start of each piece (and at the end)
    grid_s: F64
    grid_xy: F64

    @property
    def length(self) -> float:
        return float(self.starts[-1])

    def _piece(self, s: F64) -> tuple[npt.NDArray[np.intp], F64, F64]:
        j = np.clip(np.searchsorted(self.starts, s, side="right") - 1, 0, len(self.k0) - 1)
        return j, s - self.starts[j], self.starts[j + 1] - self.starts[j]

    def curvature(self, s: npt.ArrayLike) -> F64:
        """Signed curvature (left turns positive) at arc length ``s``."""
        j, u, span = self._piece(np.asarray(s, dtype=float))
        return self.k0[j] + (self.k1[j] - self.k0[j]) * u / span

    def heading(self, s: npt.ArrayLike) -> F64:
        """Heading angle (radians from +x, counter-clockwise) at arc length ``s``."""
        j, u, span = self._piece(np.asarray(s, dtype=float))
        return self.theta[j] + self.k0[j] * u + (self.k1[j] - self.k0[j]) * u**2 / (2 * span)

    def _chord(self, a: F64, b: F64) -> F64:
        """∫ (cos θ, sin θ) ds from a to b (Gauss–Legendre, 6 nodes; a, b in one piece)."""
        mid, half = 0.5 * (a + b), 0.5 * (b - a)
        th = self.heading(mid[:, None] + half[:, None] * _GL_X)
        return half[:, None] * np.column_stack([np.cos(th) @ _GL_W, np.sin(th) @ _GL_W])

    def point(self, s: npt.ArrayLike) -> F64:
        """Position at arc length ``s`` (shape (n, 2))."""
        s = np.asarray(s, dtype=float)
        i = np.clip(np.searchsorted(self.grid_s, s, side="right") - 1, 0, len(self.grid_s) - 2)
        return self.grid_xy[i] + self._chord(self.grid_s[i], s)


def plane_curve(pieces: list[tuple[float, float, float]], step: float = 0.25) -> PlaneCurve:
    """Build a curve from ``(length, κ_start, κ_end)`` pieces, starting at the origin heading +x."""
    p = np.asarray(pieces, dtype=float)
    lengths, k0, k1 = p[:, 0], p[:, 1], p[:, 2]
    starts = np.concatenate([[0.0], np.cumsum(lengths)])
    theta = np.concatenate([[0.0], np.cumsum(0.5 * (k0 + k1) * lengths)])
    # Grid nodes at every piece boundary and about every `step` metres in between, so that each
    # grid interval lies inside one piece, where the heading is a polynomial.
    counts = np.maximum(np.ceil(lengths / step).astype(np.int64), 1)
    piece = np.repeat(np.arange(len(lengths)), counts)
    within = np.arange(counts.sum()) - np.repeat(np.cumsum(counts) - counts, counts)
    grid_s = np.append(starts[piece] + lengths[piece] * within / counts[piece], starts[-1])
    curve = PlaneCurve(starts, k0, k1, theta, grid_s, np.zeros((len(grid_s), 2)))
    steps = curve._chord(grid_s[:-1], grid_s[1:])
    grid_xy = np.vstack([np.zeros((1, 2)), np.cumsum(steps, axis=0)])
    return dataclasses.replace(curve, grid_xy=grid_xy)


@dataclasses.dataclass(frozen=True)
class Timeline:
    """Distance travelled along a path against time: rest-to-rest moves and holds.

    A move of distance D at cruise speed V ramps the speed up and down over ``ramp`` seconds each
    as V(1 − cos(πτ/ramp))/2, so acceleration is continuous; a hold is a move with V = 0.
    """

    start: F64  # start time of each phase, and the end time
    dist0: F64  # distance at the start of each phase
    dist: F64  # distance of each phase
    vmax: F64
    ramp: F64

    @property
    def duration(self) -> float:
        return float(self.start[-1])

    def at(self, t: npt.ArrayLike) -> tuple[F64, F64, F64]:
        """Distance, speed and its time derivative at times ``t``."""
        t = np.asarray(t, dtype=float)
        j = np.clip(np.searchsorted(self.start, t, side="right") - 1, 0, len(self.dist) - 1)
        tau = t - self.start[j]
        span = self.start[j + 1] - self.start[j]
        v, ta, d = self.vmax[j], self.ramp[j], self.dist[j]
        up, down = tau < ta, tau > span - ta
        back = span - tau
        s = np.where(up, 0.5 * v * (tau - ta / np.pi * np.sin(np.pi * tau / ta)), 0.0)
        s = np.where(~up & ~down, 0.5 * v * ta + v * (tau - ta), s)
        s = np.where(down, d - 0.5 * v * (back - ta / np.pi * np.sin(np.pi * back / ta)), s)
        speed = np.where(up, 0.5 * v * (1 - np.cos(np.pi * tau / ta)), v)
        speed = np.where(down, 0.5 * v * (1 - np.cos(np.pi * back / ta)), speed)
        accel = np.where(up, 0.5 * v * np.pi / ta * np.sin(np.pi * tau / ta), 0.0)
        accel = np.where(down, -0.5 * v * np.pi / ta * np.sin(np.pi * back / ta), accel)
        return self.dist0[j] + s, speed, accel


def timeline(phases: list[tuple[float, float, float]]) -> Timeline:
    """Phases ``(distance, cruise speed, ramp seconds)``; a hold is ``(0, 0, seconds)``."""
    p = np.asarray(phases, dtype=float)
    dist, vmax, ramp = p[:, 0], p[:, 1], p[:, 2]
    moving = vmax > 0
    if np.any(dist[moving] < vmax[moving] * ramp[moving]):
        raise ValueError("a move is too short for its speed ramps")
    span = np.where(moving, ramp + dist / np.where(moving, vmax, 1.0), ramp)
    ramp = np.where(moving, ramp, span)  # a hold: one long "ramp" at zero speed
    start = np.concatenate([[0.0], np.cumsum(span)])
    dist0 = np.concatenate([[0.0], np.cumsum(dist)])[:-1]
    return Timeline(start, dist0, dist, vmax, ramp)


def log_clock(duration: float, rate: float, rng: np.random.Generator, jitter: float) -> F64:
    """Nominal ``rate`` Hz clock with uniform jitter of ± ``jitter`` of a step, inside [0, T]."""
    dt = 1.0 / rate
    t = np.arange(0.0, duration + 0.5 * dt, dt)
    t = t + rng.uniform(-jitter, jitter, t.shape) * dt
    return np.clip(t, 0.0, duration)
