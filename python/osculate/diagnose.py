"""Warnings for data that look wrong: interleaved objects, unit mistakes, noise for fd."""

from __future__ import annotations

import os
import sys
import warnings

import numpy as np
import numpy.typing as npt

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
    labels: np.ndarray,
    stats: dict[str, np.ndarray],
    noise: npt.NDArray[np.float64],
    method: str,
    used: str,
) -> None:
    """Warn (:class:`SuspectDataWarning`) about tracks whose data look wrong.

    Parameters
    ----------
    labels : ndarray
        Track labels, for the messages.
    stats : dict of ndarray
        The kernel's per-track statistics (``step``, ``back``, ``speed``, ``flagged``, and
        ``fd_swamped``: finite differences would give accelerations that are mostly noise).
    noise : ndarray
        Position noise per track seen by the estimator (NaN: unknown).
    method, used : str
        The estimator asked for and the one used (they differ when ``"auto"`` chose).
    """
    if len(labels) == 0:
        return
    with np.errstate(all="ignore"):  # huge or tiny coordinates: the comparisons stay valid
        findings = _findings(stats, noise, method, used)
    for bad, message in findings:
        if bad.any():
            warning = SuspectDataWarning(f"track(s) {track_names(labels, bad)}: {message}")
            # Batch positions and reason, for callers that name the tracks their own way.
            warning.tracks, warning.reason = np.flatnonzero(bad), message
            warnings.warn(warning, stacklevel=_caller_level())


def _caller_level() -> int:
    """``stacklevel`` of the first frame outside this package (the caller's own line)."""
    package = os.path.dirname(os.path.abspath(__file__))
    frame, level = sys._getframe(1), 1
    while frame is not None and os.path.abspath(frame.f_code.co_filename).startswith(package):
        frame, level = frame.f_back, level + 1
    return level


def _findings(
    st: dict[str, np.ndarray], noise: npt.NDArray[np.float64], method: str, used: str
) -> list[tuple[npt.NDArray[np.bool_], str]]:
    """Per check, the tracks that fail it and what to tell the caller."""
    counts = st["count"]
    step = st["step"]
    interleaved = (counts >= 10) & (step > 0) & (st["back"] < INTERLEAVED_RATIO * step)
    fast = st["speed"] > MAX_PLAUSIBLE_SPEED
    swamped = st["fd_swamped"] & (method in ("fd", "auto"))
    noisy = (
        f"with noise of up to {np.nanmax(noise, initial=0):.3g} position units, finite "
        "differences give accelerations that are mostly noise (their standard error is over "
        "30 % of the typical |r″|); "
        + (
            "use method='smooth' or 'local'"
            if method == "fd"
            else f"method='auto' used {used!r} for every track of this call (choose with method=)"
        )
    )
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
        (swamped, noisy),
        (
            mostly,
            "more than half of the samples are flagged VAGUE or GAP; the figures of these tracks "
            "rest on few samples",
        ),
    ]
