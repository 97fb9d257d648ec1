"""Results of one kernel call as DataFrames on the caller's rows, labels and times.

Used by the ``DataFrame.osc`` accessor and the command line.
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

from ._columns import input_error
from ._prepared import Prepared
from ._validate import Grouping
from .intrinsic import OUTPUTS, Kinematics
from .intrinsic import kinematics as _kinematics
from .summary import summarize

__all__ = [
    "ELEMENT_OPTIONS",
    "RESULTS_SUMMARIZED",
    "events",
    "outputs_for",
    "result_columns",
    "result_frame",
    "summary_and_stops",
    "synthetic_run",
]

F64 = npt.NDArray[np.float64]
_SKIP = ("t", "position")  # the caller's own input


#: Estimator of the per-track tables (summaries, stops, turns, elements, speed changes) when none
#: is given: logs are usually noisy, and finite differences would headline noise there.
TABLE_METHOD = "auto"


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


def outputs_for(columns: Any) -> list[str]:
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


def _caller_time(prep: Prepared, elapsed: np.ndarray, since: Any) -> Any:
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
    options = {"method": TABLE_METHOD, **options}
    prep = Prepared(df, time, position, by, crs, origin)
    if from_results and prep.n:
        k = _from_results(prep, df)
    else:
        k = prep.run(options) if prep.n else synthetic_run(prep, options)
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


def _from_results(prep: Prepared, df: pd.DataFrame) -> Any:
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


def _event_frame(prep: Prepared, table: Any, by: Optional[Hashable]) -> pd.DataFrame:
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
    prep = Prepared(df, time, position, by, crs, origin)
    options = {"method": TABLE_METHOD, **options}
    k = prep.run(options) if prep.n else synthetic_run(prep, options)
    return _tables_of(prep, k, by, rules)


#: Options of :func:`osculate.elements.elements_of` the accessor passes on.
ELEMENT_OPTIONS = ("significance", "resolution", "refine", "max_iterations")


def _element_frame(
    prep: Prepared, k: Kinematics, by: Optional[Hashable], rules: dict[str, Any]
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
    prep: Prepared, k: Kinematics, by: Optional[Hashable], rules: dict[str, dict[str, Any]]
) -> dict[str, pd.DataFrame]:
    """Return the turn, speed-change and element tables named in ``rules``, from one run."""
    return {
        name: _element_frame(prep, k, by, r)
        if name == "elements"
        else _event_frame(prep, getattr(k, name)(**r), by)
        for name, r in rules.items()
    }


def synthetic_run(prep: Prepared, options: dict[str, Any]) -> Kinematics:
    """Run on a small made-up path with the same options: the layout for zero-row frames."""
    t = np.arange(24, dtype=np.float64)
    x = np.column_stack([np.cos(0.1 * t), np.sin(0.1 * t), 0.01 * t])[:, : len(prep.position)]
    if prep.crs == "geodetic" and x.shape[1] == 3:
        options = {"up": (0.0, 0.0, 1.0), **options}
    return _kinematics(t, x, **options)


def result_frame(prep: Prepared, k: Kinematics, columns: Any) -> pd.DataFrame:
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
