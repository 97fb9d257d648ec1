"""The oval test loop: straights and half circles, exact or noisy (the simplest check)."""

from __future__ import annotations

import dataclasses

import numpy as np
import numpy.typing as npt

__all__ = ["TestLoop", "test_loop"]

F64 = npt.NDArray[np.float64]


@dataclasses.dataclass(frozen=True)
class TestLoop:
    """A small electric vehicle lapping an oval test loop.

    Two straights are joined by two half-circle bends of one radius; the speed swings smoothly
    between 8 and 12 m/s.

    Attributes
    ----------
    t : ndarray, shape (n,)
        Log times in seconds, nominally 20 Hz with clock jitter.
    xy : ndarray, shape (n, 2)
        Logged positions in metres (east, north).
    lap : ndarray of int, shape (n,)
        Lap number of each row (one track per lap).
    bend_radius, straight_length : float
        Ground truth of the loop geometry in metres.
    in_bend : ndarray of bool, shape (n,)
        Rows on a bend (ground truth).
    speed : ndarray, shape (n,)
        True speed in m/s.
    """

    t: F64
    xy: F64
    lap: npt.NDArray[np.int64]
    bend_radius: float
    straight_length: float
    in_bend: npt.NDArray[np.bool_]
    speed: F64


def _oval(s: F64, straight: float, radius: float) -> tuple[F64, npt.NDArray[np.bool_]]:
    """Point at arc length ``s`` on the oval; the first straight runs east from the origin."""
    half = np.pi * radius
    lap = 2 * straight + 2 * half
    u = np.mod(s, lap)
    x = np.empty_like(u)
    y = np.empty_like(u)
    a = u < straight
    x[a], y[a] = u[a], 0.0
    b = (u >= straight) & (u < straight + half)
    ang = (u[b] - straight) / radius
    x[b], y[b] = straight + radius * np.sin(ang), radius - radius * np.cos(ang)
    c = (u >= straight + half) & (u < 2 * straight + half)
    x[c], y[c] = straight - (u[c] - straight - half), 2 * radius
    d = u >= 2 * straight + half
    ang = (u[d] - 2 * straight - half) / radius
    x[d], y[d] = -radius * np.sin(ang), radius + radius * np.cos(ang)
    return np.column_stack([x, y]), b | d


def test_loop(laps: int = 3, *, seed: int = 7, noise: float = 0.0) -> TestLoop:
    """Generate the oval test-loop scenario.

    Parameters
    ----------
    laps : int
        Number of laps (one track each).
    seed : int
        Seed of the clock jitter and noise.
    noise : float
        Standard deviation of position noise in metres (0: exact positions).

    Returns
    -------
    TestLoop
        Logs and ground truth.

    Examples
    --------
    >>> from osculate.demo import test_loop
    >>> d = test_loop(laps=1)
    >>> d.bend_radius, d.xy.shape[1], bool(d.in_bend.any())
    (40.0, 2, True)
    """
    rng = np.random.default_rng(seed)
    straight, radius = 120.0, 40.0
    lap_len = 2 * straight + 2 * np.pi * radius
    dt = 0.05
    n_per_lap = int(lap_len / 9.0 / dt) + 40
    t_nom = np.arange(laps * n_per_lap) * dt
    t = t_nom + rng.uniform(-0.2, 0.2, t_nom.shape) * dt
    # Speed 12 m/s on the straights easing towards 8 m/s mid-bend: s(t) = v0 t + A sin(2π t / P).
    period = lap_len / 10.0 / 2.0
    s = 10.0 * t - 2.0 * period / (2 * np.pi) * np.sin(2 * np.pi * t / period)
    speed = 10.0 - 2.0 * np.cos(2 * np.pi * t / period)
    xy, in_bend = _oval(s, straight, radius)
    xy = xy + rng.normal(0.0, noise, xy.shape) if noise > 0 else xy
    lap = (s // lap_len).astype(np.int64)
    return TestLoop(t, xy, lap, radius, straight, in_bend, speed)
