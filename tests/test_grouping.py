"""The one track grouping (python/osculate/_validate.py ↔ src/grouping.rs) and error relabelling."""

import numpy as np
import osculate as osc
import pytest
from osculate._validate import Grouping, Naming, group_rows, relabel


@pytest.mark.parametrize("n_tracks", [1, 7, 300])
def test_grouping_equals_a_stable_lexicographic_sort(n_tracks):
    # Reference: numpy.lexsort((key, codes)), a stable sort by (track, time); exact equality.
    rng = np.random.default_rng(n_tracks)
    codes = rng.integers(0, n_tracks, 5000)
    key = rng.integers(0, 50, 5000).astype(float)  # ties: stability matters
    g = Grouping.from_codes(codes, np.arange(n_tracks), key)
    expected = np.lexsort((key, codes))
    np.testing.assert_array_equal(g.order, expected)
    np.testing.assert_array_equal(
        g.offsets, np.r_[0, np.cumsum(np.bincount(codes, minlength=n_tracks))]
    )
    for a in (key, np.column_stack([key, -key]), codes.astype(np.uint8), codes > 3):
        k = g.to_kernel(a)
        np.testing.assert_array_equal(k, a[expected])
        np.testing.assert_array_equal(g.to_caller(k), a)


def test_grouped_rows_need_no_permutation():
    g = Grouping.from_codes(np.array([0, 0, 1, 1]), np.arange(2), np.array([0.0, 1.0, 0.0, 2.0]))
    assert g.order is None and g.inverse is None
    a = np.arange(4.0)
    assert g.to_caller(a) is a and g.to_kernel(a) is a


@pytest.mark.parametrize(
    "ids",
    [
        np.array([30, 10, 30, 20, 10]),  # integers: coded by a presence table
        np.array([3_000_000_000, -5, 3_000_000_000, 7, -5]),  # wide range: numpy.unique
        np.array(["b", "a", "b", "c", "a"]),
    ],
)
def test_group_rows_labels_are_sorted_ids(ids):
    # Reference: numpy.unique gives the sorted labels and codes; exact equality.
    g = group_rows(len(ids), tracks=ids, t=np.arange(len(ids), dtype=float))
    labels, codes = np.unique(ids, return_inverse=True)
    np.testing.assert_array_equal(g.labels, labels)
    np.testing.assert_array_equal(g.row_codes(), codes)


def test_relabel_names_caller_track_and_row():
    # Two tracks interleaved: kernel rows 3, 4, 5 are track "b", the caller's rows 1, 3, 4.
    g = group_rows(6, tracks=np.array(["a", "b", "a", "b", "b", "a"]), t=np.arange(6.0))
    err = osc.InputError("t: track 1, row 4: bad")
    err.argument, err.track, err.row, err.detail = "t", 1, 4, "bad"
    new = relabel(err, g)
    assert str(new) == "t: track 'b', row 3: bad" and new.row == 3
    index = ["r0", "r1", "r2", "r3", "r4", "r5"]
    framed = Grouping(
        g.offsets, None, g.labels, naming=Naming({"t": "time"}, index, "car", g.order)
    )
    new = relabel(err, framed)
    assert str(new) == "column 'time', row 'r3' (track 'b'): bad"
    assert (new.argument, new.row, new.track) == ("time", 3, "b")


def test_kernel_errors_are_worded_once_through_the_accessor():
    pd = pytest.importorskip("pandas")
    df = pd.DataFrame(
        {"car": ["a", "b"] * 4, "t": [0, 0, 1, 1, 1, 2, 3, 3], "x": range(8), "y": range(8)},
        index=[f"r{i}" for i in range(8)],
    )
    # Track "a" repeats the time 1 (rows r2 and r4): the kernel's message, worded once.
    with pytest.raises(osc.InputError) as info:
        df.osc.kinematics(time="t", position=["x", "y"], by="car")
    assert str(info.value).startswith("column 't', row 'r4' (track 'a'): ")
    assert str(info.value).count("(track") == 1 and "track 0" not in str(info.value)
