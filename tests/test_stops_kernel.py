"""The Rust stop-interval kernel against the NumPy implementation it replaced.

Expected values everywhere in this file come from ``tests/stops_reference.py`` (the NumPy
``find_stops`` kept verbatim); tolerance: exact (the same first row, last row and track of every
stop, compared as integer arrays).
"""

import doctest

import numpy as np
import osculate as osc
import osculate.stops
import pytest
import stops_reference
from osculate.stops import find_stops
from test_stops import track
from test_trust import _stop_and_go

STOPPED, INVALID = int(osc.Flag.STOPPED), int(osc.Flag.INVALID)
OTHER_BITS = int(osc.Flag.STRAIGHT | osc.Flag.EDGE | osc.Flag.GAP | osc.Flag.VAGUE)


def reference(t, x, flags, offsets, noise, min_stop):
    """The NumPy result, with ``min_stop=inf`` meaning no stops (``intrinsic._find_stops``)."""
    if min_stop == np.inf:
        return (np.zeros(0, np.intp),) * 3
    # Overflowing sums give inf − inf in the reference's differences: warnings only.
    with np.errstate(over="ignore", invalid="ignore"):
        return stops_reference.find_stops(t, x, flags, offsets, noise, min_stop)


def assert_same(t, x, flags, offsets, noise, min_stop=None):
    """Kernel == reference, exactly; returns the stops found."""
    args = (t, x, flags, np.asarray(offsets), np.asarray(noise, float), min_stop)
    got = find_stops(*args)
    want = reference(*args)
    for g, w, name in zip(got, want, ("first", "last", "track")):
        assert g.dtype == np.int64, name
        np.testing.assert_array_equal(g, w, err_msg=name)  # exact, from the reference
    return got


# (a) The scenarios of tests/test_stops.py, and the invented stop-and-go vehicle of
# tests/test_trust.py with the flags and noise the kinematics give it.


def scenarios():
    yield (*track(100, range(20, 40)), [0, 100], [np.nan], None)
    yield (*track(100, [*range(20, 30), *range(32, 46)]), [0, 100], [np.nan], None)
    yield (*track(100, [*range(20, 30), *range(33, 46)]), [0, 100], [np.nan], None)
    yield (*track(100, range(20, 26)), [0, 100], [np.nan], None)
    yield (*track(100, range(20, 25)), [0, 100], [np.nan], None)
    yield (*track(100, range(20, 25)), [0, 100], [np.nan], 4.0)
    yield (*track(100, range(20, 40)), [0, 100], [np.nan], 19.5)
    t, x, flags = track(100, range(40, 60))
    t[50:] -= 50.0
    yield t, x, flags, [0, 50, 100], [np.nan, np.nan], None
    yield (*track(100, range(20, 60), extra=(range(38, 41), INVALID)), [0, 100], [np.nan], None)
    t, x, flags = track(100, range(20, 40))
    x[20:40, 0] = 20.0
    x[20:22, 0] = 19.95
    yield t, x, flags, [0, 100], [0.01], None
    yield t, x, flags, [0, 100], [np.nan], None
    t, x, flags = track(100, range(20, 40))
    x[20:40] = [3.0, 4.0]
    yield t, x, flags, [0, 100], [0.01], None


@pytest.mark.parametrize("case", list(scenarios()))
def test_the_scenarios_of_test_stops(case):
    assert_same(*case)


@pytest.mark.parametrize("seed", [1, 7, 77])
def test_stop_and_go_vehicle(seed):
    t, x, _, _ = _stop_and_go(np.random.default_rng(seed))
    # min_stop=inf: the flags before any stop is held, as find_stops sees them.
    k = osc.kinematics(t, x, method="smooth", min_stop=np.inf)
    flags, noise = k.flags.astype(np.uint8), np.asarray(k.fit_info["noise"], float)
    found = assert_same(t, x, flags, [0, len(t)], noise)
    assert len(found[0]) == 2  # the scenario's two stops (tests/test_trust.py)
    for min_stop in (None, 0.0, 3.0, 7.0):
        assert_same(t, x, flags, [0, len(t)], noise, min_stop)
        assert_same(t, x, flags, [0, len(t)], [np.nan], min_stop)


# (b) A seeded randomized battery.


def random_batch(rng):
    """Tracks of 0–3 or more samples: STOPPED/moving/INVALID runs, positions held or drifting."""
    dim = int(rng.choice([1, 2, 3], p=[0.1, 0.6, 0.3]))
    m = int(rng.integers(1, 6))
    lengths = [
        int(rng.integers(0, 4)) if rng.random() < 0.3 else int(rng.integers(4, 120))
        for _ in range(m)
    ]
    sigma = float(rng.choice([0.0, 0.01, 0.05]))
    places = rng.normal(0, 20, (3, dim))  # a few places that stops come back to
    ts, xs, fs = [], [], []
    for n in lengths:
        t = np.cumsum(rng.uniform(0.05, 1.5, n)) - 10.0
        x = np.empty((n, dim))
        f = np.zeros(n, np.uint8)
        here = places[rng.integers(0, 3)].copy()
        i = 0
        while i < n:
            run = int(rng.integers(1, 15))
            stopped = rng.random() < 0.55
            rows = slice(i, min(n, i + run))
            k = rows.stop - rows.start
            if stopped:
                if rng.random() < 0.4:
                    here = places[rng.integers(0, 3)].copy()
                x[rows] = here + sigma * rng.standard_normal((k, dim))
                if rng.random() < 0.2:  # speed ringing: a stopped run still drifting a little
                    x[rows] += np.cumsum(rng.normal(0, 0.05, (k, dim)), axis=0)
                f[rows] = STOPPED
            else:
                step = rng.normal(0, 1.0, dim) * rng.choice([0.001, 0.05, 1.0])
                x[rows] = here + np.arange(1, k + 1)[:, None] * step
                here = x[rows.stop - 1].copy()
            i = rows.stop
        f |= (rng.random(n) < 0.3).astype(np.uint8) * np.uint8(OTHER_BITS & rng.integers(0, 64))
        bad = rng.random(n) < 0.04
        f[bad] |= INVALID
        x[bad & (rng.random(n) < 0.7)] = np.nan
        x[rng.random(n) < 0.01, 0] = np.inf
        ts.append(t)
        xs.append(x)
        fs.append(f)
    offsets = np.concatenate([[0], np.cumsum(lengths)]).astype(np.int64)
    noise = rng.choice([np.nan, np.inf, 0.0, 0.005, 0.01, 0.03, 0.2], m)
    return np.concatenate(ts), np.concatenate(xs), np.concatenate(fs), offsets, noise


def test_randomized_battery():
    rng = np.random.default_rng(20261205)
    stops = with_noise = changed_by_noise = changed_by_min = 0
    for _ in range(400):
        t, x, flags, offsets, noise = random_batch(rng)
        for min_stop in (None, 0.0, float(rng.uniform(0, 8)), np.inf):
            got = assert_same(t, x, flags, offsets, noise, min_stop)
            unknown = assert_same(t, x, flags, offsets, np.full(len(noise), np.nan), min_stop)
            stops += len(got[0])
            with_noise += len(got[0]) > 0 and np.isfinite(noise).any()
            changed_by_noise += len(got[0]) != len(unknown[0]) or (got[0] != unknown[0]).any()
        changed_by_min += len(find_stops(t, x, flags, offsets, noise, 0.0)[0]) != len(
            find_stops(t, x, flags, offsets, noise)[0]
        )
    # The battery reaches the rules: many stops, the noise (joining, trimming, merging by place)
    # and min_stop changing the answer in many cases.
    assert stops > 1000 and with_noise > 300 and changed_by_noise > 100 and changed_by_min > 100


# (c) Coordinates near 1e300.


def test_coordinates_near_1e300():
    # A stop held at (1e300, −2e300) with jitter 1e297, its first two samples 2e299 short in x:
    # centre 2e298 short, radius three noise levels 3e298. The reference keeps rows 22..39 and
    # trims the two with scale-safe distances (a sum of squares would overflow to inf and hold
    # nothing).
    rng = np.random.default_rng(5)
    n = 60
    t = np.arange(n, dtype=float)
    centre = np.array([1e300, -2e300])
    x = centre + np.outer(t - 30, [1e299, 1e299])
    x[20:40] = centre + 1e297 * rng.standard_normal((20, 2))
    x[20:22, 0] -= 2e299
    flags = np.zeros(n, np.uint8)
    flags[20:40] = STOPPED
    got = assert_same(t, x, flags, [0, n], [1e298])
    assert got[0].tolist() == [22] and got[1].tolist() == [39]
    # Near the largest double (some rows overflow to ±inf): sums overflow, the centres are inf
    # or NaN; still the same.
    with np.errstate(over="ignore"):
        huge = x * 1e8
    assert not np.isfinite(huge).all()
    for noise in (1e306, np.nan):
        assert_same(t, huge, flags, [0, n], [noise])
        assert_same(t, huge, flags, [0, n], [noise], 0.0)


def test_min_stop_is_checked_by_the_kernel():
    t, x, _ = track(30, range(5, 20))
    for bad in (-1.0, np.nan, -np.inf):
        with pytest.raises(osc.InputError, match=r"min_stop: must be >= 0 \(inf: none\)") as e:
            osc.kinematics(t, x, min_stop=bad)
        assert e.value.argument == "min_stop"
    with pytest.raises(TypeError, match="min_stop"):
        osc.kinematics(t, x, min_stop="3")
    assert len(osc.kinematics(t, x * 0, min_stop=np.inf).stops) == 0


def test_docstring_examples():
    assert doctest.testmod(osculate.stops).failed == 0
