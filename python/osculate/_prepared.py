"""A caller's DataFrame made ready for one kernel call (used by the ``DataFrame.osc`` accessor).

Its columns as arrays, its rows grouped by track and sorted by time, the names its errors use.
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
from ._validate import EXACT_SPAN, Grouping, Naming, plain
from .geodesy import enu_and_origins
from .intrinsic import Kinematics
from .intrinsic import kinematics as _kinematics

__all__ = ["CRS", "Prepared"]

F64 = npt.NDArray[np.float64]
CRS = ("cartesian", "geodetic")


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
    # The times as osculate.kinematics takes them on the caller's rows (datetime64, int64 or
    # float64 seconds): it makes them relative per track itself.
    plain: Optional[np.ndarray] = None


def _times(s: pd.Series) -> _Times:
    dtype = s.dtype
    if pd.api.types.is_integer_dtype(dtype):
        # Epoch-nanosecond or tick counters: float64 would round them (256 ns steps today); as
        # for datetimes, each track's first time is subtracted in int64.
        missing = np.asarray(s.isna().to_numpy(), dtype=bool)
        if dtype.kind == "u" and len(s) and s.max() > np.iinfo(np.int64).max:
            raise _core.InputError(f"time: column {s.name!r} holds unsigned times above 2**63 - 1")
        ticks = np.asarray(s.to_numpy(dtype=np.int64, na_value=0))
        return _Times(ticks, 1.0, missing, integer=True, plain=ticks)
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
            return _Times(sec, None, missing, plain=sec)
        return _Times(ticks, per_second, missing, plain=a)
    sec = _numbers(s, "time")
    return _Times(sec, None, np.isnan(sec), plain=sec)


class Prepared:
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
        self.plain_times = times.plain
        # Positions on the caller's rows; in kernel order (self.x) only when asked for.
        self.x_caller = np.column_stack(coords) if n else np.empty((0, 3))
        self._x: Optional[F64] = None
        self.origins: Optional[F64] = None
        self.enu: Optional[F64] = None
        if crs == "geodetic" and n:
            x = self.to_kernel(self.x_caller)
            llh = x if x.shape[1] == 3 else np.column_stack([x, np.zeros(n)])
            enu, self.origins = enu_and_origins(llh, self.kernel_grouping, origin)
            self.enu = enu
            x = enu if x.shape[1] == 3 else np.ascontiguousarray(enu[:, :2])
            self._x = np.ascontiguousarray(x, dtype=np.float64)

    @property
    def x(self) -> F64:
        """Positions in kernel order (east, north, up for geodetic frames)."""
        if self._x is None:
            self._x = np.ascontiguousarray(self.to_kernel(self.x_caller), dtype=np.float64)
        return self._x

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

    @property
    def caller_rows(self) -> bool:
        """Whether :meth:`run` gives results on the caller's rows (kernel rows otherwise)."""
        return self.enu is None

    def run(self, options: dict[str, Any], caller_rows: bool = False) -> Kinematics:
        """One call of :func:`osculate.kinematics` on all tracks.

        With ``caller_rows`` (and :attr:`caller_rows`), the kernel takes the frame's own rows
        and puts its results back on them, so nothing is gathered here either way; otherwise the
        results are in kernel order, as the per-track tables want them.
        """
        for bad in ("tracks", "offsets"):
            if bad in options:
                raise TypeError(f"{bad}: not an option of the accessor; name the column with by=")
        if caller_rows and self.caller_rows:
            g = self.grouping
            own = Grouping(
                g.offsets, g.order, g.labels, g.inverse, self.kernel_grouping.naming, g.codes
            )
            return _kinematics(self.plain_times, self.x_caller, tracks=own, **options)
        if self.enu is not None and self.x.shape[1] == 3:
            options = {"up": (0.0, 0.0, 1.0), **options}
        return _kinematics(self.t, self.x, tracks=self.kernel_grouping, **options)
