"""Invented demo scenarios with known ground truth, generated with a fixed seed.

Every scenario is made up by the code below (no recorded data): the true path is built from its
geometry and a speed law, then sampled on an uneven clock and spoiled with noise like a real log,
so estimates can be compared with the truth. :func:`osculate.report.run` is what ``osculate demo``
does with them.

Scenarios
---------
:func:`survey_flight`
    A survey drone given in WGS 84 latitude, longitude and height: a vertical climb, lawn-mower
    legs joined by half-circle turns of known radius, a hover stop and a short GPS outage.
:func:`spiral_loop`
    A small electric vehicle lapping a closed loop of straights, clothoid (Euler spiral)
    transitions and constant-radius bends, with a logged resistance force.
:func:`swirl_tracers`
    Tracer particles in a Lamb–Oseen vortex: many short tracks and the velocity on a grid.
:func:`test_loop`
    An oval of straights and half circles, exact or noisy (the simplest check).
"""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np
import numpy.typing as npt

__all__ = [
    "SpiralLoop",
    "SurveyFlight",
    "SwirlTracers",
    "TestLoop",
    "spiral_loop",
    "survey_flight",
    "swirl_tracers",
    "test_loop",
]

F64 = npt.NDArray[np.float64]
STANDARD_GRAVITY = 9.80665  # m/s², standard gravity (SI brochure; CGPM 1901)


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


# -- geometry shared by the scenarios ------------------------------------------------------------

_GL_X, _GL_W = np.polynomial.legendre.leggauss(6)


@dataclasses.dataclass(frozen=True)
class _PlaneCurve:
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


def _plane_curve(pieces: list[tuple[float, float, float]], step: float = 0.25) -> _PlaneCurve:
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
    curve = _PlaneCurve(starts, k0, k1, theta, grid_s, np.zeros((len(grid_s), 2)))
    steps = curve._chord(grid_s[:-1], grid_s[1:])
    grid_xy = np.vstack([np.zeros((1, 2)), np.cumsum(steps, axis=0)])
    return dataclasses.replace(curve, grid_xy=grid_xy)


@dataclasses.dataclass(frozen=True)
class _Timeline:
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


def _timeline(phases: list[tuple[float, float, float]]) -> _Timeline:
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
    return _Timeline(start, dist0, dist, vmax, ramp)


def _log_clock(duration: float, rate: float, rng: np.random.Generator, jitter: float) -> F64:
    """Nominal ``rate`` Hz clock with uniform jitter of ± ``jitter`` of a step, inside [0, T]."""
    dt = 1.0 / rate
    t = np.arange(0.0, duration + 0.5 * dt, dt)
    t = t + rng.uniform(-jitter, jitter, t.shape) * dt
    return np.clip(t, 0.0, duration)


# -- survey drone -------------------------------------------------------------------------------


@dataclasses.dataclass(frozen=True)
class SurveyFlight:
    """A survey drone's GPS log (invented): climb, lawn-mower legs, a hover stop.

    The drone climbs vertically from rest to ``altitude``, holds, then flies four straight
    legs of ``leg_length`` joined by half-circle turns of ``turn_radius`` (alternately left and
    right, so neighbouring legs are ``2 * turn_radius`` apart), cruising at ``cruise_speed``. It
    stops to hover for ``hover`` seconds in the middle of the third leg and comes to rest at the
    end. The receiver logs at about 10 Hz with clock jitter, loses a few fixes at random and has
    one outage of ``outage`` seconds on the first leg.

    Attributes
    ----------
    t : ndarray, shape (n,)
        Seconds since take-off (uneven).
    lat, lon, height : ndarray, shape (n,)
        Logged WGS 84 latitude and longitude (degrees) and ellipsoidal height (metres), with noise.
    origin : tuple of float
        (lat, lon, h) of the take-off point, the origin of the true east-north-up frame.
    enu : ndarray, shape (n, 3)
        True east, north, up positions in metres about ``origin``.
    speed, accel_tangential, curvature : ndarray, shape (n,)
        True speed (m/s), its rate of change (m/s²) and curvature (1/m; 0 on the climb and the
        legs).
    turn : ndarray of int, shape (n,)
        Turn number of each row (0, 1, ...) or -1 off the turns.
    distance : ndarray, shape (n,)
        True distance flown since take-off (m).
    turn_radius, leg_length, altitude, cruise_speed, hover, outage : float
        The flight plan (m, m, m, m/s, s, s).
    hover_span : tuple of float
        Start and end time of the hover (s).
    length : float
        Length of the whole flight path (m).
    noise_horizontal, noise_vertical : float
        Standard deviation of the position noise (m).
    start : str
        UTC time of take-off, for :meth:`to_pandas`.
    """

    t: F64
    lat: F64
    lon: F64
    height: F64
    origin: tuple[float, float, float]
    enu: F64
    speed: F64
    accel_tangential: F64
    curvature: F64
    turn: npt.NDArray[np.int64]
    distance: F64
    turn_radius: float
    leg_length: float
    altitude: float
    cruise_speed: float
    hover: float
    hover_span: tuple[float, float]
    outage: float
    length: float
    noise_horizontal: float
    noise_vertical: float
    start: str

    def to_pandas(self) -> Any:
        """Return the log as a table: ``drone``, ``time`` (UTC), ``lat``, ``lon``, ``height``.

        Returns
        -------
        pandas.DataFrame
            One row per fix.
        """
        import pandas as pd

        time = pd.Timestamp(self.start) + pd.to_timedelta(self.t, unit="s")
        return pd.DataFrame(
            {
                "drone": "survey-1",
                "time": time,
                "lat": self.lat,
                "lon": self.lon,
                "height": self.height,
            }
        )


def survey_flight(
    *,
    seed: int = 11,
    noise_horizontal: float = 0.3,
    noise_vertical: float = 0.5,
    turn_radius: float = 30.0,
) -> SurveyFlight:
    """Generate the survey-drone scenario.

    Parameters
    ----------
    seed : int
        Seed of the clock jitter, the dropped fixes and the noise.
    noise_horizontal, noise_vertical : float
        Standard deviation of the position noise in metres, per horizontal axis and vertically.
    turn_radius : float
        Radius of the half-circle turns between legs (m).

    Returns
    -------
    SurveyFlight
        The log (latitude, longitude, height) and the ground truth.

    Examples
    --------
    >>> from osculate.demo import survey_flight
    >>> f = survey_flight()
    >>> f.turn_radius, f.altitude, round(f.length, 1), bool(f.t.size > 2000)  # 60 + 4·240 + 3·30π
    (30.0, 60.0, 1302.7, True)

    The noise-free log returns to the true east-north-up path to rounding:

    >>> import numpy as np
    >>> import osculate as osc
    >>> g = survey_flight(noise_horizontal=0.0, noise_vertical=0.0)
    >>> enu = osc.geodetic_to_enu(g.lat, g.lon, g.height, origin=g.origin)
    >>> bool(np.abs(enu - g.enu).max() < 1e-6)
    True
    """
    from .geodesy import enu_to_geodetic

    rng = np.random.default_rng(seed)
    legs, leg, altitude, cruise = 4, 240.0, 60.0, 6.0
    hover, outage, climb_speed = 8.0, 2.5, 2.5
    k = 1.0 / turn_radius
    pieces: list[tuple[float, float, float]] = []
    for i in range(legs):  # a plan of a handful of pieces, not a loop over samples
        pieces.append((leg, 0.0, 0.0))
        if i < legs - 1:
            sign = 1.0 if i % 2 == 0 else -1.0
            pieces.append((np.pi * turn_radius, sign * k, sign * k))
    plan = _plane_curve(pieces)
    hover_at = 2 * leg + 2 * np.pi * turn_radius + 0.5 * leg
    clock = _timeline(
        [
            (altitude, climb_speed, 4.0),
            (0.0, 0.0, 3.0),
            (hover_at, cruise, 4.0),
            (0.0, 0.0, hover),
            (plan.length - hover_at, cruise, 4.0),
        ]
    )
    hover_span = (float(clock.start[3]), float(clock.start[4]))
    t = _log_clock(clock.duration, 10.0, rng, 0.15)
    keep = rng.uniform(size=t.shape) > 0.03  # fixes lost at random
    dist, speed, accel = clock.at(t)
    out_start = float(np.interp(altitude + 0.5 * leg, dist, t))
    keep &= (t < out_start) | (t > out_start + outage)
    keep[[0, -1]] = True
    t, dist, speed, accel = t[keep], dist[keep], speed[keep], accel[keep]
    s_plan = np.maximum(dist - altitude, 0.0)
    on_plan = dist > altitude
    enu = np.zeros((len(t), 3))
    enu[:, :2] = np.where(on_plan[:, None], plan.point(s_plan), 0.0)
    enu[:, 2] = np.minimum(dist, altitude)
    curvature = np.where(on_plan, np.abs(plan.curvature(s_plan)), 0.0)
    # Turn number: pieces alternate leg, turn, leg, ...; odd pieces are turns.
    piece = np.clip(np.searchsorted(plan.starts, s_plan, side="right") - 1, 0, len(pieces) - 1)
    turn = np.where(on_plan & (piece % 2 == 1), piece // 2, -1).astype(np.int64)
    noisy = enu + rng.normal(0.0, 1.0, enu.shape) * [
        noise_horizontal,
        noise_horizontal,
        noise_vertical,
    ]
    origin = (45.8123, 9.0871, 312.0)  # an invented field
    llh = enu_to_geodetic(noisy[:, 0], noisy[:, 1], noisy[:, 2], origin=origin)
    return SurveyFlight(
        t=t,
        lat=llh[:, 0],
        lon=llh[:, 1],
        height=llh[:, 2],
        origin=origin,
        enu=enu,
        speed=speed,
        accel_tangential=accel,
        curvature=curvature,
        turn=turn,
        distance=dist,
        turn_radius=float(turn_radius),
        leg_length=leg,
        altitude=altitude,
        cruise_speed=cruise,
        hover=hover,
        hover_span=hover_span,
        outage=outage,
        length=float(altitude + plan.length),
        noise_horizontal=float(noise_horizontal),
        noise_vertical=float(noise_vertical),
        start="2026-05-14T07:30:00Z",
    )


# -- electric vehicle on a loop with spiral transitions -----------------------------------------


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
    loop = _plane_curve([straights[0], *bend, straights[1], *bend, straights[2]])
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
    t = _log_clock(float(t_fine[-1]), 20.0, rng, 0.2)
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


# -- tracer particles in a vortex ---------------------------------------------------------------


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
