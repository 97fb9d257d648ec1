"""Straight lines at ECEF-sized coordinates: curvature at the rounding floor, and STRAIGHT."""

from __future__ import annotations

import warnings

import numpy as np
import osculate as osc
import pytest

ORIGIN = np.array([4.2e6, 1.1e6, 4.7e6])  # metres, the size of Earth-centred coordinates
DIRECTION = np.array([0.3, 0.5, 0.81]) / np.linalg.norm([0.3, 0.5, 0.81])


def _line(speed, rate, n=2000):
    t = np.arange(n) / rate
    return t, ORIGIN + np.outer(speed * t, DIRECTION)


@pytest.mark.parametrize("speed, rate", [(0.3, 100), (1.0, 100), (10.0, 100), (10.0, 1000)])
def test_curvature_stays_within_the_rounding_floor(speed, rate):
    t, x = _line(speed, rate)
    # Raw estimates (absolute thresholds of zero, so nothing is flagged away).
    k = osc.kinematics(t, x, min_curvature=0.0, min_speed=0.0)
    # The floor worked out: δ = half an ulp of the largest coordinate; the five-point r″ weights
    # (−1/12, 4/3, −5/2, 4/3, −1/12)/h² have Σ|w| = 16/(3h²); three coordinates add up to √3;
    # κ_floor = Σ|w|·δ·√3 / v². The issue allows 2× that; measured 0.29–0.30×.
    delta = 0.5 * np.spacing(np.abs(x).max())
    h = 1.0 / rate
    floor = 16.0 / (3.0 * h * h) * delta * np.sqrt(3.0) / speed**2
    assert np.nanmax(k.curvature[3:-3]) <= 2.0 * floor


@pytest.mark.parametrize("speed, rate", [(0.3, 100), (1.0, 100), (10.0, 100), (30.0, 10)])
def test_straight_line_far_from_the_origin_is_straight_at_the_defaults(speed, rate):
    t, x = _line(speed, rate)
    with warnings.catch_warnings():
        warnings.simplefilter("error", osc.SuspectDataWarning)  # rounding is not noise
        k = osc.kinematics(t, x)
    inner = slice(3, -3)
    assert k.flagged(osc.Flag.STRAIGHT)[inner].all()
    assert not k.flagged(osc.Flag.STOPPED)[inner].any()
    # Speed exact to the rounding of the positions (closed form: the given speed).
    np.testing.assert_allclose(k.speed[inner], speed, rtol=1e-6)
