"""osculate.dask: partition by partition, the same numbers as the pandas accessor."""

import numpy as np
import osculate as osc
import pandas as pd
import pytest

dd = pytest.importorskip("dask.dataframe")
distributed = pytest.importorskip("distributed")

XYZ = ["x", "y", "z"]


@pytest.fixture
def frame(rng):
    """40 interleaved tracks, time-unsorted, datetime (UTC) times, a NaN fix, a unique index."""
    m, per = 40, 50
    ids = np.repeat(np.arange(m) * 11, per)
    t = np.concatenate([np.cumsum(rng.uniform(0.05, 0.15, per)) for _ in range(m)])
    ph = np.repeat(rng.uniform(0, 6, m), per)
    df = pd.DataFrame(
        {
            "vehicle": ids,
            "time": pd.Timestamp("2025-06-01", tz="UTC") + pd.to_timedelta(t, unit="s"),
            "x": 20 * np.cos(0.3 * t + ph),
            "y": 20 * np.sin(0.3 * t + ph),
            "z": 0.1 * t,
        }
    )
    df.loc[17, "x"] = np.nan
    return df.sample(frac=1.0, random_state=3)  # interleaved and out of time order


def pandas_and_dask(df, npartitions=4, **kw):
    spec = {"time": "time", "position": XYZ, "by": "vehicle", "order": 4, **kw}
    eager = df.osc.kinematics(**spec)
    lazy = osc.dask.kinematics(dd.from_pandas(df, npartitions=npartitions), keep=True, **spec)
    return eager, lazy


def check_equal(eager, computed):
    # Exact equality (tolerance 0): each partition holds whole tracks and every track is computed
    # from its own rows only, so the numbers are the pandas accessor's to the bit.
    computed = computed.sort_index()
    eager = eager.sort_index()
    assert len(computed) == len(eager)
    pd.testing.assert_frame_equal(computed[eager.columns], eager, check_exact=True)


def test_threaded_scheduler_equals_pandas(frame):
    eager, lazy = pandas_and_dask(frame)
    assert list(lazy.columns) == [*frame.columns, *eager.columns]
    computed = lazy.compute(scheduler="threads")
    check_equal(eager, computed)
    # The meta is right: the lazy frame announces the dtypes the partitions deliver.
    pd.testing.assert_series_equal(lazy.dtypes, computed.dtypes)


def test_process_scheduler_equals_pandas(frame):
    eager, lazy = pandas_and_dask(frame, npartitions=2)
    check_equal(eager, lazy.compute(scheduler="processes", num_workers=2))


def test_local_cluster_with_two_workers_equals_pandas(frame):
    eager, lazy = pandas_and_dask(frame, npartitions=3)
    s_lazy = osc.dask.summary(
        dd.from_pandas(frame, npartitions=3), time="time", position=XYZ, by="vehicle", order=4
    )
    with (
        distributed.LocalCluster(
            n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None
        ) as cluster,
        distributed.Client(cluster) as client,
    ):
        computed, summary = client.compute([lazy, s_lazy], sync=True)
    check_equal(eager, computed)
    expected = frame.osc.summary(time="time", position=XYZ, by="vehicle", order=4)
    pd.testing.assert_frame_equal(summary.sort_index(), expected, check_exact=True)


def test_summary_and_geodetic_through_dask(rng):
    # GPS tracks: each track anchored at its own first fix, in dask as in pandas (exact).
    m, per = 6, 30
    ids = np.repeat([f"g{k}" for k in range(m)], per)
    t = np.tile(np.arange(per, dtype=float), m)
    lat = 47.0 + 1e-4 * np.sin(0.2 * t) + np.repeat(np.arange(m), per) * 0.01
    lon = 8.0 + 1e-4 * np.cos(0.2 * t)
    df = pd.DataFrame({"id": ids, "t": t, "lat": lat, "lon": lon, "alt": 400 + t})
    df = df.sample(frac=1.0, random_state=5)
    spec = {"time": "t", "position": ["lat", "lon", "alt"], "by": "id", "crs": "geodetic"}
    ddf = dd.from_pandas(df, npartitions=3)
    got = osc.dask.summary(ddf, **spec).compute(scheduler="threads").sort_index()
    # Dask keeps text as its own string dtype, so only the index *type* may differ.
    expected = df.osc.summary(**spec)
    pd.testing.assert_frame_equal(got, expected, check_exact=True, check_index_type=False)
    assert got.index.tolist() == expected.index.tolist()
    res = osc.dask.kinematics(ddf, columns=["east", "curvature"], **spec)
    assert list(res.columns) == ["east", "curvature"]
    eager = df.osc.kinematics(columns=["east", "curvature"], **spec)
    check_equal(eager, res.compute(scheduler="threads"))


def test_partitions_hold_whole_tracks(frame):
    ddf = dd.from_pandas(frame, npartitions=5)
    parts = osc.dask.partition_by_track(ddf, "vehicle").partitions
    seen = [set(p["vehicle"].compute(scheduler="threads")) for p in parts]
    assert sum(len(s) for s in seen) == len(set().union(*seen)) == frame["vehicle"].nunique()
    # Already partitioned by a sorted index with known divisions: no shuffle is needed.
    indexed = dd.from_pandas(frame.set_index("vehicle").sort_index(), npartitions=4)
    assert osc.dask.partition_by_track(indexed, "vehicle") is indexed
    # One track: one partition.
    assert osc.dask.partition_by_track(ddf, None).npartitions == 1
    assert osc.dask.partition_by_track(ddf, "vehicle", shuffle=False) is ddf


def test_track_id_in_the_index(frame):
    spec = {"time": "time", "position": XYZ, "by": "vehicle"}
    indexed = frame.set_index("vehicle")
    eager = indexed.osc.summary(**spec)
    for ddf in (
        dd.from_pandas(indexed.sort_index(), npartitions=3),  # known divisions, no shuffle
        dd.from_pandas(indexed, npartitions=3, sort=False),  # unknown divisions: shuffled
    ):
        got = osc.dask.summary(ddf, **spec).compute(scheduler="threads").sort_index()
        pd.testing.assert_frame_equal(got, eager, check_exact=True)


def test_errors_surface_at_graph_construction(frame):
    ddf = dd.from_pandas(frame, npartitions=2)
    with pytest.raises(osc.InputError, match="column 'q' not found"):
        osc.dask.kinematics(ddf, time="time", position=["x", "q"], by="vehicle")
