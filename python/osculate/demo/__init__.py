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

from ._drone import SurveyFlight, survey_flight
from ._oval import TestLoop, test_loop
from ._shapes import STANDARD_GRAVITY as STANDARD_GRAVITY  # g of the rolling resistance
from ._tracers import SwirlTracers, swirl_tracers
from ._vehicle import SpiralLoop, spiral_loop

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
