"""osculate.summary: every column documented, extremes found where they happen."""

import re

import numpy as np
import osculate as osc
import pytest
from osculate.summary import COLUMNS

# The leading unit of a column's description: "L", "T", "L/T²", "rad", ... or a count.
UNIT_HEAD = re.compile(r"(1|rad|[LT][²³]?(/T[²³]?)?)(,|$)")
COUNTS = ("rows", "samples", "number")


def test_every_column_is_documented_with_its_unit():
    t = np.linspace(0.0, 10.0, 101)
    k = osc.kinematics(t, np.column_stack([t, np.sin(t)]))
    s = k.summary_arrays()
    names = list(s)
    assert names[0] == "track" and sorted(names[1:]) == sorted(COLUMNS)
    for name, text in COLUMNS.items():
        assert UNIT_HEAD.match(text) or text.startswith(COUNTS), (name, text)
    assert k.summary().columns.tolist() == names[1:]  # the pandas table: track as index


def test_extremes_and_their_times_on_a_straight_with_a_speed_swing():
    # x(t) = 10 t + 2 sin(t / 2): v = 10 + cos(t / 2) is largest (11 m/s) at t = 4π, and
    # |a_t| = |sin(t / 2)| / 2 is largest (0.5 m/s²) at t = π, 3π, 5π (closed form). Order-4 fd
    # of exact positions at 0.01 s steps, extremes as means over three samples: 1e-4 relative
    # on the values; the times to one step.
    t = np.arange(1.0, 17.0, 0.01)
    x = np.column_stack([10 * t + 2 * np.sin(t / 2), 0 * t])
    s = osc.kinematics(t, x, order=4).summary_arrays()
    assert s["max_speed"][0] == pytest.approx(11.0, rel=1e-4)
    assert s["max_speed_at"][0] == pytest.approx(4 * np.pi, abs=0.01)
    assert s["max_abs_accel_tangential"][0] == pytest.approx(0.5, rel=1e-4)
    at = s["max_abs_accel_tangential_at"][0]
    assert min(abs(at - c) for c in (np.pi, 3 * np.pi, 5 * np.pi)) <= 0.01
    # A straight path: no curved sample, so no lateral extreme or radius; nothing turned.
    assert s["curved"][0] == 0 and np.isnan(s["max_accel_normal"][0])
    assert np.isnan(s["min_radius"][0]) and s["turning_angle"][0] == pytest.approx(0, abs=1e-12)
    assert s["length"][0] == pytest.approx(x[-1, 0] - x[0, 0], rel=1e-12)  # a straight line
    # Finite differences give no standard errors.
    assert np.isnan(s["max_speed_se"][0])


def test_smallest_radius_of_invented_routes():
    # The routes of test_turns.py (quarter turns and a hairpin of 5–40 m at 1.4–10 m/s, stops,
    # 3–5 cm noise; truth from their construction). The summary's smallest radius is the extreme
    # of stretch means, biased by their noise; with stretches of 3 smoothing bandwidths it was
    # within −7.1 % … +5.2 % over these seeds (1.5 bandwidths: down to −9.3 %). Tolerance 8 %.
    from test_turns import CASES, route

    for legs, v, sigma, truth in CASES.values():
        for seed in (0, 1, 2):
            t, x = route(np.random.default_rng(seed), legs, v=v, amax=min(2.0, v / 3), sigma=sigma)
            k = osc.kinematics(t, x, method="smooth")
            smallest = min(radius for radius, _ in truth)
            assert abs(k.summary_arrays()["min_radius"][0] / smallest - 1) <= 0.08
