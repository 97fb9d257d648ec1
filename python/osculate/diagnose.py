"""Warnings for data that look wrong: interleaved objects, unit mistakes, noise for fd."""

from __future__ import annotations

import warnings

import numpy as np
import numpy.typing as npt

from . import _core

__all__ = ["SuspectDataWarning", "check_tracks", "track_names"]

#: No tracked object moves faster than Earth's escape speed, 11.2 km/s (common practice); a
#: median step speed above this in metres per second is a unit mistake (e.g. millimetres).
MAX_PLAUSIBLE_SPEED = 12_000.0
#: For one object, the nearest of the rows 2 to :data:`INTERLEAVED_LAG` ahead is about twice as
#: far as the next row while moving, and 0.45 times as far while standing in Gaussian noise (the
#: median of the smallest of five Rayleigh distances); far less means the rows come back to where
#: they were after a few others, as rows of several interleaved objects do.
INTERLEAVED_RATIO = 0.2
#: The most objects whose interleaved rows are recognised (the kernel's search depth).
INTERLEAVED_LAG = 6
#: fd is useless when the noise of its r″ exceeds this fraction of the typical |r″|.
FD_NOISE_RATIO = 0.3
#: Share of a track flagged VAGUE or GAP beyond which the track is reported (INVALID rows are
#: the input's own NaN, visible to the caller already).
MOSTLY_FLAGGED = 0.5


class SuspectDataWarning(UserWarning):
    """The data look wrong for the analysis asked for; the message says why and what to do.

    Raised by :func:`osculate.kinematics` (and everything built on it) and printed by the
    command line. Silence it with :func:`warnings.filterwarnings` once the cause is understood.
    """


def track_names(labels: np.ndarray, bad: npt.NDArray[np.bool_]) -> str:
    """Return the labels of the tracks ``bad`` for a message (the first five, and how many more)."""
    shown = [str(v) for v in labels[bad][:5]]
    more = int(bad.sum()) - len(shown)
    return ", ".join(shown) + (f" and {more} more" if more > 0 else "")


def check_tracks(
    t: npt.NDArray[np.float64],
    x: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    labels: np.ndarray,
    flags: npt.NDArray[np.uint8],
    noise: npt.NDArray[np.float64],
    method: str,
) -> None:
    """Warn (:class:`SuspectDataWarning`) about tracks whose data look wrong (kernel row order).

    Parameters
    ----------
    t, x, flags
        Times, measured positions and flags of every row, tracks contiguous.
    offsets : ndarray of int
        Row offsets of the tracks.
    labels : ndarray
        Track labels, for the messages.
    noise : ndarray
        Position noise per track seen by the estimator (NaN: unknown).
    method : str
        The estimator.
    """
    m = len(offsets) - 1
    if m == 0 or len(t) < 3:
        return
    with np.errstate(all="ignore"):  # huge or tiny coordinates: the comparisons stay valid
        findings = _findings(t, x, offsets, flags, noise, method)
    for bad, message in findings:
        if bad.any():
            warning = SuspectDataWarning(f"track(s) {track_names(labels, bad)}: {message}")
            # Batch positions and reason, for callers that name the tracks their own way.
            warning.tracks, warning.reason = np.flatnonzero(bad), message
            warnings.warn(warning, stacklevel=3)


def _findings(
    t: npt.NDArray[np.float64],
    x: npt.NDArray[np.float64],
    offsets: npt.NDArray[np.int64],
    flags: npt.NDArray[np.uint8],
    noise: npt.NDArray[np.float64],
    method: str,
) -> list[tuple[npt.NDArray[np.bool_], str]]:
    """Per check, the tracks that fail it and what to tell the caller."""
    st = _core.track_stats(t, x, offsets, np.ascontiguousarray(flags, dtype=np.uint8))
    m = len(offsets) - 1
    counts = np.diff(offsets)
    step = st["step"]
    interleaved = (counts >= 10) & (step > 0) & (st["back"] < INTERLEAVED_RATIO * step)
    fast = st["speed"] > MAX_PLAUSIBLE_SPEED
    noisy_fd = np.zeros(m, bool)
    if method == "fd":
        # Noise at the level of rounding (exact or simulated data) is no reason to warn. The
        # 3-point r″ of a uniform grid has the weights (1, −2, 1)/h²: standard error √6 σ/h².
        real = (noise > 1e-9 * step) & (step > 0) & (counts >= 10)
        noisy_fd = real & (np.sqrt(6.0) * noise / st["dt"] ** 2 > FD_NOISE_RATIO * st["accel"])
        if noisy_fd.any():
            # Positions far from the origin (ECEF metres) carry rounding of about ε·|x|; noise
            # within 16 times that is rounding too (looked at only when the check would fire).
            has = counts > 0
            mag = np.fmax.reduce(np.abs(x), axis=1) if len(x) else np.zeros(0)
            scale = np.zeros(m)
            scale[has] = np.fmax.reduceat(mag, offsets[:-1][has])
            noisy_fd &= noise > 16.0 * np.finfo(np.float64).eps * scale
    mostly = (st["flagged"] > MOSTLY_FLAGGED) & (counts >= 20)
    return [
        (
            interleaved,
            "the rows jump away and come back a few rows later (the nearest of the next "
            f"{INTERLEAVED_LAG} rows is typically under {INTERLEAVED_RATIO:.0%} of the step to the "
            "next row), as if several objects were interleaved; give tracks= (by=, --track) to "
            "separate them",
        ),
        (
            fast,
            f"the median speed between samples is up to {np.nanmax(st['speed'], initial=0):.3g} "
            "position units per time unit, faster than anything tracked in metres per second; "
            "check the units (millimetres given as metres, or milliseconds as seconds?)",
        ),
        (
            noisy_fd,
            f"with noise of up to {np.nanmax(noise, initial=0):.3g} position units, finite "
            "differences give accelerations that are mostly noise (their standard error is over "
            "30 % of the typical |r″|); use method='smooth' or 'local'",
        ),
        (
            mostly,
            "more than half of the samples are flagged VAGUE or GAP; the figures of these tracks "
            "rest on few samples",
        ),
    ]
