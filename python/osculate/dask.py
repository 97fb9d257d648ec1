"""Kinematics of Dask DataFrames: every partition holds whole tracks and goes to Rust in one call.

Needs ``pip install 'osculate[dask]'``. Works with any Dask scheduler (threads, processes,
``distributed``): the work of a partition is :meth:`DataFrame.osc.kinematics` on that partition.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence
from typing import Any, Optional

try:
    import dask.dataframe as dd
except ImportError as exc:  # pragma: no cover - depends on the environment
    raise ImportError("osculate.dask needs Dask: pip install 'osculate[dask]'") from exc

import pandas as pd

from . import accessor  # noqa: F401  (registers DataFrame.osc, which the partitions use)
from ._columns import input_error

__all__ = ["kinematics", "partition_by_track", "summary"]


def partition_by_track(
    ddf: dd.DataFrame, by: Optional[Hashable], *, shuffle: Optional[bool] = None
) -> dd.DataFrame:
    """Return ``ddf`` arranged so that no track straddles two partitions.

    Parameters
    ----------
    ddf : dask.dataframe.DataFrame
        The frame.
    by : hashable or None
        Column (or the index's name) of track ids; None means the whole frame is one track.
    shuffle : bool or None, default None
        None: shuffle on ``by`` unless that is already guaranteed (one partition, or ``by`` is the
        index and the divisions are known). True: always shuffle (when there are several
        partitions). False: trust the caller that tracks do not straddle partitions; a track that
        does is then computed as separate pieces, with wrong values at the cuts.

    Returns
    -------
    dask.dataframe.DataFrame
        ``ddf`` itself, or ``ddf`` shuffled on ``by`` (rows keep their index but move between
        partitions, and some partitions may be empty), or with ``by=None`` a single partition.

    Examples
    --------
    >>> import pandas as pd
    >>> import dask.dataframe as dd
    >>> from osculate.dask import partition_by_track
    >>> df = pd.DataFrame({"car": [1, 2, 3, 1, 2, 3], "t": [0.0, 0, 0, 1, 1, 1]})
    >>> parts = partition_by_track(dd.from_pandas(df, npartitions=2), "car").partitions
    >>> sorted(len(set(p["car"].compute())) for p in parts)  # each id in one partition only
    [1, 2]
    """
    if ddf.npartitions == 1 or shuffle is False:
        return ddf
    if by is None:
        return ddf.repartition(npartitions=1)
    if by in ddf.columns:
        return ddf.shuffle(on=by)
    if by == ddf.index.name:
        if ddf.known_divisions and not shuffle:
            return ddf
        return ddf.shuffle(on_index=True)
    raise input_error(f"by: column {by!r} not found in the Dask frame", str(by))


def _kinematics_part(part: pd.DataFrame, spec: dict[str, Any]) -> pd.DataFrame:
    return part.osc.kinematics(**spec)


def _summary_part(part: pd.DataFrame, spec: dict[str, Any]) -> pd.DataFrame:
    return part.osc.summary(**spec)


def kinematics(
    ddf: dd.DataFrame,
    *,
    time: Hashable,
    position: Sequence[Hashable],
    by: Optional[Hashable] = None,
    shuffle: Optional[bool] = None,
    **kwargs: Any,
) -> dd.DataFrame:
    """Per-sample kinematics of a Dask DataFrame, partition by partition.

    Parameters
    ----------
    ddf : dask.dataframe.DataFrame
        The frame; ``time`` and ``position`` name columns, ``by`` a column or the index.
    time, position, by
        As in :meth:`DataFrame.osc.kinematics <osculate.accessor.OscAccessor.kinematics>`.
    shuffle : bool or None, default None
        How tracks are kept whole, see :func:`partition_by_track`. A shuffle moves rows between
        partitions: pass ``keep=True`` to have the input columns next to the results.
    **kwargs
        ``crs``, ``origin``, ``columns``, ``keep`` and the estimator options, as in
        :meth:`DataFrame.osc.kinematics <osculate.accessor.OscAccessor.kinematics>`.

    Returns
    -------
    dask.dataframe.DataFrame
        Lazy; its partitions are exactly what the pandas accessor returns for those rows, so the
        computed rows equal the pandas results for the whole frame (each track is computed from
        its own rows only). The ``meta`` is the accessor's result on the empty frame. Lateral
        acceleration, jerk and radius are indicative: local codes and licensed engineers decide
        whether a road, rail, ride or vehicle is acceptable.

    Examples
    --------
    >>> import numpy as np
    >>> import pandas as pd
    >>> import dask.dataframe as dd
    >>> import osculate as osc
    >>> t = np.tile(np.linspace(0.0, 3.0, 31), 2)
    >>> df = pd.DataFrame({"id": np.repeat([7, 8], 31), "t": t, "x": t, "y": 0.25 * t**2})
    >>> lazy = osc.dask.kinematics(
    ...     dd.from_pandas(df, npartitions=3), time="t", position=["x", "y"], by="id", keep=True
    ... )
    >>> out = lazy.compute(scheduler="threads").sort_index()
    >>> eager = df.osc.kinematics(time="t", position=["x", "y"], by="id")
    >>> bool((out["speed"] == eager["speed"]).all()), list(out.columns[:4])
    (True, ['id', 't', 'x', 'y'])

    With ``by=None`` the frame is one track and goes to a single partition:

    >>> one = dd.from_pandas(df[df["id"] == 7], npartitions=3)
    >>> osc.dask.kinematics(one, time="t", position=["x", "y"]).npartitions
    1
    """
    spec = {"time": time, "position": position, "by": by, **kwargs}
    meta = _kinematics_part(ddf._meta, spec)
    arranged = partition_by_track(ddf, by, shuffle=shuffle)
    return arranged.map_partitions(_kinematics_part, spec=spec, meta=meta)


def summary(
    ddf: dd.DataFrame,
    *,
    time: Hashable,
    position: Sequence[Hashable],
    by: Optional[Hashable] = None,
    shuffle: Optional[bool] = None,
    **kwargs: Any,
) -> dd.DataFrame:
    """One row per track of a Dask DataFrame.

    Parameters
    ----------
    ddf : dask.dataframe.DataFrame
        The frame.
    time, position, by, shuffle, **kwargs
        As in :func:`kinematics` (``kwargs``: ``crs``, ``origin`` and estimator options).

    Returns
    -------
    dask.dataframe.DataFrame
        Indexed by track label, with the columns of
        :meth:`DataFrame.osc.summary <osculate.accessor.OscAccessor.summary>`; one row per track
        (in no particular order across partitions).

    Notes
    -----
    Lateral acceleration, jerk and radius estimated from logged data are indicative only: local
    codes and licensed engineers decide whether a road, track, ride or vehicle is acceptable.

    Examples
    --------
    >>> import numpy as np
    >>> import pandas as pd
    >>> import dask.dataframe as dd
    >>> import osculate as osc
    >>> t = np.tile(np.arange(5.0), 3)
    >>> df = pd.DataFrame({"id": np.repeat(["a", "b", "c"], 5), "t": t, "x": 2 * t, "y": 0 * t})
    >>> ddf = dd.from_pandas(df, npartitions=2)
    >>> s = osc.dask.summary(ddf, time="t", position=["x", "y"], by="id")
    >>> s.compute(scheduler="threads").sort_index()["length"].tolist()
    [8.0, 8.0, 8.0]
    """
    spec = {"time": time, "position": position, "by": by, **kwargs}
    meta = _summary_part(ddf._meta, spec)
    arranged = partition_by_track(ddf, by, shuffle=shuffle)
    return arranged.map_partitions(_summary_part, spec=spec, meta=meta)
