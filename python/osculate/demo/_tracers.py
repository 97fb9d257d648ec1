"""Tracer particles in a Lamb–Oseen vortex: many short tracks and the velocity on a grid."""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np
import numpy.typing as npt

__all__ = ["SwirlTracers", "swirl_tracers"]

F64 = npt.NDArray[np.float64]


@dataclasses.dataclass(frozen=True)
class SwirlTracers:
    """Tracer particles in a steady Lamb–Oseen vortex, filmed at a fixed frame rate (invented).

    The swirl velocity at radius r is Γ/(2πr)·(1 − exp(−r²/r_c²)), so every particle runs round a
    circle about the centre at constant speed: radius of curvature r₀ and a_n = v²/r₀ exactly.
    Tracks are short (40–150 frames) and start at random frames; positions carry tracking noise.

    Attributes
    ----------
    t : ndarray, shape (n,)
        Frame times (s).
    xy : ndarray, shape (n, 2)
        Tracked positions (m), with noise.
    particle : ndarray of int, shape (n,)
        Track id of each row.
    radius : ndarray, shape (tracks,)
        True radius of each particle's circle (m), by track id.
    speed : ndarray, shape (n,)
        True speed of each row (m/s).
    circulation, core_radius : float
        Γ (m²/s) and r_c (m) of the vortex.
    grid_x, grid_y : ndarray
        Coordinates of the velocity grid (m), increasing.
    grid_velocity : ndarray, shape (len(grid_x), len(grid_y), 2)
        Velocity at the grid nodes, indexed ``[i, j]`` for ``(grid_x[i], grid_y[j])`` (m/s).
    noise : float
        Standard deviation of the tracking noise per axis (m).
    fps : float
        Frame rate (1/s).
    """

    t: F64
    xy: F64
    particle: npt.NDArray[np.int64]
    radius: F64
    speed: F64
    circulation: float
    core_radius: float
    grid_x: F64
    grid_y: F64
    grid_velocity: F64
    noise: float
    fps: float

    def swirl_speed(self, r: npt.ArrayLike) -> F64:
        """Swirl speed Γ/(2πr)·(1 − exp(−r²/r_c²)) at radius ``r`` (0 at the centre)."""
        r = np.asarray(r, dtype=float)
        safe = np.where(r > 0, r, 1.0)
        v = self.circulation / (2 * np.pi * safe) * -np.expm1(-((safe / self.core_radius) ** 2))
        return np.where(r > 0, v, 0.0)

    def velocity(self, points: npt.ArrayLike) -> F64:
        """Velocity (m/s) at points of shape (m, 2): a vectorized field for line integrals."""
        p = np.asarray(points, dtype=float)
        r = np.hypot(p[:, 0], p[:, 1])
        safe = np.where(r > 0, r, 1.0)
        w = self.swirl_speed(r) / safe
        return np.column_stack([-w * p[:, 1], w * p[:, 0]])

    def enclosed_circulation(self, r: npt.ArrayLike) -> F64:
        """Circulation ∮ u·dr round a centred circle of radius ``r``: Γ(1 − exp(−r²/r_c²))."""
        r = np.asarray(r, dtype=float)
        return -self.circulation * np.expm1(-((r / self.core_radius) ** 2))

    def to_pandas(self) -> Any:
        """Return the tracks as a table: ``particle``, ``t``, ``x``, ``y``.

        Returns
        -------
        pandas.DataFrame
            One row per tracked position.
        """
        import pandas as pd

        return pd.DataFrame(
            {"particle": self.particle, "t": self.t, "x": self.xy[:, 0], "y": self.xy[:, 1]}
        )


def swirl_tracers(
    tracks: int = 240, *, seed: int = 3, noise: float = 1e-5, fps: float = 50.0
) -> SwirlTracers:
    """Generate tracer tracks in a Lamb–Oseen vortex and its velocity on a grid.

    Parameters
    ----------
    tracks : int
        Number of particle tracks.
    seed : int
        Seed of the starting points, track lengths and noise.
    noise : float
        Standard deviation of the tracking noise per axis (m); 10 µm is a tenth of a pixel at
        0.1 mm per pixel.
    fps : float
        Frame rate (1/s).

    Returns
    -------
    SwirlTracers
        Tracks, ground truth and the gridded velocity.

    Notes
    -----
    Lamb–Oseen vortex: H. Lamb, *Hydrodynamics* (6th ed., 1932, §334a) and C. W. Oseen (1912);
    here steady, with circulation Γ = 4e-3 m²/s and core radius r_c = 15 mm, a vortex in a
    water tank.

    Examples
    --------
    >>> from osculate.demo import swirl_tracers
    >>> d = swirl_tracers(tracks=10)
    >>> len(d.radius), d.grid_velocity.shape
    (10, (81, 81, 2))
    >>> round(float(d.enclosed_circulation(1.0)), 6)  # all of Γ far from the core
    0.004
    """
    rng = np.random.default_rng(seed)
    gamma, core = 4e-3, 0.015
    r_min, r_max = 0.008, 0.07
    r0 = np.sqrt(rng.uniform(r_min**2, r_max**2, tracks))  # uniform over the annulus
    phase0 = rng.uniform(0.0, 2 * np.pi, tracks)
    frames = rng.integers(40, 151, tracks)
    first = rng.integers(0, 500, tracks)
    particle = np.repeat(np.arange(tracks), frames)
    offsets = np.concatenate([[0], np.cumsum(frames)])
    frame = first[particle] + np.arange(offsets[-1]) - offsets[:-1][particle]
    t = frame / fps
    field = SwirlTracers(
        t=t,
        xy=np.zeros((len(t), 2)),
        particle=particle,
        radius=r0,
        speed=np.zeros(len(t)),
        circulation=gamma,
        core_radius=core,
        grid_x=np.linspace(-0.08, 0.08, 81),
        grid_y=np.linspace(-0.08, 0.08, 81),
        grid_velocity=np.zeros((81, 81, 2)),
        noise=float(noise),
        fps=float(fps),
    )
    v = field.swirl_speed(r0)
    angle = phase0[particle] + (v / r0)[particle] * t
    xy = r0[particle, None] * np.column_stack([np.cos(angle), np.sin(angle)])
    xy = xy + rng.normal(0.0, noise, xy.shape) if noise > 0 else xy
    gx, gy = np.meshgrid(field.grid_x, field.grid_y, indexing="ij")
    grid = field.velocity(np.column_stack([gx.ravel(), gy.ravel()])).reshape(*gx.shape, 2)
    return dataclasses.replace(field, xy=xy, speed=v[particle], grid_velocity=grid)
