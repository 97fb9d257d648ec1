"""The one place where arguments are checked and converted before they reach Rust.

Messages name the argument, and where relevant the track and the caller's row.
"""

from __future__ import annotations

from typing import Any, Callable, TypeVar

import numpy as np
import numpy.typing as npt

from . import _core
from ._core import InputError

__all__ = [
    "Grouping",
    "Naming",
    "as_int",
    "as_positions",
    "as_real",
    "as_real_array",
    "as_times",
    "call_kernel",
    "group_rows",
    "relabel",
]

F64 = npt.NDArray[np.float64]
T = TypeVar("T")


def _array(name: str, value: Any) -> np.ndarray:
    """Return ``value`` as a NumPy array.

    pandas extension columns (nullable Float64/Int64) become float64; a missing value is an
    InputError naming its row.
    """
    if hasattr(value, "to_numpy") and (hasattr(value, "dtype") or hasattr(value, "dtypes")):
        dtypes = [value.dtype] if hasattr(value, "dtype") else list(value.dtypes)
        if any(_is_extension_number(d) for d in dtypes):
            missing = np.asarray(value.isna())
            if missing.any():
                row = int(np.flatnonzero(missing.reshape(len(missing), -1).any(axis=1))[0])
                raise InputError(f"{name}: row {row}: the value is missing (NA)")
            return np.asarray(value.to_numpy(dtype=np.float64))
    try:
        return np.asarray(value)
    except ValueError as exc:  # ragged nested sequences
        raise InputError(
            f"{name}: expected a regular array, got a ragged sequence ({exc})"
        ) from None


def _is_extension_number(dtype: Any) -> bool:
    return not isinstance(dtype, np.dtype) and getattr(dtype, "kind", "") in "fiu"


def _real(name: str, value: Any) -> F64:
    arr = _array(name, value)
    kind = arr.dtype.kind
    if kind not in "fiu":
        what = {
            "b": "boolean",
            "c": "complex",
            "O": "object",
            "U": "string",
            "S": "bytes",
            "m": "timedelta64 (convert to seconds first)",
        }.get(kind, str(arr.dtype))
        raise TypeError(f"{name}: expected real numbers, got {what} array (dtype {arr.dtype})")
    return np.ascontiguousarray(arr, dtype=np.float64)


def as_real_array(name: str, value: Any) -> F64:
    """Return ``value`` as a contiguous float64 array; TypeError naming it unless real."""
    return _real(name, value)


def as_real(name: str, value: Any) -> float:
    """Return a real scalar option as a float; TypeError or InputError naming it otherwise."""
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float, np.number)):
        raise TypeError(f"{name}: expected a real number, got {value!r}")
    if isinstance(value, (complex, np.complexfloating)):
        raise TypeError(f"{name}: expected a real number, got {value!r}")
    try:
        return float(value)
    except OverflowError:
        raise InputError(f"{name}: {value!r} is too large") from None


def as_int(name: str, value: Any, low: int, high: int) -> int:
    """Return an integer option within [low, high]; TypeError or InputError naming it otherwise."""
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, np.integer)):
        raise TypeError(f"{name}: expected an integer, got {value!r}")
    v = int(value)
    if not low <= v <= high:
        raise InputError(f"{name}: must be between {low} and {high}, got {v}")
    return v


def ticks_of(t: Any) -> tuple[np.ndarray, float] | None:
    """Integer or datetime times as int64 ticks and ticks per time unit; None for float times.

    Datetimes (NumPy ``datetime64`` or pandas, naive or timezone-aware) count nanoseconds since
    1970-01-01 UTC and their time unit is the second.
    """
    dtype = getattr(t, "dtype", None)
    if dtype is not None and not isinstance(dtype, np.dtype) and hasattr(t, "dt"):
        if getattr(dtype, "tz", None) is not None:  # pandas timezone-aware: to UTC
            t = t.dt.tz_convert("UTC").dt.tz_localize(None)
    try:
        arr = np.asarray(t)
    except ValueError:
        return None  # ragged: reported by as_times
    if arr.dtype.kind == "M":
        if np.isnat(arr).any():
            raise InputError(f"t: row {int(np.argmax(np.isnat(arr)))}: the time is missing (NaT)")
        return arr.astype("datetime64[ns]").view(np.int64), 1e9
    if arr.dtype.kind in "iu":
        if arr.dtype.kind == "u" and arr.size and arr.max() > np.iinfo(np.int64).max:
            raise InputError("t: unsigned times above 2**63 - 1 are not supported")
        return arr.astype(np.int64, copy=False), 1.0
    return None


def as_times(t: Any, name: str = "t") -> F64:
    """Return times as a contiguous float64 vector (order and finiteness are checked in Rust).

    Datetimes become seconds since 1970-01-01 UTC (exact differences come from
    :func:`kernel_times`).
    """
    ticks = ticks_of(t)
    if ticks is not None and ticks[1] != 1.0:
        t = ticks[0] / ticks[1]
    arr = _real(name, t)
    if arr.ndim != 1:
        raise InputError(f"{name}: expected a 1-D array of times, got shape {arr.shape}")
    if arr.size == 0:
        raise InputError(f"{name}: is empty (no samples)")
    return arr


#: Largest span of integer times within one track whose differences float64 holds exactly.
EXACT_SPAN = 2**53


def kernel_times(t: Any, tt: F64, g: Grouping, name: str = "t") -> tuple[F64, F64]:
    """Return times in kernel row order as the kernels need them (only differences matter).

    Integer times (e.g. epoch nanoseconds) lose their last bits as float64 (steps of 256 ns near
    the present epoch); each track's first time is subtracted in int64 first, so its differences
    are exact up to :data:`EXACT_SPAN`. Float times are returned as they are.

    Returns
    -------
    (times, shift)
        The kernel's times and, per track, what was subtracted (as float64; zeros for float
        times): add it back to times the kernels return.
    """
    ticks = ticks_of(t)
    tk = g.to_kernel(tt)
    off = g.offsets
    layout_ok = (
        off.ndim == 1
        and len(off) >= 2
        and off[0] == 0
        and off[-1] == len(tt)
        and bool(np.all(np.diff(off) >= 0))
    )
    if ticks is None or ticks[0].shape != tt.shape or not layout_ok:
        # Float times, or offsets the kernel will reject with its own message.
        return tk, np.zeros(max(g.n_tracks, 0))
    ik, per_unit = g.to_kernel(ticks[0]), ticks[1]
    counts = np.diff(g.offsets)
    has = counts > 0
    firsts = g.offsets[:-1][has]
    lo = np.minimum.reduceat(ik, firsts)
    hi = np.maximum.reduceat(ik, firsts)
    # The span in float64 is within a few ulps of the true one: enough to tell it from 2**53.
    span = hi.astype(np.float64) - lo.astype(np.float64)
    if span.size and span.max() > EXACT_SPAN:
        j = int(np.argmax(span))
        label = plain(g.labels[np.flatnonzero(has)[j]])
        raise InputError(
            f"{name}: track {label!r}: integer times span {span[j]:.4g} units, more than 2**53, "
            "so float64 cannot hold their differences exactly; convert to a coarser unit or "
            "to float seconds first (int64 values near 2**63 are about 292 years of nanoseconds)"
        )
    starts = np.minimum(g.offsets[:-1], max(len(ik) - 1, 0))
    first = ik[starts] * has
    relative = (ik - np.repeat(first, counts)).astype(np.float64) / per_unit
    return relative, first.astype(np.float64) / per_unit


def plain(label: Any) -> Any:
    """Return a NumPy scalar label as the Python value it holds (3, not np.int64(3))."""
    return label.item() if isinstance(label, np.generic) else label


def as_positions(x: Any, n: int, name: str = "positions") -> F64:
    """Return positions as a contiguous float64 (n, 2) or (n, 3) array."""
    arr = _real(name, x)
    if arr.ndim != 2 or arr.shape[1] not in (2, 3):
        raise InputError(f"{name}: expected shape (n, 2) or (n, 3), got {arr.shape}")
    if arr.shape[0] != n:
        raise InputError(f"{name}: has {arr.shape[0]} rows but t has {n}")
    return arr


class Grouping:
    """How the caller's rows split into tracks: the one grouping every layer uses.

    The kernels see each track's rows together and in time order ("kernel rows"); the caller
    keeps its own row order. ``order[i]`` is the caller row of kernel row ``i`` and ``inverse``
    the reverse map; both are None when the caller's rows already are grouped and in time order.
    Both directions are parallel gathers in Rust (:func:`osculate._core.take_rows`).

    Build one with :meth:`from_offsets`, :meth:`from_codes` or :func:`group_rows` (from ids).
    ``naming`` (for DataFrame callers) tells :func:`relabel` the columns and row labels.
    """

    __slots__ = ("codes", "inverse", "labels", "naming", "offsets", "order")

    def __init__(
        self,
        offsets: npt.NDArray[np.int64],
        order: np.ndarray | None,
        labels: np.ndarray,
        inverse: np.ndarray | None = None,
        naming: Naming | None = None,
        codes: np.ndarray | None = None,
    ) -> None:
        self.offsets = offsets
        # Track position of every caller row, when the caller gave one per row.
        self.codes = codes
        self.order = None if order is None else _as_rows(order)
        if self.order is not None and inverse is None:
            inverse = np.empty_like(self.order)
            inverse[self.order] = np.arange(len(self.order))
        self.inverse = None if inverse is None else _as_rows(inverse)
        self.labels = labels
        self.naming = naming

    @classmethod
    def from_offsets(cls, offsets: Any, labels: np.ndarray | None = None) -> Grouping:
        """Rows already grouped: track k is rows ``offsets[k]:offsets[k + 1]``."""
        off = np.asarray(offsets)
        if off.dtype.kind not in "iu":
            raise TypeError(f"offsets: expected integers, got dtype {off.dtype}")
        if off.ndim != 1:
            raise InputError(f"offsets: expected a 1-D array, got shape {off.shape}")
        if off.dtype.kind == "u" and off.size and off.max() > np.iinfo(np.int64).max:
            raise InputError(f"offsets: {int(off.max())} is beyond any row count")
        off = np.ascontiguousarray(off, dtype=np.int64)
        return cls(off, None, np.arange(max(len(off) - 1, 0)) if labels is None else labels)

    @classmethod
    def from_codes(cls, codes: np.ndarray, labels: np.ndarray, key: Any = None) -> Grouping:
        """Rows with track codes ``0 <= code < len(labels)``, put in ``key`` (time) order per track.

        Equal to a stable sort by (code, key); O(n) when each track's rows are in time order.
        """
        key_arr = None
        if key is not None:
            key_arr = np.asarray(key)
            kind = key_arr.dtype.kind
            key_arr = np.ascontiguousarray(key_arr, np.int64 if kind in "iuMm" else np.float64)
        codes = np.ascontiguousarray(codes, dtype=np.int64)
        order, inverse, off = _core.group_rows(codes, len(labels), key_arr)
        return cls(off.astype(np.int64), order, labels, inverse, codes=codes.view(np.intp))

    @property
    def n_tracks(self) -> int:
        """Number of tracks."""
        return len(self.offsets) - 1

    @property
    def names(self) -> np.ndarray:
        """Track labels as messages show them (the caller's, also when ``labels`` are codes)."""
        named = None if self.naming is None else self.naming.labels
        return self.labels if named is None else np.asarray(named, dtype=object)

    def to_kernel(self, a: np.ndarray) -> np.ndarray:
        """Caller rows → kernel rows."""
        return a if self.order is None else _take(a, self.order)

    def to_caller(self, a: np.ndarray) -> np.ndarray:
        """Kernel rows → caller rows."""
        return a if self.inverse is None else _take(a, self.inverse)

    def caller_row(self, row: int) -> int:
        """Return the caller's row of kernel row ``row``."""
        return row if self.order is None else int(self.order[row])

    def caller_rows(self, rows: np.ndarray) -> npt.NDArray[np.int64]:
        """Return the caller's rows of kernel rows ``rows`` (an integer array)."""
        rows = np.asarray(rows, dtype=np.int64)
        return rows if self.order is None else self.order[rows].astype(np.int64)

    def row_codes(self) -> npt.NDArray[np.intp]:
        """Track position (0 .. n_tracks - 1) of every caller row."""
        if self.codes is not None:
            return self.codes
        codes = np.repeat(np.arange(self.n_tracks), np.diff(self.offsets))
        return self.to_caller(codes)


def _as_rows(index: np.ndarray) -> npt.NDArray[np.intp]:
    """Row numbers as intp (Rust hands out usize; same bits, no copy)."""
    index = np.ascontiguousarray(index)
    if index.dtype == np.uintp:
        return index.view(np.intp)
    return np.ascontiguousarray(index, dtype=np.intp)


def _take(a: np.ndarray, index: npt.NDArray[np.intp]) -> np.ndarray:
    """``a[index]`` along the first axis: a parallel gather in Rust where the dtype allows."""
    if (
        isinstance(a, np.ndarray)
        and a.dtype.kind in "fiub"
        and a.dtype.itemsize in (1, 4, 8)
        and a.dtype.isnative
        and a.ndim >= 1
        and a.size > 0
        and a.flags.c_contiguous
        and not (a.dtype.kind == "u" and a.dtype.itemsize != 1)
        and not (a.dtype.kind == "i" and a.dtype.itemsize == 1)
    ):
        return _core.take_rows(a, index.view(np.uintp))
    return np.ascontiguousarray(np.asarray(a)[index])


def track_time_order(
    codes: npt.NDArray[np.intp], key: np.ndarray, n_tracks: int
) -> npt.NDArray[np.intp] | None:
    """Permutation that sorts rows stably by (track code, time key); None if they already are.

    Equal to ``numpy.lexsort((key, codes))``; see :meth:`Grouping.from_codes`.
    """
    return Grouping.from_codes(codes, np.arange(n_tracks), key).order


def group_rows(n: int, tracks: Any = None, offsets: Any = None, t: Any = None) -> Grouping:
    """Split ``n`` rows into tracks given per-row ids (any order) or row offsets.

    With ids and times ``t``, the rows of each track are put in time order (stable), as the
    DataFrame accessor does: a log's rows may come in any order. With offsets the caller states
    the layout, and times must already increase within each track. ``tracks`` may also be a
    :class:`Grouping` made by a caller that grouped its rows itself.
    """
    if tracks is not None and offsets is not None:
        raise InputError("tracks, offsets: give one of them, not both")
    if isinstance(tracks, Grouping):  # made by a caller that already grouped (the accessor)
        if tracks.offsets[-1] != n:
            raise InputError(f"tracks: the grouping holds {tracks.offsets[-1]} rows, not {n}")
        return tracks
    if offsets is not None:
        return Grouping.from_offsets(offsets)
    if tracks is None:
        return Grouping(np.array([0, n], dtype=np.int64), None, np.array([0]))
    try:
        ids = np.asarray(tracks)
    except ValueError as exc:  # ragged nested sequences
        raise InputError(
            f"tracks: expected one id per row, got a ragged sequence ({exc})"
        ) from None
    if ids.ndim != 1 or len(ids) != n:
        raise InputError(f"tracks: expected one id per row ({n}), got shape {ids.shape}")
    if n == 0:
        return Grouping(np.array([0, 0], dtype=np.int64), None, np.array([0]))
    if ids.dtype.kind == "f" and np.isnan(ids).any():
        raise InputError(
            f"tracks: row {int(np.argmax(np.isnan(ids)))}: the track id is missing (NaN)"
        )
    if ids.dtype.kind == "O":
        labels, codes = _factorize_objects(ids)
    else:
        labels, codes = _integer_codes(ids) if ids.dtype.kind in "iu" else (None, None)
        if labels is None:
            labels, codes = np.unique(ids, return_inverse=True)
            codes = codes.reshape(-1)
    return Grouping.from_codes(codes, labels, None if t is None else t)


def _integer_codes(ids: np.ndarray) -> tuple[np.ndarray | None, np.ndarray | None]:
    """Return sorted labels and codes of integer ids in O(n), or (None, None).

    A presence table instead of the sort of :func:`numpy.unique`, for ids spanning a range up
    to 4 times their count.
    """
    lo, hi = ids.min(), ids.max()
    span = int(hi) - int(lo) + 1
    if span > 4 * len(ids) + 1024:
        return None, None
    rel = (ids - lo).astype(np.intp)
    present = np.zeros(span, dtype=bool)
    present[rel] = True
    code_of = np.cumsum(present, dtype=np.intp) - 1
    labels = (np.flatnonzero(present) + lo).astype(ids.dtype)
    return labels, code_of[rel]


def _factorize_objects(ids: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Labels and codes of object ids, each id keeping its type (1 and "1" are two tracks).

    The same rule as the DataFrame accessor: sorted labels when the ids can be sorted, else
    first-seen order; a missing id (None, NaN) is an error naming the row.
    """
    try:
        import pandas as pd
    except ImportError:  # pragma: no cover - the test environment has pandas
        raise InputError(
            "tracks: ids of mixed or object types need pandas to keep them apart "
            "(pip install 'osculate[pandas]'), or pass one NumPy dtype (integers or strings)"
        ) from None
    try:
        codes, uniques = pd.factorize(ids, sort=True)
    except TypeError:  # labels of mixed types cannot be sorted: first-seen order
        codes, uniques = pd.factorize(ids, sort=False)
    if len(codes) and codes.min() < 0:
        raise InputError(f"tracks: row {int(np.argmax(codes < 0))}: the track id is missing")
    labels = np.empty(len(uniques), dtype=object)
    labels[:] = list(uniques)
    return labels, np.asarray(codes, dtype=np.intp)


class Naming:
    """How messages name a DataFrame caller's things: columns for arguments, index labels for rows.

    Parameters
    ----------
    columns : mapping of str to label
        The caller's column behind each kernel argument name (``"t"``, ``"positions"``, ...).
    index : sequence
        The caller's row labels (the DataFrame index), by position.
    by : label
        The column of the track ids.
    order : ndarray of int, optional
        The caller's row position of each kernel row, when the caller grouped its rows itself
        and hands the kernels grouped arrays.
    labels : sequence, optional
        The caller's track labels, when the grouping's own labels are codes.
    """

    __slots__ = ("by", "columns", "index", "labels", "order")

    def __init__(
        self, columns: dict[str, Any], index: Any, by: Any, order: Any = None, labels: Any = None
    ) -> None:
        self.columns, self.index, self.by, self.order = columns, index, by, order
        self.labels = labels

    def position(self, row: int) -> int:
        """Return the caller's row position of kernel row ``row``."""
        return row if self.order is None else int(self.order[row])


def relabel(err: Any, grouping: Grouping | None) -> Any:
    """Return a kernel error re-worded once with the caller's track labels and rows.

    The one place where kernel errors get the caller's names: the track label for the batch
    position, the caller's row for the kernel row, and with :attr:`Grouping.naming` the column
    and the index label. With ``grouping`` None the kernel's rows are the caller's and there are
    no tracks: a row error reads ``"argument: row R: ..."``. Other errors are returned as they
    are.
    """
    if grouping is None:
        row = getattr(err, "row", None)
        if row is None:
            return err
        new = InputError(f"{err.argument}: row {row}: {err.detail}")
        new.argument, new.track, new.row, new.detail = err.argument, None, row, err.detail
        return new
    track = getattr(err, "track", None)
    if track is None or not 0 <= track < len(grouping.labels):
        return err
    label = plain(grouping.names[track])
    row = getattr(err, "row", None)
    argument, detail = err.argument, err.detail
    naming = grouping.naming
    if naming is None:
        caller = None if row is None else grouping.caller_row(row)
        where = f"track {label!r}" + ("" if caller is None else f", row {caller}")
        new = InputError(f"{argument}: {where}: {detail}")
        new.argument, new.track, new.row, new.detail = argument, track, caller, detail
        return new
    if row is not None:
        pos = naming.position(row)
        column = naming.columns.get(argument, argument)
        name = plain(naming.index[pos])
        new = InputError(f"column {column!r}, row {name!r} (track {label!r}): {detail}")
        new.argument, new.row = str(column), pos
    else:
        name = plain(naming.index[naming.position(int(grouping.offsets[track]))])
        new = InputError(f"track {label!r} (column {naming.by!r}, first row {name!r}): {detail}")
        new.argument, new.row = str(naming.by), None
    new.track, new.detail = label, detail
    setattr(new, "label", name)  # noqa: B010  (InputError has no declared `label`)
    return new


def call_kernel(grouping: Grouping | None, fn: Callable[..., T], *args: Any, **kwargs: Any) -> T:
    """Call a kernel; its errors are re-worded once by :func:`relabel`."""
    try:
        return fn(*args, **kwargs)
    except InputError as err:
        raise relabel(err, grouping) from None
