"""The NumPy implementation of ``osculate.stops.find_stops`` before it moved to Rust.

Kept verbatim (constants, ``find_stops`` and its helpers, as they stood in
``python/osculate/stops.py``) as the reference the kernel is checked against in
``tests/test_stops_kernel.py``. Not imported by the package.
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt
from osculate.flags import Flag

#: Runs of moving samples at most this long between two stopped runs are bridged.
MERGE_SAMPLES = 2
#: Minimum stop duration, in mean time steps of the track, when none is given.
MIN_STOP_STEPS = 5.0
#: A sample holds a stop's position when it lies within this many noise levels of its centre
#: (for 2-D or 3-D Gaussian noise, |e|/σ exceeds 3 with probability 1.1 % or 2.9 %, the
#: Rayleigh and Maxwell tails: the same significance as the speed test).
HOLD_NOISE = 3.0


def _runs(on: npt.NDArray[np.bool_], code: npt.NDArray[np.intp]) -> tuple[np.ndarray, np.ndarray]:
    """First and last index of each maximal run of ``on`` within one value of ``code``."""
    n = len(on)
    if n == 0:
        return np.zeros(0, np.intp), np.zeros(0, np.intp)
    brk = np.ones(n + 1, bool)
    brk[1:-1] = (on[1:] != on[:-1]) | (code[1:] != code[:-1])
    starts = np.flatnonzero(brk[:-1])
    ends = np.flatnonzero(brk[1:])
    keep = on[starts]
    return starts[keep], ends[keep]


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
    Runs of STOPPED samples (moving gaps of at most two samples bridged) are stops when they last
    at least ``min_stop``. Their ends are then trimmed inwards past samples whose measured
    position lies more than three noise levels from the stop's mean position (the smoothed
    speed reaches zero a moment before the object does), and consecutive stops of a track at
    the same place (centres within that distance) merge. The position test is common practice
    for stay-point detection, here with the radius taken from the estimated noise instead of a
    fixed distance. (Extending the ends over neighbours that stay within the radius was tried and
    dropped: at 5 cm noise and 10 Hz it swallowed the last samples of a braking vehicle still
    moving at 0.6–0.9 m/s.)
    """
    n = len(t)
    counts = np.diff(offsets)
    code = np.repeat(np.arange(len(counts)), counts)
    stopped = (flags & np.uint8(Flag.STOPPED)) != 0
    stopped &= (flags & np.uint8(Flag.INVALID)) == 0
    # Bridge short moving runs between stopped runs of the same track.
    moving_first, moving_last = _runs(~stopped, code)
    inner = (moving_first > 0) & (moving_last < n - 1)
    mf, ml = moving_first[inner], moving_last[inner]
    bridge = (
        (ml - mf + 1 <= MERGE_SAMPLES)
        & stopped[mf - 1]
        & stopped[ml + 1]
        & (code[mf - 1] == code[ml + 1])
    )
    if bridge.any():
        lengths = ml[bridge] - mf[bridge] + 1
        rows = np.repeat(mf[bridge], lengths) + _ramp(lengths)
        stopped[rows] = True
    first, last = _runs(stopped, code)
    first, last = _join_held(x, code, noise, first, last)
    step = np.full(len(counts), np.nan)
    ok = counts > 1
    step[ok] = (t[offsets[1:][ok] - 1] - t[offsets[:-1][ok]]) / (counts[ok] - 1)
    shortest = MIN_STOP_STEPS * step[code[first]] if min_stop is None else float(min_stop)
    long_enough = (t[last] - t[first]) >= shortest
    first, last = first[long_enough], last[long_enough]
    if len(first) == 0:
        return first, last, code[first]
    first, last = _hold(t, x, code, offsets, noise, first, last)
    return first, last, code[first]


def _ramp(lengths: np.ndarray) -> np.ndarray:
    """0..len−1 for each length, concatenated."""
    total = int(lengths.sum())
    starts = np.repeat(np.cumsum(lengths) - lengths, lengths)
    return np.arange(total) - starts


def _centres(x: np.ndarray, first: np.ndarray, last: np.ndarray) -> np.ndarray:
    """Mean finite position of rows ``first[i]..last[i]`` (inf or NaN if the sums overflow)."""
    finite = np.isfinite(x).all(axis=1)
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
        cs = np.cumsum(np.where(finite[:, None], x, 0), 0)
        cs = np.concatenate([np.zeros((1, x.shape[1])), cs])
        cn = np.concatenate([[0], np.cumsum(finite)])
        cnt = (cn[last + 1] - cn[first]).astype(float)
        return (cs[last + 1] - cs[first]) / cnt[:, None]  # type: ignore[no-any-return]


def _join_held(
    x: np.ndarray, code: np.ndarray, noise: np.ndarray, first: np.ndarray, last: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Join consecutive runs of a track that hold one position.

    Runs join when every sample between them, and the centre of the shorter run, lie within
    :data:`HOLD_NOISE` noise levels of the centre of the longer run.

    Inside a stop, a spline's speed can ring just above the significance threshold after an
    abrupt halt, splitting the stop into pieces shorter than the minimum duration; the positions
    show that the object never left.
    """
    if len(first) < 2:
        return first, last
    centre = _centres(x, first, last)
    radius = HOLD_NOISE * noise[code[first]]
    gap_first, gap_last = last[:-1] + 1, first[1:] - 1
    same = code[first[1:]] == code[first[:-1]]
    size = last - first
    ref = np.where(size[1:] > size[:-1], np.arange(1, len(first)), np.arange(len(first) - 1))
    # Largest distance of the rows between run i and i + 1 from the centre of the longer one.
    lengths = np.maximum(gap_last - gap_first + 1, 0)
    rows = np.repeat(gap_first, lengths) + _ramp(lengths)
    owner = np.repeat(np.arange(len(lengths)), lengths)
    d = np.hypot.reduce(x[rows] - centre[ref[owner]], axis=1) if len(rows) else np.zeros(0)
    far = np.zeros(len(lengths), bool)
    np.logical_or.at(far, owner, ~(d <= radius[ref[owner]]))
    apart = np.hypot.reduce(centre[1:] - centre[:-1], axis=1)
    join = np.zeros(len(first), bool)
    join[1:] = same & ~far & (apart <= radius[ref])
    starts = np.flatnonzero(~join)
    return first[starts], np.maximum.reduceat(last, starts)


def _hold(
    t: np.ndarray,
    x: np.ndarray,
    code: np.ndarray,
    offsets: np.ndarray,
    noise: np.ndarray,
    first: np.ndarray,
    last: np.ndarray,
) -> tuple[np.ndarray, np.ndarray]:
    """Trim stop ends to samples that hold the stop's position; merge stops at one place."""
    n = len(t)
    centre = _centres(x, first, last)
    known = HOLD_NOISE * noise[code[first]]
    # Unknown noise: no trimming (every sample holds) and no merging by place.
    radius = np.where(np.isfinite(known), known, np.inf)
    idx = np.arange(n)
    # Every row from a stop's first sample on belongs to that stop (until the next one starts).
    own = np.searchsorted(first, idx, side="right") - 1
    ok = own >= 0
    own = np.maximum(own, 0)
    d = np.hypot.reduce(x - centre[own], axis=1)  # scale-safe
    held = ok & (code[first[own]] == code) & (d <= radius[own])
    next_held = np.minimum.accumulate(np.where(held, idx, n)[::-1])[::-1]
    prev_held = np.maximum.accumulate(np.where(held, idx, -1))
    new_first, new_last = next_held[first], prev_held[last]
    kept = new_first <= new_last
    first, last, centre = new_first[kept], new_last[kept], centre[kept]
    radius = np.where(np.isfinite(known), known, 0.0)[kept]
    if len(first) == 0:
        return first, last
    # Consecutive stops of one track merge when the gap is tiny or the place is the same.
    same_track = code[first[1:]] == code[first[:-1]]
    near = np.hypot.reduce(centre[1:] - centre[:-1], axis=1) <= radius[1:]
    touch = np.zeros(len(first), bool)
    touch[1:] = same_track & ((first[1:] <= last[:-1] + MERGE_SAMPLES + 1) | near)
    starts = np.flatnonzero(~touch)
    return np.minimum.reduceat(first, starts), np.maximum.reduceat(last, starts)
