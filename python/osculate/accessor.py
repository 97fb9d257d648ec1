"""The pandas accessor ``DataFrame.osc``: kinematics of every track of a frame, on the frame's rows.

Importing :mod:`osculate` registers the accessor when pandas is importable.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence
from typing import Any, Optional

import numpy.typing as npt

try:
    import pandas as pd
except ImportError as exc:  # pragma: no cover - depends on the environment
    raise ImportError(
        "the DataFrame.osc accessor needs pandas: pip install 'osculate[pandas]'"
    ) from exc

from ._dataframes import (
    ELEMENT_OPTIONS,
    events,
    outputs_for,
    result_columns,
    result_frame,
    summary_and_stops,
    synthetic_run,
)
from ._prepared import Prepared
from ._validate import track_time_order

__all__ = ["OscAccessor", "result_columns", "track_time_order"]


@pd.api.extensions.register_dataframe_accessor("osc")
class OscAccessor:
    """``DataFrame.osc``: intrinsic kinematics of the tracks of a frame.

    Parameters
    ----------
    df : pandas.DataFrame
        The frame; registered as ``df.osc`` when :mod:`osculate` is imported.
    """

    def __init__(self, df: pd.DataFrame) -> None:
        self._df = df

    def kinematics(
        self,
        *,
        time: Hashable,
        position: Sequence[Hashable],
        by: Optional[Hashable] = None,
        crs: str = "cartesian",
        origin: npt.ArrayLike | None = None,
        columns: str | Sequence[str] | None = None,
        keep: bool = False,
        **options: Any,
    ) -> pd.DataFrame:
        """Kinematics of every row, on the frame's own rows and index.

        All tracks go to Rust in one call of :func:`osculate.kinematics`: rows are grouped by
        track and sorted by time (stable, ``numpy.lexsort``) inside, and every result is put back
        on the caller's row. The rows of a track may be scattered through the frame and in any
        time order; the index may be anything (non-unique, datetime, MultiIndex).

        Parameters
        ----------
        time : hashable
            Column (or index level) of sample times: numbers (seconds, or your time unit),
            ``datetime64`` (naive or timezone-aware) or ``timedelta64``. Datetimes become
            seconds since the first time of each track (timezone-aware ones via UTC), timedeltas
            seconds as they are. A missing time (NaN, NaT) is an error.
        position : sequence of 2 or 3 hashables
            Columns (or index levels) of the coordinates: x, y[, z] with ``crs="cartesian"``, or
            latitude, longitude[, ellipsoidal height] in degrees and metres with
            ``crs="geodetic"``. Rows with a missing coordinate are kept, flagged INVALID, NaN.
        by : hashable, optional
            Column (or index level) of track ids; without it the frame is one track.
        crs : {"cartesian", "geodetic"}
            ``"geodetic"``: WGS 84 positions are converted to local east-north-up metres
            (:func:`osculate.geodetic_to_enu`) before differentiating. Each track is anchored at
            its own first finite fix unless ``origin`` is given (then one origin for all tracks).
            Without a height column the height is taken as 0 and the path as planar (east,
            north). For 3-D geodetic paths ``up`` defaults to (0, 0, 1), so ``signed_curvature``
            is positive for left turns seen from above.
        origin : (lat, lon, h), optional
            Global origin of the local frame for ``crs="geodetic"``.
        columns : str or sequence of str, optional
            Keep only these results: quantity names (``"speed"``, ``"tangent"``) or component
            columns (``"tangent_x"``); ``"position"`` selects ``east, north, up``.
        keep : bool, default False
            Return the frame's own columns followed by the results (input columns with a result's
            name are replaced).
        **options
            Passed unchanged to :func:`osculate.kinematics` (``method``, ``order``,
            ``min_speed``, ``min_curvature``, ``gap_factor``, ``up``, and any option of later
            estimators).

        Returns
        -------
        pandas.DataFrame
            On ``df.index``, one column per result: scalars by name (``speed``, ``arclength``,
            ``curvature``, ``radius``, ``torsion``, ``accel_tangential``, ...), vectors by
            component (``velocity_x``, ``tangent_y``, ``binormal_z``, ...; x, y, z are east,
            north, up for geodetic input, which also gives ``east``, ``north``, ``up``) and
            ``flags`` (bits of :class:`osculate.Flag`). Read that column as ``res["flags"]``:
            ``res.flags`` is pandas' own ``DataFrame.flags`` attribute. Lateral acceleration,
            jerk and radius are indicative: local codes and licensed engineers decide whether a
            road, rail, ride or vehicle is acceptable.

        Raises
        ------
        InputError
            A missing column, a missing time or track id, times that repeat within a track, a
            track too short for the method, bad options. The message names the column, the
            caller's index label of the row and the track.
        TypeError
            A column of non-numeric values, or an unknown option.

        See Also
        --------
        osculate.kinematics : The array function behind the accessor.

        Notes
        -----
        Speed, frame, curvature, torsion and the acceleration split are those of
        :func:`osculate.kinematics` with the same ``method`` (see its Notes for the estimator and
        its reference); geodetic conversion as in :func:`osculate.geodetic_to_enu` (WGS 84,
        NIMA TR8350.2).

        Examples
        --------
        Two tracks whose rows are interleaved and out of time order, on a non-unique index:

        >>> import numpy as np
        >>> import pandas as pd
        >>> import osculate as osc
        >>> t = np.arange(6.0)
        >>> df = pd.DataFrame(
        ...     {
        ...         "car": ["a", "b"] * 6,
        ...         "t": np.repeat(t, 2),
        ...         "x": np.column_stack([t, 2 * t]).ravel(),
        ...         "y": np.column_stack([0.5 * t**2, 0 * t]).ravel(),
        ...     },
        ...     index=["r"] * 12,
        ... ).iloc[::-1]
        >>> res = df.osc.kinematics(time="t", position=["x", "y"], by="car")
        >>> res[["speed", "accel_normal"]].iloc[:4].round(3)
           speed  accel_normal
        r  2.000         0.000
        r  5.099         0.196
        r  2.000         0.000
        r  4.123         0.243

        Track ``b`` runs straight: flagged STRAIGHT, curvature 0. A missing coordinate is kept
        on its row, flagged INVALID:

        >>> bool((res["flags"].iloc[::2] & int(osc.Flag.STRAIGHT)).all())
        True
        >>> df.loc[:, "x"] = df["x"].where(df["t"] != 2.0)
        >>> res = df.osc.kinematics(time="t", position=["x", "y"], by="car")
        >>> [osc.Flag.INVALID in osc.Flag(int(f)) for f in res["flags"].iloc[6:8]]
        [True, True]
        """
        df = self._df
        prep = Prepared(df, time, position, by, crs, origin)
        if columns is not None and "outputs" not in options:
            options = {**options, "outputs": outputs_for(columns)}
        k = prep.run(options) if prep.n else synthetic_run(prep, options)
        res = result_frame(prep, k, columns)
        if not keep:
            return res
        own = df.drop(columns=[c for c in res.columns if c in df.columns])
        return pd.concat([own, res], axis=1)

    def stops(
        self,
        *,
        time: Hashable,
        position: Sequence[Hashable],
        by: Optional[Hashable] = None,
        crs: str = "cartesian",
        origin: npt.ArrayLike | None = None,
        **options: Any,
    ) -> pd.DataFrame:
        """Intervals where each track stands still.

        Parameters
        ----------
        time, position, by, crs, origin, **options
            As in :meth:`kinematics`, except that ``method`` defaults to ``"auto"``: finite
            differences, or a smoothing spline where the noise would swamp their accelerations
            (see :func:`osculate.kinematics`).

        Returns
        -------
        pandas.DataFrame
            One row per stop: the track label (column named as ``by``, or ``track``), ``start``,
            ``end``, ``duration`` (time units; datetimes give seconds), mean position
            ``position_x``, ``position_y`` [, ``position_z``] and ``samples``; see
            :class:`osculate.Stops`.

        Examples
        --------
        >>> import numpy as np
        >>> import pandas as pd
        >>> import osculate as osc
        >>> t = np.arange(60.0)
        >>> x = np.concatenate([np.arange(20.0), np.full(20, 20.0), 20.0 + np.arange(20.0)])
        >>> df = pd.DataFrame({"t": t, "x": x, "y": 0.0 * t})
        >>> s = df.osc.stops(time="t", position=["x", "y"])
        >>> s[["start", "end"]].to_numpy().tolist()
        [[21.0, 39.0]]

        The position is held from t = 20 to t = 40, but the samples at 20 and 40 are the arrival
        and the departure: their finite-difference speed is 0.5, so they are moving samples.
        """
        return summary_and_stops(self._df, time, position, by, crs, origin, options)[1]

    def turns(
        self,
        *,
        time: Hashable,
        position: Sequence[Hashable],
        by: Optional[Hashable] = None,
        crs: str = "cartesian",
        origin: npt.ArrayLike | None = None,
        up: npt.ArrayLike | None = None,
        significance: float = 3.0,
        hold: float = 1.0,
        min_heading: float = 10.0,
        merge: int = 5,
        core: float = 0.75,
        **options: Any,
    ) -> pd.DataFrame:
        """One row per turn of every track.

        Parameters
        ----------
        time, position, by, crs, origin, **options
            As in :meth:`kinematics`, except that ``method`` defaults to ``"auto"`` (see
            :func:`osculate.kinematics`; ``"smooth"`` is the usual choice for logs).
        up, significance, hold, min_heading, merge, core
            As in :meth:`osculate.Kinematics.turns` (for geodetic input, up defaults to the
            local vertical).

        Returns
        -------
        pandas.DataFrame
            The columns of :class:`osculate.turns.Turns`; ``start``, ``end`` and the ``…_at``
            times in the time column's own type, ``first_row``/``last_row`` positions in the
            frame. Turn radii and lateral accelerations are indicative: local codes and licensed
            engineers decide whether a road, rail, ride or vehicle is acceptable.

        Examples
        --------
        >>> import numpy as np
        >>> import pandas as pd
        >>> import osculate as osc
        >>> s = np.arange(0.0, 120.0, 0.5)
        >>> a = np.clip((s - 40.0) / 25.0, 0.0, np.pi / 2)
        >>> x = np.where(s < 40, s, 40 + 25 * np.sin(a))
        >>> y = 25 * (1 - np.cos(a)) + np.clip(s - 40 - 12.5 * np.pi, 0, None)
        >>> df = pd.DataFrame({"t": s / 5, "x": x, "y": y})
        >>> turns = df.osc.turns(time="t", position=["x", "y"], method="spline")
        >>> turns[["direction", "heading_change", "min_radius"]].round(1).to_numpy().tolist()
        [['left', 90.0, 25.0]]
        """
        rules = {"significance": significance, "hold": hold, "min_heading": min_heading}
        rules.update(merge=merge, core=core, up=(0.0, 0.0, 1.0) if crs == "geodetic" else up)
        args = (self._df, time, position, by, crs, origin, options)
        return events(*args, {"turns": rules})["turns"]

    def elements(
        self,
        *,
        time: Hashable,
        position: Sequence[Hashable],
        by: Optional[Hashable] = None,
        crs: str = "cartesian",
        origin: npt.ArrayLike | None = None,
        up: npt.ArrayLike | None = None,
        penalty: float | None = None,
        min_length: float | None = None,
        **options: Any,
    ) -> pd.DataFrame:
        """Straights, circular arcs and transition spirals of every track, one row each.

        Parameters
        ----------
        time, position, by, crs, origin, **options
            As in :meth:`kinematics`, except that ``method`` defaults to ``"auto"`` (see
            :func:`osculate.kinematics`; ``"smooth"`` is the usual choice for logs); the
            element options ``significance``, ``resolution``, ``refine`` and
            ``max_iterations`` go to :func:`osculate.elements.elements_of`.
        up, penalty, min_length
            As in :meth:`osculate.Kinematics.elements` (geodetic input: up is the local
            vertical).

        Returns
        -------
        pandas.DataFrame
            The columns of :class:`osculate.Elements` (``kind`` by name), the track label named
            after ``by``, ``start_time``/``end_time`` in the time column's own type. Element
            tables are reconstructions from logged data; design values are decided by local
            codes and licensed engineers.

        Examples
        --------
        >>> import numpy as np
        >>> import pandas as pd
        >>> import osculate as osc
        >>> s = np.arange(0.0, 200.0 + 50 * np.pi / 3, 1.0)
        >>> a = np.clip((s - 100.0) / 50.0, 0.0, np.pi / 3)
        >>> after = np.clip(s - 100.0 - 50 * np.pi / 3, 0.0, None)
        >>> x = np.where(s < 100, s, 100 + 50 * np.sin(a)) + after * np.cos(np.pi / 3)
        >>> y = 50 * (1 - np.cos(a)) + after * np.sin(np.pi / 3)
        >>> df = pd.DataFrame({"t": s / 10.0, "x": x, "y": y})
        >>> el = df.osc.elements(time="t", position=["x", "y"], method="spline")
        >>> el["kind"].astype(str).tolist()
        ['straight', 'arc', 'straight']
        """
        element_rules = {k: options.pop(k) for k in list(options) if k in ELEMENT_OPTIONS}
        rules = {"up": up, "penalty": penalty, "min_length": min_length, **element_rules}
        args = (self._df, time, position, by, crs, origin, options)
        return events(*args, {"elements": rules})["elements"]

    def speed_changes(
        self,
        *,
        time: Hashable,
        position: Sequence[Hashable],
        by: Optional[Hashable] = None,
        crs: str = "cartesian",
        origin: npt.ArrayLike | None = None,
        threshold: float = 0.5,
        release: float | None = None,
        significance: float = 3.0,
        hold: float = 1.0,
        min_samples: int = 3,
        **options: Any,
    ) -> pd.DataFrame:
        """One row per marked speed-up or slow-down of every track.

        Parameters
        ----------
        time, position, by, crs, origin, **options
            As in :meth:`kinematics`, except that ``method`` defaults to ``"auto"``: finite
            differences, or a smoothing spline where the noise would swamp their accelerations
            (see :func:`osculate.kinematics`).
        threshold, release, significance, hold, min_samples
            As in :meth:`osculate.Kinematics.speed_changes`.

        Returns
        -------
        pandas.DataFrame
            The columns of :class:`osculate.turns.SpeedChanges`; times in the time column's
            own type.

        Examples
        --------
        >>> import numpy as np
        >>> import pandas as pd
        >>> import osculate as osc
        >>> t = np.linspace(0.0, 20.0, 401)
        >>> v = np.minimum(2 * t, 10.0)
        >>> x = np.concatenate([[0.0], np.cumsum(0.5 * (v[1:] + v[:-1]) * np.diff(t))])
        >>> df = pd.DataFrame({"t": t, "x": x, "y": 0.0})
        >>> ch = df.osc.speed_changes(time="t", position=["x", "y"], min_speed=1e-9)
        >>> ch[["kind", "speed_after"]].round(1).to_numpy().tolist()
        [['speed-up', 10.0]]
        """
        rules = {"threshold": threshold, "release": release, "significance": significance}
        rules.update(hold=hold, min_samples=min_samples)
        args = (self._df, time, position, by, crs, origin, options)
        return events(*args, {"speed_changes": rules})["speed_changes"]

    def summary(
        self,
        *,
        time: Hashable,
        position: Sequence[Hashable],
        by: Optional[Hashable] = None,
        crs: str = "cartesian",
        origin: npt.ArrayLike | None = None,
        **options: Any,
    ) -> pd.DataFrame:
        """One row per track: length, duration, speeds, accelerations, radius, jerk, turning.

        Parameters
        ----------
        time, position, by, crs, origin, **options
            As in :meth:`kinematics`, except that ``method`` defaults to ``"auto"``: finite
            differences, or a smoothing spline where the noise would swamp their accelerations
            (see :func:`osculate.kinematics`).

        Returns
        -------
        pandas.DataFrame
            Indexed by track label (named after ``by``; a single track is labelled 0), with
            ``start``, ``end`` and the ``…_at`` times of the extremes in the time column's own
            type (datetimes stay datetimes), the
            columns of :meth:`osculate.Kinematics.summary_arrays` (``samples``, ``length``,
            ``duration`` in seconds, ``mean_speed``, ``max_speed``, ``max_accel_normal``,
            ``min_radius``, ...) and, for geodetic input, the origin of each track's local frame
            (``origin_lat``, ``origin_lon``, ``origin_h``).

        Raises
        ------
        InputError
            As in :meth:`kinematics`.

        Notes
        -----
        The figures come from the per-sample results of :meth:`kinematics` (one Rust call for
        all tracks). Lateral acceleration, jerk and radius estimated from logged data are
        indicative only: local codes and licensed engineers decide whether a road, track, ride or
        vehicle is acceptable.

        Examples
        --------
        >>> import numpy as np
        >>> import pandas as pd
        >>> import osculate as osc
        >>> t = np.linspace(0.0, 2 * np.pi, 201)
        >>> df = pd.DataFrame({"t": t, "x": 5 * np.cos(t), "y": 5 * np.sin(t)})
        >>> s = df.osc.summary(time="t", position=["x", "y"], order=4)
        >>> s.loc[0, ["samples", "length", "min_radius"]].round(4).tolist()
        [201.0, 31.4146, 5.0]

        (The length is that of the polyline through the 201 samples; the circle's is
        10π = 31.4159.) A frame with no rows gives a summary with no rows:

        >>> len(df.iloc[:0].osc.summary(time="t", position=["x", "y"]))
        0
        """
        return summary_and_stops(self._df, time, position, by, crs, origin, options)[0]
