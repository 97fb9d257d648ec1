"""The pandas accessor DataFrame.osc: same numbers as the array API, on the caller's rows."""

import subprocess
import sys
import textwrap

import numpy as np
import osculate as osc
import pandas as pd
import pytest
from osculate import Flag
from osculate.accessor import track_time_order

XYZ = ["x", "y", "z"]


def sorted_tracks(rng, m=7, n_min=20, n_max=60):
    """Tracks of helices with random phases and uneven times, rows grouped and time-ordered."""
    ids, ts, xs = [], [], []
    for k in range(m):
        n = int(rng.integers(n_min, n_max))
        t = np.cumsum(rng.uniform(0.05, 0.15, n)) + rng.uniform(0, 100)
        ph = rng.uniform(0, 2 * np.pi)
        xs.append(np.column_stack([3 * np.cos(t + ph), 3 * np.sin(t + ph), 0.4 * t]))
        ts.append(t)
        ids.append(np.full(n, f"car{k}"))
    return np.concatenate(ids), np.concatenate(ts), np.concatenate(xs)


@pytest.fixture
def scrambled(rng):
    """(frame with interleaved, time-unsorted tracks and a non-unique index, reference, perm)."""
    ids, t, x = sorted_tracks(rng)
    x[5] = np.nan  # a sensor drop-out
    ref = osc.kinematics(t, x, tracks=ids, order=4)
    perm = rng.permutation(len(t))
    df = pd.DataFrame(
        {"track": ids[perm], "t": t[perm], "x": x[perm, 0], "y": x[perm, 1], "z": x[perm, 2]},
        index=pd.Index(np.arange(len(t))[perm] // 3, name="obs"),  # each label three times
    )
    return df, ref, perm


def test_accessor_equals_the_array_api(scrambled):
    # Reference: osc.kinematics on the same rows grouped and time-ordered (the array API). The
    # accessor runs the same kernel on the same per-track rows, so the results are identical
    # (tolerance 0).
    df, ref, perm = scrambled
    res = df.osc.kinematics(time="t", position=XYZ, by="track", order=4)
    assert res.index.equals(df.index)
    assert len(res) == len(df)
    expected = ref.to_pandas().iloc[perm]
    for col in res.columns:
        np.testing.assert_array_equal(res[col].to_numpy(), expected[col].to_numpy(), err_msg=col)
    assert set(res.columns) == set(expected.columns) - {
        "track",
        "t",
        "position_x",
        "position_y",
        "position_z",
    }
    # The NaN row is kept on its own row, flagged INVALID.
    row = int(np.flatnonzero(perm == 5)[0])
    assert Flag.INVALID in Flag(int(res["flags"].iloc[row]))
    assert np.isnan(res["speed"].iloc[row])


def test_summary_equals_the_array_api(scrambled):
    # Reference: Kinematics.summary() of the array API (same kernel, tolerance 0).
    df, ref, _ = scrambled
    s = df.osc.summary(time="t", position=XYZ, by="track", order=4)
    expected = ref.summary()
    assert list(s.index) == list(expected.index)
    assert s.index.name == "track"
    for col in expected.columns:
        np.testing.assert_array_equal(s[col].to_numpy(), expected[col].to_numpy(), err_msg=col)
    first = df.groupby("track")["t"].min()
    np.testing.assert_array_equal(s["start"].to_numpy(), first.loc[s.index].to_numpy())


@pytest.mark.parametrize("tz", [None, "UTC", "America/Chicago"])
def test_datetime_times_equal_float_seconds(rng, tz):
    # Times in whole milliseconds: k·1e6 ns / 1e9 and k / 1000 are both the correctly rounded
    # value of the same rational, so datetime input must give bit-identical results to float
    # seconds counted from each track's first sample (tolerance 0).
    ids, _, _ = sorted_tracks(rng, m=4)
    n = len(ids)
    ms = np.zeros(n, dtype=np.int64)
    for label in np.unique(ids):
        rows = np.flatnonzero(ids == label)
        ms[rows] = np.cumsum(np.r_[0, rng.integers(80, 120, len(rows) - 1)])
    t = ms / 1000.0
    x = np.column_stack([np.cos(t) * 5, np.sin(t) * 5, t])
    start = {label: rng.integers(0, 10**6) for label in np.unique(ids)}  # tracks start apart
    offset_ms = np.array([start[i] for i in ids], dtype=np.int64)
    stamps = pd.to_datetime(np.datetime64("2024-03-30T23:00:00", "ms") + (ms + offset_ms))
    if tz is not None:
        stamps = stamps.tz_localize("UTC").tz_convert(tz)
    perm = rng.permutation(n)
    base = pd.DataFrame({"id": ids, "x": x[:, 0], "y": x[:, 1], "z": x[:, 2]}).iloc[perm]
    as_float = base.assign(t=t[perm])
    as_dates = base.assign(t=stamps[perm])
    as_durations = base.assign(t=pd.to_timedelta(ms[perm], unit="ms"))
    a = as_float.osc.kinematics(time="t", position=XYZ, by="id")
    b = as_dates.osc.kinematics(time="t", position=XYZ, by="id")
    c = as_durations.osc.kinematics(time="t", position=XYZ, by="id")
    pd.testing.assert_frame_equal(a, b, check_exact=True)
    pd.testing.assert_frame_equal(a, c, check_exact=True)
    s = as_dates.osc.summary(time="t", position=XYZ, by="id")
    assert s["start"].dtype == as_dates["t"].dtype
    assert (s["end"] > s["start"]).all()


def test_any_index_and_index_levels(rng):
    ids, t, x = sorted_tracks(rng, m=3)
    perm = rng.permutation(len(t))
    flat = pd.DataFrame({"id": ids, "t": t, "x": x[:, 0], "y": x[:, 1]}).iloc[perm]
    ref = flat.osc.kinematics(time="t", position=["x", "y"], by="id")
    # MultiIndex whose levels hold the track and the time.
    multi = flat.set_index(["id", "t"])
    res = multi.osc.kinematics(time="t", position=["x", "y"], by="id")
    assert res.index.equals(multi.index)
    np.testing.assert_array_equal(res.to_numpy(), ref.to_numpy())
    # A DatetimeIndex that is not the time column.
    dated = flat.set_axis(pd.date_range("2020-01-01", periods=len(flat), freq="D"))
    res = dated.osc.kinematics(time="t", position=["x", "y"], by="id")
    assert res.index.equals(dated.index)
    np.testing.assert_array_equal(res.to_numpy(), ref.to_numpy())


def test_options_pass_straight_through(rng):
    ids, t, x = sorted_tracks(rng, m=2)
    df = pd.DataFrame({"id": ids, "t": t, "x": x[:, 0], "y": x[:, 1], "z": x[:, 2]})
    opts = {"order": 4, "min_speed": 0.5, "gap_factor": 3.0, "up": (0, 0, 1)}
    res = df.osc.kinematics(time="t", position=XYZ, by="id", **opts)
    ref = osc.kinematics(t, x, tracks=ids, **opts)
    np.testing.assert_array_equal(res["signed_curvature"], ref.signed_curvature)
    with pytest.raises(osc.InputError, match="method: expected one of"):
        df.osc.kinematics(time="t", position=XYZ, by="id", method="no-such-estimator")
    with pytest.raises(TypeError, match="no_such_option"):
        df.osc.kinematics(time="t", position=XYZ, by="id", no_such_option=1)
    with pytest.raises(TypeError, match="by="):
        df.osc.kinematics(time="t", position=XYZ, tracks=ids)


def test_columns_and_keep(rng):
    ids, t, x = sorted_tracks(rng, m=2)
    df = pd.DataFrame({"id": ids, "t": t, "x": x[:, 0], "y": x[:, 1], "speed": 0.0})
    full = df.osc.kinematics(time="t", position=["x", "y"], by="id")
    some = df.osc.kinematics(time="t", position=["x", "y"], by="id", columns=["speed", "tangent"])
    assert list(some.columns) == ["speed", "tangent_x", "tangent_y"]  # in result order
    pd.testing.assert_frame_equal(some, full[some.columns])
    kept = df.osc.kinematics(time="t", position=["x", "y"], by="id", keep=True, columns="speed")
    assert list(kept.columns) == ["id", "t", "x", "y", "speed"]  # the input's speed is replaced
    np.testing.assert_array_equal(kept["speed"], full["speed"])
    with pytest.raises(osc.InputError, match="columns: unknown result 'sped'"):
        df.osc.kinematics(time="t", position=["x", "y"], by="id", columns=["sped"])


def test_empty_frame_has_the_columns_of_a_full_one(rng):
    ids, t, x = sorted_tracks(rng, m=2)
    df = pd.DataFrame({"id": ids, "t": t, "x": x[:, 0], "y": x[:, 1]})
    full = df.osc.kinematics(time="t", position=["x", "y"], by="id")
    empty = df.iloc[:0].osc.kinematics(time="t", position=["x", "y"], by="id")
    assert len(empty) == 0
    pd.testing.assert_series_equal(empty.dtypes, full.dtypes)
    s_full = df.osc.summary(time="t", position=["x", "y"], by="id")
    s_empty = df.iloc[:0].osc.summary(time="t", position=["x", "y"], by="id")
    pd.testing.assert_series_equal(s_empty.dtypes, s_full.dtypes)


def test_nullable_columns():
    t = np.arange(6.0)
    df = pd.DataFrame(
        {"t": t, "x": pd.array([0.0, 1.0, None, 3.0, 4.0, 5.0], dtype="Float64"), "y": t**2}
    )
    res = df.osc.kinematics(time="t", position=["x", "y"])
    assert Flag.INVALID in Flag(int(res["flags"].iloc[2]))


@pytest.mark.parametrize("n_tracks", [1, 3, 300])
def test_track_time_order_is_lexsort(rng, n_tracks):
    # Reference: numpy.lexsort((time, track)), the stable sort it replaces (exact equality).
    n = 2000
    codes = rng.integers(0, n_tracks, n).astype(np.intp)
    key = rng.integers(0, 50, n).astype(float)  # many ties

    def order(codes, key):
        o = track_time_order(codes, key, n_tracks)
        return np.arange(n) if o is None else o  # None: already in order

    np.testing.assert_array_equal(order(codes, key), np.lexsort((key, codes)))
    # Interleaved but time-ordered within each track (the usual log): same permutation.
    key = np.arange(n, dtype=float)
    np.testing.assert_array_equal(order(codes, key), np.lexsort((key, codes)))
    assert track_time_order(np.sort(codes), key, n_tracks) is None


def bad_frame():
    return pd.DataFrame(
        {
            "id": ["a", "b", "a", "b", "a", "b", "a"],
            "t": [0.0, 0.0, 1.0, 1.0, 2.0, 1.0, 3.0],
            "x": [0.0, 0.0, 1.0, 1.0, 2.0, 2.0, 3.0],
            "y": [0.0, 0.0, 1.0, 2.0, 4.0, 3.0, 9.0],
        },
        index=["p", "q", "r", "s", "u", "v", "w"],
    )


BAD = [
    # (description, frame change, keywords, exception, message regex)
    ("missing column", None, {"position": ["x", "q"]}, osc.InputError, r"column 'q' not found"),
    ("missing time column", None, {"time": "when"}, osc.InputError, r"time: column 'when'"),
    (
        "repeated time in a track",
        None,
        {},
        osc.InputError,
        r"column 't', row 'v' \(track 'b'\): times must be strictly increasing",
    ),
    (
        "NaN time",
        lambda df: df.assign(t=df["t"].where(df.index != "r")),
        {},
        osc.InputError,
        r"column 't', row 'r': the time is missing",
    ),
    (
        "missing track id",
        lambda df: df.assign(id=df["id"].where(df.index != "u")),
        {},
        osc.InputError,
        r"column 'id', row 'u': the track id is missing",
    ),
    (
        "too short",
        lambda df: df.drop(index=["v", "w"]),
        {},
        osc.InputError,
        r"track 'b' \(column 'id', first row 'q'\): has 2 samples",
    ),
    (
        "text coordinates",
        lambda df: df.assign(y=df["y"].astype(str)),
        {},
        TypeError,
        r"position: column 'y' holds",
    ),
    ("one position column", None, {"position": ["x"]}, osc.InputError, r"expected 2 or 3"),
    ("unknown crs", None, {"crs": "mercator"}, osc.InputError, r"crs: expected one of"),
    ("origin without geodetic", None, {"origin": (0, 0, 0)}, osc.InputError, r"origin: only"),
]


@pytest.mark.parametrize("what, change, kw, exc, pattern", BAD, ids=[b[0] for b in BAD])
def test_errors_name_column_and_row_label(what, change, kw, exc, pattern):
    df = bad_frame() if change is None else change(bad_frame())
    args = {"time": "t", "position": ["x", "y"], "by": "id", **kw}
    with pytest.raises(exc, match=pattern):
        df.osc.kinematics(**args)


def test_core_import_needs_only_numpy():
    # In a fresh interpreter where pandas and dask cannot be imported: osculate imports and
    # computes; the accessor and osculate.dask say which extra to install.
    code = textwrap.dedent(
        """
        import sys
        class Block:
            def find_spec(self, name, path=None, target=None):
                if name.split(".")[0] in ("pandas", "dask"):
                    raise ImportError("blocked: " + name)
        sys.meta_path.insert(0, Block())
        import osculate as osc
        k = osc.kinematics([0.0, 1.0, 2.0], [[0, 0], [1, 1], [2, 4]])
        assert k.speed.shape == (3,)
        for mod, extra in (("osculate.accessor", "pandas"), ("osculate.dask", "dask")):
            try:
                __import__(mod)
            except ImportError as err:
                assert f"pip install 'osculate[{extra}]'" in str(err), err
            else:
                raise AssertionError(mod + " imported without its extra")
        try:
            osc.dask
        except ImportError as err:
            assert "osculate[dask]" in str(err)
        print("ok")
        """
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "ok"
