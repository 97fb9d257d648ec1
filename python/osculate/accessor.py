"""The pandas accessor ``DataFrame.osc``: kinematics of every track of a frame, on the frame's rows.

Importing :mod:`osculate` registers the accessor when pandas is importable.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Hashable, Sequence
from typing import Any, Optional

import numpy as np
import numpy.typing as npt

try:
    import pandas as pd
except ImportError as exc:  # pragma: no cover - depends on the environment
    raise ImportError(
        "the DataFrame.osc accessor needs pandas: pip install 'osculate[pandas]'"
    ) from exc

from . import _core
from ._columns import column_values, input_error
from ._validate import EXACT_SPAN, Grouping, Naming, plain, track_time_order
from .geodesy import enu_and_origins
from .intrinsic import OUTPUTS, Kinematics
from .intrinsic import kinematics as _kinematics
from .summary import summarize

__all__ = ["OscAccessor", "result_columns", "track_time_order"]

F64 = npt.NDArray[np.float64]
CRS = ("cartesian", "geodetic")
_SKIP = ("t", "position")  # the caller's own input


def _numbers(s: pd.Series, role: str) -> F64:
    if pd.api.types.is_bool_dtype(s.dtype) or not pd.api.types.is_numeric_dtype(s.dtype):
        raise TypeError(f"{role}: column {s.name!r} holds {s.dtype} values, expected real numbers")
    if pd.api.types.is_complex_dtype(s.dtype):
        raise TypeError(f"{role}: column {s.name!r} holds complex values, expected real numbers")
    return np.ascontiguousarray(s.to_numpy(dtype=np.float64, na_value=np.nan))


@dataclasses.dataclass(frozen=True)
class _Times:
    """A time column as a sort key plus how to turn it into seconds."""

    key: np.ndarray  # float64 seconds, or int64 ticks for datetimes and integer times
    ticks_per_second: Optional[float]  # set for int64 keys: times are relative to each track
    missing: npt.NDArray[np.bool_]
    integer: bool = False  # integer times (their own unit), kept exact like datetimes


def _times(s: pd.Series) -> _Times:
    dtype = s.dtype
    if pd.api.types.is_integer_dtype(dtype):
        # Epoch-nanosecond or tick counters: float64 would round them (256 ns steps today); as
        # for datetimes, each track's first time is subtracted in int64.
        missing = np.asarray(s.isna().to_numpy(), dtype=bool)
        if dtype.kind == "u" and len(s) and s.max() > np.iinfo(np.int64).max:
            raise _core.InputError(f"time: column {s.name!r} holds unsigned times above 2**63 - 1")
        ticks = np.asarray(s.to_numpy(dtype=np.int64, na_value=0))
        return _Times(ticks, 1.0, missing, integer=True)
    if isinstance(dtype, pd.DatetimeTZDtype):
        s = s.dt.tz_convert("UTC").dt.tz_localize(None)
        dtype = s.dtype
    if dtype.kind in "Mm":
        a = s.to_numpy()
        unit, count = np.datetime_data(a.dtype)
        per_second = float(np.array(1, "m8[s]") / np.array(count, f"m8[{unit}]"))
        missing = np.isnat(a)
        ticks = a.view(np.int64)
        if dtype.kind == "m":  # durations: seconds as they are
            sec = ticks / per_second
            sec[missing] = np.nan
            return _Times(sec, None, missing)
        return _Times(ticks, per_second, missing)
    sec = _numbers(s, "time")
    return _Times(sec, None, np.isnan(sec))


class _Prepared:
    """Rows of a frame grouped by track and sorted by time, ready for one kernel call."""

    def __init__(
        self,
        df: pd.DataFrame,
        time: Hashable,
        position: Sequence[Hashable],
        by: Optional[Hashable],
        crs: str,
        origin: Any,
    ) -> None:
        if crs not in CRS:
            raise input_error(f"crs: expected one of {CRS}, got {crs!r}", "crs")
        if isinstance(position, (str, bytes)) or len(position) not in (2, 3):
            raise input_error(
                f"position: expected 2 or 3 column names, got {position!r}", "position"
            )
        if crs == "cartesian" and origin is not None:
            raise input_error("origin: only used with crs='geodetic'", "origin")
        self.index = df.index
        self.n = n = len(df)
        self.time, self.position, self.by, self.crs = time, tuple(position), by, crs
        self.time_values = column_values(df, time, "time")
        times = _times(self.time_values)
        coords = [_numbers(column_values(df, c, "position"), "position") for c in self.position]
        if by is None:
            codes = np.zeros(n, dtype=np.intp)
            self.labels: pd.Index = pd.Index([0], name="track")
        else:
            if isinstance(by, (list, tuple, np.ndarray, pd.Index, pd.Series)):
                raise TypeError(
                    f"by: expected the name of one column or index level, got {type(by).__name__}"
                    f" {list(by)!r:.80}; to group by several columns, build one key column first"
                )
            ids = column_values(df, by, "by")
            try:
                c, uniques = pd.factorize(ids, sort=True)
            except TypeError:  # labels of mixed types cannot be sorted: first-seen order
                c, uniques = pd.factorize(ids, sort=False)
            codes = np.asarray(c, dtype=np.intp)
            self.labels = pd.Index(uniques, name=by)
            if n and codes.min() < 0:
                pos = int(np.argmax(codes < 0))
                raise self.row_error(by, pos, "the track id is missing")
        if times.missing.any():
            pos = int(np.argmax(times.missing))
            raise self.row_error(time, pos, "the time is missing (NaN or NaT)")
        self.n_tracks = m = len(self.labels) if n else 0
        self.grouping = Grouping.from_codes(codes, np.arange(m), times.key)
        self.order: Optional[npt.NDArray[np.intp]] = self.grouping.order
        self.offsets = self.grouping.offsets
        columns = {"t": time, "lat": self.position[0]}
        columns["positions"] = columns["llh"] = ", ".join(str(p) for p in self.position)
        # The kernels see the rows grouped (arrays below are in kernel order); errors and
        # warnings name the caller's labels, columns and index through this grouping.
        self.kernel_grouping = Grouping(
            self.offsets,
            None,
            np.arange(m),
            naming=Naming(columns, self.index, by, self.order, self.labels),
        )
        counts = np.diff(self.offsets)
        key = times.key
        key = self.to_kernel(key)
        self.datetimes = times.ticks_per_second is not None and not times.integer
        self.integer_times = times.integer
        if times.ticks_per_second is not None:  # relative to each track's first time, in int64
            first = np.repeat(key[np.minimum(self.offsets[:-1], max(n - 1, 0))], counts)
            relative = key - first
            if times.integer and n:
                span = np.maximum.reduceat(relative, self.offsets[:-1][counts > 0])
                if span.max() > EXACT_SPAN:
                    label = plain(self.labels[np.flatnonzero(counts > 0)[int(np.argmax(span))]])
                    raise _core.InputError(
                        f"time: column {time!r}, track {label!r}: integer times span more than "
                        "2**53 units, so float64 cannot hold their differences exactly; convert "
                        "to a coarser unit or to float seconds first"
                    )
            self.t = relative / times.ticks_per_second
        else:
            self.t = np.ascontiguousarray(key, dtype=np.float64)
        x = np.column_stack([self.to_kernel(c) for c in coords]) if n else np.empty((0, 3))
        self.origins: Optional[F64] = None
        self.enu: Optional[F64] = None
        if crs == "geodetic" and n:
            llh = x if x.shape[1] == 3 else np.column_stack([x, np.zeros(n)])
            enu, self.origins = enu_and_origins(llh, self.kernel_grouping, origin)
            self.enu = enu
            x = enu if x.shape[1] == 3 else np.ascontiguousarray(enu[:, :2])
        self.x = np.ascontiguousarray(x, dtype=np.float64)

    # -- rows ------------------------------------------------------------------------------------
    def to_kernel(self, a: np.ndarray) -> np.ndarray:
        """Caller rows → kernel rows (grouped by track, sorted by time)."""
        return self.grouping.to_kernel(a)

    def to_caller(self, a: np.ndarray) -> np.ndarray:
        """Kernel rows → caller rows."""
        return self.grouping.to_caller(a)

    def row_error(self, column: Hashable, pos: int, detail: str, track: Any = None) -> Any:
        """Make an InputError naming the column, the index label of caller row ``pos``, a track."""
        label = plain(self.index[pos])
        where = f"column {column!r}, row {label!r}"
        if track is not None:
            where += f" (track {plain(track)!r})"
        return input_error(f"{where}: {detail}", str(column), pos, label)

    def run(self, options: dict[str, Any]) -> Kinematics:
        """One call of :func:`osculate.kinematics` on all tracks."""
        for bad in ("tracks", "offsets"):
            if bad in options:
                raise TypeError(f"{bad}: not an option of the accessor; name the column with by=")
        if self.enu is not None and self.x.shape[1] == 3:
            options = {"up": (0.0, 0.0, 1.0), **options}
        return _kinematics(self.t, self.x, tracks=self.kernel_grouping, **options)


def _quantities(k: Kinematics) -> list[tuple[str, np.ndarray]]:
    """Per-sample results of ``k`` (any estimator), in field order, without the input."""
    n = len(k)
    out = []
    for f in dataclasses.fields(k):
        if f.name.startswith("_") or f.name in _SKIP:
            continue
        if f.name in OUTPUTS and f.name not in k.outputs:
            continue
        a = getattr(k, f.name)
        if isinstance(a, np.ndarray) and a.ndim in (1, 2) and a.shape[0] == n and a.dtype != object:
            out.append((f.name, a))
    for name, a in (k.se or {}).items():
        out.append((f"{name}_se", a))
    # The track labels of Kinematics are batch positions here; the caller has the real column.
    return [(name, a) for name, a in out if name != "tracks"]


def result_columns(k: Kinematics) -> list[str]:
    """Names of the accessor's result columns for the quantities of ``k``.

    Parameters
    ----------
    k : Kinematics
        A result of :func:`osculate.kinematics`.

    Returns
    -------
    list of str
        Scalars keep their name; vectors get ``_x``, ``_y`` (and ``_z``) suffixes.
    """
    names = []
    for name, a in _quantities(k):
        if a.ndim == 1:
            names.append(name)
        else:
            names.extend(f"{name}_{axis}" for axis in "xyz"[: a.shape[1]])
    return names


def _outputs_for(columns: Any) -> list[str]:
    """Return the quantities behind result column names (``speed``, ``tangent_x``, ``..._se``).

    Names that match none (unknown ones, ``position``, ``flags``) ask for nothing here;
    :func:`_select` reports the unknown ones.
    """
    wanted = [columns] if isinstance(columns, str) else list(columns)
    out = []
    for w in map(str, wanted):
        base = w[:-3] if w.endswith("_se") else w.replace("_se_", "_")
        for q in OUTPUTS:
            if base == q or (base.startswith(f"{q}_") and base[len(q) + 1 :] in ("x", "y", "z")):
                out.append(q)
    return out


def _select(
    available: list[str], quantities: list[str], enu: tuple[str, ...], columns: Any
) -> set[str]:
    if columns is None:
        return set(available)
    wanted = [columns] if isinstance(columns, str) else list(columns)
    chosen: set[str] = set()
    for w in wanted:
        hits = [c for c in available if c == w or (w in quantities and c.startswith(f"{w}_"))]
        if w == "position":
            hits = list(enu)
        if not hits:
            raise input_error(
                f"columns: unknown result {w!r}; choose from {', '.join(quantities)} "
                f"or one of their components",
                "columns",
            )
        chosen.update(hits)
    return chosen


def _caller_time(prep: _Prepared, elapsed: np.ndarray, since: Any) -> Any:
    """Return the times ``elapsed`` after the caller's times ``since`` in the caller's type.

    Datetimes for datetime columns (``elapsed`` in seconds), the integers' own unit for integer
    columns; float times are already the caller's.
    """
    if prep.datetimes:
        return (pd.Series(since) + pd.to_timedelta(np.asarray(elapsed), unit="s")).array
    if prep.integer_times:
        return np.asarray(since, dtype=np.float64) + np.asarray(elapsed)
    return elapsed


def summary_and_stops(
    df: pd.DataFrame,
    time: Hashable,
    position: Sequence[Hashable],
    by: Optional[Hashable],
    crs: str,
    origin: npt.ArrayLike | None,
    options: dict[str, Any],
    from_results: bool = False,
    tables: Optional[dict[str, dict[str, Any]]] = None,
) -> tuple[pd.DataFrame, pd.DataFrame, dict[str, pd.DataFrame]]:
    """Return the tables of :meth:`OscAccessor.summary` and :meth:`OscAccessor.stops`, one run.

    With ``from_results``, ``df`` is an output of ``osculate analyze`` (or of
    ``df.osc.kinematics(..., keep=True)``): its result columns (:data:`RESULTS_SUMMARIZED`, the
    jerk and the ``_se`` columns where present) are summarised as they are, without recomputing.
    Extremes then use stretches of three samples (the smoothing bandwidth is not in the table),
    and the stops are the STOPPED runs of the table, not trimmed by the noise.

    ``tables`` names the turn, speed-change and element tables to make as well (see
    :func:`events`): from the same run, or from the positions when summarising results.
    """
    prep = _Prepared(df, time, position, by, crs, origin)
    if from_results and prep.n:
        k = _from_results(prep, df)
    else:
        k = prep.run(options) if prep.n else _synthetic(prep, options)
    keep = slice(None) if prep.n else slice(0, 0)  # a synthetic run: its layout, none of its rows
    data = {c: v[keep] for c, v in summarize(k).items()}
    data.pop("track", None)
    out = pd.DataFrame(data, index=prep.labels[: prep.n_tracks])
    first = prep.offsets[:-1] if prep.order is None else prep.order[prep.offsets[:-1]]
    last = prep.offsets[1:] - 1 if prep.order is None else prep.order[prep.offsets[1:] - 1]
    raw = prep.time_values
    out["start"] = raw.iloc[first].array
    out["end"] = raw.iloc[last].array
    # The times of the extremes, like start and end, in the caller's type and origin.
    for c in [c for c in out.columns if str(c).endswith("_at")]:
        out[c] = _caller_time(prep, out[c].to_numpy(), out["start"].array)
    if prep.crs == "geodetic":
        o = prep.origins if prep.origins is not None else np.empty((0, 3))
        for j, name in enumerate(("origin_lat", "origin_lon", "origin_h")):
            out[name] = o[:, j]
    cols = {c: v[keep] for c, v in k.stops.columns().items()}
    stops = pd.DataFrame(cols)
    stops["track"] = prep.labels[k.stops.track_index[keep]]
    # The run's rows are the prepared (grouped) rows: map them back to the frame's.
    rows = (k.stops.first_row[keep], k.stops.last_row[keep])
    if prep.order is not None:
        rows = (prep.order[rows[0]], prep.order[rows[1]])
    stops["start"] = raw.iloc[rows[0]].array
    stops["end"] = raw.iloc[rows[1]].array
    extra: dict[str, pd.DataFrame] = {}
    if tables and from_results and prep.n:  # the results hold no velocities: run the positions
        extra = events(df, time, position, by, crs, origin, options, tables)
    elif tables:
        extra = _tables_of(prep, k, by, tables)
    return out, stops.rename(columns={"track": "track" if by is None else by}), extra


#: Columns of an ``analyze`` output that a summary is made from (see :func:`summary_and_stops`).
RESULTS_SUMMARIZED = (
    "flags",
    "speed",
    "accel_tangential",
    "accel_normal",
    "curvature",
    "angular_speed",
    "arclength",
)


def _from_results(prep: _Prepared, df: pd.DataFrame) -> Any:
    """Return the per-sample results already in ``df`` (an ``analyze`` output) as summarised.

    Kernel row order; the stops are found again from the STOPPED runs (untrimmed: the noise is
    not in the table).
    """
    from types import SimpleNamespace

    from .stops import find_stops, stop_table

    def kern(column: str) -> np.ndarray:
        values = df[column].to_numpy(dtype=np.float64, na_value=np.nan)
        return np.ascontiguousarray(prep.to_kernel(values))

    m = prep.n_tracks
    cols = {c: kern(c) for c in RESULTS_SUMMARIZED if c != "flags"}
    flags = np.ascontiguousarray(prep.to_kernel(df["flags"].to_numpy().astype(np.uint8)))
    axes = [a for a in "xyz" if f"jerk_{a}" in df.columns]
    jerk = (
        np.column_stack([kern(f"jerk_{a}") for a in axes]) if axes else np.full((prep.n, 1), np.nan)
    )
    se = {
        q: kern(f"{q}_se")
        for q in ("speed", "accel_tangential", "accel_normal", "curvature")
        if f"{q}_se" in df.columns
    }
    if axes and f"jerk_se_{axes[0]}" in df.columns:
        se["jerk"] = kern(f"jerk_se_{axes[0]}")
    first, last, code = find_stops(prep.t, prep.x, flags, prep.offsets, np.full(m, np.nan))
    stops = stop_table(prep.t, prep.x, first, last, code, np.arange(m), None)
    return SimpleNamespace(
        grouping=Grouping(prep.offsets, None, np.arange(m)),
        t=prep.t,
        flags=flags,
        jerk=jerk,
        se=se or None,
        stops=stops,
        fit_info={"noise": np.full(m, np.nan)},
        **cols,
    )


def _event_frame(prep: _Prepared, table: Any, by: Optional[Hashable]) -> pd.DataFrame:
    """Return a table of turns or speed changes of a run of ``prep`` as the caller has it.

    Track labels, rows and times as in the caller's frame.
    """
    keep = slice(None) if prep.n else slice(0, 0)  # a synthetic run: its layout, none of its rows
    cols = {c: v[keep] for c, v in table.columns().items()}
    out = pd.DataFrame(cols)
    out["track"] = prep.labels[np.asarray(cols["track"], dtype=np.intp)]
    # The run's rows are the prepared (grouped) rows: map them back to the frame's.
    rows = (out["first_row"].to_numpy(), out["last_row"].to_numpy())
    if prep.order is not None:
        rows = (prep.order[rows[0]], prep.order[rows[1]])
    out["first_row"], out["last_row"] = rows
    raw = prep.time_values
    start = raw.iloc[rows[0]].array
    for c in [c for c in out.columns if str(c).endswith("_at")]:
        out[c] = _caller_time(prep, (out[c] - out["start"]).to_numpy(), start)
    out["start"], out["end"] = start, raw.iloc[rows[1]].array
    return out.rename(columns={"track": "track" if by is None else by})


def events(
    df: pd.DataFrame,
    time: Hashable,
    position: Sequence[Hashable],
    by: Optional[Hashable],
    crs: str,
    origin: npt.ArrayLike | None,
    options: dict[str, Any],
    rules: dict[str, dict[str, Any]],
) -> dict[str, pd.DataFrame]:
    """Return the tables of turns, speed changes and elements named in ``rules``, from one run.

    ``rules`` maps ``"turns"``, ``"speed_changes"`` and/or ``"elements"`` to the keyword
    arguments of :meth:`osculate.Kinematics.turns`, :meth:`~osculate.Kinematics.speed_changes`
    and :func:`osculate.elements.elements_of`.
    """
    prep = _Prepared(df, time, position, by, crs, origin)
    k = prep.run(options) if prep.n else _synthetic(prep, options)
    return _tables_of(prep, k, by, rules)


#: Options of :func:`osculate.elements.elements_of` the accessor passes on.
_ELEMENT_OPTIONS = ("significance", "resolution", "refine", "max_iterations")


def _element_frame(
    prep: _Prepared, k: Kinematics, by: Optional[Hashable], rules: dict[str, Any]
) -> pd.DataFrame:
    """Return the element table of a run of ``prep`` as the caller has it (labels, times)."""
    from .elements import elements_of

    if rules.get("up") is None and (prep.crs == "geodetic" or (not prep.n and k.dim == 3)):
        rules = {**rules, "up": (0.0, 0.0, 1.0)}  # local vertical; or the synthetic layout run
    keep = slice(None) if prep.n else slice(0, 0)
    out = elements_of(k, **rules).to_pandas().iloc[keep].reset_index(drop=True)
    code = np.asarray(out["track"], dtype=np.intp)
    out["track"] = prep.labels[code]
    # Times in the caller's type: each track's first time plus the seconds since it.
    firsts = prep.offsets[:-1] if prep.order is None else prep.order[prep.offsets[:-1]]
    origin_time = prep.time_values.iloc[firsts[code]].array
    for c in ("start_time", "end_time"):
        out[c] = _caller_time(prep, out[c].to_numpy(), origin_time)
    return out.rename(columns={"track": "track" if by is None else by})


def _tables_of(
    prep: _Prepared, k: Kinematics, by: Optional[Hashable], rules: dict[str, dict[str, Any]]
) -> dict[str, pd.DataFrame]:
    """Return the turn, speed-change and element tables named in ``rules``, from one run."""
    return {
        name: _element_frame(prep, k, by, r)
        if name == "elements"
        else _event_frame(prep, getattr(k, name)(**r), by)
        for name, r in rules.items()
    }


def _synthetic(prep: _Prepared, options: dict[str, Any]) -> Kinematics:
    """Run on a small made-up path with the same options: the layout for zero-row frames."""
    t = np.arange(24, dtype=np.float64)
    x = np.column_stack([np.cos(0.1 * t), np.sin(0.1 * t), 0.01 * t])[:, : len(prep.position)]
    if prep.crs == "geodetic" and x.shape[1] == 3:
        options = {"up": (0.0, 0.0, 1.0), **options}
    return _kinematics(t, x, **options)


def _frame(prep: _Prepared, k: Kinematics, columns: Any) -> pd.DataFrame:
    quantities = _quantities(k)
    if prep.n == 0:  # k is a synthetic run: keep its layout and dtypes, none of its rows
        quantities = [(name, a[:0]) for name, a in quantities]
    names = [q for q, _ in quantities]
    enu_names = ("east", "north", "up")[: len(prep.position)] if prep.crs == "geodetic" else ()
    available = [*enu_names, *result_columns(k)]
    chosen = _select(available, names, enu_names, columns)
    cols: dict[str, np.ndarray] = {}
    if enu_names and not chosen.isdisjoint(enu_names):
        enu = prep.enu if prep.enu is not None else np.empty((0, 3))
        for j, name in enumerate(enu_names):
            if name in chosen:
                cols[name] = prep.to_caller(enu[:, j])
    for name, a in quantities:
        if a.ndim == 1:
            if name in chosen:
                cols[name] = prep.to_caller(a)
            continue
        axes = [(j, f"{name}_{axis}") for j, axis in enumerate("xyz"[: a.shape[1]])]
        axes = [(j, c) for j, c in axes if c in chosen]
        if axes:
            whole = prep.to_caller(a)  # one gather of all components; the columns are views
            for j, c in axes:
                cols[c] = whole[:, j]
    return pd.DataFrame(cols, index=prep.index, copy=False)


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
        prep = _Prepared(df, time, position, by, crs, origin)
        if columns is not None and "outputs" not in options:
            options = {**options, "outputs": _outputs_for(columns)}
        k = prep.run(options) if prep.n else _synthetic(prep, options)
        res = _frame(prep, k, columns)
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
            As in :meth:`kinematics`.

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
            As in :meth:`kinematics` (``method="smooth"`` is the usual choice for logs).
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
            As in :meth:`kinematics` (``method="smooth"`` is the usual choice for logs); the
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
        element_rules = {k: options.pop(k) for k in list(options) if k in _ELEMENT_OPTIONS}
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
            As in :meth:`kinematics`.
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
            As in :meth:`kinematics`.

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
