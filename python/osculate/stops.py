"""Stops as intervals: where a track stands still, from its STOPPED samples and held positions."""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np
import numpy.typing as npt

from . import _core

__all__ = ["Stops", "find_stops", "kernel_stops", "stop_table"]


@dataclasses.dataclass(frozen=True)
class Stops:
    """Intervals where a track stands still, one row per stop, ordered by track and time.

    Attributes
    ----------
    track : ndarray
        Track label of each stop (the row index 0 for a single track).
    start, end : ndarray of float
        Times of the first and last sample of the stop (input time units).
    duration : ndarray of float
        ``end - start``.
    position : ndarray, shape (m, dim)
        Mean measured position while stopped.
    samples : ndarray of int
        Samples in the stop.
    first_row, last_row : ndarray of int
        Positions (0-based, in the caller's row order) of the first and last sample.
    track_index : ndarray of int
        Position of the track among the tracks (0-based, the order of ``summary()``).
    """

    track: np.ndarray
    start: npt.NDArray[np.float64]
    end: npt.NDArray[np.float64]
    duration: npt.NDArray[np.float64]
    position: npt.NDArray[np.float64]
    samples: npt.NDArray[np.int64]
    first_row: npt.NDArray[np.int64]
    last_row: npt.NDArray[np.int64]
    track_index: npt.NDArray[np.int64]

    @classmethod
    def none(cls, dim: int) -> Stops:
        """No stops (paths of ``dim`` coordinates)."""
        empty = np.zeros(0, np.int64)
        return cls(empty, empty * 0.0, empty * 0.0, empty * 0.0, np.zeros((0, dim)), *[empty] * 4)

    def __len__(self) -> int:
        return len(self.start)

    def __getitem__(self, name: str) -> np.ndarray:
        return getattr(self, name)  # type: ignore[no-any-return]

    def columns(self) -> dict[str, np.ndarray]:
        """Return the stops as flat columns (``position_x``, ``position_y`` [, ``position_z``])."""
        cols: dict[str, np.ndarray] = {"track": self.track, "start": self.start, "end": self.end}
        cols["duration"] = self.duration
        for j, axis in enumerate("xyz"[: self.position.shape[1]]):
            cols[f"position_{axis}"] = self.position[:, j]
        cols["samples"] = self.samples
        return cols

    def to_pandas(self) -> Any:
        """Return the stops as a :class:`pandas.DataFrame` (columns of :meth:`columns`)."""
        import pandas as pd

        return pd.DataFrame(self.columns())


def find_stops(
    t: npt.NDArray[np.float64],
    x: npt.NDArray[np.float64],
    flags: npt.NDArray[np.uint8],
    offsets: npt.NDArray[np.int64],
    noise: npt.NDArray[np.float64],
    min_stop: float | None = None,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Stop intervals of tracks stored contiguously (kernel row order).

    Parameters
    ----------
    t, x, flags
        Times, measured positions and flags of every row, tracks contiguous.
    offsets : ndarray of int, shape (m + 1,)
        Row offsets of the tracks.
    noise : ndarray, shape (m,)
        Position noise per track (NaN: unknown).
    min_stop : float, optional
        Shortest stop (time units); default five mean time steps of the track.

    Returns
    -------
    first, last, code : ndarray of int
        Kernel rows of the first and last sample of each stop, and its track number.

    Notes
    -----
    Runs of STOPPED samples that are not INVALID (moving gaps of at most two samples bridged)
    are stop candidates. Consecutive runs of a track join when every sample between them, and
    the centre of the shorter run, lie within three noise levels of the centre of the longer one
    (inside a stop, a spline's speed can ring just above the significance threshold after an
    abrupt halt; the positions show that the object never left). Candidates lasting at least
    ``min_stop`` are stops. Their ends are then trimmed inwards past samples whose measured
    position lies more than three noise levels from the stop's mean position (the smoothed
    speed reaches zero a moment before the object does), and consecutive stops of a track that
    then touch or lie at the same place (centres within that distance) merge. The position test
    is common practice for stay-point detection, here with the radius taken from the estimated
    noise instead of a fixed distance. (Extending the ends over neighbours that stay within the
    radius was tried and dropped: at 5 cm noise and 10 Hz it swallowed the last samples of a
    braking vehicle still moving at 0.6–0.9 m/s.) Unknown noise: no joining, no trimming.

    The work is done by the Rust kernel ``osculate::stops::find_stops``, one track at a time
    and tracks in parallel, with the interpreter released. ``min_stop`` must be >= 0
    (``inf``: no stops).

    Examples
    --------
    A 1 s clock, rows 3..9 STOPPED with row 6 moving (a bridged gap), a second track of
    one sample (no mean step, so no default shortest stop):

    >>> import numpy as np
    >>> t = np.r_[np.arange(14.0), 0.0]
    >>> x = np.column_stack([t, np.zeros(15)])
    >>> flags = np.zeros(15, np.uint8)
    >>> flags[[3, 4, 5, 7, 8, 9, 14]] = 1
    >>> first, last, code = find_stops(t, x, flags, np.array([0, 14, 15]), np.full(2, np.nan))
    >>> first.tolist(), last.tolist(), code.tolist()
    ([3], [9], [0])
    >>> find_stops(t, x, flags, np.array([0, 14, 15]), np.full(2, np.nan), 0.0)[2].tolist()
    [0, 1]
    """
    return _core.find_stops(
        np.ascontiguousarray(t, np.float64),
        np.ascontiguousarray(x, np.float64),
        np.ascontiguousarray(flags, np.uint8),
        np.ascontiguousarray(offsets, np.int64),
        np.ascontiguousarray(noise, np.float64),
        None if min_stop is None else float(min_stop),
    )


def stop_table(
    t: np.ndarray,
    x: np.ndarray,
    first: np.ndarray,
    last: np.ndarray,
    code: np.ndarray,
    labels: np.ndarray,
    order: np.ndarray | None,
) -> Stops:
    """Return the stops of :func:`find_stops` as a table (``order``: kernel → caller rows)."""
    if len(first) == 0:
        return Stops.none(x.shape[1])
    caller = (lambda r: r) if order is None else (lambda r: order[r])
    return Stops(
        track=labels[code],
        start=t[first],
        end=t[last],
        duration=t[last] - t[first],
        position=_centres(x, first, last),
        samples=(last - first + 1).astype(np.int64),
        first_row=np.asarray(caller(first), np.int64),
        last_row=np.asarray(caller(last), np.int64),
        track_index=code.astype(np.int64),
    )


def kernel_stops(
    t: np.ndarray, found: dict[str, np.ndarray], labels: np.ndarray, order: np.ndarray | None
) -> Stops:
    """Return the stops the kinematics kernel found as a table.

    ``found`` holds kernel rows ``first`` and ``last``, track codes ``track`` and mean positions
    ``centre``; ``t`` is on the caller's rows and ``order`` maps kernel → caller rows (None: the
    same).
    """
    first, last, code = found["first"], found["last"], found["track"]
    if len(first) == 0:
        return Stops.none(found["centre"].shape[1])
    first_row = first if order is None else order[first].astype(np.int64)
    last_row = last if order is None else order[last].astype(np.int64)
    start, end = t[first_row], t[last_row]
    return Stops(
        track=labels[code],
        start=start,
        end=end,
        duration=end - start,
        position=found["centre"],
        samples=last - first + 1,
        first_row=first_row,
        last_row=last_row,
        track_index=code,
    )


def _centres(x: np.ndarray, first: np.ndarray, last: np.ndarray) -> np.ndarray:
    """Mean finite position of rows ``first[i]..last[i]`` (inf or NaN if the sums overflow)."""
    finite = np.isfinite(x).all(axis=1)
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
        cs = np.cumsum(np.where(finite[:, None], x, 0), 0)
        cs = np.concatenate([np.zeros((1, x.shape[1])), cs])
        cn = np.concatenate([[0], np.cumsum(finite)])
        cnt = (cn[last + 1] - cn[first]).astype(float)
        return (cs[last + 1] - cs[first]) / cnt[:, None]  # type: ignore[no-any-return]
