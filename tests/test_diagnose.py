"""osculate.diagnose: which tracks a warning names, and the limits the checks draw.

The checks themselves on realistic data (interleaved objects, millimetres as metres, fd on noisy
logs) are in tests/test_trust.py; here: the track labels in the message, the attributes a
caller can filter on, the plausible-speed limit and the mostly-flagged check.
"""

import warnings

import numpy as np
import osculate as osc
import pytest
from osculate.diagnose import MAX_PLAUSIBLE_SPEED, MOSTLY_FLAGGED, track_names


def test_track_names_shows_five_and_counts_the_rest():
    labels = np.array([f"car-{i}" for i in range(10)])
    assert track_names(labels, np.arange(10) < 7) == "car-0, car-1, car-2, car-3, car-4 and 2 more"
    assert track_names(labels, np.arange(10) >= 5) == "car-5, car-6, car-7, car-8, car-9"
    assert track_names(labels, np.arange(10) == 3) == "car-3"


def straight(speed, n=200, dt=0.1):
    t = np.arange(n) * dt
    return t, np.column_stack([speed * t, 0.01 * np.sin(t)])


def test_the_warning_names_only_the_suspect_track_and_carries_its_position():
    # Two vehicles at 30 m/s; "b" logged in millimetres (30 000 units/s).
    ta, xa = straight(30.0)
    tb, xb = straight(30_000.0)
    with pytest.warns(osc.SuspectDataWarning) as rec:
        osc.kinematics(
            np.concatenate([ta, tb]),
            np.vstack([xa, xb]),
            tracks=np.repeat(["a", "b"], len(ta)),
            method="smooth",
        )
    (w,) = [w.message for w in rec if "units" in str(w.message)]
    assert str(w).startswith("track(s) b: the median speed")
    assert w.tracks.tolist() == [1] and "check the units" in w.reason


@pytest.mark.parametrize(
    "speed, warned", [(0.9 * MAX_PLAUSIBLE_SPEED, False), (1.1 * MAX_PLAUSIBLE_SPEED, True)]
)
def test_the_plausible_speed_limit(speed, warned):
    # The limit is 12 000 length units per second (Earth's escape speed, 11.2 km/s, rounded up:
    # common practice); 10 % either side of it.
    t, x = straight(speed)
    with warnings.catch_warnings(record=True) as rec:
        warnings.simplefilter("always", osc.SuspectDataWarning)
        osc.kinematics(t, x, method="smooth")
    assert any("check the units" in str(w.message) for w in rec) is warned


def test_tracks_mostly_flagged_gap_are_reported():
    # Steps of 0.1, 0.1, 1.0 s repeated: the median step is 0.1 s, every 1 s step is a gap (over
    # gap_factor = 5 medians) and flags the samples on both sides of it: two samples in three,
    # more than MOSTLY_FLAGGED (half). Regular steps: no such warning.
    steps = np.tile([0.1, 0.1, 1.0], 40)
    t = np.concatenate([[0.0], np.cumsum(steps)])
    x = np.column_stack([5.0 * t, np.zeros_like(t)])
    with pytest.warns(osc.SuspectDataWarning, match="more than half of the samples"):
        k = osc.kinematics(t, x, min_speed=0.0)
    assert np.mean(k.flagged(osc.Flag.GAP)) > MOSTLY_FLAGGED
    with warnings.catch_warnings():
        warnings.simplefilter("error", osc.SuspectDataWarning)
        t = np.arange(121) * 0.1
        osc.kinematics(t, np.column_stack([5.0 * t, np.zeros_like(t)]), min_speed=0.0)
