"""The electric vehicle lapping a loop of straights, clothoid transitions and arcs."""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np
import numpy.typing as npt

from ._shapes import STANDARD_GRAVITY, log_clock, plane_curve

__all__ = ["SpiralLoop", "spiral_loop"]

F64 = npt.NDArray[np.float64]


@dataclasses.dataclass(frozen=True)
class SpiralLoop:
    """A small electric vehicle lapping a loop with clothoid transitions (invented).

    Each half of the loop is a straight, a clothoid whose curvature grows linearly from 0 to
    1/``bend_radius`` over ``spiral_length``, a circular arc of ``bend_radius`` and the mirror
    clothoid back to 0; the two halves turn left by 180° each. Laps start and end in the middle
    of a straight (the start/finish line). The speed follows the loop: fastest
    mid-straight, slowest mid-bend. Positions are logged at about 20 Hz with clock jitter and
    noise; the resistance force (aerodynamic drag plus rolling resistance, opposite to the
    direction of travel) is logged beside them with sensor noise.

    Attributes
    ----------
    t : ndarray, shape (n,)
        Log times (s).
    xy : ndarray, shape (n, 2)
        Logged positions (m), with noise.
    lap : ndarray of int, shape (n,)
        Lap index of each row, counted from 0 (one track per lap); the report of
        ``osculate demo`` calls index 0 lap 1.
    force : ndarray, shape (n, 2)
        Logged resistance force (N), with noise.
    xy_true, distance, speed, curvature, accel_tangential, accel_normal : ndarray
        Ground truth per row: position, distance driven since the first start (m), speed (m/s),
        signed curvature (1/m), dv/dt and v²κ (m/s²).
    segment : ndarray of str, shape (n,)
        ``"straight"``, ``"spiral"`` or ``"arc"``.
    bend_radius, spiral_length, straight_length, arc_length, lap_length : float
        The loop's geometry (m).
    spiral_rate : float
        dκ/ds on the entry clothoids, 1 / (``bend_radius`` · ``spiral_length``) (1/m²).
    lap_distance : ndarray, shape (laps,)
        True distance between the first and last row of each lap (m), by lap index. It is short
        of ``lap_length`` by the part of the start/finish crossing that falls between two rows:
        laps are cut mid-straight, at full speed, where rows are about 0.7 m apart.
    drag_work : ndarray, shape (laps,)
        True work of the resistance force from the first to the last row of each lap (J).
    cumulative_drag_work : ndarray, shape (n,)
        True work of the resistance force from the first row of the row's lap to the row (J); at
        each lap's last row it equals that lap's ``drag_work``.
    mass, drag_area, rolling, air_density : float
        Vehicle mass (kg), drag coefficient × frontal area (m²), rolling-resistance coefficient,
        air density (kg/m³).
    noise, force_noise : float
        Standard deviation of the position noise (m) and of the force noise (N).
    """

    t: F64
    xy: F64
    lap: npt.NDArray[np.int64]
    force: F64
    xy_true: F64
    distance: F64
    speed: F64
    curvature: F64
    accel_tangential: F64
    accel_normal: F64
    segment: npt.NDArray[np.str_]
    bend_radius: float
    spiral_length: float
    straight_length: float
    arc_length: float
    lap_length: float
    spiral_rate: float
    lap_distance: F64
    drag_work: F64
    cumulative_drag_work: F64
    mass: float
    drag_area: float
    rolling: float
    air_density: float
    noise: float
    force_noise: float

    def resistance(self, speed: npt.ArrayLike) -> F64:
        """Magnitude of the resistance force (N) at ``speed`` (m/s): ½ρ·CdA·v² + Crr·m·g."""
        v = np.asarray(speed, dtype=float)
        return 0.5 * self.air_density * self.drag_area * v**2 + self.rolling * self.mass * (
            STANDARD_GRAVITY
        )

    def to_pandas(self) -> Any:
        """Return the log as a table: ``lap``, ``t``, ``x``, ``y``, ``force_x``, ``force_y``.

        Returns
        -------
        pandas.DataFrame
            One row per logged sample.
        """
        import pandas as pd

        return pd.DataFrame(
            {
                "lap": self.lap,
                "t": self.t,
                "x": self.xy[:, 0],
                "y": self.xy[:, 1],
                "force_x": self.force[:, 0],
                "force_y": self.force[:, 1],
            }
        )


def spiral_loop(
    laps: int = 3,
    *,
    seed: int = 5,
    noise: float = 0.05,
    force_noise: float = 3.0,
) -> SpiralLoop:
    """Generate the electric-vehicle loop with clothoid transitions.

    Parameters
    ----------
    laps : int
        Number of laps (one track each).
    seed : int
        Seed of the clock jitter and the noise.
    noise : float
        Standard deviation of the position noise per axis (m); 5 cm is typical of a
        carrier-phase (RTK) GNSS receiver.
    force_noise : float
        Standard deviation of the force noise per axis (N).

    Returns
    -------
    SpiralLoop
        The log and the ground truth.

    Notes
    -----
    The clothoid (Euler spiral) has curvature linear in arc length, the usual transition between
    a straight and a circular bend on roads and railways. The path is built by integrating the
    heading θ(s) = ∫κ ds exactly and the position (cos θ, sin θ) numerically (Gauss–Legendre on a
    grid of about 25 cm aligned with the pieces, so the truth is exact to about 1e-12 m).

    Examples
    --------
    >>> from osculate.demo import spiral_loop
    >>> d = spiral_loop(laps=1)
    >>> d.bend_radius, d.spiral_length, round(d.lap_length, 3)  # 2 (150 + 40 + 35π)
    (35.0, 40.0, 599.911)

    The loop closes on itself, in position and heading:

    >>> import numpy as np
    >>> e = spiral_loop(laps=2, noise=0.0)
    >>> i = np.argmin(np.abs(e.distance - e.lap_length))
    >>> bool(np.hypot(*(e.xy_true[i] - e.xy_true[0])) < abs(e.distance[i] - e.lap_length) + 1e-9)
    True
    """
    rng = np.random.default_rng(seed)
    straight, spiral, radius = 150.0, 40.0, 35.0
    arc = np.pi * radius - spiral  # the two clothoids turn by spiral / (2 radius) each
    k = 1.0 / radius
    bend = [(spiral, 0.0, k), (arc, k, k), (spiral, k, 0.0)]
    straights = [(0.5 * straight, 0.0, 0.0), (straight, 0.0, 0.0), (0.5 * straight, 0.0, 0.0)]
    loop = plane_curve([straights[0], *bend, straights[1], *bend, straights[2]])
    lap_len = loop.length
    v_fast, v_slow = 14.0, 9.0
    centre = 0.5 * straight + spiral + 0.5 * arc

    def speed_at(s: F64) -> F64:
        phase = 2 * np.pi * (s - centre) / (0.5 * lap_len)
        return 0.5 * (v_fast + v_slow) - 0.5 * (v_fast - v_slow) * np.cos(phase)

    def dspeed_ds(s: F64) -> F64:
        phase = 2 * np.pi * (s - centre) / (0.5 * lap_len)
        return 0.5 * (v_fast - v_slow) * np.sin(phase) * 2 * np.pi / (0.5 * lap_len)

    # Time as a function of distance, t(s) = ∫ ds / v, on a fine grid; inverted by interpolation.
    s_fine = np.linspace(0.0, laps * lap_len, int(laps * lap_len / 0.02) + 1)
    inv_v = 1.0 / speed_at(s_fine)
    t_fine = np.concatenate([[0.0], np.cumsum(0.5 * (inv_v[1:] + inv_v[:-1]) * np.diff(s_fine))])
    t = log_clock(float(t_fine[-1]), 20.0, rng, 0.2)
    dist = np.interp(t, t_fine, s_fine)
    u = np.mod(dist, lap_len)
    lap = np.minimum(dist // lap_len, laps - 1).astype(np.int64)
    xy_true = loop.point(u)
    speed = speed_at(dist)
    curvature = loop.curvature(u)
    heading = loop.heading(u)
    piece = np.clip(np.searchsorted(loop.starts, u, side="right") - 1, 0, 8)
    kinds = ["straight", "spiral", "arc", "spiral"]
    segment = np.array([*kinds, *kinds, "straight"])[piece]
    xy = xy_true + rng.normal(0.0, noise, xy_true.shape) if noise > 0 else xy_true.copy()
    model = SpiralLoop(
        t=t,
        xy=xy,
        lap=lap,
        force=np.zeros_like(xy),
        xy_true=xy_true,
        distance=dist,
        speed=speed,
        curvature=curvature,
        accel_tangential=speed * dspeed_ds(dist),
        accel_normal=np.abs(curvature) * speed**2,
        segment=segment,
        bend_radius=radius,
        spiral_length=spiral,
        straight_length=straight,
        arc_length=float(arc),
        lap_length=lap_len,
        spiral_rate=1.0 / (radius * spiral),
        lap_distance=np.zeros(laps),
        drag_work=np.zeros(laps),
        cumulative_drag_work=np.zeros(len(t)),
        mass=450.0,
        drag_area=0.62,
        rolling=0.012,
        air_density=1.2,
        noise=float(noise),
        force_noise=float(force_noise),
    )
    pull = model.resistance(speed)
    force = -pull[:, None] * np.column_stack([np.cos(heading), np.sin(heading)])
    force = force + rng.normal(0.0, force_noise, force.shape) if force_noise > 0 else force
    # True work of the resistance between the first and last row of each lap: −∫ R(v(s)) ds.
    r_fine = model.resistance(speed_at(s_fine))
    step = np.diff(s_fine)
    work_fine = np.concatenate([[0.0], np.cumsum(0.5 * (r_fine[1:] + r_fine[:-1]) * step)])
    first = np.searchsorted(lap, np.arange(laps), side="left")
    last = np.searchsorted(lap, np.arange(laps), side="right") - 1
    lap_distance = dist[last] - dist[first]
    at_last, at_first = (
        np.interp(dist[last], s_fine, work_fine),
        np.interp(dist[first], s_fine, work_fine),
    )
    drag_work = -(at_last - at_first)
    so_far = -(np.interp(dist, s_fine, work_fine) - at_first[lap])
    return dataclasses.replace(
        model,
        force=force,
        lap_distance=lap_distance,
        drag_work=drag_work,
        cumulative_drag_work=so_far,
    )
