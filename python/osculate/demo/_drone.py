"""The survey drone: a GPS log in WGS 84 of a climb, lawn-mower legs, turns and a hover."""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np
import numpy.typing as npt

from ._shapes import log_clock, plane_curve, timeline

__all__ = ["SurveyFlight", "survey_flight"]

F64 = npt.NDArray[np.float64]


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
    from ..geodesy import enu_to_geodetic

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
    plan = plane_curve(pieces)
    hover_at = 2 * leg + 2 * np.pi * turn_radius + 0.5 * leg
    clock = timeline(
        [
            (altitude, climb_speed, 4.0),
            (0.0, 0.0, 3.0),
            (hover_at, cruise, 4.0),
            (0.0, 0.0, hover),
            (plan.length - hover_at, cruise, 4.0),
        ]
    )
    hover_span = (float(clock.start[3]), float(clock.start[4]))
    t = log_clock(clock.duration, 10.0, rng, 0.15)
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
