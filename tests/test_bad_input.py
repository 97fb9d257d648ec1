"""Bad input gives a clear exception naming the argument, track and row; never a panic."""

import re
import warnings

import numpy as np
import osculate as osc
import pytest

T5 = np.arange(5.0)
X5 = np.column_stack([T5, T5**2, T5**3])


def call(t=T5, x=X5, fn=osc.kinematics, **kw):
    return fn(t, x, **kw)


CASES = [
    # (description, kwargs, exception, message regex)
    ("length mismatch", {"x": X5[:4]}, osc.InputError, r"positions: has 4 rows but t has 5"),
    ("1-column positions", {"x": X5[:, :1]}, osc.InputError, r"positions: expected shape"),
    ("4-column positions", {"x": np.ones((5, 4))}, osc.InputError, r"positions: expected shape"),
    ("2-D times", {"t": T5[:, None]}, osc.InputError, r"t: expected a 1-D"),
    (
        "too few samples",
        {"t": T5[:2], "x": X5[:2]},
        osc.InputError,
        r"t: track 0: has 2 samples but fd needs at least 3",
    ),
    (
        "order 4 needs 5",
        {"t": T5[:4], "x": X5[:4], "order": 4},
        osc.InputError,
        r"needs at least 5",
    ),
    ("bad order", {"order": 3}, osc.InputError, r"order: must be 2 or 4"),
    (
        "duplicate time",
        {"t": np.array([0, 1, 1, 2, 3.0])},
        osc.InputError,
        r"t: track 0, row 2: times must be strictly increasing",
    ),
    ("decreasing time", {"t": np.array([0, 1, 2, 1.5, 3.0])}, osc.InputError, r"row 3"),
    (
        "NaN time",
        {"t": np.array([0, 1, np.nan, 2, 3.0])},
        osc.InputError,
        r"t: track 0, row 2: time is not finite",
    ),
    ("inf time", {"t": np.array([0, 1, 2, 3, np.inf])}, osc.InputError, r"row 4"),
    (
        "negative min_speed",
        {"min_speed": -1},
        osc.InputError,
        r"min_speed: must be finite and >= 0",
    ),
    ("NaN min_curvature", {"min_curvature": np.nan}, osc.InputError, r"min_curvature"),
    ("gap_factor <= 1", {"gap_factor": 0.5}, osc.InputError, r"gap_factor: must be > 1"),
    ("zero up", {"up": (0, 0, 0)}, osc.InputError, r"up: must be a finite non-zero vector"),
    ("up on planar", {"x": X5[:, :2], "up": (0, 0, 1)}, osc.InputError, r"up: expected a 3-vector"),
    ("unknown method", {"method": "magic"}, osc.InputError, r"method: expected one of"),
    (
        "complex positions",
        {"x": X5 + 1j},
        TypeError,
        r"positions: expected real numbers, got complex",
    ),
    (
        "object positions",
        {"x": X5.astype(object)},
        TypeError,
        r"positions: expected real numbers, got object",
    ),
    ("bool times", {"t": np.ones(5, bool)}, TypeError, r"t: expected real numbers, got boolean"),
    (
        "string times",
        {"t": np.array(list("abcde"))},
        TypeError,
        r"t: expected real numbers, got string",
    ),
    (
        "offsets not ending at n",
        {"offsets": [0, 3]},
        osc.InputError,
        r"offsets: must end at the number of rows 5",
    ),
    ("offsets not starting at 0", {"offsets": [1, 5]}, osc.InputError, r"offsets: must start at 0"),
    (
        "empty track in offsets",
        {"offsets": [0, 0, 5]},
        osc.InputError,
        r"offsets: track 0 is empty",
    ),
    (
        "unsorted offsets",
        {"offsets": [0, 4, 2, 5]},
        osc.InputError,
        r"offsets: track 1 is empty or reversed",
    ),
    ("float offsets", {"offsets": [0.0, 5.0]}, TypeError, r"offsets: expected integers"),
    (
        "tracks and offsets",
        {"offsets": [0, 5], "tracks": np.zeros(5)},
        osc.InputError,
        r"give one of them",
    ),
    (
        "tracks wrong length",
        {"tracks": np.zeros(4)},
        osc.InputError,
        r"tracks: expected one id per row \(5\)",
    ),
    ("empty input", {"t": np.zeros(0), "x": np.zeros((0, 3))}, osc.InputError, r"t: is empty"),
    (
        "subnormal time step",
        {"t": np.array([0.0, 5e-324, 1e-323, 1.5e-323, 2e-323])},
        osc.InputError,
        r"t: track 0, row 1: the time step 5e-324 is too small to divide by",
    ),
    (
        "smoothing beyond the usable range",
        {
            "t": np.linspace(0.0, 10.0, 200),
            "x": np.zeros((200, 3)),
            "method": "smooth",
            "smoothing": 1e30,
        },
        osc.InputError,
        r"smoothing: track 0: λ\* = 1e30 is beyond the usable range for 200 samples",
    ),
    (
        "bc_velocity not finite",
        {"method": "spline", "bc": "clamped", "bc_velocity": [[1.0, np.nan, 0.0], [1.0, 2.0, 0.0]]},
        osc.InputError,
        r"bc_velocity: track 0: end velocities must be finite, got NaN",
    ),
    (
        "NaN track id",
        {"tracks": np.array([0.0, 0.0, np.nan, 1.0, 1.0])},
        osc.InputError,
        r"tracks: row 2: the track id is missing",
    ),
    (
        "None track id",
        {"tracks": np.array(["a", "a", "a", None, "b"], dtype=object)},
        osc.InputError,
        r"tracks: row 3: the track id is missing",
    ),
    (
        "integer times beyond 2**53",
        {"t": np.array([0, 1, 2, 3, 2**60])},
        osc.InputError,
        r"t: track 0: integer times span .* more than 2\*\*53",
    ),
]


@pytest.mark.parametrize("desc, kw, exc, msg", CASES, ids=[c[0] for c in CASES])
def test_bad_input_battery(desc, kw, exc, msg):
    kw = dict(kw)
    t = kw.pop("t", T5)
    x = kw.pop("x", X5)
    before = (np.array(t, copy=True), np.array(x, copy=True))
    with pytest.raises(exc, match=msg):
        call(t, x, **kw)
    # Inputs are never modified.
    np.testing.assert_array_equal(np.asarray(t), before[0])
    np.testing.assert_array_equal(np.asarray(x), before[1])


@pytest.mark.parametrize("method", ["fd", "spline", "smooth"])
def test_arc_length_of_huge_steps_stays_finite(method):
    # Steps of 1.4e200 (squares overflow): the length is the sum of the steps (closed form for a
    # straight line), to 1e-12 relative.
    t = np.arange(6.0)
    x = np.column_stack([1.4e200 * t, np.zeros(6)])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", osc.SuspectDataWarning)  # it is implausibly fast
        s = osc.arclength(t, x, method=method)
    np.testing.assert_allclose(s, 1.4e200 * t, rtol=1e-12)


def test_rows_of_a_track_may_come_in_any_order():
    # One rule with the accessor: with tracks=, rows are put in time order within each track,
    # and every result comes back on the caller's row (exactly: the same kernel on the same
    # rows). With offsets= the caller states the layout, and times must increase.
    rng = np.random.default_rng(3)
    t = np.arange(100.0)
    x = np.column_stack([np.cos(t / 10), np.sin(t / 10)])
    ids = np.repeat([0, 1], 50)
    perm = rng.permutation(100)
    a = osc.kinematics(t, x, tracks=ids, method="smooth")
    b = osc.kinematics(t[perm], x[perm], tracks=ids[perm], method="smooth")
    np.testing.assert_array_equal(a.speed[perm], b.speed)
    np.testing.assert_array_equal(a.curvature[perm], b.curvature)
    with pytest.raises(osc.InputError, match=r"t: track 0, row \d+: times must be strictly"):
        osc.kinematics(t[::-1], x[::-1], offsets=[0, 100])


def test_ragged_positions_are_named():
    with pytest.raises(osc.InputError, match=r"positions: expected a regular array, got a ragged"):
        osc.kinematics(T5, [[0, 0, 0], [1, 1], [2, 2, 2], [3, 3, 3], [4, 4, 4]])


def test_track_ids_keep_their_type():
    # One rule with the accessor (pandas.factorize): 1 and "1" are two tracks, labels keep type.
    t = np.tile(np.arange(10.0), 2)
    ids = np.array([1] * 10 + ["1"] * 10, dtype=object)
    k = osc.kinematics(t, np.column_stack([t, t**2]), tracks=ids)
    assert list(k.summary_arrays()["track"]) == [1, "1"]
    assert [type(v) for v in k.tracks[[0, 10]]] == [int, str]


def test_errors_name_the_callers_track_and_row():
    # Rows of two tracks interleaved; track "b" has a repeated time at caller row 5.
    t = np.array([0, 0, 1, 1, 2, 1.0, 3, 4])
    ids = np.array(["a", "b", "a", "b", "a", "b", "a", "b"])
    x = np.column_stack([t, t])
    with pytest.raises(
        osc.InputError, match=re.escape("t: track 'b', row 5: times must be")
    ) as info:
        osc.kinematics(t, x, tracks=ids)
    assert (info.value.argument, info.value.row) == ("t", 5)
    assert issubclass(osc.InputError, ValueError)


def test_too_short_track_is_named():
    ids = np.array([7, 7, 7, 9, 9])
    with pytest.raises(osc.InputError, match=r"t: track 9: has 2 samples"):
        osc.kinematics(T5, X5, tracks=ids)


def test_extreme_magnitudes_stay_finite_or_flagged():
    # 1e300 positions overflow the squared speed: the result is flagged, never a crash. At
    # 1e300 m/s the data check also says the units look wrong.
    for scale in (1e300, 1e-300):
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", osc.SuspectDataWarning)
            k = osc.kinematics(T5, X5 * scale)
        assert [("units" in str(w.message)) for w in caught] == ([True] if scale > 1 else [])
        assert k.flags.dtype == np.uint8
        assert np.all(np.isfinite(k.speed) | k.flagged(osc.Flag.STOPPED) | np.isinf(k.speed))


def test_all_nan_positions_are_invalid_not_an_error():
    k = osc.kinematics(T5, np.full((5, 2), np.nan))
    assert k.flagged(osc.Flag.INVALID).all()
    assert np.isnan(k.speed).all()


def test_arclength_checks_times():
    with pytest.raises(osc.InputError, match=r"t: track 0, row 1"):
        osc.arclength([0.0, 0.0, 1.0], np.zeros((3, 2)))
